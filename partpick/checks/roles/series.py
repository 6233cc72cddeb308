"""The ``series`` role: a diode in series with a DC load (reverse-polarity protection, OR-ing, steering).

SPEC §4. The diode either conducts or blocks, never both at once:

- forward state at each of the 8 corners, at switch-on (Tj = Ta, ``cold_start``)
  and self-heated (``steady``, Tj = Ta + Vf·I·RthJA solved by Newton in
  `partpick.physics.thermal.self_heated_forward`);
- reverse state at the hottest ambient (``reverse``): the continuous reverse
  voltage (``reverse_V``, default the supply reversed); leakage from the
  datasheet IR point (and the hot one, `partpick.physics.leakage.leakage_law`)
  heats the junction from its start — the steady forward Tj with ``handover``
  (default), else ambient — and the equilibria come from
  `partpick.physics.thermal.blocking_state`; the distance to runaway is bisected
  in ambient and RthJA. A ``reverse_transient_V`` pulse is its own check against
  VRSM/VRRM and never heats the junction.

Points: columns 0…C−1 are the cold-start corners, C…2C−1 the steady ones,
2C the reverse state (supply_V there is the reverse voltage, load_A is 0).
"""

from __future__ import annotations

import numpy as np

from partpick.checks.corners import corners_of
from partpick.checks.partdata import (RS_TEMP_DEFAULT_NOTE, Needs, limit_array, thermal_data,
                                      thermal_needs as thermal_needs_of, tj_limit)
from partpick.checks.results import PointTable, object_array, worst_case_check, worst_value
from partpick.checks.roles.base import Overrides, Role, RoleResult
from partpick.physics.constants import ZERO_CELSIUS_K
from partpick.physics.junction import ForwardModel
from partpick.physics.leakage import leakage_law
from partpick.physics.thermal import blocking_state, derated_current, self_heated_forward

__all__ = ["SeriesRole", "ROLE", "forward_model_of"]

_MODEL_FIELDS = ("is_A", "n", "rs_ohm")
_FORWARD_RUNAWAY = ("forward thermal runaway: Tj = Ta + Vf·I·RthJA has no steady solution at this corner "
                    "(far more dissipation than RthJA can shed: the part is grossly overloaded)")
_FORWARD_RUNAWAY_RS = ("forward thermal runaway: Tj = Ta + Vf·I·RthJA has no steady solution at this corner "
                       "(Rs rises with temperature: each kelvin adds more dissipation than RthJA sheds)")


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
        if req.reverse_transient_V is not None:
            needs.require("reverse_transient", "vrrm_V")
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
        # the cause in words: with Rs constant only sheer overload can leave no steady Tj
        rs_rises = (parts.value("rs_temp_exponent") > 0) & (parts.value("rs_ohm", 0.0) > 0)
        forward_reasons = [(forward_bad, None), (runaway_any & rs_rises, _FORWARD_RUNAWAY_RS),
                           (runaway_any, _FORWARD_RUNAWAY)]

        # ---- reverse state --------------------------------------------------------------
        # SPEC §3: the continuous reverse voltage at the hottest ambient, from the hand-over start
        # (the steady forward Tj of the same corner) or, without hand-over, from a cold junction.
        law = _leakage_law(parts)
        load_max = ov.load_max(req, count)
        hot_corners = np.flatnonzero(corners.ambient_C == req.ambient_max_C)
        if req.hands_over:
            start_K = np.max(tj_steady_K[:, hot_corners], axis=1)  # NaN where the forward state runs away
        else:
            start_K = np.asarray(hot_K, dtype=float)
        blocking = blocking_state(law, reverse_V, hot_K, rth)
        settles, cause = _settling(blocking, start_K, hot_K, tj_max_K, req.hands_over)
        tj_rev_K = np.where(reverse_bad | ~np.isfinite(blocking.junction_temperature), np.nan,
                            blocking.junction_temperature)
        # leakage peaks right after a hand-over, while the junction is still hot: at max(start, stable)
        leak_at_K = np.fmax(np.where(np.isfinite(start_K), start_K, np.nan), tj_rev_K)
        leakage = np.where(settles & ~reverse_bad, law.current(reverse_V, np.where(np.isfinite(leak_at_K),
                                                                                  leak_at_K, hot_K)), np.nan)
        runaway_ambient_K, runaway_rth = _runaway_limits(model, law, reverse_V, load_max, hot_K, rth, tj_max_K,
                                                         req.hands_over, req.ambient_min_C + ZERO_CELSIUS_K)
        reverse_reasons = [(reverse_bad, None), (~settles, cause)]
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
        rs_default = object_array(None, count)
        rs_default[~parts.known("rs_temp_exponent") & parts.known("rs_ohm") & (parts.value("rs_ohm", 0.0) > 0)] = \
            RS_TEMP_DEFAULT_NOTE
        checks[-1].note = _joined(thermal.notes, rs_default)  # the thermal path's assumptions (SPEC §3a)

        # reverse_runaway (SPEC §3): the hottest start must settle at ambient_max; the margin is the
        # distance to runaway, in K of ambient, and as the share of thermal resistance still unused.
        amb_max_C = hot_K - ZERO_CELSIUS_K
        runaway_ambient_C = runaway_ambient_K - ZERO_CELSIUS_K
        check = worst_case_check(
            "reverse_runaway", "°C", amb_max_C[:, None], runaway_ambient_C, [reverse_id], "max",
            "runaway_ambient_C: the highest ambient at which the hottest start still settles below Tj max",
            reasons=with_missing("reverse_runaway", [(reverse_bad, None),
                                                     (~np.isfinite(runaway_ambient_C), cause)]),
            invalid=needs.missing("reverse_runaway"))
        known = np.isfinite(check.margin) & ~needs.missing("reverse_runaway")
        with np.errstate(divide="ignore", invalid="ignore"):
            rth_share = 100.0 * (runaway_rth - rth) / runaway_rth
        # the direct evaluation at ambient_max decides; the bisected limits only measure the distance
        check.passed = settles & known
        check.margin = np.where(known, np.where(settles, np.maximum(check.margin, 0.0),
                                                np.minimum(check.margin, -1e-9)), np.nan)
        check.margin_pct = np.where(known & np.isfinite(rth_share),
                                    np.where(settles, np.maximum(rth_share, 0.0), np.minimum(rth_share, -1e-9)),
                                    np.where(known, np.where(settles, 0.0, -100.0), np.nan))
        # SPEC §3: leakage in proportion to voltage above the test voltage, held below it; the sheet says so.
        ir_vr = parts.raw["ir_vr_V"]
        voltage_note = object_array(None, count)
        voltage_note[parts.known("ir_vr_V") & (reverse_V > ir_vr)] = (
            f"leakage scaled in proportion to voltage: {reverse_V:g} V is above the datasheet's IR test voltage")
        voltage_note[parts.known("ir_vr_V") & (reverse_V < ir_vr)] = (
            f"leakage held at the datasheet's value below its test voltage ({reverse_V:g} V is below it; "
            "conservative)")
        check.note = _joined(_runaway_notes(blocking, start_K, settles, cause, law, req.hands_over, reverse_bad),
                             voltage_note)
        checks.append(check)

        # reverse_transient (SPEC §3): a non-repetitive pulse against the peak rating only.
        if req.reverse_transient_V is not None:
            vrsm = parts.raw["vrsm_V"]
            peak = np.where(np.isfinite(vrsm), vrsm, vrrm)
            peak_source = object_array([
                f"{rev_src[g]}: {v:g} % of " for g, v in enumerate(_group_values(limits, "reverse_pct"))])[groups]
            peak_source = peak_source + np.where(np.isfinite(vrsm), "VRSM (non-repetitive peak)",
                                                 "VRRM (the part gives no VRSM)").astype(object)
            checks.append(worst_case_check(
                "reverse_transient", "V", np.full((count, 1), req.reverse_transient_V), peak * rev_pct / 100.0,
                [reverse_id], "max", peak_source,
                reasons=[(needs.missing("reverse_transient"), needs.reason("reverse_transient"))],
                invalid=needs.missing("reverse_transient")))

        if req.max_leakage_A is not None:
            checks.append(worst_case_check(
                "leakage", "A", leakage[:, None], np.full(count, req.max_leakage_A), [reverse_id], "max",
                "requirement max_leakage_A", reasons=with_missing("leakage", reverse_reasons),
                invalid=needs.missing("leakage")))
            checks[-1].note = _joined(_leakage_notes(law, reverse_bad), voltage_note)

        if surge_asked:
            # Charging a capacitor C from Vmax through R: ∫i²dt = Vmax²·C/(2R); the
            # rating of a half-sine surge IFSM of length t is IFSM²·t/2.
            i2t = req.supply_max_V**2 * req.inrush_capacitance_F / (2.0 * req.inrush_source_ohm)
            inrush_peak_A = req.supply_max_V / req.inrush_source_ohm
            ifsm = parts.value("ifsm_A", 1.0)
            rating = ifsm**2 * (parts.value("ifsm_ms") / 1000.0) / 2.0
            surge_pct, surge_src = limit_array(limits, groups, "surge_pct")
            # SPEC §4: the surge limit is on the peak current, so the I²t limit is its square
            surge_source = object_array([f"{surge_src[g]}: ({v:g} % of IFSM)² · IFSM²·t/2" for g, v in
                                         enumerate(_group_values(limits, "surge_pct"))])[groups]
            inrush_id = int(np.flatnonzero((corners.supply_V == req.supply_max_V))[0])  # a cold start at Vmax
            checks.append(worst_case_check(
                "surge", "A²s", np.full((count, 1), i2t), rating * (surge_pct / 100.0) ** 2, [inrush_id], "max",
                surge_source, reasons=[(needs.missing("surge"), needs.reason("surge"))],
                invalid=needs.missing("surge")))
            # surge_peak (SPEC §4): the inrush peak Vmax/R into an empty capacitor against IFSM × the
            # surge limit. The charging pulse (time constant R·C) is shorter than the part's IFSM pulse,
            # and no part gives a rating for a shorter one, so the peak is held to IFSM itself.
            peak_source = object_array([f"{surge_src[g]}: {v:g} % of IFSM" for g, v in
                                        enumerate(_group_values(limits, "surge_pct"))])[groups]
            checks.append(worst_case_check(
                "surge_peak", "A", np.full((count, 1), inrush_peak_A), ifsm * surge_pct / 100.0, [inrush_id],
                "max", peak_source, reasons=[(needs.missing("surge"), needs.reason("surge"))],
                invalid=needs.missing("surge")))
            checks[-1].note = object_array(
                f"inrush peak = supply_max_V/inrush_source_ohm = {inrush_peak_A:.4g} A, time constant "
                f"{req.inrush_source_ohm * req.inrush_capacitance_F * 1e3:.3g} ms; held to IFSM (no rating for a "
                "pulse shorter than the part's surge pulse)", count)

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
            "runaway_ambient_C": np.where(reverse_bad, np.nan, runaway_ambient_C),
            **({"inrush_peak_A": np.full(count, inrush_peak_A)} if surge_asked else {}),
            "runaway_rth_K_per_W": np.where(reverse_bad, np.nan, runaway_rth),
            "vth0_V": vth0,
            "ron_ohm": ron,
        }
        metric_points = {
            "forward_drop_V": both_ids[drop_col], "output_min_V": both_ids[out_min_col],
            "output_max_V": both_ids[out_max_col], "dissipation_W": steady_ids[diss_col],
            "junction_temp_C": np.concatenate([steady_ids, [reverse_id]])[tj_col],
            "reverse_voltage_V": np.full(count, reverse_id), "leakage_A": np.full(count, reverse_id),
            "reverse_power_W": np.full(count, reverse_id), "vth0_V": both_ids[drop_col],
            "runaway_ambient_C": np.full(count, reverse_id), "runaway_rth_K_per_W": np.full(count, reverse_id),
            **({"inrush_peak_A": np.full(count, inrush_id)} if surge_asked else {}),
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


def _leakage_law(parts):
    """The parts' leakage law from the datasheet IR point and, where given, the hot one (SPEC §3)."""
    return leakage_law(parts.value("ir_A", 1e-6), parts.value("ir_vr_V", 1.0),
                       parts.value("ir_t_C") + ZERO_CELSIUS_K, parts.value("ir_double_K"),
                       parts.raw["ir_hot_A"], parts.raw["ir_hot_t_C"] + ZERO_CELSIUS_K)


def _settling(state, start_K, ambient_K, tj_max_K, handover: bool):
    """(settles (P,), cause (P,) object): whether the blocking junction settles from its start, and why not.

    It settles where a stable solution exists below Tj max and the start lies below the unstable one
    (SPEC §3). The cause names what actually happens.
    """
    stable = np.asarray(state.junction_temperature, dtype=float)
    unstable = np.asarray(state.unstable_temperature, dtype=float)
    start = np.asarray(start_K, dtype=float)
    no_start = ~np.isfinite(start)
    no_stable = ~np.isfinite(stable)
    too_hot = ~no_stable & (stable >= tj_max_K)
    settles = _settling_mask(state, start, tj_max_K)  # the rule, stated once; the masks below say why not
    cause = object_array(None, start.size)
    amb = np.broadcast_to(np.asarray(ambient_K, dtype=float) - ZERO_CELSIUS_K, start.shape)
    for j in np.flatnonzero(~settles):
        if no_start[j]:
            cause[j] = ("no steady forward junction temperature to hand over from (the forward state runs "
                        "away at the hottest ambient)")
        elif no_stable[j]:
            cause[j] = (f"thermal runaway in the reverse state at {amb[j]:g} °C ambient: the leakage power "
                        "grows with Tj faster than RthJA sheds it at every junction temperature (loop gain "
                        "above 1), so no junction temperature is stable")
        elif too_hot[j]:
            cause[j] = (f"the only stable reverse-state Tj ({stable[j] - ZERO_CELSIUS_K:.1f} °C) is at or above "
                        f"Tj max ({tj_max_K[j] - ZERO_CELSIUS_K:.1f} °C)")
        else:
            where = "the steady forward Tj (hand-over)" if handover else "ambient"
            cause[j] = (f"thermal runaway after the hand-over: the junction starts at {where}, "
                        f"{start[j] - ZERO_CELSIUS_K:.1f} °C, above the reverse state's unstable point "
                        f"{unstable[j] - ZERO_CELSIUS_K:.1f} °C, where leakage heating outruns RthJA; from "
                        f"a cold start it would settle at {stable[j] - ZERO_CELSIUS_K:.1f} °C")
    return settles, cause


def _runaway_limits(model, law, reverse_V, load_A, ambient_K, rth, tj_max_K, handover: bool, ambient_min_K,
                    iterations: int = 32):
    """(runaway_ambient [K], runaway_rth [K/W]) per part, by vectorised bisection (SPEC §3, §3a).

    The highest ambient at which the hottest start still settles (bracket: 150 K below the
    requirement's ambient minimum up to Tj max), and the largest RthJA that still settles at
    ``ambient_K`` (bracket 0 … 100 × RthJA in use, bisected in ln RthJA). With hand-over the start
    is the steady forward Tj at ``load_A`` recomputed at each trial ambient and RthJA. NaN where
    even the bracket's low end does not settle; the bracket's high end where it still settles there.
    """
    P = np.size(rth)
    load = np.asarray(load_A, dtype=float).reshape(P, 1)

    def settles(ambient, thermal_resistance):
        ambient = np.asarray(ambient, dtype=float)
        if handover:
            fwd = self_heated_forward(model, load, ambient[:, None], thermal_resistance[:, None])
            start = np.asarray(fwd.junction_temperature, dtype=float).reshape(P)
        else:
            start = ambient
        state = blocking_state(law, reverse_V, ambient, thermal_resistance)
        return _settling_mask(state, start, tj_max_K)

    lo = np.full(P, max(ambient_min_K - 150.0, 50.0))
    hi = np.maximum(np.asarray(tj_max_K, dtype=float), lo + 1.0)
    ok_lo = settles(lo, rth)
    a, b = lo.copy(), hi.copy()
    for _ in range(iterations):
        mid = 0.5 * (a + b)
        ok = settles(mid, rth)
        a = np.where(ok, mid, a)
        b = np.where(ok, b, mid)
    ambient_limit = np.where(ok_lo, a, np.nan)

    amb = np.broadcast_to(np.asarray(ambient_K, dtype=float), (P,))
    r_lo = np.maximum(rth, 1e-6) * 1e-3
    r_hi = np.maximum(rth, 1e-6) * 100.0
    ok_rlo = settles(amb, r_lo)
    ok_rhi = settles(amb, r_hi)
    la, lb = np.log(r_lo), np.log(r_hi)
    for _ in range(iterations):
        mid = 0.5 * (la + lb)
        ok = settles(amb, np.exp(mid))
        la = np.where(ok, mid, la)
        lb = np.where(ok, lb, mid)
    rth_limit = np.where(ok_rhi, r_hi, np.where(ok_rlo, np.exp(la), np.nan))
    return ambient_limit, rth_limit


def _settling_mask(state, start, tj_max_K) -> np.ndarray:
    stable = np.asarray(state.junction_temperature, dtype=float)
    unstable = np.asarray(state.unstable_temperature, dtype=float)
    with np.errstate(invalid="ignore"):
        return np.isfinite(stable) & (stable < tj_max_K) & np.isfinite(start) & (start < unstable)


def _runaway_notes(state, start_K, settles, cause, law, handover: bool, reverse_bad) -> np.ndarray:
    """What the reverse state does, for the check sheet: start, stable and unstable points, leakage law."""
    notes = object_array(None, np.size(start_K))
    stable = np.asarray(state.junction_temperature, dtype=float) - ZERO_CELSIUS_K
    unstable = np.asarray(state.unstable_temperature, dtype=float) - ZERO_CELSIUS_K
    start = np.asarray(start_K, dtype=float) - ZERO_CELSIUS_K
    gain = np.asarray(state.loop_gain, dtype=float)
    law_notes = _leakage_notes(law, reverse_bad)
    for j in np.flatnonzero(settles & ~reverse_bad):
        begin = "hand-over: starts at the steady forward Tj" if handover else "switch-on: starts at ambient"
        far = "never (no leakage)" if not np.isfinite(unstable[j]) else f"{unstable[j]:.1f} °C"
        notes[j] = (f"{begin}, {start[j]:.1f} °C; settles at {stable[j]:.1f} °C (loop gain {gain[j]:.2f}); "
                    f"runs away from a start above {far}; {law_notes[j]}")
    for j in np.flatnonzero(~settles & ~reverse_bad):
        notes[j] = f"{cause[j]}; {law_notes[j]}"
    return notes


def _leakage_notes(law, reverse_bad) -> np.ndarray:
    """Which doubling interval the leakage uses, per part (SPEC §3: the check sheet says which)."""
    notes = object_array(None, np.size(law.low_interval))
    for j in np.flatnonzero(~np.asarray(reverse_bad)):
        if law.two_point[j]:
            notes[j] = (f"leakage doubling every {law.low_interval[j]:.3g} K from the two datasheet points, "
                        f"every {law.high_interval[j]:.3g} K above the hot point "
                        f"({law.hot_temperature[j] - ZERO_CELSIUS_K:g} °C)")
        else:
            notes[j] = f"leakage doubling every {law.low_interval[j]:.3g} K (one datasheet point)"
    return notes


def _joined(*notes) -> np.ndarray:
    """Per part, the notes that are not None, joined with "; "."""
    out = object_array(None, np.size(notes[0]))
    for j in range(out.size):
        texts = [n[j] for n in notes if n[j]]
        out[j] = "; ".join(texts) if texts else None
    return out


def _group_values(limits: dict, key: str) -> list:
    return [limits[g][key].value for g in ("pn", "schottky", "zener")]


ROLE = SeriesRole()
