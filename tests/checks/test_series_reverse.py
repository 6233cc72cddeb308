"""The series role's reverse state (SPEC §3, §4): hand-over start, distance to runaway, transients,
hot leakage, the inrush peak, the Rs(T) default and the runaway wording.

Every expected value comes from an independent calculation written here, not from partpick: the
steady forward Tj and the reverse-state equilibria from scipy's bracketed root finder `brentq`
(`reference_models`), the runaway ambient and RthJA by brute-force scans, the two-point doubling
interval and the inrush peak by hand. The parts are invented.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from checks_builders import make_part, make_requirement
from partpick.checks.service import run_check
from reference_models import forward_voltage, leakage, steady_junction

ZERO_C = 273.15
# An invented 3 A Schottky: Is 2 µA, n 1.05, Rs 20 mΩ held constant, IR 0.3 mA at 20 V and 25 °C.
SCHOTTKY_MODEL = dict(is0=2e-6, n=1.05, rs=0.02, eg=0.69, m=2.0, p=0.0)


def _schottky(**changes):
    fields = dict(part_number="OR-S3", kind="schottky", package="SMC", vrrm_V=40.0, if_avg_A=5.0, if_ref_C=25.0,
                  tj_max_C=150.0, rth_ja_K_per_W=40.0, is_A=2e-6, n=1.05, rs_ohm=0.02, rs_temp_exponent=0.0,
                  ir_A=3e-4, ir_vr_V=20.0, ir_t_C=25.0, ifsm_A=80.0)
    fields.update(changes)
    return make_part(**fields)


def _oring(**keys):
    # 12 V OR-ing: 11–13 V, up to 3 A, 70 °C; the diode blocks 13 V when the other source takes over.
    base = dict(supply_min_V=11.0, supply_max_V=13.0, load_min_A=0.5, load_max_A=3.0, ambient_min_C=-20.0,
                ambient_max_C=70.0)
    base.update(keys)
    return make_requirement(**base)


def _checks(candidate):
    return {c["name"]: c for c in candidate["checks"]}


def reverse_roots(Ta, rth, VR, ir, ir_vr, ir_t, d=10.0):
    """Every root of g(T) = Ta + Rth·VR·IR(T) − T above Ta, by a 0.05 K scan and brentq on each sign change."""
    g = lambda T: Ta + rth * VR * leakage(T, VR, ir, ir_vr, ir_t, d) - T  # noqa: E731
    grid = np.arange(Ta, Ta + 500.0, 0.05)
    values = Ta + rth * VR * ir * np.exp2((grid - ir_t) / d) * max(1.0, VR / ir_vr) - grid  # g on the grid
    flips = np.flatnonzero(np.sign(values[:-1]) != np.sign(values[1:]))
    return [brentq(g, grid[i], grid[i + 1], xtol=1e-10) for i in flips]


def settles_by_reference(Ta, rth, VR, tj_max, start, **leak):
    """SPEC §3: a stable root below Tj max, and the start below the unstable one."""
    roots = reverse_roots(Ta, rth, VR, **leak)
    if not roots or roots[0] >= tj_max:
        return False
    return len(roots) < 2 or start < roots[1]


LEAK = dict(ir=3e-4, ir_vr=20.0, ir_t=25.0 + ZERO_C)


def test_hand_over_runs_away_where_a_cold_start_settles():
    # Reference: at 70 °C and 13 V the balance has a stable root near 75 °C and an unstable one near
    # 101.6 °C (brentq); the diode conducting 3 A at 70 °C sits at about 110.7 °C (brentq on the
    # self-heated forward state). Blocking from switch-on it settles; handed over hot, it runs away.
    Ta = 70.0 + ZERO_C
    roots = reverse_roots(Ta, 40.0, 13.0, **LEAK)
    start = steady_junction(3.0, Ta, 40.0, **SCHOTTKY_MODEL)
    assert len(roots) == 2 and roots[0] < start and roots[1] < start  # the case the rule exists for
    assert settles_by_reference(Ta, 40.0, 13.0, 150.0 + ZERO_C, Ta, **LEAK)
    assert not settles_by_reference(Ta, 40.0, 13.0, 150.0 + ZERO_C, start, **LEAK)

    cold = _checks(run_check(_oring(handover=False), [_schottky()])["candidates"][0])["reverse_runaway"]
    hot_cand = run_check(_oring(), [_schottky()])["candidates"][0]
    hot = _checks(hot_cand)["reverse_runaway"]
    assert cold["passed"] and cold["margin"] > 0
    assert not hot["passed"] and hot["margin"] < 0 and hot["margin_pct"] < 0
    assert "after the hand-over" in hot["note"] and f"{start - ZERO_C:.1f} °C" in hot["note"]
    assert f"{roots[1] - ZERO_C:.1f} °C" in hot["note"]  # the unstable point named
    assert "reverse_runaway" in hot_cand["failed_checks"]


def test_runaway_ambient_matches_a_brute_force_scan_of_the_hand_over():
    # The highest ambient at which the hottest start (the forward Tj at 3 A, recomputed at each
    # ambient) still settles, scanned in 0.05 K steps with the reference solutions.
    cand = run_check(_oring(), [_schottky()])["candidates"][0]
    found = cand["metrics"]["runaway_ambient_C"]
    scan = None
    for amb in np.arange(0.0, 80.0, 0.05):
        Ta = amb + ZERO_C
        start = steady_junction(3.0, Ta, 40.0, **SCHOTTKY_MODEL)
        if settles_by_reference(Ta, 40.0, 13.0, 150.0 + ZERO_C, start, **LEAK):
            scan = amb
        else:
            break
    assert scan is not None and found == pytest.approx(scan, abs=0.06)
    assert _checks(cand)["reverse_runaway"]["margin"] == pytest.approx(found - 70.0, abs=1e-9)


def test_runaway_rth_matches_a_brute_force_scan():
    # The largest RthJA that still settles at 70 °C from the hottest start (forward Tj recomputed at each
    # trial RthJA), scanned in 0.05 K/W steps; the margin_pct is the share of RthJA still unused.
    cand = run_check(_oring(load_max_A=1.0), [_schottky()])["candidates"][0]
    found = cand["metrics"]["runaway_rth_K_per_W"]
    Ta = 70.0 + ZERO_C
    scan = None
    for rth in np.arange(1.0, 120.0, 0.05):
        start = steady_junction(1.0, Ta, rth, **SCHOTTKY_MODEL)
        if settles_by_reference(Ta, rth, 13.0, 150.0 + ZERO_C, start, **LEAK):
            scan = rth
        else:
            break
    assert scan is not None and found == pytest.approx(scan, abs=0.06)
    runaway = _checks(cand)["reverse_runaway"]
    assert runaway["margin_pct"] == pytest.approx(100.0 * (found - 40.0) / found, rel=1e-9)
    assert runaway["passed"] == (found > 40.0)


def test_two_point_hot_leakage_sets_the_doubling_interval():
    # IR 0.3 mA at 25 °C and 30 mA at 125 °C (same 20 V): by hand, d = (125 − 25)·ln2/ln(100) = 15.05 K;
    # above 125 °C the law steepens to min(15.05 K, the 10 K default) from the hot point.
    part = _schottky(ir_hot_A=30e-3, ir_hot_t_C=125.0)
    d_two = 100.0 * math.log(2.0) / math.log(100.0)
    assert d_two == pytest.approx(15.051, abs=1e-3)
    cand = run_check(_oring(handover=False, max_leakage_A=1.0, ambient_max_C=60.0, reverse_V=13.0),
                     [part])["candidates"][0]
    leak = _checks(cand)["leakage"]
    Ta = 60.0 + ZERO_C
    # the stable reverse Tj with the two-point law, by brentq (below the hot point, one segment applies)
    law = lambda T: 3e-4 * 2.0 ** ((T - 25.0 - ZERO_C) / d_two)  # noqa: E731
    tj = brentq(lambda T: Ta + 40.0 * 13.0 * law(T) - T, Ta, Ta + 30.0, xtol=1e-12)
    assert leak["value"] == pytest.approx(law(tj), rel=1e-6)
    assert "15.1 K from the two datasheet points" in leak["note"] and "every 10 K above the hot point" in leak["note"]
    # above the hot point: the hot figure doubled every 10 K (a junction at 135 °C would leak 60 mA)
    from partpick.physics.leakage import leakage_law

    at = leakage_law(3e-4, 20.0, 25.0 + ZERO_C, 10.0, 30e-3, 125.0 + ZERO_C)
    assert float(at.current(13.0, 135.0 + ZERO_C)) == pytest.approx(60e-3, rel=1e-12)
    assert float(at.current(13.0, 125.0 + ZERO_C)) == pytest.approx(30e-3, rel=1e-12)
    assert float(at.current(13.0, 25.0 + ZERO_C)) == pytest.approx(3e-4, rel=1e-12)  # held below ir_vr_V


def test_a_reverse_transient_is_checked_against_vrsm_and_never_heats_the_junction():
    req = _oring(handover=False, reverse_transient_V=44.0, max_leakage_A=1.0)
    plain = run_check(_oring(handover=False, max_leakage_A=1.0), [_schottky()])["candidates"][0]
    with_vrsm = run_check(req, [_schottky(vrsm_V=48.0)])["candidates"][0]
    without = run_check(req, [_schottky()])["candidates"][0]
    pulse = _checks(with_vrsm)["reverse_transient"]
    assert pulse["value"] == 44.0 and pulse["limit"] == pytest.approx(48.0) and pulse["passed"]
    assert "VRSM" in pulse["limit_source"]
    fallback = _checks(without)["reverse_transient"]
    assert fallback["limit"] == pytest.approx(40.0) and not fallback["passed"]  # VRRM, the part gives no VRSM
    assert "no VRSM" in fallback["limit_source"]
    # the continuous 13 V alone sets leakage, reverse power and runaway
    for key in ("leakage_A", "reverse_power_W", "runaway_ambient_C", "runaway_rth_K_per_W"):
        assert with_vrsm["metrics"][key] == pytest.approx(plain["metrics"][key], rel=1e-12)
    assert _checks(with_vrsm)["reverse_voltage"]["value"] == 13.0


def test_surge_peak_is_the_inrush_peak_against_ifsm():
    # 13 V into an empty 2 mF capacitor through 0.1 Ω: peak 13/0.1 = 130 A (by hand) against IFSM 80 A.
    cand = run_check(_oring(inrush_capacitance_F=2e-3, inrush_source_ohm=0.1), [_schottky()])["candidates"][0]
    peak = _checks(cand)["surge_peak"]
    assert cand["metrics"]["inrush_peak_A"] == pytest.approx(130.0)
    assert peak["value"] == pytest.approx(130.0) and peak["limit"] == pytest.approx(80.0)
    assert not peak["passed"] and peak["margin"] == pytest.approx(-50.0)
    assert peak["margin_pct"] == pytest.approx(-62.5) and "held to IFSM" in peak["note"]


def test_rs_temperature_exponent_defaults_to_1_5_and_the_sheet_says_so():
    # The same rectifier with and without rs_temp_exponent: without it Rs(T) = Rs·(T/T0)^1.5 (SPEC §3),
    # so the dissipation at 50 °C and 1 A matches the reference with p = 1.5, found by brentq.
    part = make_part(part_number="RS-D", kind="rectifier", vrrm_V=100.0, if_avg_A=2.0, tj_max_C=150.0,
                     rth_ja_K_per_W=50.0, is_A=1e-12, n=1.0, rs_ohm=0.2, ir_A=1e-6, ir_vr_V=100.0)
    cand = run_check(make_requirement(), [part])["candidates"][0]
    model = dict(is0=1e-12, n=1.0, rs=0.2, p=1.5)
    powers = []
    for amb in (25.0, 50.0):
        T = brentq(lambda t: t - amb - ZERO_C - 50.0 * forward_voltage(1.0, t, **model), amb + ZERO_C,
                   amb + ZERO_C + 500.0, xtol=1e-12)
        powers.append(forward_voltage(1.0, T, **model))
    assert cand["metrics"]["dissipation_W"] == pytest.approx(max(powers), rel=1e-6)
    assert "default 1.5" in _checks(cand)["junction_temp"]["note"]
    given = run_check(make_requirement(), [dict(part, rs_temp_exponent=1.5)])["candidates"][0]
    assert given["metrics"]["dissipation_W"] == pytest.approx(cand["metrics"]["dissipation_W"], rel=1e-12)
    assert "default 1.5" not in (_checks(given)["junction_temp"].get("note") or "")


def test_an_overloaded_diode_with_constant_rs_is_not_said_to_run_away_because_rs_rises():
    # A small signal diode at 3 A in a 500 K/W package: far past any steady state, Rs held constant.
    part = make_part(part_number="SIG-1", kind="signal", vrrm_V=100.0, if_avg_A=0.2, tj_max_C=150.0,
                     rth_ja_K_per_W=500.0, is_A=2e-9, n=1.9, rs_ohm=0.6, rs_temp_exponent=0.0, ir_A=1e-7,
                     ir_vr_V=75.0)
    tj = _checks(run_check(_oring(), [part])["candidates"][0])["junction_temp"]
    assert tj["value"] is None and "grossly overloaded" in tj["reason"] and "Rs rises" not in tj["reason"]


def test_high_reliability_surge_limit_is_on_the_peak_so_i2t_takes_its_square():
    # SPEC §4 policies: high_reliability surge ≤ 50 % on the peak current, so I²t ≤ 0.5² × IFSM²·t/2.
    # By hand: IFSM 80 A, 8.3 ms: rating 80²·0.0083/2 = 26.56 A²s → I²t limit 6.64 A²s, peak limit 40 A.
    req = _oring(policy="high_reliability", inrush_capacitance_F=2e-3, inrush_source_ohm=1.0)
    checks = _checks(run_check(req, [_schottky()])["candidates"][0])
    assert checks["surge"]["limit"] == pytest.approx(0.25 * 80.0**2 * 0.0083 / 2.0, rel=1e-9)
    assert checks["surge_peak"]["limit"] == pytest.approx(40.0) and checks["surge_peak"]["value"] == 13.0
