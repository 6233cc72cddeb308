"""The ``zener_shunt`` role: a resistor from the supply and a Zener across the load.

SPEC §4. The resistor is the requirement's ``[zener].resistor_ohm`` (a
finished design under review) or else the largest value of the E-series whose
high end R·(1 + tol) still keeps Iz ≥ Iz min at the lowest supply and the
highest load with the highest Zener voltage (the + tolerance end, the ambient
end that raises Vz, self-heated at Iz min):

    R ≤ (Vs,min − Vz,high(Iz min)) / ((IL,max + Iz min)·(1 + tol))

(the common-practice design rule R ≤ (Vs,min − Vz,max)/(IL,max + Iz,min)).

Every corner is then solved at both ends of the Vz tolerance and both ends of
the resistor tolerance, Vout, Iz and Tj together
(`partpick.physics.zener.solve_shunt`): points are 8 corners × 2 Vz ends ×
2 resistor ends = 32, all in the ``steady`` state.
"""

from __future__ import annotations

import itertools

import numpy as np

from partpick.checks.corners import corners_of
from partpick.checks.partdata import Needs, limit_array, thermal_data, thermal_needs as thermal_needs_of, tj_limit
from partpick.checks.results import PointTable, object_array, worst_case_check, worst_value
from partpick.checks.roles.base import Overrides, Role, RoleResult
from partpick.physics.constants import T0_K, ZERO_CELSIUS_K
from partpick.physics.eseries import RESISTOR_POWER_CLASSES_W, largest_at_most, resistor_derating, smallest_power_class
from partpick.physics.zener import ZenerModel, solve_shunt

__all__ = ["ZenerShuntRole", "ROLE", "zener_models_of", "choose_resistor"]

_ENDS = ("low", "high")


def zener_models_of(parts, shape_tail=(1,)):
    """(low-end, high-end) Zener models and the nominal one, attributes shaped (P, 1).

    Placeholders (Vz 5 V, ±5 %, Izt 5 mA, Zzt 10 Ω) stand in for parts without
    data; the caller masks their results.
    """
    col = lambda a: np.asarray(a, dtype=float).reshape((-1,) + tuple(shape_tail))  # noqa: E731
    vz = parts.value("vz_V", 5.0)
    tol = parts.value("vz_tol_pct", 5.0)
    izt = parts.value("izt_A", 5e-3)
    izk = parts.raw["izk_A"]
    izk = np.where(np.isfinite(izk) & (izk < izt), izk, np.nan)
    common = dict(test_current=col(izt), test_impedance=col(parts.value("zzt_ohm", 10.0)), knee_current=col(izk),
                  knee_impedance=col(np.where(np.isfinite(izk), parts.raw["zzk_ohm"], np.nan)),
                  temperature_coefficient=col(parts.value("vz_tc_pct_per_K", 0.0) / 100.0))  # %/K → 1/K
    low = ZenerModel(voltage=col(vz * (1 - tol / 100.0)), **common)
    high = ZenerModel(voltage=col(vz * (1 + tol / 100.0)), **common)
    nominal = ZenerModel(voltage=col(vz), **common)
    return low, high, nominal


def choose_resistor(requirement, high: ZenerModel, iz_min, rth, *, tolerance_pct, series, ambient_max_C=None):
    """The largest preferred resistor keeping Iz ≥ Iz min at min supply and max load (SPEC §4).

    Parameters
    ----------
    high : ZenerModel
        The + tolerance end, attributes shaped (P, 1).
    iz_min : ndarray (P,)
        Iz min [A], > 0.
    rth : ndarray (P,)
        RthJA [K/W].
    ambient_max_C : ndarray (P,), optional
        The highest ambient per part [°C] (operating limits); default the requirement's.

    Returns
    -------
    resistance : ndarray (P,)
        [ohm]; NaN where no resistor exists.
    vz_high : ndarray (P,)
        The highest Zener voltage at Iz min [V].
    ambient_C : ndarray (P,)
        The ambient end that raises Vz [°C].

    Notes
    -----
    Vz,high = Vz⁺·(1 + αVz·(Tj − 25 °C)) + ΔV(Iz min) with Tj = Ta + Vz,high·Iz min·RthJA
    is linear in Vz,high, so it is solved in closed form:
    Vz,high = (Vz⁺·(1 + αVz·(Ta − T0)) + ΔV) / (1 − Vz⁺·αVz·Iz min·RthJA).
    """
    base = np.ravel(high.voltage)
    alpha = np.ravel(high.temperature_coefficient)
    hottest = requirement.ambient_max_C if ambient_max_C is None else ambient_max_C  # (P,) for operating limits
    ambient_C = np.where(alpha > 0, hottest, requirement.ambient_min_C)
    ambient_K = ambient_C + ZERO_CELSIUS_K
    dv = np.ravel(high.delta_voltage(iz_min[:, None]))
    vz_high = (base * (1 + alpha * (ambient_K - T0_K)) + dv) / (1 - base * alpha * iz_min * rth)
    bound = (requirement.supply_min_V - vz_high) / ((requirement.load_max_A + iz_min) * (1 + tolerance_pct / 100.0))
    feasible = bound > 0
    resistance = np.where(feasible, largest_at_most(np.where(feasible, bound, 1.0), series), np.nan)
    return resistance, vz_high, ambient_C


class ZenerShuntRole(Role):
    name = "zener_shunt"
    label = "Zener shunt regulator"
    kinds = ("zener",)
    objective_metrics = {"drop": "regulation_error_pct", "dissipation": "zener_power_W"}
    curve_plots = (("breakdown", "I–V", {"legend": "bottom_right"}),
                   ("breakdown", "I–V (log)", {"legend": "bottom_right", "log_y": True}),
                   ("zener_output", "Output vs supply", {"legend": "bottom_right"}),
                   ("junction_temperature", "Junction temperature", {"legend": "bottom_right"}),
                   ("power", "Power", {"legend": "top_right"}))

    def curves(self, requirement, part, candidate, notes):
        from partpick.checks.roles.zener_shunt_curves import zener_shunt_curves

        return zener_shunt_curves(requirement, part, candidate, notes)
    supports_yield = True
    method_notes = (
        "Every corner (supply × load × ambient) is solved at both ends of the Vz tolerance and both ends of the "
        "resistor tolerance, Vout, Iz and Tj together (self-heated).",
        "The resistor's power rating falls with ambient: the full class rating up to 70 °C, linearly to zero at "
        "155 °C (film resistors, common practice; [zener].resistor_rated_ambient_C and resistor_zero_power_C "
        "override). The class is the smallest whose rating, so derated and at the policy's percentage, covers "
        "the resistor's power at every corner.",
        "Output short: the highest supply across the resistor's low end, against 100 % of its rating derated to "
        "the hottest ambient (a fault, so the policy's percentage does not apply).",
        "Line and load regulation are small-signal figures, 1000·Z/(R + Z) and −(R ∥ Z), at Izt and at the "
        "corner of lowest Iz, with Z from the knee curve there.",
        "Yield (--yield N) is per build over every corner: each build draws Vz (normal, tolerance = 3σ, or "
        "uniform for binned parts) and R (normal, tolerance = 3σ) and passes only if Vout stays within the "
        "regulation limit and Iz ≥ Iz min at all corners; the 95 % interval is Wilson's score interval.",
    )
    part_inputs = ("vz_V", "vz_tol_pct", "izt_A", "zzt_ohm", "izk_A", "zzk_ohm", "vz_tc_pct_per_K", "pd_W",
                   "pd_ref_C", "tj_max_C", "rth_ja_K_per_W", "rth_jc_K_per_W", "rth_ja_large_K_per_W")

    def choices(self, result: RoleResult) -> dict:
        """The chosen E-series resistor and its power class, held fixed for limits and sensitivity."""
        held = {"resistor_class_W": result.metrics["resistor_power_class_W"]}
        if result.internals["resistor_chosen"].any():  # a resistor given by the requirement is an input
            held["resistor_ohm"] = result.internals["resistor_ohm"]
        return held

    def evaluate(self, requirement, parts, limits, overrides: Overrides | None = None) -> RoleResult:
        req = requirement
        ov = overrides or Overrides()
        zr = req.zener
        count = parts.count
        corners = corners_of(req)
        combos = list(itertools.product(range(len(corners)), range(2), range(2)))  # corner, vz end, R end
        corner_idx = np.array([c for c, _, _ in combos])
        vz_end = np.array([v for _, v, _ in combos])
        r_end = np.array([r for _, _, r in combos])
        points = PointTable(
            supply_V=corners.supply_V[corner_idx], load_A=corners.load_A[corner_idx],
            ambient_C=corners.ambient_C[corner_idx], state=("steady",) * len(combos),
            vz_end=tuple(_ENDS[v] for v in vz_end), resistor_end=tuple(_ENDS[r] for r in r_end),
        )
        ids = np.arange(len(combos))

        needs = Needs(parts)
        thermal_needs = thermal_needs_of(req)
        zener_needs = [("vz_V",), ("vz_tol_pct",), ("izt_A",), ("zzt_ohm",)] + thermal_needs
        iz_min_needs = [] if zr.min_zener_current_A is not None else [("izk_A",)]
        for check in ("feasible", "zener_current_min", "zener_power", "junction_temp", "regulation_error",
                      "resistor_power") + (("short_circuit",) if zr.short_circuit else ()):
            needs.require(check, *zener_needs, *iz_min_needs)
        bad = needs.any_missing()

        thermal = thermal_data(parts, req, ov.thermal_resistance)
        rth = thermal.thermal_resistance
        tj_max_K = thermal.tj_max_K
        tj_max_C = tj_max_K - ZERO_CELSIUS_K
        groups = parts.group
        low, high, nominal = zener_models_of(parts)

        if zr.min_zener_current_A is not None:
            iz_min = np.full(count, zr.min_zener_current_A)
            iz_min_source = "requirement [zener].min_zener_current_A"
        else:
            iz_min = parts.value("izk_A", 1e-4)
            iz_min_source = "part izk_A (Iz min defaults to the knee current)"

        tolerance_pct = zr.resistor_tolerance
        if "resistor_ohm" in ov.choices or zr.resistor_ohm is not None:
            resistance = np.asarray(ov.choice("resistor_ohm", np.full(count, zr.resistor_ohm)), dtype=float)
            _, vz_high, vz_high_ambient = choose_resistor(req, high, iz_min, rth, tolerance_pct=tolerance_pct,
                                                          series=zr.resistor_series,
                                                          ambient_max_C=ov.ambient_max(req, count))
            resistor_source = ("requirement [zener].resistor_ohm" if zr.resistor_ohm is not None
                               else f"largest {zr.resistor_series} value keeping Iz ≥ Iz min")
        else:
            resistance, vz_high, vz_high_ambient = choose_resistor(req, high, iz_min, rth,
                                                                   tolerance_pct=tolerance_pct,
                                                                   series=zr.resistor_series)
            resistor_source = f"largest {zr.resistor_series} value keeping Iz ≥ Iz min"
        feasible = (req.supply_min_V > vz_high) & np.isfinite(resistance) & ~bad
        # No operating points where data are missing, or where no resistor could be chosen; a given
        # resistor (review mode) is solved even when the supply cannot keep the Zener regulating.
        unsolved = bad | (~feasible if zr.resistor_ohm is None else np.zeros(count, dtype=bool))
        unsolved |= ~np.isfinite(resistance)  # a held choice of a part that had none
        infeasible_text = (f"supply too low for this Vz at max load: at {req.supply_min_V:g} V and "
                           f"{req.load_max_A:g} A no resistor keeps Iz at or above Iz min, because the "
                           "highest Zener voltage at Iz min (the check's limit) is not below the supply")

        # ---- solve every corner × Vz end × R end ----------------------------------------
        supply = points.supply_V[None, :]
        ambient_C, load_A = corners.for_parts(count, ov)
        load = load_A[:, corner_idx]
        ambient_K = ambient_C[:, corner_idx] + ZERO_CELSIUS_K  # °C → K at the physics boundary
        r_nominal = np.where(unsolved, 1000.0, resistance)
        r_factor = np.where(r_end == 1, 1 + tolerance_pct / 100.0, 1 - tolerance_pct / 100.0)
        R = r_nominal[:, None] * r_factor[None, :]
        # Only the parts whose results are shown are solved (the solver works element by element,
        # so a subset gives the same numbers); the others stay NaN.
        solved = np.flatnonzero(~unsolved)
        vout, iz, tj_C, pz = (np.full((count, len(combos)), np.nan) for _ in range(4))
        if solved.size:
            vz_points = np.where(vz_end[None, :] == 1, np.ravel(high.voltage)[solved, None],
                                 np.ravel(low.voltage)[solved, None])
            model = ZenerModel(voltage=vz_points, test_current=low.test_current[solved],
                               test_impedance=low.test_impedance[solved], knee_current=low.knee_current[solved],
                               knee_impedance=low.knee_impedance[solved],
                               temperature_coefficient=low.temperature_coefficient[solved])
            shunt = solve_shunt(model, supply, R[solved], load[solved], ambient_K[solved], rth[solved, None])
            vout[solved] = shunt.output_voltage
            iz[solved] = shunt.zener_current
            tj_C[solved] = shunt.junction_temperature - ZERO_CELSIUS_K
            pz[solved] = shunt.power
        p_resistor = (supply - vout) ** 2 / R
        error = 100.0 * np.abs(vout - zr.target_V) / zr.target_V

        missing_text = needs.data_missing_reason()
        unsolved_reasons = [(bad, missing_text), (unsolved, infeasible_text)]

        checks = []
        # feasible: the lowest supply must exceed the highest Zener voltage at Iz min.
        # Lowest supply, highest load, + Vz end, high resistor end, at the ambient end that raises Vz.
        amb_pick = np.where(vz_high_ambient == ov.ambient_max(req, count), 1, 0)
        feasible_ids = np.array([_point_id(0, 1, 0, 1, 1), _point_id(0, 1, 1, 1, 1)])
        check = worst_case_check(
            "feasible", "V", np.full((count, 1), req.supply_min_V), np.where(bad, np.nan, vz_high), [0], "min",
            "highest Zener voltage at Iz min (+ tolerance, the ambient end raising Vz, self-heated)",
            reasons=[(bad, missing_text)], invalid=bad)
        check.point = np.where(bad, -1, feasible_ids[amb_pick])
        check.note = object_array(None, count)  # the value is known, so the words go in the note
        check.note[~bad & ~feasible] = infeasible_text
        check.passed = check.passed & feasible
        checks.append(check)

        checks.append(worst_case_check(
            "zener_current_min", "A", iz, iz_min, ids, "min", iz_min_source, reasons=unsolved_reasons,
            invalid=unsolved))
        pow_pct, pow_src = limit_array(limits, groups, "power_pct")
        p_allowed = thermal.allowed_power(ambient_K)
        pow_source = object_array([f"{pow_src[g]}: {limits[n]['power_pct'].value:g} % of Pallow(Ta)"
                                   for g, n in enumerate(("pn", "schottky", "zener"))])[groups]
        checks.append(worst_case_check(
            "zener_power", "W", pz, p_allowed * pow_pct[:, None] / 100.0, ids, "max", pow_source,
            reasons=unsolved_reasons, invalid=unsolved))
        tj_lim, tj_src = tj_limit(limits, groups, tj_max_C)
        checks.append(worst_case_check(
            "junction_temp", "°C", tj_C, tj_lim, ids, "max", tj_src, reasons=unsolved_reasons, invalid=unsolved,
            ambient_C=ambient_K - ZERO_CELSIUS_K))
        checks[-1].note = thermal.notes  # the thermal path's assumptions (SPEC §3a)
        checks.append(worst_case_check(
            "regulation_error", "%", error, np.full(count, zr.max_regulation_error_pct), ids, "max",
            "requirement [zener].max_regulation_error_pct", reasons=unsolved_reasons, invalid=unsolved))

        # resistor_power: the smallest class whose rating, derated by the policy and by the corner's
        # ambient, covers the power at every point; fails only above the largest class (or above
        # [zener].resistor_rating_W when a finished design gives its resistor's rating).
        res_pct, res_src = limit_array(limits, groups, "resistor_power_pct")
        fraction = res_pct / 100.0
        derate = resistor_derating(ambient_K, zr.rated_ambient_C + ZERO_CELSIUS_K,
                                   zr.zero_power_C + ZERO_CELSIUS_K)  # (P, K), 1 up to 70 °C
        p_res_max, p_res_col = worst_value(p_resistor, "max")
        known = np.isfinite(p_resistor)
        with np.errstate(divide="ignore", invalid="ignore"):
            needed = np.where(known & (p_resistor > 0), p_resistor / (fraction[:, None] * derate), 0.0)
        klass = smallest_power_class(np.max(needed, axis=1), 1.0)
        klass = np.where(np.isfinite(p_res_max), klass, np.nan)
        klass = np.asarray(ov.choice("resistor_class_W", klass), dtype=float)  # held fixed for limits
        largest = RESISTOR_POWER_CLASSES_W[-1]
        if zr.resistor_rating_W is not None:
            rating = np.full(count, zr.resistor_rating_W)
        else:
            rating = np.where(np.isfinite(klass), klass, largest)
        rating = np.where(unsolved, np.nan, rating)
        derate_text = (f"full rating up to {zr.rated_ambient_C:g} °C ambient, linear to zero at "
                       f"{zr.zero_power_C:g} °C")
        derate_text += (" (film resistors, common practice)"
                        if zr.resistor_rated_ambient_C is None and zr.resistor_zero_power_C is None
                        else " (requirement [zener].resistor_rated_ambient_C, resistor_zero_power_C)")
        if zr.resistor_rating_W is not None:
            rating_texts = [f"the resistor's rating {zr.resistor_rating_W:g} W (requirement [zener].resistor_rating_W)"]
            rating_index = np.zeros(count, dtype=int)
        else:
            rating_texts = [f"the {k:g} W class rating" for k in RESISTOR_POWER_CLASSES_W]
            rating_texts.append(f"the largest class ({largest:g} W)")
            rating_index = np.where(np.isfinite(klass), np.searchsorted(RESISTOR_POWER_CLASSES_W, klass),
                                    len(RESISTOR_POWER_CLASSES_W))
        texts = []
        for g, name in enumerate(("pn", "schottky", "zener")):
            pct_text = f"{res_src[g]}: {limits[name]['resistor_power_pct'].value:g} % of "
            texts += [pct_text + t + ", " + derate_text for t in rating_texts]
        res_source = object_array(texts)[groups.astype(int) * len(rating_texts) + rating_index]
        checks.append(worst_case_check(
            "resistor_power", "W", p_resistor, rating[:, None] * fraction[:, None] * derate, ids, "max", res_source,
            reasons=unsolved_reasons, invalid=unsolved))

        # short_circuit: an output short puts the highest supply across the low end of R. A fault,
        # so it is held to 100 % of the rating derated to the hottest ambient, not the policy's share.
        hottest_C = ov.ambient_max(req, count)
        r_low = r_nominal * (1 - tolerance_pct / 100.0)
        p_short = np.where(unsolved, np.nan, req.supply_max_V ** 2 / r_low)
        derate_hot = resistor_derating(hottest_C + ZERO_CELSIUS_K, zr.rated_ambient_C + ZERO_CELSIUS_K,
                                       zr.zero_power_C + ZERO_CELSIUS_K)
        if zr.short_circuit:
            sc_texts = [f"100 % of {t} (a fault: the policy's share does not apply), {derate_text}"
                        for t in rating_texts]
            check = worst_case_check(
                "short_circuit", "W", p_short[:, None], rating * derate_hot, [0], "max",
                object_array(sc_texts)[rating_index], reasons=unsolved_reasons, invalid=unsolved)
            amb_end = np.where(hottest_C > req.ambient_min_C, 1, 0)
            check.point = np.where(unsolved, -1, np.array([_point_id(1, 0, 0, 0, 0), _point_id(1, 0, 1, 0, 0)])[amb_end])
            check.note = object_array(None, count)
            check.note[~unsolved] = ("output shorted: supply max across the resistor's low end R·(1 − tol), "
                                     "at the hottest ambient")
            checks.append(check)

        any_missing = bad
        nan = np.full(count, np.nan)
        checks.append(worst_case_check(
            "data_missing", "", nan[:, None], nan, [-1], "max", "part record: the fields the checks need",
            reasons=[(any_missing, missing_text)], present=any_missing))

        # ---- metrics ------------------------------------------------------------------------
        iz_lo, iz_lo_col = worst_value(iz, "min")
        iz_hi, iz_hi_col = worst_value(iz, "max")
        pz_max, pz_col = worst_value(pz, "max")
        out_lo, out_lo_col = worst_value(vout, "min")
        out_hi, out_hi_col = worst_value(vout, "max")
        err_max, err_col = worst_value(error, "max")
        tj_hi, tj_col = worst_value(tj_C, "max")
        zzt = parts.value("zzt_ohm", 10.0)
        r_ok = np.where(unsolved, np.nan, resistance)
        # At the worst corner's (lowest) Iz, Z from the knee curve, as a conductance: a Zener that
        # carries no current there has G = 0 (the output follows the supply through R).
        rows = np.arange(count)
        r_worst = np.where(unsolved, np.nan, R[rows, iz_lo_col])
        conducting = np.isfinite(iz_lo) & (iz_lo > 0)
        z_worst = np.ravel(nominal.impedance(np.where(conducting, iz_lo, 1.0)[:, None]))
        g_worst = np.where(conducting, 1.0 / z_worst, 0.0)
        rg = r_worst * g_worst
        metrics = {
            "series_resistor_ohm": np.where(bad, np.nan, resistance),
            "zener_current_min_A": iz_lo,
            "zener_current_max_A": iz_hi,
            "zener_power_W": pz_max,
            "output_min_V": out_lo,
            "output_max_V": out_hi,
            "regulation_error_pct": err_max,
            "junction_temp_C": tj_hi,
            "resistor_power_W": p_res_max,
            "resistor_power_class_W": klass,
            # Small-signal regulation at Izt: ΔVo/ΔVs = Z/(R + Z) and ΔVo/ΔIL = −(R ∥ Z)
            # (ohm = mV/mA), common practice (Sedra & Smith's shunt-regulator analysis).
            "line_regulation_mV_per_V": 1000.0 * np.where(bad, np.nan, zzt) / (r_ok + zzt),
            "load_regulation_mV_per_mA": -(r_ok * zzt) / (r_ok + zzt),
            "line_regulation_worst_mV_per_V": 1000.0 / (1.0 + rg),
            "load_regulation_worst_mV_per_mA": -r_worst / (1.0 + rg),
        }
        if zr.short_circuit:
            metrics["short_circuit_power_W"] = p_short
        metric_points = {
            "zener_current_min_A": iz_lo_col, "zener_current_max_A": iz_hi_col, "zener_power_W": pz_col,
            "output_min_V": out_lo_col, "output_max_V": out_hi_col, "regulation_error_pct": err_col,
            "junction_temp_C": tj_col, "resistor_power_W": p_res_col,
            "line_regulation_worst_mV_per_V": iz_lo_col, "load_regulation_worst_mV_per_mA": iz_lo_col,
        }
        metric_points = {k: np.where(unsolved, -1, v) for k, v in metric_points.items()}
        internals = {
            "vz_low_V": np.ravel(low.voltage), "vz_high_V": np.ravel(high.voltage), "vz_V": np.ravel(nominal.voltage),
            "izt_A": np.ravel(np.broadcast_to(nominal.test_current, (count, 1))),
            "zzt_ohm": zzt, "izk_A": parts.raw["izk_A"], "zzk_ohm": parts.raw["zzk_ohm"],
            "vz_tc_per_K": np.ravel(np.broadcast_to(nominal.temperature_coefficient, (count, 1))),
            "iz_min_A": iz_min, "vz_high_at_iz_min_V": vz_high, "vz_high_ambient_C": vz_high_ambient,
            "resistor_ohm": resistance, "resistor_tolerance_pct": np.full(count, tolerance_pct),
            "resistor_source": object_array(resistor_source, count),
            "resistor_chosen": np.full(count, zr.resistor_ohm is None),
            "rth_ja_K_per_W": rth, "pd_W": thermal.power_rating, "tj_max_C": tj_max_C, "tj_limit_C": tj_lim,
            "feasible": feasible, "solved": ~unsolved, "thermal_path_note": thermal.notes, "output_voltage_V": vout, "zener_current_A": iz, "zener_tj_C": tj_C,
        }
        return RoleResult(points, checks, metrics, metric_points, internals)

    def yield_pct(self, requirement, parts, result: RoleResult, index, runs: int, seed: int) -> dict:
        from partpick.checks.montecarlo import shunt_yield

        return shunt_yield(requirement, parts, result, index, runs, seed)


def _point_id(supply_end: int, load_end: int, ambient_end: int, vz_end: int, resistor_end: int) -> int:
    """Column of a point: corners in `corners_of` order (supply, load, ambient), then Vz end, then R end."""
    return ((supply_end * 2 + load_end) * 2 + ambient_end) * 4 + vz_end * 2 + resistor_end


ROLE = ZenerShuntRole()
