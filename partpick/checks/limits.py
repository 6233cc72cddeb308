"""Operating limits: how far each candidate can be pushed before a check fails (SPEC §3a).

For every candidate, by bisection vectorised over the candidates and run on
the role's own checks (all of them must pass), with the discrete choices of
the base check held fixed (`Role.choices`: the chosen E-series resistor and its
power class):

- ``max_ambient_C``: the highest ``ambient_max_C``, bracket [ambient_min_C, Tj max], to 0.1 K;
- ``max_load_A``: the highest ``load_max_A``, bracket [0, 10 × load_max_A], to 0.1 %;
- ``max_rth_ja_K_per_W``: the largest RthJA in use, bracket [0, 10 × RthJA in use], to 0.1 %;
- from the last, for a heatsink mount ``max_rth_sa_K_per_W`` (the smallest heatsink that
  holds: RthJA max − RthJC − RthCS) and for a board mount ``min_copper_area_mm2``
  (the ln-area line inverted; none "beyond the datasheet's range").

The three searches run side by side: the candidates are stacked three times
and every step is one call of the role's ``evaluate`` with per-candidate
`Overrides`. Nothing here knows a role: a new role gets its limits by
honouring `Overrides` in its ``evaluate``.

A limit is NaN where none exists (the part fails even at the bracket's lower
end), with a note saying so; a limit at the bracket's upper end holds at least
that far (noted).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from partpick.checks.results import object_array
from partpick.checks.roles.base import Overrides, Role, RoleResult
from partpick.physics.thermal_path import copper_area_for_thermal_resistance, heatsink_for_thermal_resistance

__all__ = ["OperatingLimits", "operating_limits", "all_pass", "LIMIT_KEYS", "AMBIENT_TOL_K", "RELATIVE_TOL"]

LIMIT_KEYS = ("max_ambient_C", "max_load_A", "max_rth_ja_K_per_W", "max_rth_sa_K_per_W", "min_copper_area_mm2")
AMBIENT_TOL_K = 0.1      # SPEC §3a: to 0.1 K
RELATIVE_TOL = 1e-3      # SPEC §3a: to 0.1 %
_SPAN = 10.0             # brackets reach 10 × the requirement's value
_FLOOR = 1e-3            # the lower bracket ends of load and RthJA (the physics wants > 0): 0.1 % of the value
_MAX_STEPS = 40
_SEARCHES = ("ambient", "load", "thermal")  # in this order; a role lists those that apply (`Role.limit_searches`)


@dataclass
class OperatingLimits:
    """Operating limits of P candidates.

    Attributes
    ----------
    values : dict of str to ndarray (P,)
        `LIMIT_KEYS` that apply (NaN where none exists).
    notes : dict of str to ndarray of object (P,)
        Per key, a remark where the number needs one (none exists, bracket end,
        beyond the datasheet's range, extrapolated).
    summary : ndarray of object (P,)
        One line per candidate ("passes up to 71 °C ambient").
    passed : ndarray of bool (P,)
        Whether the base check passed.
    """

    values: dict[str, np.ndarray]
    notes: dict[str, np.ndarray]
    summary: np.ndarray
    passed: np.ndarray = field(default=None)


def all_pass(result: RoleResult) -> np.ndarray:
    """(P,) True where every check on the part's sheet passes."""
    ok = np.ones(result.checks[0].passed.shape, dtype=bool) if result.checks else np.zeros(0, dtype=bool)
    for check in result.checks:
        ok &= check.passed | ~check.present
    return ok


def _tile_choices(choices: dict, index: np.ndarray, copies: int) -> dict:
    return {k: np.tile(np.asarray(v)[index], copies) for k, v in choices.items()}


def operating_limits(role: Role, requirement, parts, limits: dict, base: RoleResult,
                     index=None) -> OperatingLimits:
    """Operating limits of the candidates ``index`` (default all) of a base evaluation.

    Parameters
    ----------
    role : Role
    requirement : Requirement
    parts : PartArrays
        The candidates ``base`` was evaluated over.
    limits : dict
        `resolve_limits` output, as for the base evaluation.
    base : RoleResult
        The base evaluation (its discrete choices are held fixed).
    index : array_like of int, optional
        Which candidates (positions in ``parts``).
    """
    index = np.arange(parts.count) if index is None else np.asarray(index, dtype=int)
    P = index.size
    passed = all_pass(base)[index] if P else np.zeros(0, dtype=bool)
    if P == 0:
        empty = np.zeros(0)
        return OperatingLimits({k: empty for k in LIMIT_KEYS[:3]}, {}, object_array([]), passed)
    req = requirement
    searches = [k for k in _SEARCHES if k in role.limit_searches]
    S = len(searches)
    tj_max_C = np.asarray(base.internals["tj_max_C"], dtype=float)[index]
    rth_in_use = (np.asarray(base.internals["rth_ja_K_per_W"], dtype=float)[index] if "thermal" in searches
                  else np.full(P, np.nan))
    load_max = float(req.load_max_A) if "load" in searches else 1.0
    brackets = {"ambient": (np.full(P, float(req.ambient_min_C)),
                            np.maximum(tj_max_C, req.ambient_min_C + AMBIENT_TOL_K), AMBIENT_TOL_K),
                "load": (np.full(P, _FLOOR * max(load_max, 1e-3)), np.full(P, _SPAN * max(load_max, 1e-3)), 0.0),
                "thermal": (_FLOOR * rth_in_use, _SPAN * rth_in_use, 0.0)}
    lo = np.concatenate([brackets[k][0] for k in searches])
    hi = np.concatenate([brackets[k][1] for k in searches])
    tol_abs = np.concatenate([np.full(P, brackets[k][2]) for k in searches])
    stacked = parts.subset(np.tile(index, S))
    choices = _tile_choices(role.choices(base), index, S)
    nan = np.full(P, np.nan)

    def passes(trial: np.ndarray) -> np.ndarray:
        block = {k: trial[n * P:(n + 1) * P] for n, k in enumerate(searches)}
        rows = lambda k: np.concatenate([block[k] if m == k else nan for m in searches])  # noqa: E731
        over = Overrides(ambient_max_C=rows("ambient") if "ambient" in block else None,
                         load_max_A=rows("load") if "load" in block else None,
                         thermal_resistance=rows("thermal") if "thermal" in block else None, choices=choices)
        return all_pass(role.evaluate(req, stacked, limits, over))

    ok_lo = passes(lo)
    ok_hi = passes(hi)
    a, b = lo.copy(), hi.copy()  # invariant where searched: passes at a, fails at b
    search = ok_lo & ~ok_hi
    for _ in range(_MAX_STEPS):
        width = b - a
        open_ = search & (width > np.maximum(tol_abs, RELATIVE_TOL * np.abs(b)))
        if not open_.any():
            break
        mid = 0.5 * (a + b)
        trial = np.where(open_, mid, a)
        ok = passes(trial)
        a = np.where(open_ & ok, mid, a)
        b = np.where(open_ & ~ok, mid, b)
    found = np.where(search, a, np.where(ok_hi, hi, np.nan))
    key_of = {"ambient": "max_ambient_C", "load": "max_load_A", "thermal": "max_rth_ja_K_per_W"}
    values = {key_of[k]: found[n * P:(n + 1) * P] for n, k in enumerate(searches)}
    notes: dict[str, np.ndarray] = {}
    words = {"ambient": lambda j: f"fails at every ambient from ambient_min_C ({req.ambient_min_C:g} °C)",
             "load": lambda j: "fails even with no load",
             "thermal": lambda j: "fails even with an ideal thermal path (RthJA → 0)"}
    ends = {"ambient": lambda j: "passes up to Tj max (the search's end)",
            "load": lambda j: (f"passes at least to {_amperes(brackets['load'][1][j])} "
                               "(10 × load_max_A, the search's end)"),
            "thermal": lambda j: f"passes at least to {brackets['thermal'][1][j]:.3g} K/W (10 × RthJA in use)"}
    for n, k in enumerate(searches):
        text = object_array(None, P)
        for j in range(P):
            if not ok_lo[n * P + j]:
                text[j] = words[k](j)
            elif ok_hi[n * P + j]:
                text[j] = ends[k](j)
        notes[key_of[k]] = text
    if "thermal" not in searches:
        return OperatingLimits(values, notes, _summaries(values, notes, passed, _failing(base, index), req), passed)

    mount = getattr(req, "thermal", None)
    rth_max = values["max_rth_ja_K_per_W"]
    if mount is not None and mount.mount == "heatsink":
        jc = parts.raw["rth_jc_K_per_W"][index]
        sa = np.where(np.isfinite(rth_max) & np.isfinite(jc),
                      heatsink_for_thermal_resistance(np.where(np.isfinite(rth_max), rth_max, 0.0),
                                                      np.where(np.isfinite(jc), jc, 0.0), mount.interface), np.nan)
        text = object_array(None, P)
        none = np.isfinite(sa) & (sa <= 0)
        text[none] = (f"no heatsink holds: RthJC + RthCS ({mount.interface:g} K/W) already exceed the largest "
                      "RthJA that passes")
        sa = np.where(none, np.nan, sa)
        values["max_rth_sa_K_per_W"] = sa
        notes["max_rth_sa_K_per_W"] = text
    elif mount is not None and mount.mount == "board":
        fields = [parts.raw[f][index] for f in ("rth_ja_area_mm2", "rth_ja_K_per_W", "rth_ja_large_area_mm2",
                                                "rth_ja_large_K_per_W")]
        known = np.logical_and.reduce([np.isfinite(f) for f in fields]) & np.isfinite(rth_max) & (rth_max > 0)
        safe = [np.where(known, f, d) for f, d in zip(fields, (100.0, 100.0, 1000.0, 50.0))]
        safe[3] = np.minimum(safe[3], safe[1])
        area, extrapolated = copper_area_for_thermal_resistance(np.where(known, rth_max, 1.0), *safe)
        area = np.where(known, area, np.nan)
        text = object_array(None, P)
        beyond = known & np.isinf(area)
        text[beyond] = "beyond the datasheet's range: even its larger copper area does not hold"
        text[known & np.asarray(extrapolated) & ~beyond] = ("extrapolated below the datasheet's smaller copper "
                                                           "area (ln-area line extended)")
        values["min_copper_area_mm2"] = np.where(beyond, np.nan, area)
        notes["min_copper_area_mm2"] = text
    return OperatingLimits(values, notes, _summaries(values, notes, passed, _failing(base, index), req), passed)


def _failing(base: RoleResult, index) -> list[list[str]]:
    return [[c.name for c in base.checks if c.present[i] and not c.passed[i]] for i in index]


def _amperes(value: float) -> str:
    """A current as people write it: 5.52 mA, 2.1 A."""
    for scale, unit in ((1.0, "A"), (1e-3, "mA"), (1e-6, "µA")):
        if abs(value) >= scale or unit == "µA":
            return f"{value / scale:.3g} {unit}"
    return f"{value:.3g} A"


def _celsius(value: float) -> str:
    return f"{value:.1f} °C".replace("-", "−")


def _summaries(values: dict, notes: dict, passed: np.ndarray, failing: list[list[str]], req) -> np.ndarray:
    """The one-line words per candidate: how far a passing part passes, where a failing one would pass."""
    P = passed.size
    out = object_array(None, P)
    for j in range(P):
        parts_ = []
        amb = values["max_ambient_C"][j] if "max_ambient_C" in values else np.nan
        if np.isfinite(amb):
            asked = getattr(req, "ambient_max_C", None)
            short = "" if passed[j] or asked is None else f" (the requirement asks for {_celsius(asked)})"
            parts_.append(f"up to {_celsius(amb)} ambient{short}")
        load = values["max_load_A"][j] if "max_load_A" in values else np.nan
        if np.isfinite(load):
            asked = getattr(req, "load_max_A", None)
            short = "" if passed[j] or asked is None else f" (the requirement asks for {_amperes(asked)})"
            parts_.append(f"up to {_amperes(load)} load{short}")
        if "max_rth_sa_K_per_W" in values and np.isfinite(values["max_rth_sa_K_per_W"][j]):
            parts_.append(f"on a heatsink of RthSA ≤ {values['max_rth_sa_K_per_W'][j]:.3g} K/W")
        elif "min_copper_area_mm2" in values and np.isfinite(values["min_copper_area_mm2"][j]):
            parts_.append(f"on ≥ {values['min_copper_area_mm2'][j]:.3g} mm² of copper")
        elif "max_rth_ja_K_per_W" in values and np.isfinite(values["max_rth_ja_K_per_W"][j]):
            parts_.append(f"with RthJA ≤ {values['max_rth_ja_K_per_W'][j]:.3g} K/W")
        if not parts_:
            out[j] = ("no ambient, load or thermal resistance alone makes every check pass (failing: "
                      f"{', '.join(failing[j]) or 'none'})")
            continue
        lead = "passes " if passed[j] else "would pass "
        # A failing part passes where one limit alone is moved, the others kept at the requirement's values.
        out[j] = lead + ", or ".join(parts_) if not passed[j] else lead + ", ".join(parts_)
    return out
