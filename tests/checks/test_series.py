"""The series role against hand analysis and an independent corner-by-corner brentq solution."""

from __future__ import annotations

import itertools
import json
import math

import pytest

from checks_builders import make_part, make_requirement
from partpick.checks.service import candidate_details, run_check
from reference_models import forward_voltage, leakage, reverse_junction, steady_junction

ZERO_C = 273.15


def dict_requirement(req, **changes):
    """The requirement ``req`` with keys changed (the TOML keys, validated again)."""
    from partpick.checks.requirement import requirement_from_dict

    data = req.to_dict()
    data.update(changes)
    return requirement_from_dict({k: v for k, v in data.items() if v is not None}, "test.toml")


def _by_name(candidate):
    return {c["name"]: c for c in candidate["checks"]}


def test_series_diode_by_hand_and_by_brentq(silicon_part):
    # The invented rectifier TR-1: Is = 1e-12 A, n = 1, Rs = 0.05 Ω, Eg = 1.11 eV, m = 3 (defaults),
    # RthJA = 50 K/W, Tj max 150 °C. Requirement: 12–14 V, 0.5–1 A, 25–50 °C, no policy (ratings only).
    #
    # By hand (SPEC §3 equations), worst drop = cold start at the coldest ambient and the highest load:
    #   VT(25 °C) = k·298.15 K/q = 25.693 mV; ln(1 + 1 A/1e-12 A) = 27.631
    #   Vf = 25.693 mV · 27.631 + 1 A · 0.05 Ω = 0.7099 + 0.05 = 0.760 V
    # Steady state at 25 °C, 1 A, by fixed-point iteration on Tj = Ta + Vf·I·RthJA:
    #   Tj1 = 25 + 0.760·50 = 63.0 °C → Is = 1e-12·(336.15/298.15)³·exp(12881·(1/298.15 − 1/336.15)) = 1.89e-10 A,
    #         VT = 28.97 mV, Vf = 28.97 mV·ln(1/1.89e-10) + 0.05 = 0.699 V
    #   Tj2 = 25 + 0.699·50 = 59.9 °C → Is = 1.29e-10 A, VT = 28.70 mV, Vf = 0.7035 V
    #   Tj3 = 60.2 °C: settles near Vf ≈ 0.703 V, P ≈ 0.703 W, Tj ≈ 60.1 °C (the largest dissipation:
    #   the hotter ambient lowers Vf and so the power).
    # Hand model at 1 A and the worst-drop corner's Tj (25 °C): Ron = n·VT/(I + Is) + Rs = 0.0757 Ω,
    #   Vth0 = Vf − I·Ron = 0.760 − 0.0757 = 0.684 V.
    # Reverse state at 50 °C, without hand-over (blocking from switch-on): VR = 14 V (supply reversed),
    #   IR = 1 µA·2^((50 − 25)/10) = 5.66 µA, PR = 79 µW: the junction barely warms (0.004 K at 50 K/W).
    #   With hand-over (the default) it blocks from the steady forward Tj at 50 °C and 1 A instead.
    req = make_requirement(handover=False)
    result = run_check(req, [silicon_part])
    json.dumps(result, allow_nan=False)
    cand = result["candidates"][0]
    m = cand["metrics"]

    # The hand figures (tolerances: the rounding of a hand calculation).
    assert m["forward_drop_V"] == pytest.approx(0.760, abs=0.001)
    assert m["dissipation_W"] == pytest.approx(0.703, abs=0.002)
    assert m["ron_ohm"] == pytest.approx(0.0757, abs=0.0001)
    assert m["vth0_V"] == pytest.approx(0.684, abs=0.001)
    assert m["leakage_A"] == pytest.approx(5.66e-6, rel=0.01)

    # The same numbers from brentq, corner by corner (self-heating included).
    model = dict(is0=1e-12, n=1.0, rs=0.05)
    cold, steady, tj = [], [], []
    for vs, load, amb in itertools.product((12.0, 14.0), (0.5, 1.0), (25.0, 50.0)):
        Ta = amb + ZERO_C
        v_cold = forward_voltage(load, Ta, **model)
        T = steady_junction(load, Ta, 50.0, **model)
        v_steady = forward_voltage(load, T, **model)
        cold.append((v_cold, vs - v_cold))
        steady.append((v_steady, vs - v_steady, load * v_steady))
        tj.append(T - ZERO_C)
    t_rev = reverse_junction(50.0 + ZERO_C, 50.0, 14.0, ir=1e-6, ir_vr=100.0, ir_t=25.0 + ZERO_C)
    # the hand-over start: the hottest steady forward Tj at the hottest ambient (1 A, 50 °C)
    t_start = steady_junction(1.0, 50.0 + ZERO_C, 50.0, **model)
    handed = run_check(make_requirement(), [silicon_part])["candidates"][0]["metrics"]
    assert handed["leakage_A"] == pytest.approx(leakage(t_start, 14.0, 1e-6, 100.0, 25.0 + ZERO_C), rel=1e-6)
    drops = [c[0] for c in cold] + [s[0] for s in steady]
    outputs = [c[1] for c in cold] + [s[1] for s in steady]
    assert m["forward_drop_V"] == pytest.approx(max(drops), abs=1e-7)
    assert m["output_min_V"] == pytest.approx(min(outputs), abs=1e-7)
    assert m["output_max_V"] == pytest.approx(max(outputs), abs=1e-7)
    assert m["dissipation_W"] == pytest.approx(max(s[2] for s in steady), rel=1e-6)
    assert m["junction_temp_C"] == pytest.approx(max(tj + [t_rev - ZERO_C]), abs=1e-5)
    assert m["leakage_A"] == pytest.approx(leakage(t_rev, 14.0, 1e-6, 100.0, 25.0 + ZERO_C), rel=1e-6)
    assert m["reverse_voltage_V"] == 14.0 and m["reverse_headroom_V"] == 86.0 and m["reverse_stress_pct"] == 14.0

    checks = _by_name(cand)
    # The worst drop is named at its corner: cold start, 12 V (either supply), 1 A, 25 °C.
    power = checks["power"]
    # Pd from RthJA: (150 − 25)/50 = 2.5 W; Pallow(50 °C) = 2.5·(150 − 50)/125 = 2.0 W, Pallow(25 °C) = 2.5 W.
    # The worst ratio P/Pallow is at 50 °C and 1 A (the lower Vf there costs less than the lost allowance).
    p50 = max(s[2] for s, (vs, load, amb) in zip(steady, itertools.product((12.0, 14.0), (0.5, 1.0), (25.0, 50.0)))
              if amb == 50.0)
    assert power["value"] == pytest.approx(100 * p50 / 2.0, rel=1e-6) and power["limit"] == 100.0
    assert power["unit"] == "% of Pallow"
    assert power["corner"]["ambient_C"] == 50.0 and power["corner"]["load_A"] == 1.0
    assert power["corner"]["state"] == "steady"
    # IF(AV) 2 A derated at 50 °C: 2·(150 − 50)/(150 − 25) = 1.6 A; margin (1.6 − 1)/1.6 = 37.5 %.
    current = checks["forward_current"]
    assert current["limit"] == pytest.approx(1.6) and current["margin_pct"] == pytest.approx(37.5)
    assert checks["junction_temp"]["limit_source"].startswith("default (no derating policy: ratings only)")
    assert cand["passed"] and result["subject_passed"]
    assert result["policy"]["note"] == "no derating policy: ratings only"


def test_guaranteed_max_vf_is_what_the_checks_use(silicon_part):
    # vf_max_V = 0.80 V at 1 A is above the typical 0.760 V: the checked curve passes through it at 25 °C
    # (SPEC §3), so the cold start at 25 °C and 1 A gives exactly 0.80 V.
    part = dict(silicon_part, vf_max_V=0.80, vf_max_at_A=1.0)
    m = run_check(make_requirement(), [part])["candidates"][0]["metrics"]
    assert m["forward_drop_V"] == pytest.approx(0.80, abs=1e-9)
    details = candidate_details(make_requirement(), part)
    assert details["parameters"]["is_A"] < details["parameters"]["is_A_typical"] == 1e-12


def test_forward_drop_and_output_limits_fail_with_the_corner(silicon_part):
    req = make_requirement(max_forward_drop_V=0.70, min_output_V=11.30)
    cand = run_check(req, [silicon_part])["candidates"][0]
    checks = _by_name(cand)
    drop = checks["forward_drop"]
    assert not drop["passed"]
    assert drop["margin_pct"] == pytest.approx(100 * (0.70 - drop["value"]) / 0.70)
    assert drop["corner"] == {"supply_V": 12.0, "load_A": 1.0, "ambient_C": 25.0, "state": "cold_start"}
    out = checks["output_min"]
    assert out["value"] == pytest.approx(12.0 - drop["value"]) and not out["passed"]
    assert cand["failed_checks"][0] == "forward_drop"  # the most negative margin comes first
    assert not cand["passed"]


def test_hot_schottky_runs_away_in_the_reverse_state():
    # An invented leaky Schottky: IR 2 mA at 40 V and 25 °C, doubling every 10 K, RthJA 120 K/W.
    # At 85 °C and 32 V: IR(Ta) = 2 mA·2^6 = 128 mA, PR = 4.1 W; with c = ln2/10 K the balance
    # x = RthJA·PR·e^(c·x) has a root only while c·RthJA·PR ≤ 1/e — here it is 34, so no stable Tj.
    hot = make_part(part_number="SK-HOT", kind="schottky", vrrm_V=40.0, if_avg_A=3.0, tj_max_C=150.0,
                    rth_ja_K_per_W=120.0, is_A=1e-6, n=1.05, rs_ohm=0.03, ir_A=2e-3, ir_vr_V=40.0, ir_t_C=25.0)
    req = make_requirement(supply_min_V=24.0, supply_max_V=32.0, ambient_min_C=-40.0, ambient_max_C=85.0,
                           load_min_A=0.1, load_max_A=0.5)
    assert reverse_junction(85.0 + ZERO_C, 120.0, 32.0, ir=2e-3, ir_vr=40.0, ir_t=25.0 + ZERO_C) is None
    result = run_check(req, [hot])
    json.dumps(result, allow_nan=False)  # never NaN or Infinity
    cand = result["candidates"][0]
    runaway = _by_name(cand)["reverse_runaway"]
    assert not runaway["passed"] and runaway["margin"] < 0 and runaway["margin_pct"] < 0
    assert runaway["value"] == 85.0 and runaway["unit"] == "°C"  # the ambient asked, against runaway_ambient_C
    assert "thermal runaway in the reverse state" in runaway["note"]
    assert runaway["corner"]["state"] == "reverse" and runaway["corner"]["ambient_C"] == 85.0
    assert cand["metrics"]["leakage_A"] is None
    assert runaway["margin"] == pytest.approx(cand["metrics"]["runaway_ambient_C"] - 85.0)
    assert not result["subject_passed"]


@pytest.mark.parametrize("factor", [0.9, 1.1])
def test_reverse_runaway_boundary_matches_the_independent_criterion(factor):
    # Put c·RthJA·PR just below (0.9) and above (1.1) 1/e: stable, then runaway (SPEC §3 stability).
    rth, vr, d = 100.0, 20.0, 10.0
    c = math.log(2) / d
    p0 = factor * math.exp(-1) / (c * rth)
    ir = p0 / vr  # rated at 25 °C and 20 V; ambient 25 °C, so IR(Ta) = ir
    part = make_part(part_number="SK-B", kind="schottky", vrrm_V=40.0, if_avg_A=3.0, tj_max_C=175.0,
                     rth_ja_K_per_W=rth, is_A=1e-6, n=1.05, rs_ohm=0.03, ir_A=ir, ir_vr_V=vr, ir_t_C=25.0)
    req = make_requirement(supply_min_V=12.0, supply_max_V=20.0, ambient_min_C=25.0, ambient_max_C=25.0,
                           load_min_A=0.01, load_max_A=0.02)
    ref = reverse_junction(25.0 + ZERO_C, rth, vr, ir=ir, ir_vr=vr, ir_t=25.0 + ZERO_C)
    # Blocking from switch-on (no hand-over): the junction starts at ambient, where IR(Ta) = ir.
    cand = run_check(dict_requirement(req, handover=False), [part])["candidates"][0]
    runaway = _by_name(cand)["reverse_runaway"]
    # The distance to runaway in closed form (the tangency c·RthJA·PR(Ta) = 1/e of the classic
    # thermal-stability criterion): PR(Ta) = factor·(1/e)/(c·RthJA)·2^((Ta − 25 °C)/d), so the highest
    # ambient that still settles is 25 °C + d·log2(1/factor), and the largest RthJA is RthJA/factor.
    assert cand["metrics"]["runaway_ambient_C"] == pytest.approx(25.0 + d * math.log2(1 / factor), abs=1e-6)
    assert cand["metrics"]["runaway_rth_K_per_W"] == pytest.approx(rth / factor, rel=1e-6)
    assert runaway["margin"] == pytest.approx(d * math.log2(1 / factor), abs=1e-6)
    assert runaway["margin_pct"] == pytest.approx(100 * (rth / factor - rth) / (rth / factor), abs=1e-4)
    if factor < 1:
        assert ref is not None and runaway["passed"]
        assert "settles at" in runaway["note"]
    else:
        assert ref is None and not runaway["passed"]


def test_forward_runaway_is_a_failed_check_not_an_error():
    # Rs rising steeply with temperature (exponent 5) in a poor package: Rth·I·dV/dT > 1, no fixed point.
    part = make_part(part_number="RS-HOT", kind="rectifier", vrrm_V=100.0, if_avg_A=5.0, tj_max_C=150.0,
                     rth_ja_K_per_W=300.0, is_A=1e-12, n=1.0, rs_ohm=1.0, rs_temp_exponent=5.0,
                     ir_A=1e-6, ir_vr_V=100.0)
    result = run_check(make_requirement(), [part])
    json.dumps(result, allow_nan=False)
    tj = _by_name(result["candidates"][0])["junction_temp"]
    assert tj["value"] is None and "forward thermal runaway" in tj["reason"]
    assert tj["corner"]["state"] == "steady"


def test_missing_data_fails_data_missing_naming_the_fields(silicon_part):
    part = dict(silicon_part, part_number="TR-2", ir_A=None, ir_vr_V=None, rth_ja_K_per_W=None, pd_W=None)
    result = run_check(make_requirement(max_leakage_A=1e-3), [part, silicon_part])
    json.dumps(result, allow_nan=False)
    by_number = {c["part_number"]: c for c in result["candidates"]}
    lacking = by_number["TR-2"]
    checks = _by_name(lacking)
    assert "pd_W rated at ambient or rth_ja_K_per_W" in checks["data_missing"]["reason"]
    assert "ir_A" in checks["data_missing"]["reason"] and "leakage" in checks["data_missing"]["reason"]
    assert checks["leakage"]["value"] is None and checks["leakage"]["reason"].startswith("not known: ")
    assert checks["reverse_voltage"]["passed"]  # what can be checked still is
    assert "data_missing" not in _by_name(by_number["TR-1"])
    assert by_number["TR-1"]["rank"] == 1 and result["subject_passed"]


def test_design_thermal_resistance_replaces_each_parts(silicon_part):
    base = run_check(make_requirement(), [silicon_part])["candidates"][0]["metrics"]
    board = run_check(make_requirement(rth_ja_K_per_W=25.0), [silicon_part])["candidates"][0]["metrics"]
    T = steady_junction(1.0, 50.0 + ZERO_C, 25.0, is0=1e-12, n=1.0, rs=0.05)
    assert board["junction_temp_C"] == pytest.approx(T - ZERO_C, abs=1e-5)
    assert board["junction_temp_C"] < base["junction_temp_C"]


def test_surge_check_against_the_i2t_rating(silicon_part):
    # Charging 1 mF from 14 V through 0.5 Ω: I²t = V²·C/(2R) = 196·1e-3/1 = 0.196 A²s.
    # IFSM 30 A for 8.3 ms (default): rating IFSM²·t/2 = 900·0.0083/2 = 3.735 A²s.
    part = dict(silicon_part, ifsm_A=30.0)
    req = make_requirement(inrush_capacitance_F=1e-3, inrush_source_ohm=0.5)
    surge = _by_name(run_check(req, [part])["candidates"][0])["surge"]
    assert surge["value"] == pytest.approx(0.196) and surge["limit"] == pytest.approx(3.735)
    assert surge["unit"] == "A²s" and surge["passed"]


def test_leakage_above_its_test_voltage_is_scaled_and_says_so(silicon_part):
    # IR 1 µA rated at 10 V; at 14 V it is scaled by 14/10 (SPEC §3), and the check sheet notes it.
    part = dict(silicon_part, ir_vr_V=10.0)
    cand = run_check(make_requirement(max_leakage_A=1e-3, handover=False), [part])["candidates"][0]
    leak = _by_name(cand)["leakage"]
    t_rev = reverse_junction(50.0 + ZERO_C, 50.0, 14.0, ir=1e-6, ir_vr=10.0, ir_t=25.0 + ZERO_C)
    assert leak["value"] == pytest.approx(leakage(t_rev, 14.0, 1e-6, 10.0, 25.0 + ZERO_C), rel=1e-6)
    assert "scaled in proportion to voltage" in leak["note"]
    plain = _by_name(run_check(make_requirement(max_leakage_A=1e-3), [silicon_part])["candidates"][0])["leakage"]
    assert "scaled" not in plain["note"] and "doubling every 10 K (one datasheet point)" in plain["note"]


def test_no_allowance_at_an_ambient_above_tj_max(silicon_part):
    part = dict(silicon_part, tj_max_C=125.0, rth_ja_K_per_W=20.0)
    result = run_check(make_requirement(ambient_max_C=130.0), [part])
    json.dumps(result, allow_nan=False)
    power = _by_name(result["candidates"][0])["power"]
    assert power["value"] is None and not power["passed"] and "at or above Tj max" in power["reason"]
