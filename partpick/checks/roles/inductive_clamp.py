"""The ``inductive_clamp`` role: a diode (optionally with a Zener in series) across a low-side-switched coil.

SPEC §4a. At each point — supply end × ambient end (× Zener-voltage end with
``clamp = "diode_zener"``), state ``turn_off`` — the coil current at turn-off
comes from the winding at its lowest resistance (copper law at that ambient,
low tolerance end): occasional switching I0 = Vs/R; repetitive switching the
periodic steady state of on and off (`partpick.physics.coil.periodic_state`).
The decay L·di/dt = −(R·i + Vf(i) + Vz) is integrated with the diode's own
curve at the ambient (`partpick.physics.coil.coil_decay`), giving the diode's
and the Zener's energy, the I²t, the charge and the release time to
``dropout_A``. The pulse heats the junction by P·Zth(t), Zth(t) = RthJA·min(1,
√(t/τ)), for P = Vf(I0)·I0 over t = E/P.

One function per state: `_turn_off` (the decay at every point), then the
checks and metrics in `InductiveClampRole.evaluate`.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import numpy as np

from partpick.checks.partdata import Needs, limit_array, thermal_data, thermal_needs as thermal_needs_of, tj_limit
from partpick.checks.role_table import RoleTable, TableKey
from partpick.checks.results import PointTable, object_array, worst_case_check, worst_value
from partpick.checks.roles.base import Overrides, Role, RoleResult
from partpick.checks.roles.series import forward_model_of
from partpick.physics.coil import DiodeDrop, coil_decay, coil_resistance, periodic_state, pulse_temperature_rise
from partpick.physics.constants import ZERO_CELSIUS_K
from partpick.physics.thermal import derated_current

__all__ = ["InductiveClampRole", "ROLE", "COIL_TABLE", "RECOVERY_SHARE"]

_ENDS = ("low", "high")
_MODEL_FIELDS = ("is_A", "n", "rs_ohm")
# Reverse recovery is fast enough when trr ≤ 5 % of the switching period (common practice).
RECOVERY_SHARE = 0.05
# The event's duration for its mean power: the decay to 1 % of I0 (less than 1e-4 of the energy is left).
_EVENT_END = 0.01

_NOT_USED = {
    "load_min_A": "a coil clamp has no load current: the coil current comes from the supply and the winding ([coil])",
    "load_max_A": "a coil clamp has no load current: the coil current comes from the supply and the winding ([coil])",
    "reverse_V": "the clamp diode blocks the supply while the switch is on: its reverse voltage is supply_max_V",
    "reverse_transient_V": "the clamp diode blocks the supply: its reverse voltage is supply_max_V",
    "handover": "the clamp diode blocks the supply while the switch is on (no hand-over)",
    "max_forward_drop_V": "the clamp's drop sets the switch voltage: use [coil] switch_max_V and switch_limit_pct",
    "min_output_V": "a coil clamp has no output",
    "max_leakage_A": "a coil clamp has no leakage check",
    "inrush_capacitance_F": "a coil clamp has no inrush check: the turn-off current is checked against IFSM",
    "inrush_source_ohm": "a coil clamp has no inrush check: the turn-off current is checked against IFSM",
    "resistor_power_limit_pct": "a coil clamp has no resistor",
}

COIL_TABLE = RoleTable("coil", "Coil clamp", (
    TableKey("inductance_H", "H", "Coil inductance", "The coil's inductance L.", required=True, low=0.0,
             low_inclusive=False, high=1e3),
    TableKey("resistance_ohm", "Ω", "Winding resistance (20 °C)", "The winding's resistance at 20 °C; copper "
             "R(Ta) = R20·(1 + 0.00393·(Ta − 20 °C)) (common practice).", required=True, low=0.0,
             low_inclusive=False, high=1e6),
    TableKey("resistance_tol_pct", "%", "Winding tolerance", "± tolerance of the winding resistance; the low end "
             "gives the largest current.", default=10.0, high=50.0),
    TableKey("switch_max_V", "V", "Switch rating", "The low-side switch's voltage rating (e.g. a MOSFET's VDS).",
             required=True, low=0.0, low_inclusive=False, high=100e3),
    TableKey("switch_limit_pct", "%", "Switch voltage ≤ [% of rating]", "The switch's stress at most this share "
             "of its rating.", default=80.0, low=0.0, low_inclusive=False, high=100.0),
    TableKey("switching_hz", "Hz", "Switching frequency", "Repetitive switching frequency; 0: occasional "
             "switching (the coil settles between events).", default=0.0, high=1e6),
    TableKey("duty_pct", "%", "Duty (on-time share)", "On-time share of the period; required when "
             "switching_hz > 0.", low=0.0, low_inclusive=False, high=100.0),
    TableKey("dropout_A", "A", "Drop-out current", "The coil current at which the relay or valve releases; the "
             "release time is the decay to it.", low=0.0, low_inclusive=False, high=1e4),
    TableKey("max_release_s", "s", "Release time ≤", "The longest allowed release time (needs dropout_A).",
             low=0.0, low_inclusive=False, high=100.0),
    TableKey("clamp", "", "Clamp", "diode: a diode alone across the coil; diode_zener: a Zener in series with it "
             "for a fast release.", kind="choice", default="diode", choices=("diode", "diode_zener")),
    TableKey("zener_V", "V", "Zener voltage", "Vz of the series Zener (clamp = diode_zener).", low=0.0,
             low_inclusive=False, high=10e3),
    TableKey("zener_tol_pct", "%", "Zener tolerance", "± tolerance of Vz: the high end sets the switch stress, "
             "the low end the release time.", default=5.0, high=50.0),
    TableKey("zener_pd_W", "W", "Zener power rating", "The series Zener's power rating (clamp = diode_zener).",
             low=0.0, low_inclusive=False, high=1e4),
))


@dataclass
class _TurnOff:
    """The decay at every point, arrays (P, K)."""

    current: np.ndarray          # I0 at turn-off [A]
    valley: np.ndarray           # current still in the clamp at turn-on [A] (repetitive)
    diode_energy: np.ndarray     # per turn-off [J]
    zener_energy: np.ndarray
    i2t: np.ndarray              # [A²s]
    charge: np.ndarray           # [C]
    event_time: np.ndarray       # decay to 1 % of I0 [s]
    release: np.ndarray          # to dropout_A [s] (NaN where not asked)
    diode_voltage: np.ndarray    # Vf(I0) [V]
    zener_voltage: np.ndarray    # Vz at the point's end [V]


def _turn_off(coil, supply, ambient_K, vz, drop: DiodeDrop) -> _TurnOff:
    """Coil current at turn-off and its decay through the clamp, (P, K) over parts × points."""
    R = coil_resistance(coil.resistance_ohm, ambient_K, -coil.resistance_tol_pct / 100.0)
    L = coil.inductance_H
    shape = np.broadcast_shapes(np.shape(drop.saturation_current), np.shape(supply))
    R = np.broadcast_to(R, shape)
    vz = np.broadcast_to(vz, shape)
    supply = np.broadcast_to(supply, shape)
    if coil.switching_hz > 0:
        state = periodic_state(L, R, drop, supply, coil.switching_hz, coil.duty_pct / 100.0, vz)
        I0, valley, decay = state.peak_current, state.valley_current, state.decay
    else:
        I0 = supply / R
        valley = np.zeros(shape)
        decay = coil_decay(L, R, drop, I0, 0.0, vz)
    event = coil_decay(L, R, drop, I0, _EVENT_END * I0, vz, with_energy=False).time
    release = np.full(shape, np.nan)
    if coil.dropout_A is not None:
        above = I0 > coil.dropout_A
        stop = np.where(above, coil.dropout_A, 0.5 * I0)
        release = np.where(above, coil_decay(L, R, drop, I0, stop, vz, with_energy=False).time, 0.0)
    return _TurnOff(I0, valley, decay.diode_energy, decay.zener_energy, decay.current_squared_time, decay.charge,
                    event, release, drop(I0), vz)


class InductiveClampRole(Role):
    name = "inductive_clamp"
    label = "Coil clamp"
    kinds = ("rectifier", "signal", "schottky", "fast_recovery")
    objective_metrics = {"drop": "release_time_s", "dissipation": "dissipation_W"}
    part_inputs = ("is_A", "n", "rs_ohm", "vf_max_V", "vrrm_V", "ifsm_A", "ifrm_A", "if_avg_A", "tj_max_C",
                   "pd_W", "rth_ja_K_per_W", "tau_th_s", "trr_s", "qrr_C")
    limit_searches = ("ambient", "thermal")  # no load current: the coil sets it
    required_keys = ("supply_min_V", "supply_max_V")
    unused_keys = _NOT_USED
    table = COIL_TABLE
    curve_plots = (("coil_current", "Coil current", {"legend": "top_right"}),
                   ("switch_voltage", "Switch voltage", {"legend": "top_right"}))

    check_labels = {"peak_current": "Peak current", "switch_voltage": "Switch voltage",
                    "release_time": "Release time", "recovery": "Reverse recovery"}
    metric_labels = {"coil_current_A": "Coil current at turn-off", "diode_peak_A": "Diode peak current",
                     "diode_energy_J": "Diode energy per turn-off", "zener_energy_J": "Zener energy per turn-off",
                     "diode_i2t_A2s": "Diode I²t per turn-off", "switch_voltage_V": "Switch voltage",
                     "release_time_s": "Release time", "recovery_loss_W": "Recovery loss in the switch"}
    key_metrics = ("coil_current_A", "switch_voltage_V", "release_time_s", "junction_temp_C")
    rating_of_check = {"peak_current": ("ifsm_A", "IFSM (occasional) or IFRM (repetitive)", "A"),
                       "recovery": ("trr_s", "trr", "s")}
    method_notes = (
        "Coil current at turn-off from the winding at its lowest resistance: copper R(Ta) = R20·(1 + 0.00393·(Ta − "
        "20 °C)) at the low tolerance end (common practice). Occasional switching: I0 = Vs/R; repetitive: the "
        "periodic steady state of on (L·di/dt = Vs − R·i) and off, closed by shooting on the current at turn-on.",
        "The decay L·di/dt = −(R·i + Vf(i) + Vz) is integrated over the current (Gauss–Legendre in ln i) with the "
        "diode's own forward curve at the ambient; the diode's and the Zener's energies, the I²t and the release "
        "time to dropout_A follow; the energies add up to ½·L·I0² less what the winding dissipates.",
        "Pulse heating: ΔTj = P·Zth(t), Zth(t) = RthJA·min(1, √(t/τ)), for P = Vf(I0)·I0 over t = E/P; where "
        "tau_th_s is not known, the steady RthJA (conservative). The switch sees supply + Vf(I0) + Vz at the high "
        "Vz end; the release time is taken at the low Vz end.",
        "Occasional switching: the peak against IFSM and the I²t against IFSM²·t/2; repetitive: the peak against "
        "IFRM where rated, else the average current against IF(AV). With current still in the diode at turn-on, "
        "reverse recovery adds Qrr·Vs·f in the switch, and trr ≤ 5 % of the period (common practice).",
    )
    cautions = (
        "A coil's stored energy is released into the clamp at every turn-off: an open or undersized clamp lets the "
        "switch avalanche and can destroy it or the diode violently. The turn-off is a single-event estimate from "
        "datasheet parameters; verify the switch voltage and the diode's temperature by measurement on the built "
        "circuit, and follow the applicable test standards.",
    )

    def check_table(self, values, common, fail):
        hz = values.get("switching_hz", 0.0)
        if hz > 0 and "duty_pct" not in values:
            fail("switching_hz", f"{hz:g} Hz needs duty_pct (the on-time share of the period)")
        if hz == 0 and "duty_pct" in values:
            fail("duty_pct", "is given with switching_hz = 0 (occasional switching has no duty; give switching_hz)")
        if values.get("duty_pct", 50.0) >= 100.0:
            fail("duty_pct", f"{values['duty_pct']:g} % leaves no off-time (allowed: 0 < duty_pct < 100)")
        zener = values.get("clamp", "diode") == "diode_zener"
        for key in ("zener_V", "zener_pd_W"):
            if zener and key not in values:
                fail("clamp", f"'diode_zener' needs {key} (the series Zener's "
                              f"{'voltage' if key == 'zener_V' else 'power rating'})")
        for key in ("zener_V", "zener_pd_W", "zener_tol_pct"):
            if not zener and key in values:
                fail(key, "is given but clamp is 'diode' (write clamp = \"diode_zener\" for a series Zener)")
        if "max_release_s" in values and "dropout_A" not in values:
            fail("max_release_s", "needs dropout_A (the release time is the decay to the drop-out current)")

    def curves(self, requirement, part, candidate, notes):
        from partpick.checks.roles.inductive_clamp_curves import coil_sections

        return coil_sections(requirement, part, candidate, notes)

    def evaluate(self, requirement, parts, limits, overrides: Overrides | None = None) -> RoleResult:
        req = requirement
        ov = overrides or Overrides()
        coil = req.table("coil")
        repetitive = coil.switching_hz > 0
        with_zener = coil.clamp == "diode_zener"
        count = parts.count
        ends = _ENDS if with_zener else (None,)
        combos = list(itertools.product((req.supply_min_V, req.supply_max_V),
                                        (req.ambient_min_C, req.ambient_max_C), ends))
        supply = np.array([c[0] for c in combos], dtype=float)
        ambient_C = np.array([c[1] for c in combos], dtype=float)
        end_of = tuple(c[2] for c in combos)
        K = len(combos)
        points = PointTable(supply_V=supply, load_A=None, ambient_C=ambient_C, state=("turn_off",) * K,
                            extra=(("zener_end", end_of),) if with_zener else ())
        ids = np.arange(K)
        hot = np.array([a for _, a, _ in itertools.product(range(2), range(2), range(len(ends)))]) == 1
        ambient_K = ov.ambient_table(req, ambient_C, hot, count) + ZERO_CELSIUS_K  # °C → K, (P, K)
        if with_zener:
            sign = np.array([-1.0 if e == "low" else 1.0 for e in end_of])
            vz = coil.zener_V * (1.0 + sign * coil.zener_tol_pct / 100.0)
        else:
            vz = np.zeros(K)

        # ---- what each check needs ----------------------------------------------------
        needs = Needs(parts)
        thermal_needs = thermal_needs_of(req)
        model_needs = [(f,) for f in _MODEL_FIELDS]
        needs.require("reverse_voltage", "vrrm_V")
        if repetitive:
            needs.require("peak_current", ("ifrm_A", "if_avg_A"), *model_needs)
            needs.require("power", *model_needs, *thermal_needs)
        else:
            needs.require("peak_current", "ifsm_A", *model_needs)
            needs.require("surge", "ifsm_A", *model_needs)
        needs.require("junction_temp", *model_needs, *thermal_needs)
        needs.require("switch_voltage", *model_needs)
        if with_zener:
            needs.require("zener_power", *model_needs)
        if coil.max_release_s is not None:
            needs.require("release_time", *model_needs)
        model_bad = np.zeros(count, dtype=bool)
        for (f,) in model_needs:
            model_bad |= ~parts.known(f)

        thermal = thermal_data(parts, req, ov.thermal_resistance)
        rth = thermal.thermal_resistance
        tj_max_K = thermal.tj_max_K
        tj_max_C = tj_max_K - ZERO_CELSIUS_K
        groups = parts.group

        # ---- the turn-off at every point --------------------------------------------
        _, model = forward_model_of(parts)
        drop = DiodeDrop.from_model(model, ambient_K)
        off = _turn_off(coil, supply[None, :], ambient_K, vz[None, :], drop)
        f = coil.switching_hz
        if repetitive:
            diode_power = off.diode_energy * f
            zener_power = off.zener_energy * f
            diode_average = off.charge * f
        else:  # per event: the mean power while the coil decays to 1 % of I0
            diode_power = off.diode_energy / off.event_time
            zener_power = off.zener_energy / off.event_time
            diode_average = np.zeros_like(off.charge)
        pulse_power = off.diode_voltage * off.current
        pulse_time = off.diode_energy / pulse_power
        tau = parts.value("tau_th_s", 0.0)[:, None]
        rise = pulse_temperature_rise(pulse_power, pulse_time, rth[:, None], tau)
        steady_rise = diode_power * rth[:, None] if repetitive else 0.0
        tj_K = ambient_K + steady_rise + rise
        mask = model_bad[:, None]
        nanify = lambda a: np.where(mask, np.nan, a)  # noqa: E731

        def with_missing(check, extra=()):
            return [(needs.missing(check), needs.reason(check)), *extra]

        checks = []
        # reverse_voltage: the diode blocks the supply while the switch is on.
        rev_pct, rev_src = limit_array(limits, groups, "reverse_pct")
        top = ids[supply == req.supply_max_V][:1]
        checks.append(worst_case_check(
            "reverse_voltage", "V", np.full((count, 1), req.supply_max_V), parts.raw["vrrm_V"] * rev_pct / 100.0,
            top, "max", _sources(rev_src, groups, "% of VRRM", limits, "reverse_pct"),
            reasons=with_missing("reverse_voltage"), invalid=needs.missing("reverse_voltage")))

        cur_pct, cur_src = limit_array(limits, groups, "current_pct")
        surge_pct, surge_src = limit_array(limits, groups, "surge_pct")
        peak_note = object_array(None, count)
        if repetitive:
            # Repetitive: the peak against IFRM where rated; else the average against the derated IF(AV).
            ifrm = parts.raw["ifrm_A"]
            rated = np.isfinite(ifrm)
            if_derated = derated_current(ambient_K,
                                         parts.value("if_avg_A", 1.0)[:, None], tj_max_K[:, None],
                                         np.minimum(parts.value("if_ref_C") + ZERO_CELSIUS_K, tj_max_K - 1.0)[:, None])
            value = np.where(rated[:, None], off.current, diode_average)
            limit = np.where(rated[:, None], np.where(rated, ifrm, 1.0)[:, None], if_derated) * cur_pct[:, None] / 100
            source = object_array([f"{cur_src[g]}: {v:g} % of IFRM" for g, v in
                                   enumerate(_group_values(limits, "current_pct"))])[groups]
            avg_source = object_array([f"{cur_src[g]}: {v:g} % of IF(AV) derated at Ta (IFRM not rated)"
                                       for g, v in enumerate(_group_values(limits, "current_pct"))])[groups]
            source = np.where(rated, source, avg_source)
            peak_note[~rated] = "peak not rated (no IFRM): the average diode current is checked against IF(AV)"
            checks.append(worst_case_check(
                "peak_current", "A", nanify(value), limit, ids, "max", source, reasons=with_missing("peak_current"),
                invalid=needs.missing("peak_current")))
        else:
            # Occasional: the peak against IFSM and the I²t against IFSM²·t/2 (SPEC §4a).
            ifsm = parts.value("ifsm_A", 1.0)
            checks.append(worst_case_check(
                "peak_current", "A", nanify(off.current), ifsm * surge_pct / 100.0, ids, "max",
                _sources(surge_src, groups, "% of IFSM", limits, "surge_pct"), reasons=with_missing("peak_current"),
                invalid=needs.missing("peak_current")))
            rating = ifsm**2 * (parts.value("ifsm_ms") / 1000.0) / 2.0
            checks.append(worst_case_check(
                "surge", "A²s", nanify(off.i2t), rating * (surge_pct / 100.0) ** 2, ids, "max",
                object_array([f"{surge_src[g]}: ({v:g} %)² of IFSM²·t/2" for g, v in
                              enumerate(_group_values(limits, "surge_pct"))])[groups],
                reasons=with_missing("surge"), invalid=needs.missing("surge")))
        for c in checks:
            if c.name == "peak_current":
                c.note = peak_note

        tj_lim, tj_src = tj_limit(limits, groups, tj_max_C)
        if repetitive:
            pow_pct, pow_src = limit_array(limits, groups, "power_pct")
            p_allowed = thermal.allowed_power(ambient_K)
            with np.errstate(divide="ignore", invalid="ignore"):
                ratio = np.where(p_allowed > 0, 100.0 * diode_power / np.where(p_allowed > 0, p_allowed, 1.0),
                                 np.inf)
            checks.append(worst_case_check(
                "power", "% of Pallow", nanify(ratio), pow_pct, ids, "max",
                _sources(pow_src, groups, "% of Pallow(Ta)", limits, "power_pct"),
                reasons=with_missing("power", [(np.isinf(ratio).any(axis=1),
                                                "no dissipation is allowed at this ambient: it is at or above Tj max")]),
                invalid=needs.missing("power")))
        checks.append(worst_case_check(
            "junction_temp", "°C", nanify(tj_K - ZERO_CELSIUS_K), tj_lim, ids, "max", tj_src,
            reasons=with_missing("junction_temp"), invalid=needs.missing("junction_temp"),
            ambient_C=ambient_K - ZERO_CELSIUS_K))
        tau_note = object_array(None, count)
        tau_note[~parts.known("tau_th_s")] = ("thermal time constant tau_th_s not known: the pulse is taken "
                                              "against the steady RthJA (conservative)")
        checks[-1].note = tau_note

        # switch_voltage: supply + Vf(I0) + Vz; the worst point is the high Vz end at supply max.
        switch = supply[None, :] + off.diode_voltage + vz[None, :]
        switch_limit = coil.switch_max_V * coil.switch_limit_pct / 100.0
        checks.append(worst_case_check(
            "switch_voltage", "V", nanify(switch), np.full(count, switch_limit), ids, "max",
            f"requirement [coil] switch_limit_pct: {coil.switch_limit_pct:g} % of switch_max_V "
            f"{coil.switch_max_V:g} V", reasons=with_missing("switch_voltage"),
            invalid=needs.missing("switch_voltage")))

        if with_zener:
            z_pct, z_src = limit_array(limits, np.full(count, 2, dtype=np.int8), "power_pct")  # the Zener group
            z_limit = (coil.zener_pd_W or 0.0) * z_pct / 100.0
            what = "average power" if repetitive else "mean power while the coil decays (conservative)"
            checks.append(worst_case_check(
                "zener_power", "W", nanify(zener_power), z_limit, ids, "max",
                object_array(f"{z_src[2]}: {z_pct[0]:g} % of [coil] zener_pd_W {coil.zener_pd_W:g} W ({what})", count),
                reasons=with_missing("zener_power"), invalid=needs.missing("zener_power")))
            if not repetitive:
                note = object_array("one event: a Zener's pulse rating for ms pulses lies well above its steady "
                                    "rating; check the Zener's surge curve", count)
                checks[-1].note = note

        if coil.max_release_s is not None:
            checks.append(worst_case_check(
                "release_time", "s", nanify(off.release), np.full(count, coil.max_release_s), ids, "max",
                "requirement [coil] max_release_s", reasons=with_missing("release_time"),
                invalid=needs.missing("release_time")))

        # recovery: with current still in the diode at turn-on, trr against 5 % of the period.
        recovery_applies = (off.valley > 0).any(axis=1) & ~model_bad if repetitive else np.zeros(count, bool)
        schottky = parts.kind == "schottky"
        trr = np.where(parts.known("trr_s"), parts.raw["trr_s"], np.where(schottky, 0.0, np.nan))
        qrr = np.where(parts.known("qrr_C"), parts.raw["qrr_C"], np.where(schottky, 0.0, np.nan))
        recovery_loss = np.where(recovery_applies, qrr * req.supply_max_V * f, 0.0)
        if recovery_applies.any():
            lacking = recovery_applies & ~np.isfinite(trr)
            checks.append(worst_case_check(
                "recovery", "s", np.where(recovery_applies, trr, np.nan)[:, None],
                np.full(count, RECOVERY_SHARE / f), top, "max",
                f"{RECOVERY_SHARE * 100:g} % of the switching period (common practice)",
                reasons=[(lacking, "not known: trr_s (needed by recovery)")], invalid=lacking,
                present=recovery_applies))
            rec_note = object_array(None, count)
            rec_note[recovery_applies & schottky & ~parts.known("trr_s")] = (
                "Schottky: no minority-carrier recovery (common practice); trr taken as 0")
            checks[-1].note = rec_note
            recovery_missing = lacking
        else:
            recovery_missing = np.zeros(count, dtype=bool)

        any_missing = needs.any_missing() | recovery_missing
        reason = needs.data_missing_reason()
        for j in np.flatnonzero(recovery_missing):  # trr is needed only where recovery applies
            text = "not known: trr_s (needed by recovery)"
            reason[j] = text if reason[j] is None else f"{reason[j]}; {text}"
        nan = np.full(count, np.nan)
        checks.append(worst_case_check(
            "data_missing", "", nan[:, None], nan, [-1], "max", "part record: the fields the checks need",
            reasons=[(any_missing, reason)], present=any_missing))

        # ---- metrics at their worst point ----------------------------------------------
        def worst(a, sense="max"):
            value, col = worst_value(nanify(a), sense)
            return value, ids[col]

        metrics, metric_points = {}, {}
        for key, arr in (("coil_current_A", off.current), ("diode_peak_A", off.current),
                         ("diode_energy_J", off.diode_energy), ("dissipation_W", diode_power),
                         ("junction_temp_C", tj_K - ZERO_CELSIUS_K), ("switch_voltage_V", switch),
                         ("diode_i2t_A2s", off.i2t)):
            metrics[key], metric_points[key] = worst(arr)
        if with_zener:
            for key, arr in (("zener_energy_J", off.zener_energy), ("zener_power_W", zener_power)):
                metrics[key], metric_points[key] = worst(arr)
        if coil.dropout_A is not None:
            metrics["release_time_s"], metric_points["release_time_s"] = worst(off.release)
        else:
            metrics["release_time_s"] = nan.copy()
        metrics["reverse_voltage_V"] = np.full(count, req.supply_max_V)
        metric_points["reverse_voltage_V"] = np.full(count, int(top[0]))
        metrics["recovery_loss_W"] = np.where(model_bad, np.nan, recovery_loss)

        internals = {
            "rth_ja_K_per_W": rth, "tj_max_C": tj_max_C, "tj_limit_C": tj_lim,
            "is_A": np.ravel(np.broadcast_to(model.saturation_current, (count, 1))),
            "n": parts.value("n", 1.0), "rs_ohm": parts.value("rs_ohm", 0.0),
            "eg_eV": parts.value("eg_eV"), "is_temp_exponent": parts.value("is_temp_exponent"),
            "rs_temp_exponent": parts.value("rs_temp_exponent"),
            "tau_th_s": parts.raw["tau_th_s"],
            "forward_bad": model_bad,
            "turn_off_current_A": off.current, "valley_current_A": off.valley,
            "pulse_rise_K": rise,
        }
        return RoleResult(points, checks, metrics, metric_points, internals)


def _group_values(limits: dict, key: str) -> list:
    return [limits[g][key].value for g in ("pn", "schottky", "zener", "tvs")]


def _sources(sources: list, groups: np.ndarray, what: str, limits: dict, key: str) -> np.ndarray:
    return object_array([f"{sources[g]}: {v:g} {what}" for g, v in enumerate(_group_values(limits, key))])[groups]


ROLE = InductiveClampRole()
