"""The ``tvs_clamp`` role: a transient-voltage suppressor across a line, clamping a surge.

SPEC §4a. Points: ambient end × breakdown end (VBR min, VBR max), state
``surge``. The clamp is the straight line V = VBR(T) + Rd·I with
Rd = (VC − VBR max)/(IPP − IT) and VBR moved by its temperature coefficient
to the ambient (`partpick.physics.tvs`); the surge generator (open-circuit
peak ``surge_V`` behind ``surge_source_ohm``) meets it at Ip = (Vsurge − VBR)/(Rsource + Rd).
Each metric at its worst end: the surge current at VBR min, the clamp
voltage at VBR max, the pulse power the larger of the two. The part's pulse
rating is moved to the surge's decay time (two rating points log-log, or
t^(−1/2) from one; only within 10 µs–10 ms) and derated linearly from 25 °C
to zero at Tj max, at the ambient (the junction's temperature before the pulse).
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import numpy as np

from partpick.checks.partdata import Needs, limit_array
from partpick.checks.role_table import RoleTable, TableKey
from partpick.checks.results import PointTable, object_array, worst_case_check, worst_value
from partpick.checks.roles.base import Overrides, Role, RoleResult
from partpick.library.fields import parse_waveform
from partpick.physics.constants import ZERO_CELSIUS_K
from partpick.physics.leakage import reverse_current
from partpick.physics.tvs import (PULSE_RANGE_S, breakdown_voltage_at, derated_pulse_rating, pulse_rating_for)

__all__ = ["TvsClampRole", "ROLE", "SURGE_TABLE", "SURGE_WAVEFORMS", "DEFAULT_VBR_TC_PCT_PER_K",
           "DEFAULT_PPP_WAVEFORM"]

_ENDS = ("low", "high")
# Avalanche breakdown rises with temperature, about +0.1 %/K for TVS parts of tens of volts
# (common practice, from memory); used where a part gives no coefficient, and said so.
DEFAULT_VBR_TC_PCT_PER_K = 0.1
DEFAULT_PPP_WAVEFORM = "10/1000"

# The short-circuit current waveforms of the usual surge tests (rise/decay in µs; common practice):
# 8/20 the combination wave's current (its 1.2/50 is the open-circuit voltage), 10/1000 and 10/350
# the long pulses, 5/320 the current of the 10/700 telecom wave, 2/10, 10/160 and 10/560 telecom pulses.
SURGE_WAVEFORMS = ("8/20", "10/1000", "10/350", "5/320", "2/10", "10/160", "10/560")

_NOT_USED = {
    "supply_min_V": "a surge clamp has no DC supply: give the line's maximum as [surge] line_max_V",
    "supply_max_V": "a surge clamp has no DC supply: give the line's maximum as [surge] line_max_V",
    "load_min_A": "a surge clamp carries no load current",
    "load_max_A": "a surge clamp carries no load current",
    "reverse_V": "the line voltage is [surge] line_max_V",
    "reverse_transient_V": "the surge is [surge] surge_V behind surge_source_ohm",
    "reverse_margin_pct": "the stand-off and breakdown checks take [surge] line_max_V as it is",
    "handover": "a surge clamp has no hand-over",
    "max_forward_drop_V": "a surge clamp has no forward drop check: use [surge] protected_max_V",
    "min_output_V": "a surge clamp has no output",
    "tj_margin_K": "a surge clamp has no steady junction temperature: the pulse rating is derated with ambient",
    "current_limit_pct": "a surge clamp's limit is its pulse power (policy pulse-power limit)",
    "power_limit_pct": "a surge clamp's limit is its pulse power (policy pulse-power limit)",
    "resistor_power_limit_pct": "a surge clamp has no resistor",
    "rth_ja_K_per_W": "a surge clamp has no steady heating: its pulse rating is derated with ambient",
    "inrush_capacitance_F": "a surge clamp has no inrush check",
    "inrush_source_ohm": "a surge clamp has no inrush check",
}

SURGE_TABLE = RoleTable("surge", "Surge clamp", (
    TableKey("line_max_V", "V", "Line maximum", "The highest normal line voltage (the TVS must not conduct).",
             required=True, low=0.0, low_inclusive=False, high=100e3),
    TableKey("protected_max_V", "V", "Protected maximum", "The highest voltage the protected circuit survives.",
             required=True, low=0.0, low_inclusive=False, high=100e3),
    TableKey("clamp_limit_pct", "%", "Clamp voltage ≤ [% of protected max]", "The clamp voltage at most this "
             "share of the protected maximum.", default=90.0, low=0.0, low_inclusive=False, high=100.0),
    TableKey("surge_V", "V", "Surge voltage", "The surge generator's open-circuit peak.", required=True, low=0.0,
             low_inclusive=False, high=1e6),
    TableKey("surge_source_ohm", "Ω", "Surge source resistance", "The generator's source resistance with any "
             "coupling network (e.g. 2 Ω, or 42 Ω with the usual 40 Ω coupling on lines; common practice).",
             required=True, low=0.0, low_inclusive=False, high=1e6),
    TableKey("surge_waveform", "µs", "Surge current waveform", "The short-circuit current waveform, rise/decay "
             "in µs: 8/20 for the combination wave (not its 1.2/50 voltage).", kind="choice", default="8/20",
             choices=SURGE_WAVEFORMS),
    TableKey("bidirectional_line", "", "Bidirectional line", "The line swings or is surged in both polarities: "
             "a bidirectional part is needed.", kind="bool", default=False),
))


def _decay_times(texts: np.ndarray) -> np.ndarray:
    """Decay time [s] of each part's waveform text (NaN where not given)."""
    out = np.full(texts.shape, np.nan)
    cache: dict[str, float] = {}
    for j, text in enumerate(texts.tolist()):
        if text:
            if text not in cache:
                cache[text] = parse_waveform(text)[1]
            out[j] = cache[text]
    return out


@dataclass
class _SurgePoint:
    """The surge operating point at every point, arrays (P, K)."""

    breakdown: np.ndarray
    resistance: np.ndarray   # (P, 1)
    current: np.ndarray
    clamp: np.ndarray
    power: np.ndarray


def _surge(surge, vbr_end, tc_pct, rd, ambient_K) -> _SurgePoint:
    """Clamp line at each end and ambient, and where the surge generator meets it."""
    vbr = breakdown_voltage_at(vbr_end, tc_pct, ambient_K)
    # The generator's line meets the clamp line (IT, mA, neglected against the surge's amperes).
    ip = np.maximum(0.0, (surge.surge_V - vbr) / (surge.surge_source_ohm + rd))
    vc = vbr + rd * ip
    return _SurgePoint(vbr, rd, ip, vc, vc * ip)


class TvsClampRole(Role):
    name = "tvs_clamp"
    label = "Surge clamp"
    kinds = ("tvs",)
    objective_metrics = {"drop": "clamp_voltage_V", "dissipation": "pulse_stress_pct"}
    part_inputs = ("vwm_V", "vbr_min_V", "vbr_max_V", "vc_V", "ipp_A", "it_A", "ppp_W", "ppp2_W",
                   "vbr_tc_pct_per_K", "tj_max_C", "ir_A", "ir_vr_V")
    limit_searches = ("ambient",)  # no load current and no steady heating: the pulse rating is derated
    required_keys = ()
    unused_keys = _NOT_USED
    table = SURGE_TABLE
    curve_plots = (("clamp_line", "Clamp line", {"legend": "bottom_right"}),
                   ("pulse_rating", "Pulse rating", {"legend": "bottom_right", "log_x": True, "log_y": True}))
    check_labels = {"standoff": "Stand-off", "breakdown_margin": "Breakdown above line", "clamp_voltage":
                    "Clamp voltage", "pulse_power": "Pulse power", "direction": "Direction"}
    metric_labels = {"surge_current_A": "Surge current", "clamp_voltage_V": "Clamp voltage",
                     "pulse_power_W": "Pulse power", "pulse_rating_W": "Pulse rating (moved, derated)",
                     "pulse_stress_pct": "Pulse stress", "standoff_V": "Stand-off VWM",
                     "breakdown_min_V": "VBR min (coldest)"}
    key_metrics = ("clamp_voltage_V", "surge_current_A", "pulse_stress_pct", "standoff_V")
    rating_of_check = {"standoff": ("vwm_V", "VWM", "V"), "breakdown_margin": ("vbr_min_V", "VBR min", "V"),
                       "clamp_voltage": ("vc_V", "VC at IPP", "V"), "pulse_power": ("ppp_W", "PPP", "W")}
    method_notes = (
        "Clamp line V = VBR + Rd·I through the datasheet's (IT, VBR max) and (IPP, VC): Rd = (VC − VBR max)/(IPP − "
        "IT), at both ends of VBR, moved by the breakdown's temperature coefficient to the ambient ends (+0.1 %/K "
        "where the part gives none, common practice). The surge generator's line meets it at Ip = (Vsurge − "
        "VBR)/(Rsource + Rd); the surge current is taken at VBR min, the clamp voltage at VBR max.",
        "The pulse rating is moved to the surge's decay time through the part's two rating points (log–log), or "
        "from one by Ppp ∝ t^(−1/2) (common practice, from memory), never beyond 10 µs–10 ms, and derated "
        "linearly from 25 °C to zero at Tj max at the ambient (common practice).",
        "A single surge pulse is assumed: repeated surges heat the part further; the clamp line beyond IPP is an "
        "extrapolation.",
    )
    cautions = (
        "Surge energy can destroy a clamp violently (a TVS fails short, then open, and can burn); this is a "
        "single-pulse estimate from datasheet parameters. Defer to the applicable surge test standards and verify "
        "by a surge test on the built circuit.",
    )

    def check_table(self, values, common, fail):
        if values["protected_max_V"] <= values["line_max_V"]:
            fail("protected_max_V", f"{values['protected_max_V']:g} V is not above line_max_V = "
                                    f"{values['line_max_V']:g} V (no clamp fits between the line and the limit)")
        if values["surge_V"] <= values["line_max_V"]:
            fail("surge_V", f"{values['surge_V']:g} V is not above line_max_V = {values['line_max_V']:g} V "
                            "(the open-circuit peak of the surge, not its rise above the line)")

    def curves(self, requirement, part, candidate, notes):
        from partpick.checks.roles.tvs_clamp_curves import tvs_sections

        return tvs_sections(requirement, part, candidate, notes)

    def evaluate(self, requirement, parts, limits, overrides: Overrides | None = None) -> RoleResult:
        req = requirement
        ov = overrides or Overrides()
        surge = req.table("surge")
        count = parts.count
        combos = list(itertools.product((req.ambient_min_C, req.ambient_max_C), _ENDS))
        ambient_C = np.array([c[0] for c in combos], dtype=float)
        end_of = tuple(c[1] for c in combos)
        K = len(combos)
        points = PointTable(supply_V=None, load_A=None, ambient_C=ambient_C, state=("surge",) * K,
                            extra=(("vbr_end", end_of),))
        ids = np.arange(K)
        low = np.array([e == "low" for e in end_of])
        cold = ambient_C == req.ambient_min_C
        hot = ambient_C == req.ambient_max_C
        hot_end = np.array([a for a, _ in itertools.product(range(2), range(len(_ENDS)))]) == 1
        ambient_K = ov.ambient_table(req, ambient_C, hot_end, count) + ZERO_CELSIUS_K  # °C → K, (P, K)

        needs = Needs(parts)
        needs.require("standoff", "vwm_V")
        needs.require("breakdown_margin", "vbr_min_V")
        needs.require("clamp_voltage", "vbr_min_V", "vbr_max_V", "vc_V", "ipp_A", "it_A")
        needs.require("pulse_power", "vbr_min_V", "vbr_max_V", "vc_V", "ipp_A", "it_A", "ppp_W", "tj_max_C")
        if req.max_leakage_A is not None:
            needs.require("leakage", "ir_A", "ir_vr_V")
        known = lambda name: parts.known(name)  # noqa: E731
        line_bad = ~(known("vbr_min_V") & known("vbr_max_V") & known("vc_V") & known("ipp_A") & known("it_A"))
        vbr_min = parts.value("vbr_min_V", 10.0)
        vbr_max = np.maximum(parts.value("vbr_max_V", 11.0), vbr_min)
        vc_rated = parts.value("vc_V", 15.0)
        ipp = parts.value("ipp_A", 10.0)
        it = parts.value("it_A", 1e-3)
        line_bad |= ~((vc_rated > vbr_max) & (ipp > it))
        rd = np.where(line_bad, 1.0, (vc_rated - vbr_max) / np.where(line_bad, 1.0, ipp - it))
        tc_known = known("vbr_tc_pct_per_K")
        tc = np.where(tc_known, parts.raw["vbr_tc_pct_per_K"], DEFAULT_VBR_TC_PCT_PER_K)

        vbr_end = np.where(low[None, :], vbr_min[:, None], vbr_max[:, None])
        op = _surge(surge, vbr_end, tc[:, None], rd[:, None], ambient_K)
        mask = line_bad[:, None]
        nanify = lambda a: np.where(mask, np.nan, a)  # noqa: E731

        # Pulse rating at the surge's decay time, derated at the ambient.
        decay = parse_waveform(surge.surge_waveform)[1]
        ppp = parts.value("ppp_W", 1.0)
        ppp_t = _decay_times(parts.ppp_waveform)
        ppp_t = np.where(np.isfinite(ppp_t), ppp_t, parse_waveform(DEFAULT_PPP_WAVEFORM)[1])
        ppp2_t = _decay_times(parts.ppp2_waveform)
        moved = pulse_rating_for(np.full(count, decay), ppp, ppp_t, parts.raw["ppp2_W"], ppp2_t)
        tj_max_K = parts.value("tj_max_C", 150.0) + ZERO_CELSIUS_K
        tj_max_K = np.maximum(tj_max_K, ZERO_CELSIUS_K + 26.0)
        out_of_range = np.isnan(moved)
        rating = derated_pulse_rating(np.where(out_of_range, 0.0, moved)[:, None], ambient_K,
                                      tj_max_K[:, None])
        rating = np.where(out_of_range[:, None], np.nan, rating)

        def with_missing(check, extra=()):
            return [(needs.missing(check), needs.reason(check)), *extra]

        checks = []
        hot_low = int(ids[hot & low][0])
        cold_low = int(ids[cold & low][0])
        vwm = parts.raw["vwm_V"]
        checks.append(worst_case_check(
            "standoff", "V", vwm[:, None], np.full(count, surge.line_max_V), [hot_low], "min",
            "requirement [surge] line_max_V: stand-off VWM at or above the line's maximum",
            reasons=with_missing("standoff"), invalid=needs.missing("standoff")))
        vbr_cold = np.where(needs.missing("breakdown_margin"), np.nan, op.breakdown[:, cold_low])
        checks.append(worst_case_check(
            "breakdown_margin", "V", vbr_cold[:, None], np.full(count, surge.line_max_V), [cold_low], "min",
            "requirement [surge] line_max_V: VBR min at the coldest ambient above the line's maximum",
            reasons=with_missing("breakdown_margin"), invalid=needs.missing("breakdown_margin")))
        tc_note = object_array(None, count)
        tc_note[~tc_known] = (f"vbr_tc_pct_per_K not known: +{DEFAULT_VBR_TC_PCT_PER_K:g} %/K assumed "
                              "(avalanche breakdown, common practice)")
        checks[-1].note = tc_note
        clamp_limit = surge.protected_max_V * surge.clamp_limit_pct / 100.0
        checks.append(worst_case_check(
            "clamp_voltage", "V", nanify(op.clamp), np.full(count, clamp_limit), ids, "max",
            f"requirement [surge] clamp_limit_pct: {surge.clamp_limit_pct:g} % of protected_max_V "
            f"{surge.protected_max_V:g} V", reasons=with_missing("clamp_voltage"),
            invalid=needs.missing("clamp_voltage")))
        beyond = object_array(None, count)
        beyond[(np.nanmax(nanify(op.current), axis=1, initial=0.0) > ipp) & ~line_bad] = (
            "surge current above IPP: the clamp line is extended beyond the datasheet's points (an estimate)")
        checks[-1].note = beyond
        pulse_pct, pulse_src = limit_array(limits, parts.group, "pulse_power_pct")
        no_rating = (f"no rating for this pulse: decay {decay * 1e6:g} µs is outside "
                     f"{PULSE_RANGE_S[0] * 1e6:g} µs–{PULSE_RANGE_S[1] * 1e3:g} ms, where pulse ratings are moved")
        checks.append(worst_case_check(
            "pulse_power", "W", nanify(op.power), rating * pulse_pct[:, None] / 100.0, ids, "max",
            object_array([f"{pulse_src[g]}: {v:g} % of Ppp moved to {surge.surge_waveform} µs and derated at Ta"
                          for g, v in enumerate(_group_values(limits, "pulse_power_pct"))])[parts.group],
            reasons=with_missing("pulse_power", [(out_of_range, no_rating)]),
            invalid=needs.missing("pulse_power") | out_of_range))
        scaling = np.where(np.isfinite(parts.raw["ppp2_W"]) & np.isfinite(ppp2_t),
                           "rating moved log-log through the part's two rating points",
                           "rating moved by Ppp ∝ t^(−1/2) from one point (common practice, from memory)")
        checks[-1].note = object_array([f"{s}; derated linearly 25 °C → Tj max (common practice)"
                                        for s in scaling.tolist()])

        # Leakage at the line maximum and the hottest ambient (a metric always, a check when a limit is given).
        lacking = ~(known("ir_A") & known("ir_vr_V"))
        hot_K = ov.ambient_max(req, count) + ZERO_CELSIUS_K
        leak = reverse_current(parts.value("ir_A", 1e-6), parts.value("ir_vr_V", 1.0),
                               parts.value("ir_t_C") + ZERO_CELSIUS_K, surge.line_max_V, hot_K,
                               parts.value("ir_double_K"))
        leak = np.where(lacking, np.nan, leak)
        if req.max_leakage_A is not None:
            checks.append(worst_case_check(
                "leakage", "A", leak[:, None], np.full(count, req.max_leakage_A), [hot_low], "max",
                "requirement max_leakage_A", reasons=with_missing("leakage"), invalid=lacking))
        # direction: a text field, so its missing data are found here, not by Needs (numbers only).
        direction_lacking = np.zeros(count, dtype=bool)
        if surge.bidirectional_line:
            direction_lacking = ~((parts.bidirectional == "true") | (parts.bidirectional == "false"))
            both = np.where(direction_lacking, np.nan, (parts.bidirectional == "true").astype(float))
            checks.append(worst_case_check(
                "direction", "", both[:, None], np.ones(count), [hot_low], "min",
                "requirement [surge] bidirectional_line: a bidirectional part (1 = bidirectional, 0 = not)",
                reasons=[(direction_lacking, "not known: bidirectional (needed by direction)")],
                invalid=direction_lacking))

        any_missing = needs.any_missing() | direction_lacking
        reason = needs.data_missing_reason()
        for j in np.flatnonzero(direction_lacking):
            text = "not known: bidirectional (needed by direction)"
            reason[j] = text if reason[j] is None else f"{reason[j]}; {text}"
        nan = np.full(count, np.nan)
        checks.append(worst_case_check(
            "data_missing", "", nan[:, None], nan, [-1], "max", "part record: the fields the checks need",
            reasons=[(any_missing, reason)], present=any_missing))

        # ---- metrics at their worst point --------------------------------------------
        def worst(a, sense="max"):
            value, col = worst_value(nanify(a), sense)
            return value, ids[col]

        metrics, metric_points = {}, {}
        metrics["surge_current_A"], metric_points["surge_current_A"] = worst(op.current)
        metrics["clamp_voltage_V"], metric_points["clamp_voltage_V"] = worst(op.clamp)
        metrics["pulse_power_W"], metric_points["pulse_power_W"] = worst(op.power)
        with np.errstate(divide="ignore", invalid="ignore"):
            stress = np.where(rating > 0, 100.0 * op.power / rating, np.nan)
        metrics["pulse_stress_pct"], metric_points["pulse_stress_pct"] = worst(stress)
        rows = np.arange(count)
        at = np.clip(metric_points["pulse_stress_pct"], 0, K - 1)
        metrics["pulse_rating_W"] = np.where(np.isnan(metrics["pulse_stress_pct"]), np.nan, rating[rows, at])
        metric_points["pulse_rating_W"] = metric_points["pulse_stress_pct"]
        metrics["standoff_V"] = vwm
        metrics["breakdown_min_V"] = vbr_cold
        metric_points["breakdown_min_V"] = np.full(count, cold_low)
        metrics["leakage_A"] = leak
        metric_points["leakage_A"] = np.full(count, hot_low)

        internals = {
            "vbr_min_V": np.where(known("vbr_min_V"), vbr_min, np.nan),
            "vbr_max_V": np.where(known("vbr_max_V"), vbr_max, np.nan),
            "dynamic_resistance_ohm": np.where(line_bad, np.nan, rd),
            "vbr_tc_pct_per_K": tc, "pulse_rating_moved_W": moved,
            "tj_max_C": tj_max_K - ZERO_CELSIUS_K, "line_bad": line_bad,
            "surge_current_per_point_A": nanify(op.current), "clamp_voltage_per_point_V": nanify(op.clamp),
            "breakdown_per_point_V": nanify(op.breakdown), "pulse_rating_per_point_W": rating,
            "ppp_W": parts.raw["ppp_W"], "ppp_decay_s": ppp_t, "ppp2_W": parts.raw["ppp2_W"], "ppp2_decay_s": ppp2_t,
        }
        return RoleResult(points, checks, metrics, metric_points, internals)


def _group_values(limits: dict, key: str) -> list:
    return [limits[g][key].value for g in ("pn", "schottky", "zener", "tvs")]


ROLE = TvsClampRole()
