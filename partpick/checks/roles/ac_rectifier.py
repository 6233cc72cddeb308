"""The ``ac_rectifier`` role: diodes rectifying AC into a reservoir capacitor with a DC load (SPEC §4a).

Topologies ``bridge`` (four diodes, or one bridge package), ``center_tap`` (two)
and ``half_wave`` (one), fed from the open-circuit EMF ``vac_*_Vrms`` behind
``source_ohm``. States, one function each:

- `_cycle`: the periodic steady state of one AC cycle at every corner
  (`partpick.physics.rectifier.rectifier_operating_point`: backward Euler in
  the exact load line, shooting on the capacitor voltage, the step refined
  until the peak current settles, Tj self-heated from the cycle-average power);
- `_reverse`: the reverse state at the hot forward Tj with the cycle-average
  reverse power (leakage, reverse power, runaway — how Schottky bridges fail);
- `_switch_on`: the switch-on surge at the crest into an empty capacitor.

Corners (16): Vac (min, max) × load (min, max) × ambient (min, max) ×
capacitance (low, high end of its tolerance). Points: columns 0…15 the
corners in the steady state, 16…31 the same corners in the reverse state,
32 and 33 the switch-on at Vac max, the largest capacitance, no load, at the
coldest and the hottest ambient.

A bridge part's model, VRRM, IFSM and IFRM are per leg, its ``if_avg_A`` is the
bridge's rated DC output current and its RthJA the package's, carrying all four
legs; its ``junction`` sets Eg, m and the policy group.
"""

from __future__ import annotations

import itertools

import numpy as np

from partpick.checks.partdata import Needs, limit_array, thermal_data, thermal_needs as thermal_needs_of, tj_limit
from partpick.checks.results import CheckArray, PointTable, object_array, worst_case_check, worst_value
from partpick.checks.role_table import RoleTable, TableKey
from partpick.checks.roles.base import Overrides, Role, RoleResult
from partpick.checks.roles.series import forward_model_of
from partpick.physics.constants import ZERO_CELSIUS_K
from partpick.physics.leakage import leakage_law
from partpick.physics.rectifier import (diodes_in_circuit, peak_inverse_voltage, rectifier_operating_point,
                                        switch_on_surge)
from partpick.physics.thermal import allowed_power, blocking_state, derated_current

__all__ = ["AcRectifierRole", "ROLE", "ac_corners", "MAINS_CAUTION"]

MAINS_CAUTION = (
    "Mains rectifiers can kill: the capacitor, the diodes and everything on the primary side are at a lethal "
    "voltage, and the capacitor stays charged after switch-off. Rectifiers and reservoir capacitors can fail "
    "violently (rupture, fire). Building or changing mains equipment is for qualified persons: follow your local "
    "electrical codes and safety standards and defer to licensed practice.")

_AC = RoleTable("ac", "AC rectifier", (
    TableKey("topology", "", "Topology", "bridge (four diodes or one bridge package), center_tap (two diodes, "
             "a centre-tapped winding) or half_wave (one diode).", kind="choice", required=True,
             choices=("bridge", "center_tap", "half_wave")),
    TableKey("vac_min_Vrms", "V", "AC min (rms)", "Lowest open-circuit EMF behind source_ohm (for center_tap: "
             "each half-winding), not the loaded voltage.", required=True, low=0.0, low_inclusive=False, high=1000.0),
    TableKey("vac_max_Vrms", "V", "AC max (rms)", "Highest open-circuit EMF behind source_ohm.", required=True,
             low=0.0, low_inclusive=False, high=1000.0),
    TableKey("frequency_Hz", "Hz", "Frequency", "Source frequency (50 or 60 Hz mains).", required=True, low=1.0,
             high=100e3),
    TableKey("source_ohm", "Ω", "Source resistance", "Winding and wiring resistance in series with the EMF "
             "(> 0; the transformer's copper, a mains NTC or resistor).", required=True, low=0.0,
             low_inclusive=False, high=1e4),
    TableKey("capacitance_F", "F", "Reservoir capacitor", "The reservoir capacitor's rated value.", required=True,
             low=0.0, low_inclusive=False, high=10.0),
    TableKey("capacitance_tol_pct", "%", "Capacitor tolerance", "± tolerance of the capacitor; both ends are "
             "corners.", default=20.0, high=90.0),
    TableKey("min_dc_V", "V", "Min DC", "Lowest acceptable capacitor voltage (the ripple trough) at every corner.",
             high=10e3),
    TableKey("max_ripple_Vpp", "V", "Max ripple", "Largest acceptable peak-to-peak ripple.", low=0.0,
             low_inclusive=False, high=10e3),
    TableKey("surge_source_ohm", "Ω", "Switch-on resistance", "Resistance of the switch-on path (a cold NTC's, "
             "the winding's).", low=0.0, low_inclusive=False, high=1e4, derived="source_ohm"),
    TableKey("capacitive_derate_pct", "%", "Capacitive derating", "Forward-current rating reduced by this share "
             "for a capacitive load (the usual datasheet note, from memory).", default=20.0, high=90.0),
))


def ac_corners(requirement):
    """(vac [V rms], load [A], ambient [°C], capacitance [F]) of the 16 corners, Vac slowest, C fastest."""
    ac = requirement.table("ac")
    tol = ac.capacitance_tol_pct / 100.0
    combos = list(itertools.product(
        (ac.vac_min_Vrms, ac.vac_max_Vrms), (requirement.load_min_A, requirement.load_max_A),
        (requirement.ambient_min_C, requirement.ambient_max_C),
        (ac.capacitance_F * (1.0 - tol), ac.capacitance_F * (1.0 + tol))))
    return tuple(np.array(c, dtype=float) for c in zip(*combos))


class AcRectifierRole(Role):
    name = "ac_rectifier"
    label = "AC rectifier"
    kinds = ("rectifier", "fast_recovery", "schottky", "bridge")
    objective_metrics = {"drop": "-dc_min_V", "dissipation": "dissipation_W"}
    required_keys = ("load_min_A", "load_max_A")
    unused_keys = {
        "supply_min_V": "an AC rectifier's source is [ac] vac_min_Vrms and vac_max_Vrms",
        "supply_max_V": "an AC rectifier's source is [ac] vac_min_Vrms and vac_max_Vrms",
        "reverse_V": "the peak inverse voltage follows from [ac] topology and vac_max_Vrms",
        "reverse_transient_V": "mains surges belong to a surge clamp (role tvs_clamp)",
        "max_forward_drop_V": "use [ac] min_dc_V, the lowest capacitor voltage",
        "min_output_V": "use [ac] min_dc_V, the lowest capacitor voltage",
        "inrush_capacitance_F": "the switch-on surge uses [ac] capacitance_F and surge_source_ohm",
        "inrush_source_ohm": "the switch-on surge uses [ac] surge_source_ohm",
        "resistor_power_limit_pct": "an AC rectifier has no series resistor to size",
    }
    table = _AC
    curve_plots = (("forward", "I–V", {}), ("forward", "I–V (log)", {"log_y": True}),
                   ("ac_cycle", "AC cycle", {"legend": "bottom_left"}),
                   ("ac_current", "AC cycle", {"legend": "top_right"}),
                   ("junction_temperature", "Junction temperature", {"legend": "bottom_right"}),
                   ("power", "Power", {"legend": "top_right"}))
    cautions = (MAINS_CAUTION,)
    method_notes = (
        "Method: the periodic steady state of source EMF → source_ohm → conducting diode(s) → reservoir capacitor "
        "∥ constant-current load, one AC cycle by backward Euler (the capacitor as a source behind its companion "
        "resistance h/C inside the exact Lambert-W load line; a bridge puts two legs in series), the cycle "
        "closed by Newton shooting on the capacitor voltage at the zero crossing, the step halved until the peak "
        "diode current changes by less than 0.5 %. Corners: AC voltage × load × ambient × capacitor tolerance "
        "ends (16).",
        "Assumptions: a constant-current DC load; the winding as a resistance (no leakage inductance, which "
        "would lower and widen the current pulses); the junction temperature from the cycle-average power "
        "(a diode's thermal time constant is far above one cycle), self-heated; a bridge package's RthJA "
        "carries all four legs. Reverse state: each diode blocks the capacitor voltage and the source for the "
        "rest of the cycle (a bridge leg half of its pair's), leakage and its growth with temperature as for "
        "every role, at the hot forward junction temperature with the cycle-average reverse power. The peak "
        "inverse voltage is the conservative no-load value (bridge √2·Vac max, centre tap and half wave "
        "2·√2·Vac max). Switch-on: at the crest into an empty capacitor, no load, through surge_source_ohm, "
        "time-stepped; ∫i²dt over the part's IFSM pulse length against IFSM²·t/2.",
    )
    check_labels = {"repetitive_peak": "Repetitive peak current", "ripple": "Ripple",
                    "surge_peak": "Switch-on peak current", "output_min": "DC minimum"}
    metric_labels = {
        "dc_min_V": "DC min", "dc_max_V": "DC max", "ripple_Vpp": "Ripple", "conduction_angle_deg": "Conduction angle",
        "diode_avg_A": "Diode avg current", "diode_rms_A": "Diode RMS current", "diode_peak_A": "Diode peak current",
        "diode_dissipation_W": "Diode dissipation", "peak_inverse_V": "Peak inverse voltage",
        "switch_on_peak_A": "Switch-on peak", "switch_on_i2t_A2s": "Switch-on I²t",
        "capacitor_rms_A": "Capacitor ripple current",
    }
    key_metrics = ("dc_min_V", "ripple_Vpp", "diode_peak_A", "dissipation_W", "junction_temp_C")
    part_inputs = ("is_A", "n", "rs_ohm", "vf_max_V", "vrrm_V", "if_avg_A", "ifsm_A", "ifrm_A", "tj_max_C",
                   "rth_ja_K_per_W", "pd_W", "ir_A", "ir_vr_V", "ir_double_K", "eg_eV", "is_temp_exponent")
    limit_searches = ("ambient", "load", "thermal")
    analysed_candidates = 0  # SPEC §9: on demand (each costs about 20 cycle solves of every corner)
    rating_of_check = {"repetitive_peak": ("ifrm_A", "IFRM", "A"), "surge_peak": ("ifsm_A", "IFSM", "A")}

    def candidate_kinds(self, requirement) -> tuple[str, ...]:
        """A bridge package only serves the bridge topology."""
        if requirement.table("ac").topology == "bridge":
            return self.kinds
        return tuple(k for k in self.kinds if k != "bridge")

    def check_table(self, values, common, fail):
        low, high = values.get("vac_min_Vrms"), values.get("vac_max_Vrms")
        if low is not None and high is not None and low > high:
            fail("vac_min_Vrms", f"{low:g} V is above vac_max_Vrms = {high:g} V (min above max)")
        if common.get("load_max_A") is not None and common["load_max_A"] <= 0:
            fail("topology", "a rectifier needs a load: load_max_A must be above 0")

    def curves(self, requirement, part, candidate, notes):
        from partpick.checks.roles.ac_rectifier_curves import ac_rectifier_curves

        return ac_rectifier_curves(requirement, part, candidate, notes)

    def curves_many(self, requirement, parts, candidates, notes_list):
        from partpick.checks.roles.ac_rectifier_curves import ac_rectifier_curves_many

        return ac_rectifier_curves_many(requirement, parts, candidates, notes_list)

    # ------------------------------------------------------------------------------------------
    def evaluate(self, requirement, parts, limits, overrides: Overrides | None = None) -> RoleResult:
        req = requirement
        ov = overrides or Overrides()
        ac = req.table("ac")
        count = parts.count
        vac, load_K, amb_K, cap = ac_corners(req)
        K = vac.size
        # per candidate (P, K): the overrides of operating limits and sensitivity move the max ends
        amb_C = ov.ambient_table(req, amb_K, amb_K == req.ambient_max_C, count)
        load = np.where(load_K[None, :] == req.load_max_A, ov.load_max(req, count)[:, None], load_K[None, :])
        topology = ac.topology
        bridge_part = parts.kind == "bridge"
        per_package = np.where(bridge_part, 4.0, 1.0)
        piv = float(peak_inverse_voltage(topology, ac.vac_max_Vrms))
        surge_R = ac.surge_source_ohm if ac.surge_source_ohm is not None else ac.source_ohm
        on_C = ov.ambient_table(req, [req.ambient_min_C, req.ambient_max_C], [False, True], count)
        points = PointTable(
            supply_V=None,
            load_A=np.concatenate([load_K, load_K, [0.0, 0.0]]),
            ambient_C=np.concatenate([amb_K, amb_K, [req.ambient_min_C, req.ambient_max_C]]),
            state=("steady",) * K + ("reverse",) * K + ("switch_on",) * 2,
            extra=(("vac_Vrms", np.concatenate([vac, vac, [ac.vac_max_Vrms] * 2])),
                   ("capacitance_F", np.concatenate([cap, cap, [cap.max()] * 2]))),
        )
        steady_ids, reverse_ids, on_ids = np.arange(K), np.arange(K, 2 * K), np.array([2 * K, 2 * K + 1])

        # ---- what each check needs ---------------------------------------------------
        needs = Needs(parts)
        thermal_needs = thermal_needs_of(req)
        forward_needs = [("is_A",), ("n",), ("rs_ohm",)] + thermal_needs
        reverse_needs = [("ir_A",), ("ir_vr_V",)] + thermal_needs
        needs.require("reverse_voltage", "vrrm_V")
        needs.require("forward_current", "if_avg_A", "tj_max_C", *forward_needs)
        needs.require("repetitive_peak", *forward_needs)
        needs.require("surge", "ifsm_A", *forward_needs)
        needs.require("power", *forward_needs)
        needs.require("junction_temp", *forward_needs, *reverse_needs)
        needs.require("reverse_runaway", *forward_needs, *reverse_needs)
        if ac.min_dc_V is not None:
            needs.require("output_min", *forward_needs)
        if ac.max_ripple_Vpp is not None:
            needs.require("ripple", *forward_needs)
        if req.max_leakage_A is not None:
            needs.require("leakage", *forward_needs, *reverse_needs)
        forward_bad = _missing_any(parts, forward_needs)
        reverse_bad = _missing_any(parts, reverse_needs) | forward_bad

        thermal = thermal_data(parts, req, ov.thermal_resistance)
        rth = thermal.thermal_resistance
        tj_max_C = thermal.tj_max_K - ZERO_CELSIUS_K
        groups = parts.group
        _, model = forward_model_of(parts)

        # ---- the three states ------------------------------------------------------------
        cyc = _cycle(req, model, vac, load, amb_C, cap, rth, per_package, parts)
        rev = _reverse(parts, cyc, rth, per_package, piv)
        on = _switch_on(req, model, parts, surge_R, on_C, cap.max())
        fwd_mask = forward_bad[:, None]
        nan_f = lambda a: np.where(fwd_mask, np.nan, a)  # noqa: E731 - mask parts without a model
        tj_C = nan_f(np.where(cyc.runaway | cyc.empty, np.nan, cyc.junction_temperature - ZERO_CELSIUS_K))
        rev_tj_C = np.where(reverse_bad[:, None] | rev["runaway"] | cyc.empty, np.nan, rev["tj_K"] - ZERO_CELSIUS_K)

        def with_missing(check, extra=()):
            return [(needs.missing(check), needs.reason(check))] + list(extra)

        no_state = cyc.empty.any(axis=1) & ~forward_bad
        forward_runaway = (no_state | cyc.runaway.any(axis=1),
                           object_array(["no steady state: the source cannot supply the load at some corner (even "
                                         "from empty the capacitor ends each cycle lower)" if e else
                                         "forward thermal runaway: the cycle-average power heats the junction faster "
                                         "than RthJA sheds it" for e in no_state]))
        checks = []
        # reverse_voltage: the conservative PIV against VRRM × the policy's reverse limit
        rev_pct, rev_src = limit_array(limits, groups, "reverse_pct")
        checks.append(worst_case_check(
            "reverse_voltage", "V", np.full((count, 1), piv), parts.raw["vrrm_V"] * rev_pct / 100.0,
            [reverse_ids[-1]], "max", _sources(rev_src, groups, "{} % of VRRM", limits, "reverse_pct"),
            reasons=with_missing("reverse_voltage"), invalid=needs.missing("reverse_voltage")))

        # forward_current: the diode's average (a bridge: the DC output) against IF(AV) derated at Ta,
        # less the capacitive-load derating, × the policy's current limit
        cur_pct, cur_src = limit_array(limits, groups, "current_pct")
        Ta_K = amb_C + ZERO_CELSIUS_K  # °C → K at the physics boundary, (P, K)
        if_ref_K = np.minimum(parts.value("if_ref_C") + ZERO_CELSIUS_K, thermal.tj_max_K - 1.0)
        rated = derated_current(Ta_K, parts.value("if_avg_A", 1.0)[:, None], thermal.tj_max_K[:, None],
                                if_ref_K[:, None])
        cap_share = 1.0 - ac.capacitive_derate_pct / 100.0
        carried = np.where(cyc.empty, np.nan,
                           np.where(bridge_part[:, None], load, cyc.cycle.average_current))
        cur_source = object_array([
            f"{cur_src[g]}: {v:g} % of IF(AV) derated at Ta, less {ac.capacitive_derate_pct:g} % for a "
            f"capacitive load ([ac] capacitive_derate_pct)" for g, v in enumerate(_group_values(limits, "current_pct"))
        ])[groups]
        checks.append(worst_case_check(
            "forward_current", "A", nan_f(carried), rated * cap_share * cur_pct[:, None] / 100.0, steady_ids, "max",
            cur_source, reasons=with_missing("forward_current", [forward_runaway]),
            invalid=needs.missing("forward_current")))

        # repetitive_peak: the diode's peak against IFRM × the current limit; "not rated" where no IFRM
        peak = nan_f(cyc.cycle.peak_current)
        checks.append(_repetitive_peak(peak, parts, cur_pct, cur_src, groups, limits, steady_ids, needs,
                                       forward_runaway))

        # surge: ∫i²dt over the IFSM pulse against IFSM²·t/2 × s², and the peak against IFSM × s
        surge_pct, surge_src = limit_array(limits, groups, "surge_pct")
        ifsm = parts.value("ifsm_A", 1.0)
        i2t_rating = ifsm ** 2 * (parts.value("ifsm_ms") / 1000.0) / 2.0
        surge_share = surge_pct / 100.0
        checks.append(worst_case_check(
            "surge", "A²s", nan_f(on["i2t"]), i2t_rating * surge_share ** 2, on_ids, "max",
            _sources(surge_src, groups, "({} % of IFSM)² · IFSM²·t/2", limits, "surge_pct"),
            reasons=with_missing("surge"), invalid=needs.missing("surge")))
        checks.append(worst_case_check(
            "surge_peak", "A", nan_f(on["peak"]), ifsm * surge_share, on_ids, "max",
            _sources(surge_src, groups, "{} % of IFSM (no rating for a shorter pulse: the peak is held to IFSM)",
                     limits, "surge_pct"),
            reasons=with_missing("surge"), invalid=needs.missing("surge")))

        # power: the package's cycle-average power against Pallow(Ta), per corner, in % of it
        pow_pct, pow_src = limit_array(limits, groups, "power_pct")
        p_allowed = allowed_power(Ta_K, thermal.power_rating[:, None], thermal.tj_max_K[:, None],
                                  thermal.pd_ref_K[:, None])
        package_W = nan_f(np.where(cyc.runaway, np.nan, cyc.package_power))
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.where(p_allowed > 0, 100.0 * package_W / np.where(p_allowed > 0, p_allowed, 1.0),
                             np.where(package_W > 0, np.inf, 0.0))
        ratio = np.where(np.isnan(package_W), np.nan, ratio)
        checks.append(worst_case_check(
            "power", "% of Pallow", ratio, pow_pct, steady_ids, "max",
            _sources(pow_src, groups, "{} % of Pallow(Ta) (a bridge: the package, all four legs)", limits,
                     "power_pct"),
            reasons=with_missing("power", [forward_runaway,
                                           (np.isinf(ratio).any(axis=1), "no dissipation is allowed at this "
                                                                         "ambient: it is at or above Tj max")]),
            invalid=needs.missing("power")))

        # junction_temp: the steady forward Tj and the reverse-state Tj (hot start) at every corner
        tj_lim, tj_src = tj_limit(limits, groups, tj_max_C)
        rev_runaway_reason = (rev["runaway"].any(axis=1) & ~reverse_bad,
                              "thermal runaway in the reverse state: from the hot forward Tj, the cycle-average "
                              "reverse power heats the junction faster than RthJA sheds it")
        checks.append(worst_case_check(
            "junction_temp", "°C", np.concatenate([tj_C, rev_tj_C], axis=1), tj_lim,
            np.concatenate([steady_ids, reverse_ids]), "max", tj_src,
            reasons=with_missing("junction_temp", [forward_runaway, rev_runaway_reason]),
            invalid=needs.missing("junction_temp"), ambient_C=np.concatenate([amb_C, amb_C], axis=1)))
        checks.append(worst_case_check(
            "reverse_runaway", "°C", rev_tj_C, tj_max_C, reverse_ids, "max",
            "part tj_max_C: a stable reverse-state junction temperature below Tj max, from the hot forward Tj",
            reasons=with_missing("reverse_runaway", [rev_runaway_reason, forward_runaway]),
            invalid=needs.missing("reverse_runaway"), ambient_C=amb_C))
        scaled = parts.known("ir_vr_V") & (piv / parts.value("ir_vr_V", 1.0) > 1.0)
        note = object_array(None, count)
        note[scaled] = "leakage scaled in proportion to voltage above the datasheet's IR test voltage ir_vr_V"
        checks[-1].note = note

        dc_min = nan_f(cyc.cycle.dc_min)
        ripple = nan_f(cyc.cycle.ripple)
        if ac.min_dc_V is not None:
            checks.append(worst_case_check(
                "output_min", "V", dc_min, np.full(count, ac.min_dc_V), steady_ids, "min", "requirement [ac] min_dc_V",
                reasons=with_missing("output_min", [forward_runaway]), invalid=needs.missing("output_min")))
        if ac.max_ripple_Vpp is not None:
            checks.append(worst_case_check(
                "ripple", "V", ripple, np.full(count, ac.max_ripple_Vpp), steady_ids, "max",
                "requirement [ac] max_ripple_Vpp", reasons=with_missing("ripple", [forward_runaway]),
                invalid=needs.missing("ripple")))
        leakage = np.where(reverse_bad[:, None], np.nan, rev["leakage"])
        if req.max_leakage_A is not None:
            checks.append(worst_case_check(
                "leakage", "A", leakage, np.full(count, req.max_leakage_A), reverse_ids, "max",
                "requirement max_leakage_A", reasons=with_missing("leakage", [rev_runaway_reason, forward_runaway]),
                invalid=needs.missing("leakage")))
            checks[-1].note = note

        any_missing = needs.any_missing()
        nan = np.full(count, np.nan)
        checks.append(worst_case_check(
            "data_missing", "", nan[:, None], nan, [-1], "max", "part record: the fields the checks need",
            reasons=[(any_missing, needs.data_missing_reason())], present=any_missing))

        # ---- metrics at their worst corner -----------------------------------------------
        metrics, metric_points = {}, {}

        def metric(key, values, sense, ids):
            value, col = worst_value(values, sense)
            metrics[key] = value
            metric_points[key] = np.asarray(ids)[col]

        metric("dc_min_V", dc_min, "min", steady_ids)
        metric("dc_max_V", nan_f(cyc.cycle.dc_max), "max", steady_ids)
        metric("ripple_Vpp", ripple, "max", steady_ids)
        metric("conduction_angle_deg", nan_f(cyc.cycle.conduction_angle_deg), "min", steady_ids)
        metric("diode_avg_A", nan_f(cyc.cycle.average_current), "max", steady_ids)
        metric("diode_rms_A", nan_f(cyc.cycle.rms_current), "max", steady_ids)
        metric("diode_peak_A", peak, "max", steady_ids)
        metric("dissipation_W", package_W, "max", steady_ids)
        metric("diode_dissipation_W", nan_f(np.where(cyc.runaway, np.nan, cyc.diode_power)), "max", steady_ids)
        metric("junction_temp_C", np.concatenate([tj_C, rev_tj_C], axis=1), "max",
               np.concatenate([steady_ids, reverse_ids]))
        metrics["peak_inverse_V"] = np.full(count, piv)
        metric_points["peak_inverse_V"] = np.full(count, reverse_ids[-1])
        metric("switch_on_peak_A", nan_f(on["peak"]), "max", on_ids)
        metric("switch_on_i2t_A2s", nan_f(on["i2t"]), "max", on_ids)
        metric("capacitor_rms_A", nan_f(cyc.cycle.capacitor_rms), "max", steady_ids)
        metric("leakage_A", leakage, "max", reverse_ids)
        metric("reverse_power_W", np.where(reverse_bad[:, None], np.nan, rev["power"]), "max", reverse_ids)
        vrrm = parts.raw["vrrm_V"]
        metrics["reverse_headroom_V"] = vrrm - piv
        metrics["reverse_stress_pct"] = np.where(vrrm > 0, 100.0 * piv / vrrm, np.nan)

        internals = {
            "is_A": np.ravel(np.broadcast_to(model.saturation_current, (count, 1))),
            "n": parts.value("n", 1.0), "rs_ohm": parts.value("rs_ohm", 0.0),
            "rth_ja_K_per_W": rth, "pd_W": thermal.power_rating, "tj_max_C": tj_max_C, "tj_limit_C": tj_lim,
            "diodes_per_package": per_package, "diodes_in_circuit": np.full(count, diodes_in_circuit(topology)),
            "forward_bad": forward_bad, "reverse_bad": reverse_bad,
            "steady_tj_C": tj_C, "reverse_tj_C_corners": rev_tj_C,
        }
        return RoleResult(points, checks, metrics, metric_points, internals)


# ---------------------------------------------------------------------------------------------
def _missing_any(parts, groups) -> np.ndarray:
    bad = np.zeros(parts.count, dtype=bool)
    for group in groups:
        bad |= ~np.logical_or.reduce([parts.known(x) for x in group])
    return bad


def _group_values(limits: dict, key: str) -> list:
    return [limits[g][key].value for g in ("pn", "schottky", "zener")]


def _sources(sources, groups, template, limits, key):
    return object_array([f"{sources[g]}: " + template.format(f"{v:g}") for g, v in
                         enumerate(_group_values(limits, key))])[groups]


def _cycle(req, model, vac, load, amb_C, cap, rth, per_package, parts):
    """The self-heated periodic steady state at every part × corner (P, 16)."""
    ac = req.table("ac")
    return rectifier_operating_point(
        ac.topology, vac[None, :], ac.frequency_Hz, ac.source_ohm, cap[None, :], load, model,
        amb_C + ZERO_CELSIUS_K, rth[:, None], per_package[:, None],
        leakage_rated_voltage=parts.value("ir_vr_V", 1.0)[:, None])


def _reverse(parts, cyc, rth, per_package, piv):
    """Each diode's reverse state at every corner, from the hot forward Tj (SPEC §4a, §3).

    The cycle-average reverse power PR(Tj) = IR(ir_vr, Tj)·⟨vr·max(1, vr/ir_vr)⟩ grows as
    2^(ΔTj/d); starting at the forward Tj, the package (all its diodes) balances
    Tj = Tj,fwd + N·RthJA·PR(Tj) (`blocking_state`), or runs away.
    """
    col = lambda a: np.asarray(a, dtype=float)[:, None]  # noqa: E731 - parts along axis 0
    ir_vr = col(parts.value("ir_vr_V", 1.0))
    # the leakage law of SPEC §3: one datasheet point, or two (the hot one sets the doubling interval)
    law = leakage_law(col(parts.value("ir_A", 1e-6)), ir_vr, col(parts.value("ir_t_C") + ZERO_CELSIUS_K),
                      col(parts.value("ir_double_K")), col(parts.raw["ir_hot_A"]),
                      col(parts.raw["ir_hot_t_C"] + ZERO_CELSIUS_K))
    tj_fwd = cyc.junction_temperature
    ir_at = lambda T: law.current(ir_vr, T)  # noqa: E731 - IR at its test voltage
    moment = np.nan_to_num(cyc.cycle.reverse_moment)  # no steady state: masked by the caller
    state = blocking_state(law, 0.0, tj_fwd, rth[:, None] * per_package[:, None], power_per_ampere=moment)
    runaway = np.asarray(state.runaway, dtype=bool)
    tj = np.where(runaway, tj_fwd, state.junction_temperature)
    return {"tj_K": tj, "runaway": runaway,
            "power": ir_at(tj) * moment,
            "leakage": law.current(piv, tj)}


def _switch_on(req, model, parts, surge_R, ambients_C, capacitance):
    """The switch-on surge at the crest into the largest empty capacitor, no load, cold and hot (P, 2)."""
    ac = req.table("ac")
    T = np.asarray(ambients_C, dtype=float) + ZERO_CELSIUS_K  # (P, 2)
    Is, n, Rs = model.at(T)
    sol = switch_on_surge(ac.topology, ac.vac_max_Vrms, ac.frequency_Hz, surge_R, capacitance, 0.0, Is, n, Rs, T,
                          (parts.value("ifsm_ms") / 1000.0)[:, None])
    return {"peak": sol.peak_current, "i2t": sol.i2t}


def _repetitive_peak(peak, parts, cur_pct, cur_src, groups, limits, ids, needs, no_state) -> CheckArray:
    """The peak against IFRM × the current limit; where IFRM is not known: reported "not rated"."""
    rated = parts.known("ifrm_A")
    check = worst_case_check(
        "repetitive_peak", "A", peak, parts.raw["ifrm_A"] * cur_pct / 100.0, ids, "max",
        _sources(cur_src, groups, "{} % of IFRM", limits, "current_pct"),
        reasons=[(needs.missing("repetitive_peak"), needs.reason("repetitive_peak")), no_state],
        invalid=needs.missing("repetitive_peak"))
    unrated = ~rated & ~needs.missing("repetitive_peak") & np.isfinite(peak).all(axis=1)
    if unrated.any():
        value, col = worst_value(peak, "max")
        check.value[unrated] = value[unrated]
        check.point[unrated] = np.asarray(ids)[col][unrated]
        check.passed[unrated] = True  # not a pass of a limit: the sheet says "not rated"
        check.reason[unrated] = None
        check.note = object_array(None, peak.shape[0])
        check.note[unrated] = "not rated: the part gives no IFRM; the peak is reported, not checked"
        check.limit_source[unrated] = "no IFRM in the part record"
    return check


ROLE = AcRectifierRole()
