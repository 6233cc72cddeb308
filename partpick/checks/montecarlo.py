"""Yield: a seeded Monte Carlo over tolerances and operating ranges (SPEC §4 "Yield").

Each build draws Vz (normal, the tolerance is 3σ), the resistor (normal,
tolerance = 3σ), the ambient and the supply (uniform over their ranges); it
passes when Vout stays within the regulation limit at both ends of the load
range. Every candidate sees the same draws (common random numbers), so the
figures are reproducible for a seed and comparable between parts.
"""

from __future__ import annotations

import numpy as np

from partpick.checks.partdata import PartArrays
from partpick.physics.constants import ZERO_CELSIUS_K
from partpick.physics.zener import ZenerModel, solve_shunt

__all__ = ["shunt_yield", "draws"]

# Parts × builds × 2 load ends solved per call; bounds the working memory.
_CHUNK_ELEMENTS = 200_000


def draws(runs: int, seed: int) -> dict[str, np.ndarray]:
    """The standard draws of ``runs`` builds: normal for Vz and R, uniform in [0, 1) for ambient and supply."""
    rng = np.random.default_rng(seed)
    return {"vz": rng.standard_normal(runs), "resistor": rng.standard_normal(runs),
            "ambient": rng.random(runs), "supply": rng.random(runs)}


def shunt_yield(requirement, parts: PartArrays, result, index, runs: int, seed: int) -> np.ndarray:
    """Yield [%] of the candidates ``index`` of a zener_shunt evaluation; NaN where the design has no resistor."""
    req = requirement
    zr = req.zener
    index = np.asarray(index, dtype=int)
    out = np.full(index.size, np.nan)
    internals = result.internals
    usable = internals["feasible"][index]
    chosen = index[usable]
    if chosen.size == 0:
        return out
    d = draws(runs, seed)
    ambient_K = req.ambient_min_C + d["ambient"] * (req.ambient_max_C - req.ambient_min_C) + ZERO_CELSIUS_K
    supply = req.supply_min_V + d["supply"] * (req.supply_max_V - req.supply_min_V)
    loads = np.array([req.load_min_A, req.load_max_A])
    per_part = max(1, _CHUNK_ELEMENTS // (2 * runs))
    results = np.empty(chosen.size)
    col = lambda a: np.asarray(a, dtype=float)[:, None, None]  # noqa: E731
    for start in range(0, chosen.size, per_part):
        sel = chosen[start:start + per_part]
        vz_tol = (internals["vz_high_V"][sel] / internals["vz_V"][sel] - 1.0)
        vz = internals["vz_V"][sel][:, None] * (1.0 + vz_tol[:, None] / 3.0 * d["vz"][None, :])
        r_tol = internals["resistor_tolerance_pct"][sel] / 100.0
        R = internals["resistor_ohm"][sel][:, None] * (1.0 + r_tol[:, None] / 3.0 * d["resistor"][None, :])
        # A draw beyond ~30σ could go non-physical; keep it strictly positive.
        vz = np.maximum(vz, 1e-3)
        R = np.maximum(R, 1e-3)
        model = ZenerModel(voltage=vz[:, :, None], test_current=col(internals["izt_A"][sel]),
                           test_impedance=col(internals["zzt_ohm"][sel]),
                           knee_current=col(np.where(np.isfinite(internals["izk_A"][sel])
                                                     & (internals["izk_A"][sel] < internals["izt_A"][sel]),
                                                     internals["izk_A"][sel], np.nan)),
                           knee_impedance=col(np.where(np.isfinite(internals["izk_A"][sel]),
                                                       internals["zzk_ohm"][sel], np.nan)),
                           temperature_coefficient=col(internals["vz_tc_per_K"][sel]))
        point = solve_shunt(model, supply[None, :, None], R[:, :, None], loads[None, None, :],
                            ambient_K[None, :, None], col(internals["rth_ja_K_per_W"][sel]))
        error = 100.0 * np.abs(point.output_voltage - zr.target_V) / zr.target_V
        ok = np.all(error <= zr.max_regulation_error_pct, axis=2)
        results[start:start + sel.size] = 100.0 * ok.mean(axis=1)
    out[usable] = results
    return out
