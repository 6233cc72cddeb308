"""The diode physics core: pure numpy/scipy, SI units, vectorised over parts × corners.

Modules, one physical topic each:

- `constants`   -- CODATA constants, the 25 °C reference, °C ↔ K.
- `junction`    -- thermal voltage, saturation-current temperature scaling, the
  Shockley equation with series resistance, the Lambert-W load line, and
  `ForwardModel`, a part's forward branch with its hand-analysis tangent.
- `thermal`     -- allowed power and derating, the forward electrothermal
  fixed point (Newton), reverse-state thermal runaway (Lambert W).
- `leakage`     -- datasheet reverse leakage scaled in temperature and voltage.
- `zener`       -- the Zener breakdown branch with its knee, and the
  self-heated shunt-regulator operating point.
- `fit`         -- Is, n, Rs from datasheet (IF, VF) points.
- `eseries`     -- IEC 60063 preferred values and resistor power classes.

Nothing here imports Qt, SQLAlchemy or touches files (tests/test_layers.py).
"""
