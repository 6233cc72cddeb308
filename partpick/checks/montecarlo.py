"""Yield: a seeded Monte Carlo over builds, each judged at every corner (SPEC §4 "Yield").

Each build draws its Zener voltage (normal with the tolerance as 3σ, or uniform
over the tolerance band for binned parts: ``[zener].vz_distribution``) and its
resistor (normal, tolerance = 3σ). A build passes only if, at **every** corner
of supply × load × ambient (self-heated, as the role solves them), its Vout
stays within the regulation limit and its Iz at or above Iz min: a unit must
hold over the whole range, not at one random condition. Builds × corners are
one array operation per chunk of candidates.

Every candidate sees the same draws (common random numbers), so the figures
are reproducible for a seed and comparable between parts. The fraction that
passes is reported with its 95 % Wilson score interval.
"""

from __future__ import annotations

import numpy as np

from partpick.checks.corners import corners_of
from partpick.checks.partdata import PartArrays
from partpick.physics.constants import ZERO_CELSIUS_K
from partpick.physics.zener import ZenerModel, solve_shunt

__all__ = ["shunt_yield", "draws", "wilson_interval", "YIELD_KEYS"]

YIELD_KEYS = ("yield_pct", "yield_low_pct", "yield_high_pct")
"""The JSON metrics of a yield run: the fraction of builds passing and its 95 % interval [%]."""

# Parts × builds × corners solved per call; bounds the working memory.
_CHUNK_ELEMENTS = 400_000
# The two-sided 95 % normal quantile, scipy.stats.norm.ppf(0.975).
_Z95 = 1.959963984540054


def draws(runs: int, seed: int) -> dict[str, np.ndarray]:
    """The standard draws of ``runs`` builds: standard normal for Vz and R, uniform in [−1, 1) for binned Vz."""
    rng = np.random.default_rng(seed)
    return {"vz": rng.standard_normal(runs), "resistor": rng.standard_normal(runs),
            "vz_uniform": 2.0 * rng.random(runs) - 1.0}


def wilson_interval(passed, runs: int, z: float = _Z95) -> tuple[np.ndarray, np.ndarray]:
    """The Wilson score interval of a binomial proportion, as fractions.

    Parameters
    ----------
    passed : array_like
        Number of successes (builds that pass).
    runs : int
        Number of trials, ≥ 1.
    z : float
        Normal quantile (1.96 for 95 %).

    Notes
    -----
    With p = k/n: centre (p + z²/(2n))/(1 + z²/n), half-width
    z·sqrt(p(1 − p)/n + z²/(4n²))/(1 + z²/n). Unlike p ± z·sqrt(p(1 − p)/n) it stays
    inside [0, 1] and is not empty at k = 0 or k = n.

    References
    ----------
    E. B. Wilson, "Probable inference, the law of succession, and statistical
    inference", *Journal of the American Statistical Association* 22(158), 209–212, 1927.
    """
    if runs < 1:
        raise ValueError(f"runs must be ≥ 1, got {runs!r}")
    p = np.asarray(passed, dtype=float) / runs
    z2n = z * z / runs
    centre = (p + z2n / 2.0) / (1.0 + z2n)
    half = z * np.sqrt(p * (1.0 - p) / runs + z2n / (4.0 * runs)) / (1.0 + z2n)
    # At k = 0 (k = n) the lower (upper) end is exactly 0 (1); rounding would leave a hair off it.
    low = np.where(p <= 0.0, 0.0, np.clip(centre - half, 0.0, 1.0))
    high = np.where(p >= 1.0, 1.0, np.clip(centre + half, 0.0, 1.0))
    return low, high


def shunt_yield(requirement, parts: PartArrays, result, index, runs: int, seed: int) -> dict[str, np.ndarray]:
    """Yield of the candidates ``index`` of a zener_shunt evaluation, per build over every corner.

    Returns
    -------
    dict of str to ndarray
        `YIELD_KEYS` [%], each (len(index),); NaN where the design has no
        resistor or the part lacks data (nothing to build).
    """
    req = requirement
    zr = req.zener
    index = np.asarray(index, dtype=int)
    out = {k: np.full(index.size, np.nan) for k in YIELD_KEYS}
    internals = result.internals
    usable = internals["solved"][index]
    chosen = index[usable]
    if chosen.size == 0:
        return out
    d = draws(runs, seed)
    unit_vz = d["vz_uniform"] if zr.vz_distribution == "uniform" else d["vz"] / 3.0  # × tolerance
    unit_r = d["resistor"] / 3.0
    corners = corners_of(req)
    supply = np.asarray(corners.supply_V, dtype=float)[None, None, :]
    load = np.asarray(corners.load_A, dtype=float)[None, None, :]
    ambient_K = np.asarray(corners.ambient_C, dtype=float)[None, None, :] + ZERO_CELSIUS_K  # °C → K
    per_part = max(1, _CHUNK_ELEMENTS // (runs * corners.ambient_C.size))
    passed = np.empty(chosen.size)
    col = lambda a: np.asarray(a, dtype=float)[:, None, None]  # noqa: E731
    izk_all, izt_all = internals["izk_A"], internals["izt_A"]
    for start in range(0, chosen.size, per_part):
        sel = chosen[start:start + per_part]
        vz_tol = internals["vz_high_V"][sel] / internals["vz_V"][sel] - 1.0
        vz = internals["vz_V"][sel][:, None] * (1.0 + vz_tol[:, None] * unit_vz[None, :])
        r_tol = internals["resistor_tolerance_pct"][sel] / 100.0
        R = internals["resistor_ohm"][sel][:, None] * (1.0 + r_tol[:, None] * unit_r[None, :])
        # A draw beyond ~30σ could go non-physical; keep it strictly positive.
        vz = np.maximum(vz, 1e-3)
        R = np.maximum(R, 1e-3)
        izk = izk_all[sel]
        knee = np.isfinite(izk) & (izk < izt_all[sel])
        model = ZenerModel(voltage=vz[:, :, None], test_current=col(izt_all[sel]),
                           test_impedance=col(internals["zzt_ohm"][sel]),
                           knee_current=col(np.where(knee, izk, np.nan)),
                           knee_impedance=col(np.where(knee, internals["zzk_ohm"][sel], np.nan)),
                           temperature_coefficient=col(internals["vz_tc_per_K"][sel]))
        point = solve_shunt(model, supply, R[:, :, None], load, ambient_K, col(internals["rth_ja_K_per_W"][sel]))
        error = 100.0 * np.abs(point.output_voltage - zr.target_V) / zr.target_V
        ok = (error <= zr.max_regulation_error_pct) & (point.zener_current >= col(internals["iz_min_A"][sel]))
        passed[start:start + sel.size] = np.count_nonzero(np.all(ok, axis=2), axis=1)
    low, high = wilson_interval(passed, runs)
    out["yield_pct"][usable] = 100.0 * passed / runs
    out["yield_low_pct"][usable] = 100.0 * low
    out["yield_high_pct"][usable] = 100.0 * high
    return out
