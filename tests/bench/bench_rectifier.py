"""Benchmark of the AC rectifier's periodic steady state (SPEC §9).

1,000 candidates × 16 corners (Vac × load × ambient × capacitance ends), bridge topology,
invented pn and Schottky models: the self-heated periodic steady state
(`rectifier_operating_point`: the cycle at Ta, Tj from it, the cycle again at Tj) in one
vectorised call, against a per-part `scipy.integrate.solve_ivp` reference (the brute force
of tests/physics/rectifier_reference.py: many cycles until the waveform repeats) timed on a
few parts and scaled to 1,000. Target: ≤ 2 s, and ≥ 100× the reference.

Run: .venv/bin/python tests/bench/bench_rectifier.py [--reference-parts N]
Not collected by pytest.
"""

from __future__ import annotations

import itertools
import sys
import time
from pathlib import Path

import numpy as np

from partpick.physics.junction import ForwardModel
from partpick.physics.rectifier import periodic_steady_state, rectifier_operating_point

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "physics"))
from rectifier_reference import reference_cycle  # noqa: E402

PARTS = 1000


def make_inputs(seed=1):
    rng = np.random.default_rng(seed)
    schottky = rng.random(PARTS) < 0.3
    model = ForwardModel(
        saturation_current=np.where(schottky, 10 ** rng.uniform(-7, -5, PARTS), 10 ** rng.uniform(-10, -7, PARTS))[:, None],
        ideality=np.where(schottky, rng.uniform(1.0, 1.3, PARTS), rng.uniform(1.5, 2.0, PARTS))[:, None],
        series_resistance=rng.uniform(0.01, 0.1, PARTS)[:, None],
        band_gap=np.where(schottky, 0.69, 1.11)[:, None],
        temperature_exponent=np.where(schottky, 2.0, 3.0)[:, None],
    )
    rth = rng.uniform(20, 80, PARTS)[:, None]
    combos = np.array(list(itertools.product((10.8, 13.2), (0.2, 1.0), (273.15, 333.15), (1760e-6, 2640e-6))))
    vac, load, ambient, cap = (combos[:, i][None, :] for i in range(4))
    return model, rth, vac, load, ambient, cap


def vectorised(model, rth, vac, load, ambient, cap):
    return rectifier_operating_point("bridge", vac, 50.0, 0.5, cap, load, model, ambient, rth, 4.0)


def reference(model, rth, vac, load, ambient, cap, parts):
    """Per part and corner: the brute-force cycle at the junction temperature the vectorised solve found."""
    for p in range(parts):
        for k in range(vac.shape[1]):
            T = float(ambient[0, k])
            Is, n, Rs = model.at(T)
            reference_cycle("bridge", float(vac[0, k]), 50.0, 0.5, float(cap[0, k]), float(load[0, k]),
                            float(np.asarray(Is)[p, 0]), float(np.asarray(n)[p, 0]), float(np.asarray(Rs)[p, 0]), T,
                            samples=2001)


def main() -> None:
    ref_parts = int(sys.argv[sys.argv.index("--reference-parts") + 1]) if "--reference-parts" in sys.argv else 2
    inputs = make_inputs()
    times = []
    for _ in range(3):
        t = time.perf_counter()
        point = vectorised(*inputs)
        times.append(time.perf_counter() - t)
    best = min(times)
    cycle = point.cycle
    t = time.perf_counter()
    periodic_steady_state("bridge", inputs[2], 50.0, 0.5, inputs[5], inputs[3], *inputs[0].at(inputs[4]), inputs[4])
    one_pass = time.perf_counter() - t
    t = time.perf_counter()
    reference(*inputs, parts=ref_parts)
    per_part = (time.perf_counter() - t) / ref_parts
    steps = np.unique(cycle.steps, return_counts=True)
    print(f"{PARTS} parts × 16 corners, bridge, self-heated (two cycle solves): best {best:.2f} s "
          f"(runs {', '.join(f'{x:.2f}' for x in times)}; target ≤ 2 s)")
    print(f"  one cycle solve at fixed Tj: {one_pass:.2f} s; steps per window: "
          f"{dict(zip(steps[0].tolist(), steps[1].tolist()))}")
    print(f"solve_ivp reference: {per_part:.2f} s per part (16 corners, mean of {ref_parts}) → "
          f"{per_part * PARTS:.0f} s for {PARTS}; speed-up {per_part * PARTS / best:.0f}× (target ≥ 100×)")


if __name__ == "__main__":
    main()
