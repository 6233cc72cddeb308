"""The ``series`` role: a diode in series with a DC load (reverse-polarity protection, OR-ing, steering).

SPEC §4. The diode either conducts or blocks, never both at once:

- forward state at each of the 8 corners, at switch-on (Tj = Ta, ``cold_start``)
  and self-heated (``steady``, Tj = Ta + Vf·I·RthJA solved by Newton in
  `partpick.physics.thermal.self_heated_forward`);
- reverse state at the hottest ambient (``reverse``): the supply reversed, or
  ``reverse_V`` / ``reverse_transient_V``; leakage from the datasheet IR,
  doubling every ``ir_double_K``, heats the junction (runaway by Lambert W in
  `partpick.physics.thermal.reverse_thermal_state`).

Points: columns 0…C−1 are the cold-start corners, C…2C−1 the steady ones,
2C the reverse state (supply_V there is the reverse voltage, load_A is 0).
"""

from __future__ import annotations

import numpy as np

from partpick.checks.corners import corners_of
from partpick.checks.partdata import Needs, limit_array, thermal_data, thermal_needs as thermal_needs_of, tj_limit
from partpick.checks.results import PointTable, object_array, worst_case_check, worst_value
from partpick.checks.roles.base import Overrides, Role, RoleResult
from partpick.physics.constants import ZERO_CELSIUS_K
from partpick.physics.junction import ForwardModel
from partpick.physics.leakage import reverse_current
from partpick.physics.thermal import derated_current, reverse_thermal_state, self_heated_forward

__all__ = ["SeriesRole", "ROLE", "forward_model_of"]

_MODEL_FIELDS = ("is_A", "n", "rs_ohm")
_FORWARD_RUNAWAY = ("forward thermal runaway: Tj = Ta + Vf·I·RthJA has no solution at this corner "
                    "(Rs rising with temperature faster than the junction can shed heat)")


def forward_model_of(parts) -> tuple[ForwardModel, ForwardModel]:
    """The typical forward model and the one moved to the guaranteed VF max (SPEC §3), shape (P, 1).

    Placeholders (Is 1e-14 A, n 1, Rs 0) stand in for parts without a model;
    their results are masked by the caller.
    """
    col = lambda a: np.asarray(a, dtype=float)[:, None]  # noqa: E731 - parts along axis 0
    typical = ForwardModel(
        col(parts.value("is_A", 1e-14)), col(parts.value("n", 1.0)), col(parts.value("rs_ohm", 0.0)),
        col(parts.value("eg_eV")), col(parts.value("is_temp_exponent")), col(parts.value("rs_temp_exponent")),
    )
    checked = typical.with_max_vf(col(parts.raw["vf_max_V"]), col(parts.raw["vf_max_at_A"]))
    return typical, checked


class SeriesRole(Role):
    name = "series"
    label = "Series diode"
    kinds = ("rectifier", "signal", "schottky", "fast_recovery")
    objective_metrics = {"drop": "forward_drop_V", "dissipation": "dissipation_W"}
    part_inputs = ("is_A", "n", "rs_ohm", "eg_eV", "is_temp_exponent", "rs_temp_exponent", "vf_max_V", "vrrm_V",
                   "if_avg_A", "if_ref_C", "pd_W", "pd_ref_C", "tj_max_C", "rth_ja_K_per_W", "rth_jc_K_per_W",
                   "rth_jl_K_per_W", "rth_ja_large_K_per_W", "ir_A", "ir_vr_V", "ir_t_C", "ir_double_K", "ifsm_A")
    curve_plots = (("forward", "I–V", {}), ("forward", "I–V (log)", {"log_y": True}),
                   ("junction_temperature", "Junction temperature", {"legend": "bottom_right"}),
                   ("power", "Power", {"legend": "top_right"}))

    def curves(self, requirement, part, candidate, notes):
        from partpick.checks.roles.series_curves import series_curves

        return series_curves(requirement, part, candidate, notes)

    def evaluate(self, requirement, parts, limits, overrides: Overrides | None = None) -> RoleResult:
        req = requirement
        ov = overrides or Overrides()
        count = parts.count
        corners = corners_of(req)
        C = len(corners)
        ambient_C, load_A = corners.for_parts(count, ov)
        reverse_V = req.reverse_voltage
        hot_C = req.ambient_max_C
        hot_K = ov.ambient_max(req, count) + ZERO_CELSIUS_K  # °C → K at the physics boundary
        points = PointTable(
            supply_V=np.concatenate([corners.supply_V, corners.supply_V, [reverse_V]]),
            load_A=np.concatenate([corners.load_A, corners.load_A, [0.0]]),
            ambient_C=np.concatenate([corners.ambient_C, corners.ambient_C, [hot_C]]),
            state=("cold_start",) * C + ("steady",) * C + ("reverse",),
        )
        cold_ids = np.arange(C)
        steady_ids = np.arange(C, 2 * C)
        reverse_id = 2 * C

        # ---- what each check needs --------------------------------------------------
        needs = Needs(parts)
        thermal_needs = thermal_needs_of(req)
        forward_needs = [(f,) for f in _MODEL_FIELDS] + thermal_needs
        reverse_needs = [("ir_A",), ("ir_vr_V",)] + thermal_needs
        if req.max_forward_drop_V is not None:
            needs.require("forward_drop", *forward_needs)
        if req.min_output_V is not None:
            needs.require("output_min", *forward_needs)
        needs.require("reverse_voltage", "vrrm_V")
        needs.require("forward_current", "if_avg_A", "tj_max_C")
        needs.require("power", *forward_needs)
        needs.require("junction_temp", *forward_needs, *reverse_needs)
        needs.require("reverse_runaway", *reverse_needs)
        if req.max_leakage_A is not None:
            needs.require("leakage", *reverse_needs)
        surge_asked = req.inrush_capacitance_F is not None and req.inrush_source_ohm is not None
        if surge_asked:
            needs.require("surge", "ifsm_A")
        forward_bad = np.zeros(count, dtype=bool)
        for f in forward_needs:
            forward_bad |= ~np.logical_or.reduce([parts.known(x) for x in f])
        reverse_bad = np.zeros(count, dtype=bool)
        for f in reverse_needs:
            reverse_bad |= ~np.logical_or.reduce([parts.known(x) for x in f])

        thermal = thermal_data(parts, req, ov.thermal_resistance)
        rth = thermal.thermal_resistance
        tj_max_K = thermal.tj_max_K
        tj_max_C = tj_max_K - ZERO_CELSIUS_K
        groups = parts.group

        # ---- forward state ------------------------------------------------------------
        typical, model = forward_model_of(parts)
        I = load_A
        Ta = ambient_C + ZERO_CELSIUS_K  # °C → K at the physics boundary
        v_cold = model.voltage(I, Ta)
        op = self_heated_forward(model, I, Ta, rth[:, None])
        runaway = np.asarray(op.runaway, dtype=bool)
        v_steady = np.where(runaway, np.nan, op.voltage)
        p_steady = np.where(runaway, np.nan, op.power)
        tj_steady_K = np.asarray(op.junction_temperature, dtype=float)
        fwd_mask = forward_bad[:, None]
        v_both = np.where(fwd_mask, np.nan, np.concatenate([v_cold, v_steady], axis=1))
        out_both = corners.supply_V[None, :].repeat(2, axis=0).reshape(1, -1) - v_both
        runaway_any = runaway.any(axis=1)
        forward_reasons = [(forward_bad, None), (runaway_any, _FORWARD_RUNAWAY)]

        # ---- reverse state --------------------------------------------------------------
        d = parts.value("ir_double_K")
        ir_A = parts.value("ir_A", 1e-6)
        ir_vr = parts.value("ir_vr_V", 1.0)
        ir_t_K = parts.value("ir_t_C") + ZERO_CELSIUS_K
        ir_at_ambient = reverse_current(ir_A, ir_vr, ir_t_K, reverse_V, hot_K, d)
        rev = reverse_thermal_state(reverse_V * ir_at_ambient, d, hot_K, rth)
        rev_runaway = np.asarray(rev.runaway, dtype=bool).reshape(count)
        tj_rev_K = np.where(rev_runaway | reverse_bad, np.nan, rev.junction_temperature)
        leakage = np.where(np.isnan(tj_rev_K), np.nan,
                           reverse_current(ir_A, ir_vr, ir_t_K, reverse_V, np.where(np.isnan(tj_rev_K), hot_K,
                                                                                      tj_rev_K), d))
        reverse_runaway_text = (f"thermal runaway in the reverse state: at {hot_C:g} °C ambient and "
                                f"{reverse_V:g} V the leakage heats the junction faster than RthJA sheds it "
                                "(no stable junction temperature)")
        reverse_reasons = [(reverse_bad, None), (rev_runaway, reverse_runaway_text)]

        def with_missing(check, reasons):
            text = needs.reason(check)
            return [(m, text if t is None else t) for m, t in reasons]

        checks = []
        # forward_drop and output_min: over every corner and both forward states.
        both_ids = np.concatenate([cold_ids, steady_ids])
        if req.max_forward_drop_V is not None:
            checks.append(worst_case_check(
                "forward_drop", "V", v_both, np.full(count, req.max_forward_drop_V), both_ids, "max",
                "requirement max_forward_drop_V", reasons=with_missing("forward_drop", forward_reasons),
                invalid=needs.missing("forward_drop")))
        if req.min_output_V is not None:
            checks.append(worst_case_check(
                "output_min", "V", out_both, np.full(count, req.min_output_V), both_ids, "min",
                "requirement min_output_V", reasons=with_missing("output_min", forward_reasons),
                invalid=needs.missing("output_min")))

        # reverse_voltage against VRRM × limit.
        rev_pct, rev_src = limit_array(limits, groups, "reverse_pct")
        vrrm = parts.raw["vrrm_V"]
        rev_source = object_array([f"{rev_src[g]}: {v:g} % of VRRM" for g, v in
                                   enumerate(_group_values(limits, "reverse_pct"))])[groups]
        checks.append(worst_case_check(
            "reverse_voltage", "V", np.full((count, 1), reverse_V), vrrm * rev_pct / 100.0, [reverse_id], "max",
            rev_source, reasons=[(needs.missing("reverse_voltage"), needs.reason("reverse_voltage"))],
            invalid=needs.missing("reverse_voltage")))

        # forward_current: the load at each corner against IF(AV) derated at its ambient × limit.
        cur_pct, cur_src = limit_array(limits, groups, "current_pct")
        if_ref_K = np.minimum(parts.value("if_ref_C") + ZERO_CELSIUS_K, tj_max_K - 1.0)
        rating_K = thermal.rating_temperature(parts, Ta, tj_steady_K, p_steady)  # SPEC §3a if_ref_point
        if_derated = derated_current(rating_K, parts.value("if_avg_A", 1.0)[:, None], tj_max_K[:, None],
                                     if_ref_K[:, None])
        cur_source = object_array([f"{cur_src[g]}: {v:g} % of IF(AV) derated at Ta" for g, v in
                                   enumerate(_group_values(limits, "current_pct"))])[groups]
        checks.append(worst_case_check(
            "forward_current", "A", I, if_derated * cur_pct[:, None] / 100.0, steady_ids, "max", cur_source,
            reasons=[(needs.missing("forward_current"), needs.reason("forward_current"))],
            invalid=needs.missing("forward_current")))

        # power: at each corner the ratio P/Pallow(Ta) in %, against the policy's %; the worst ratio is reported.
        pow_pct, pow_src = limit_array(limits, groups, "power_pct")
        p_allowed = thermal.allowed_power(Ta)
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.where(p_allowed > 0, 100.0 * p_steady / np.where(p_allowed > 0, p_allowed, 1.0),
                             np.where(p_steady > 0, np.inf, 0.0))
        ratio = np.where(np.isnan(p_steady), np.nan, ratio)
        no_allowance = np.isinf(ratio).any(axis=1)
        pow_source = object_array([f"{pow_src[g]}: {v:g} % of Pallow(Ta)" for g, v in
                                   enumerate(_group_values(limits, "power_pct"))])[groups]
        checks.append(worst_case_check(
            "power", "% of Pallow", ratio, pow_pct, steady_ids, "max", pow_source,
            reasons=with_missing("power", forward_reasons) + [
                (no_allowance, "no dissipation is allowed at this ambient: it is at or above Tj max")],
            invalid=needs.missing("power")))

        # junction_temp: steady forward corners and the reverse state.
        tj_all_C = np.concatenate([tj_steady_K, tj_rev_K[:, None]], axis=1) - ZERO_CELSIUS_K
        tj_lim, tj_src = tj_limit(limits, groups, tj_max_C)
        checks.append(worst_case_check(
            "junction_temp", "°C", tj_all_C, tj_lim, np.concatenate([steady_ids, [reverse_id]]), "max", tj_src,
            reasons=with_missing("junction_temp", forward_reasons + reverse_reasons),
            invalid=needs.missing("junction_temp"),
            ambient_C=np.concatenate([ambient_C, hot_K[:, None] - ZERO_CELSIUS_K], axis=1)))
        checks[-1].note = thermal.notes  # the thermal path's assumptions (SPEC §3a)

        # reverse_runaway: a stable reverse-state Tj must exist below Tj max.
        checks.append(worst_case_check(
            "reverse_runaway", "°C", tj_rev_K[:, None] - ZERO_CELSIUS_K, tj_max_C, [reverse_id], "max",
            "part tj_max_C: a stable reverse-state junction temperature below Tj max",
            reasons=with_missing("reverse_runaway", reverse_reasons), invalid=needs.missing("reverse_runaway")))

        # SPEC §3: above the rated VR the leakage is scaled in proportion to voltage; the sheet says so.
        scaled = parts.known("ir_vr_V") & (reverse_V > ir_vr)
        scaled_note = object_array(None, count)
        scaled_note[scaled] = (f"leakage scaled in proportion to voltage: {reverse_V:g} V is above the "
                               "datasheet's IR test voltage ir_vr_V")
        checks[-1].note = scaled_note
        if req.max_leakage_A is not None:
            checks.append(worst_case_check(
                "leakage", "A", leakage[:, None], np.full(count, req.max_leakage_A), [reverse_id], "max",
                "requirement max_leakage_A", reasons=with_missing("leakage", reverse_reasons),
                invalid=needs.missing("leakage")))
            checks[-1].note = scaled_note

        if surge_asked:
            # Charging a capacitor C from Vmax through R: ∫i²dt = Vmax²·C/(2R); the
            # rating of a half-sine surge IFSM of length t is IFSM²·t/2.
            i2t = req.supply_max_V**2 * req.inrush_capacitance_F / (2.0 * req.inrush_source_ohm)
            ifsm = parts.value("ifsm_A", 1.0)
            rating = ifsm**2 * (parts.value("ifsm_ms") / 1000.0) / 2.0
            surge_pct, surge_src = limit_array(limits, groups, "surge_pct")
            surge_source = object_array([f"{surge_src[g]}: {v:g} % of IFSM²·t/2" for g, v in
                                         enumerate(_group_values(limits, "surge_pct"))])[groups]
            inrush_id = int(np.flatnonzero((corners.supply_V == req.supply_max_V))[0])  # a cold start at Vmax
            checks.append(worst_case_check(
                "surge", "A²s", np.full((count, 1), i2t), rating * surge_pct / 100.0, [inrush_id], "max",
                surge_source, reasons=[(needs.missing("surge"), needs.reason("surge"))],
                invalid=needs.missing("surge")))

        any_missing = needs.any_missing()
        nan = np.full(count, np.nan)
        checks.append(worst_case_check(
            "data_missing", "", nan[:, None], nan, [-1], "max", "part record: the fields the checks need",
            reasons=[(any_missing, needs.data_missing_reason())], present=any_missing))

        # ---- metrics at their worst corner --------------------------------------------
        drop, drop_col = worst_value(v_both, "max")
        out_min, out_min_col = worst_value(out_both, "min")
        out_max, out_max_col = worst_value(out_both, "max")
        dissipation, diss_col = worst_value(np.where(fwd_mask, np.nan, p_steady), "max")
        tj_worst, tj_col = worst_value(np.where(forward_bad[:, None] | reverse_bad[:, None], np.nan, tj_all_C),
                                       "max")
        # Hand model: tangent at load_max_A at the Tj of the worst-drop corner (cold: Ta; steady: solved Tj).
        corner_of = drop_col % C
        rows = np.arange(count)
        tj_hand_K = np.where(drop_col < C, Ta[rows, corner_of], tj_steady_K[rows, corner_of])
        hand_ok = np.isfinite(drop) & np.isfinite(tj_hand_K)
        vth0, ron = model.tangent(ov.load_max(req, count)[:, None], np.where(hand_ok, tj_hand_K, Ta[:, 0])[:, None])
        vth0 = np.where(hand_ok, np.ravel(vth0), np.nan)
        ron = np.where(hand_ok, np.ravel(ron), np.nan)
        leak_metric = np.where(reverse_bad, np.nan, leakage)
        metrics = {
            "forward_drop_V": drop,
            "output_min_V": out_min,
            "output_max_V": out_max,
            "dissipation_W": dissipation,
            "junction_temp_C": tj_worst,
            "reverse_voltage_V": np.full(count, reverse_V),
            "reverse_headroom_V": vrrm - reverse_V,
            "reverse_stress_pct": np.where(vrrm > 0, 100.0 * reverse_V / vrrm, np.nan),
            "leakage_A": leak_metric,
            "reverse_power_W": reverse_V * leak_metric,
            "vth0_V": vth0,
            "ron_ohm": ron,
        }
        metric_points = {
            "forward_drop_V": both_ids[drop_col], "output_min_V": both_ids[out_min_col],
            "output_max_V": both_ids[out_max_col], "dissipation_W": steady_ids[diss_col],
            "junction_temp_C": np.concatenate([steady_ids, [reverse_id]])[tj_col],
            "reverse_voltage_V": np.full(count, reverse_id), "leakage_A": np.full(count, reverse_id),
            "reverse_power_W": np.full(count, reverse_id), "vth0_V": both_ids[drop_col],
            "ron_ohm": both_ids[drop_col],
        }
        internals = {
            "is_A_typical": np.ravel(np.broadcast_to(typical.saturation_current, (count, 1))),
            "is_A": np.ravel(np.broadcast_to(model.saturation_current, (count, 1))),
            "n": parts.value("n", 1.0), "rs_ohm": parts.value("rs_ohm", 0.0),
            "eg_eV": parts.value("eg_eV"), "is_temp_exponent": parts.value("is_temp_exponent"),
            "rs_temp_exponent": parts.value("rs_temp_exponent"),
            "rth_ja_K_per_W": rth, "pd_W": thermal.power_rating, "tj_max_C": tj_max_C,
            "tj_limit_C": tj_lim, "hand_model_tj_C": tj_hand_K - ZERO_CELSIUS_K,
            "forward_bad": forward_bad, "reverse_bad": reverse_bad,
            "cold_voltage_V": v_cold, "steady_voltage_V": v_steady, "steady_tj_C": tj_steady_K - ZERO_CELSIUS_K,
            "reverse_tj_C": tj_rev_K - ZERO_CELSIUS_K, "thermal_path_note": thermal.notes,
        }
        return RoleResult(points, checks, metrics, metric_points, internals)


def _group_values(limits: dict, key: str) -> list:
    return [limits[g][key].value for g in ("pn", "schottky", "zener")]


ROLE = SeriesRole()
