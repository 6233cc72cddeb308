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
from partpick.checks.results import PointTable, object_array, worst_case_check, worst_value
from partpick.checks.roles.base import Role, RoleResult
from partpick.library.fields import parse_waveform
from partpick.physics.constants import ZERO_CELSIUS_K
from partpick.physics.leakage import reverse_current
from partpick.physics.tvs import (PULSE_RANGE_S, breakdown_voltage_at, derated_pulse_rating, pulse_rating_for)

__all__ = ["TvsClampRole", "ROLE", "SurgeTable", "SURGE_DEFAULTS", "DEFAULT_VBR_TC_PCT_PER_K"]

_ENDS = ("low", "high")
# Avalanche breakdown rises with temperature, about +0.1 %/K for TVS parts of tens of volts
# (common practice, from memory); used where a part gives no coefficient, and said so.
DEFAULT_VBR_TC_PCT_PER_K = 0.1
DEFAULT_PPP_WAVEFORM = "10/1000"

SURGE_DEFAULTS = {
    "clamp_limit_pct": 90.0,
    "surge_waveform": "8/20",
    "bidirectional_line": False,
}
SURGE_REQUIRED = ("line_max_V", "protected_max_V", "surge_V", "surge_source_ohm")


@dataclass(frozen=True)
class SurgeTable:
    """The ``[surge]`` table (SI units, % as written; the waveform as ``rise/decay`` in µs)."""

    line_max_V: float
    protected_max_V: float
    surge_V: float
    surge_source_ohm: float
    clamp_limit_pct: float = SURGE_DEFAULTS["clamp_limit_pct"]
    surge_waveform: str = SURGE_DEFAULTS["surge_waveform"]
    bidirectional_line: bool = SURGE_DEFAULTS["bidirectional_line"]

    @property
    def decay_s(self) -> float:
        """The surge waveform's decay time [s]."""
        return parse_waveform(self.surge_waveform)[1]


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


def _surge(surge: SurgeTable, vbr_end, tc_pct, rd, ambient_K) -> _SurgePoint:
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

    def evaluate(self, requirement, parts, limits) -> RoleResult:
        req = requirement
        surge = self.table(req)
        count = parts.count
        combos = list(itertools.product((req.ambient_min_C, req.ambient_max_C), _ENDS))
        ambient_C = np.array([c[0] for c in combos], dtype=float)
        end_of = tuple(c[1] for c in combos)
        K = len(combos)
        points = PointTable(supply_V=np.full(K, surge.surge_V), load_A=np.zeros(K), ambient_C=ambient_C,
                            state=("surge",) * K, vz_end=end_of, resistor_end=(None,) * K)
        ids = np.arange(K)
        low = np.array([e == "low" for e in end_of])
        cold = ambient_C == req.ambient_min_C
        hot = ambient_C == req.ambient_max_C
        ambient_K = ambient_C + ZERO_CELSIUS_K  # °C → K at the physics boundary

        needs = Needs(parts)
        needs.require("standoff", "vwm_V")
        needs.require("breakdown_margin", "vbr_min_V")
        needs.require("clamp_voltage", "vbr_min_V", "vbr_max_V", "vc_V", "ipp_A", "it_A")
        needs.require("pulse_power", "vbr_min_V", "vbr_max_V", "vc_V", "ipp_A", "it_A", "ppp_W", "tj_max_C")
        if req.max_leakage_A is not None:
            needs.require("leakage", "ir_A", "ir_vr_V")
        if surge.bidirectional_line:
            needs.require("direction", "bidirectional")
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
        op = _surge(surge, vbr_end, tc[:, None], rd[:, None], ambient_K[None, :])
        mask = line_bad[:, None]
        nanify = lambda a: np.where(mask, np.nan, a)  # noqa: E731

        # Pulse rating at the surge's decay time, derated at the ambient.
        decay = surge.decay_s
        ppp = parts.value("ppp_W", 1.0)
        ppp_t = _decay_times(parts.ppp_waveform)
        ppp_t = np.where(np.isfinite(ppp_t), ppp_t, parse_waveform(DEFAULT_PPP_WAVEFORM)[1])
        ppp2_t = _decay_times(parts.ppp2_waveform)
        moved = pulse_rating_for(np.full(count, decay), ppp, ppp_t, parts.raw["ppp2_W"], ppp2_t)
        tj_max_K = parts.value("tj_max_C", 150.0) + ZERO_CELSIUS_K
        tj_max_K = np.maximum(tj_max_K, ZERO_CELSIUS_K + 26.0)
        out_of_range = np.isnan(moved)
        rating = derated_pulse_rating(np.where(out_of_range, 0.0, moved)[:, None], ambient_K[None, :],
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

        leak = np.full(count, np.nan)
        if req.max_leakage_A is not None:
            lacking = needs.missing("leakage")
            hot_K = req.ambient_max_C + ZERO_CELSIUS_K
            leak = reverse_current(parts.value("ir_A", 1e-6), parts.value("ir_vr_V", 1.0),
                                   parts.value("ir_t_C") + ZERO_CELSIUS_K, surge.line_max_V, hot_K,
                                   parts.value("ir_double_K"))
            leak = np.where(lacking, np.nan, leak)
            checks.append(worst_case_check(
                "leakage", "A", leak[:, None], np.full(count, req.max_leakage_A), [hot_low], "max",
                "requirement max_leakage_A", reasons=with_missing("leakage"), invalid=lacking))
        if surge.bidirectional_line:
            lacking = needs.missing("direction")
            both = np.where(lacking, np.nan, (parts.bidirectional == "true").astype(float))
            checks.append(worst_case_check(
                "direction", "", both[:, None], np.ones(count), [hot_low], "min",
                "requirement [surge] bidirectional_line: a bidirectional part (1 = bidirectional, 0 = not)",
                reasons=with_missing("direction"), invalid=lacking))

        any_missing = needs.any_missing()
        nan = np.full(count, np.nan)
        checks.append(worst_case_check(
            "data_missing", "", nan[:, None], nan, [-1], "max", "part record: the fields the checks need",
            reasons=[(any_missing, needs.data_missing_reason())], present=any_missing))

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

    @staticmethod
    def table(requirement) -> SurgeTable:
        """The requirement's ``[surge]`` table."""
        return requirement.surge


def _group_values(limits: dict, key: str) -> list:
    return [limits[g][key].value for g in ("pn", "schottky", "zener", "tvs")]


ROLE = TvsClampRole()
