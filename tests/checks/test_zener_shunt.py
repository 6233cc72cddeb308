"""The zener_shunt role: a textbook worked example, an independent brentq design check, E-series edges, yield."""

from __future__ import annotations

import itertools
import json
from decimal import Decimal

import eseries
import numpy as np
import pytest

from checks_builders import make_part, make_requirement
from partpick.checks.montecarlo import draws
from partpick.checks.service import candidate_details, run_check
from reference_models import shunt_point, zener_impedance, zener_voltage_self_heated

ZERO_C = 273.15


def _by_name(candidate):
    return {c["name"]: c for c in candidate["checks"]}


def _sedra_part(**changes):
    # Sedra & Smith, *Microelectronic Circuits*, Zener shunt regulator example (numbered 3.8 in one edition;
    # from memory): Vz = 6.8 V at Izt = 5 mA, rz = 20 Ω, Izk = 0.2 mA. Tolerance 0 and αVz = 0: the book's ideal
    # part (Zzk unknown, so Z = Zzt down to Izk, SPEC §3). Pd and Tj max are invented; they do not move Vo here.
    part = make_part(part_number="SS-6V8", kind="zener", vz_V=6.8, vz_tol_pct=0.0, izt_A=5e-3, zzt_ohm=20.0,
                     izk_A=0.2e-3, vz_tc_pct_per_K=0.0, pd_W=1.0, tj_max_C=150.0)
    part.update(changes)
    return part


def _sedra_requirement(supply, load_max=0.0, **zener):
    z = dict(target_V=6.83, max_regulation_error_pct=5.0, resistor_ohm=500.0, resistor_tolerance_pct=0.0)
    z.update(zener)
    return make_requirement(role="zener_shunt", supply_min_V=supply[0], supply_max_V=supply[1], load_min_A=0.0,
                            load_max_A=load_max, ambient_min_C=25.0, ambient_max_C=25.0, zener=z)


def test_sedra_smith_worked_example():
    # Book (from memory): no load, Vs = 10 V, R = 0.5 kΩ → Iz = 6.35 mA, Vo = 6.83 V.
    m = run_check(_sedra_requirement((10.0, 10.0)), [_sedra_part()])["candidates"][0]["metrics"]
    assert m["output_min_V"] == pytest.approx(6.83, abs=0.005)
    assert m["output_max_V"] == pytest.approx(6.83, abs=0.005)
    assert m["zener_current_min_A"] == pytest.approx(6.35e-3, abs=0.01e-3)
    # Line regulation rz/(R + rz) = 38.5 mV/V; load regulation −(rz ∥ R) = −19.2 mV/mA (book rounds to −20).
    assert m["line_regulation_mV_per_V"] == pytest.approx(38.5, abs=0.05)
    assert m["load_regulation_mV_per_mA"] == pytest.approx(-19.2, abs=0.05)
    assert m["series_resistor_ohm"] == 500.0

    # The same figures from the corners: ±1 V of supply moves Vo by ±38.5 mV.
    line = run_check(_sedra_requirement((9.0, 11.0)), [_sedra_part()])["candidates"][0]["metrics"]
    assert (line["output_max_V"] - line["output_min_V"]) / 2.0 * 1000 == pytest.approx(38.5, abs=0.05)
    # A 2 kΩ load at about 6.8 V draws 3.4 mA: ΔVo ≈ −65 mV (book: −68 mV using −rz).
    loaded = run_check(_sedra_requirement((10.0, 10.0), load_max=6.8 / 2000.0), [_sedra_part()])
    lm = loaded["candidates"][0]["metrics"]
    assert (lm["output_min_V"] - lm["output_max_V"]) * 1000 == pytest.approx(-65.0, abs=1.0)


def test_sedra_smith_half_kilohm_load_leaves_breakdown():
    # Book (from memory): with a 0.5 kΩ load the Zener leaves breakdown and Vo = 5.0 V. As a current load that
    # is 10 mA at 5 V: the resistor alone then gives 10 V − 0.5 kΩ·10 mA = 5 V with no Zener current left.
    result = run_check(_sedra_requirement((10.0, 10.0), load_max=5.0 / 500.0), [_sedra_part()])
    json.dumps(result, allow_nan=False)
    cand = result["candidates"][0]
    checks = _by_name(cand)
    assert cand["metrics"]["zener_current_min_A"] < 0.2e-3  # below Izk: not regulating
    assert not checks["zener_current_min"]["passed"]
    assert checks["zener_current_min"]["corner"]["load_A"] == pytest.approx(0.01)
    assert cand["metrics"]["output_min_V"] == pytest.approx(5.0, abs=0.1)


DESIGN = dict(part_number="ZD-5V6", kind="zener", package="SOD-123", vz_V=5.6, vz_tol_pct=5.0, izt_A=20e-3,
              zzt_ohm=5.0, izk_A=1e-3, zzk_ohm=400.0, vz_tc_pct_per_K=0.03, pd_W=0.5, tj_max_C=150.0)


def _design_requirement(**zener):
    """The design's circuit: 9–14 V supply, 0–10 mA load, −20…70 °C ambient, with the given [zener] table."""
    return make_requirement(role="zener_shunt", supply_min_V=9.0, supply_max_V=14.0, load_min_A=0.0,
                            load_max_A=0.010, ambient_min_C=-20.0, ambient_max_C=70.0, zener=zener)


def test_zener_design_against_brentq_corner_by_corner():
    part = make_part(**DESIGN)
    req = _design_requirement(target_V=5.6, max_regulation_error_pct=10.0)
    result = run_check(req, [part])
    json.dumps(result, allow_nan=False)
    cand = result["candidates"][0]
    m = cand["metrics"]

    # Independent resistor choice: Vz at Iz min = Izk, + tolerance end, hot ambient (αVz > 0), self-heated
    # (brentq), then R ≤ (Vs,min − Vz,high)/((IL,max + Iz,min)·(1 + 5 %)), the largest E24 value below
    # (the `eseries` package).
    shape = dict(izt=20e-3, zzt=5.0, izk=1e-3, zzk=400.0)
    rth = (150.0 - 25.0) / 0.5  # RthJA from Pd (SPEC §3)
    alpha = 0.03 / 100
    vz_high = zener_voltage_self_heated(1e-3, 70.0 + ZERO_C, rth, 5.6 * 1.05, alpha, **shape)
    bound = (9.0 - vz_high) / ((0.010 + 1e-3) * 1.05)
    expected_r = float(eseries.find_less_than_or_equal(eseries.E24, bound))
    assert m["series_resistor_ohm"] == pytest.approx(expected_r, rel=1e-12)
    assert _by_name(cand)["feasible"]["limit"] == pytest.approx(vz_high, abs=1e-9)

    points = []
    for vs, il, amb, vz_end, r_end in itertools.product((9.0, 14.0), (0.0, 0.010), (-20.0, 70.0), (-1, 1), (-1, 1)):
        vz0 = 5.6 * (1 + vz_end * 0.05)
        R = expected_r * (1 + r_end * 0.05)
        V, Iz, Tj = shunt_point(vs, R, il, amb + ZERO_C, rth, vz0, alpha, **shape)
        points.append(dict(V=V, Iz=Iz, Tj=Tj - ZERO_C, P=V * Iz, PR=(vs - V) ** 2 / R, vz_end=vz_end))
    assert m["zener_current_min_A"] == pytest.approx(min(p["Iz"] for p in points), rel=1e-7)
    assert m["zener_current_max_A"] == pytest.approx(max(p["Iz"] for p in points), rel=1e-7)
    assert m["output_min_V"] == pytest.approx(min(p["V"] for p in points), abs=1e-8)
    assert m["output_max_V"] == pytest.approx(max(p["V"] for p in points), abs=1e-8)
    assert m["zener_power_W"] == pytest.approx(max(p["P"] for p in points), rel=1e-7)
    assert m["junction_temp_C"] == pytest.approx(max(p["Tj"] for p in points), abs=1e-6)
    assert m["resistor_power_W"] == pytest.approx(max(p["PR"] for p in points), rel=1e-7)
    worst_error = max(abs(p["V"] - 5.6) for p in points) / 5.6 * 100
    assert m["regulation_error_pct"] == pytest.approx(worst_error, abs=1e-6)
    # With Vs,max = 14 V above 2·Vz, Vz·Iz grows with Vz: the largest Zener power is at the HIGH Vz end.
    assert max(points, key=lambda p: p["P"])["vz_end"] == 1
    assert _by_name(cand)["zener_power"]["corner"]["vz_end"] == "high"
    # The smallest power class whose 100 % rating (no policy) covers the resistor's worst power.
    assert m["resistor_power_class_W"] == min(c for c in (0.125, 0.25, 0.5, 1, 2, 3, 5) if c >= m["resistor_power_W"])

    details = candidate_details(req, part)
    json.dumps(details, allow_nan=False)
    assert details["parameters"]["resistor_ohm"] == expected_r
    assert len(details["points"]) == 32 and len(details["per_point"]["output_voltage_V"]) == 32


@pytest.mark.parametrize(("supply", "series", "bound"), [
    ("15", "E24", "1000"), ("14.999", "E24", "999.9"), ("15.001", "E24", "1000.1"),
    ("5.1", "E24", "10"), ("5.0999", "E24", "9.99"), ("14.999", "E96", "999.9"), ("14.999", "E12", "999.9"),
    ("1005", "E24", "100000"), ("1004.99", "E48", "99999"),
])
def test_eseries_choice_at_decade_edges(supply, series, bound):
    # αVz = 0, tolerances 0 and Iz min = Izt make the bound exact: R ≤ (Vs,min − Vz)/(IL,max + Iz,min)
    # = (Vs − 5 V)/(5 mA + 5 mA). The expected value comes from the `eseries` package.
    part = make_part(part_number="ZE", kind="zener", vz_V=5.0, vz_tol_pct=0.0, izt_A=5e-3, zzt_ohm=10.0,
                     izk_A=1e-3, vz_tc_pct_per_K=0.0, pd_W=100.0, tj_max_C=150.0)
    req = make_requirement(role="zener_shunt", supply_min_V=float(supply), supply_max_V=float(supply) + 1,
                           load_min_A=0.0, load_max_A=5e-3, ambient_min_C=25.0, ambient_max_C=25.0,
                           zener=dict(target_V=5.0, max_regulation_error_pct=50.0, min_zener_current_A=5e-3,
                                      resistor_series=series, resistor_tolerance_pct=0.0))
    assert Decimal(bound) == (Decimal(supply) - 5) / Decimal("0.01")
    m = run_check(req, [part])["candidates"][0]["metrics"]
    assert m["series_resistor_ohm"] == pytest.approx(float(eseries.find_less_than_or_equal(getattr(eseries, series), float(bound))),
                                                     rel=1e-12)


def test_supply_too_low_is_a_failed_feasibility_check():
    part = make_part(**dict(DESIGN, vz_V=12.0))
    req = _design_requirement(target_V=5.6, max_regulation_error_pct=10.0)
    result = run_check(req, [part])
    json.dumps(result, allow_nan=False)
    cand = result["candidates"][0]
    feasible = _by_name(cand)["feasible"]
    assert not feasible["passed"] and "supply too low for this Vz at max load" in feasible["note"]
    assert "reason" not in feasible  # the value is known: a reason is only for a null value
    assert feasible["value"] == 9.0 and feasible["limit"] > 12.0
    assert cand["metrics"]["series_resistor_ohm"] is None
    assert _by_name(cand)["zener_power"]["value"] is None and not result["subject_passed"]


def test_zener_missing_data_and_policy_limits():
    part = make_part(**dict(DESIGN, izk_A=None, zzk_ohm=None))
    req = make_requirement(role="zener_shunt", policy="high_reliability", supply_min_V=9.0, supply_max_V=14.0,
                           load_min_A=0.0, load_max_A=0.010, ambient_min_C=-20.0, ambient_max_C=70.0,
                           zener=dict(target_V=5.6, max_regulation_error_pct=10.0))
    cand = run_check(req, [part])["candidates"][0]
    assert "izk_A" in _by_name(cand)["data_missing"]["reason"]
    # With Iz min given, Izk is not needed; high_reliability: Zener power ≤ 50 % of Pallow,
    # Tj ≤ min(125 °C, Tj max − 40 K) = min(125, 150 − 40) = 110 °C (SPEC §4), the stricter named.
    req2 = req.with_changes(zener=dict(target_V=5.6, max_regulation_error_pct=10.0, min_zener_current_A=2e-3))
    checks = _by_name(run_check(req2, [part])["candidates"][0])
    assert "data_missing" not in checks
    power = checks["zener_power"]
    pallow = 0.5 * (150 - power["corner"]["ambient_C"]) / 125 if power["corner"]["ambient_C"] > 25 else 0.5
    assert power["limit"] == pytest.approx(0.5 * pallow)
    assert checks["junction_temp"]["limit"] == 110.0
    assert checks["junction_temp"]["limit_source"] == "policy high_reliability: Tj max − 40 K"


def _wilson_by_hand(k, n):
    # Wilson (1927) score interval, 95 % (z = 1.96), written as the roots of the quadratic
    # (p − k/n)² = z²·p(1 − p)/n in p — a different form from the code's centre ± half-width.
    z = 1.959963984540054
    a = 1 + z * z / n
    b = -(2 * k / n + z * z / n)
    c = (k / n) ** 2
    disc = max(b * b - 4 * a * c, 0.0)
    return (-b - disc ** 0.5) / (2 * a), (-b + disc ** 0.5) / (2 * a)


def test_wilson_interval_against_the_formula_by_hand():
    from partpick.checks.montecarlo import wilson_interval

    # Wilson 1927: the interval's ends are the roots of the quadratic in p (see _wilson_by_hand).
    for k, n in ((81, 263), (0, 50), (50, 50), (1999, 2000), (1, 10)):
        low, high = wilson_interval(k, n)
        exp_low, exp_high = _wilson_by_hand(k, n)
        assert float(low) == pytest.approx(exp_low, abs=1e-12)
        assert float(high) == pytest.approx(exp_high, abs=1e-12)
    assert float(wilson_interval(0, 50)[0]) == 0.0 and float(wilson_interval(50, 50)[1]) == 1.0
    # Rule of three (common practice): with no failure in n builds the 95 % lower bound on yield is near
    # 1 − 3/n; Wilson's is a little tighter, 1 − z²/(n + z²).
    assert float(wilson_interval(2000, 2000)[0]) == pytest.approx(1 - 1.959963984540054 ** 2 / (2000 + 1.959963984540054 ** 2))


def test_yield_is_seeded_and_matches_a_closed_form_at_every_corner():
    # With Z = rz down to Izk and αVz = 0 the regulator is linear: Vo = Vz0 + rz·(Vs − Vz0 − IL·R)/(R + rz),
    # Vz0 = Vz − rz·Izt (Sedra & Smith's model). Every build here stays above Izk, so the closed form holds.
    # A build passes only if it holds at EVERY corner: both supplies × both loads.
    part = _sedra_part(vz_tol_pct=5.0)
    req = _sedra_requirement((10.0, 11.0), load_max=1e-3, resistor_tolerance_pct=5.0, max_regulation_error_pct=2.2)
    runs = 2000
    first = run_check(req, [part], yield_runs=runs, seed=7)["candidates"][0]["metrics"]
    again = run_check(req, [part], yield_runs=runs, seed=7)["candidates"][0]["metrics"]
    other = run_check(req, [part], yield_runs=runs, seed=8)["candidates"][0]["metrics"]
    assert first == again and other["yield_pct"] != first["yield_pct"]
    d = draws(runs, 7)
    vz = 6.8 * (1 + 0.05 / 3 * d["vz"])
    R = 500.0 * (1 + 0.05 / 3 * d["resistor"])
    ok = np.ones(runs, dtype=bool)
    any_corner = np.zeros(runs, dtype=bool)
    for vs in (10.0, 11.0):
        for il in (0.0, 1e-3):
            vz0 = vz - 20.0 * 5e-3
            vo = vz0 + 20.0 * (vs - vz0 - il * R) / (R + 20.0)
            iz = (vs - vo) / R - il
            assert iz.min() > 0.2e-3
            holds = np.abs(vo - 6.83) / 6.83 * 100 <= 2.2
            ok &= holds
            any_corner |= holds
    k = int(ok.sum())
    assert first["yield_pct"] == pytest.approx(100.0 * k / runs, abs=1e-9)
    assert 0 < first["yield_pct"] < 100
    # Judging each build at one corner only would read higher: the rule must be "every corner".
    assert 100.0 * any_corner.mean() > first["yield_pct"] + 1.0
    low, high = _wilson_by_hand(k, runs)
    assert first["yield_low_pct"] == pytest.approx(100 * low, abs=1e-9)
    assert first["yield_high_pct"] == pytest.approx(100 * high, abs=1e-9)


@pytest.mark.parametrize("distribution", ["normal", "uniform"])
def test_yield_against_a_brute_force_loop_with_brentq(distribution):
    # A part with a knee (Zzk) and αVz ≠ 0, self-heated: each build is solved corner by corner with brentq
    # (tests/checks/reference_models.py), a plain Python loop; it passes if Vout is within the limit and
    # Iz ≥ Iz min at all 8 corners of supply × load × ambient.
    part = make_part(**DESIGN)
    req = _design_requirement(target_V=5.6, max_regulation_error_pct=7.0, min_zener_current_A=2e-3,
                              vz_distribution=distribution)
    runs = 150
    result = run_check(req, [part], yield_runs=runs, seed=3)
    json.dumps(result, allow_nan=False)
    m = result["candidates"][0]["metrics"]
    R0 = m["series_resistor_ohm"]
    d = draws(runs, 3)
    unit = d["vz_uniform"] if distribution == "uniform" else d["vz"] / 3.0
    shape = dict(izt=20e-3, zzt=5.0, izk=1e-3, zzk=400.0)
    rth = (150.0 - 25.0) / 0.5
    passed = 0
    for b in range(runs):
        vz0 = 5.6 * (1 + 0.05 * unit[b])
        R = R0 * (1 + 0.05 / 3 * d["resistor"][b])
        good = True
        for vs, il, amb in itertools.product((9.0, 14.0), (0.0, 0.010), (-20.0, 70.0)):
            V, Iz, _ = shunt_point(vs, R, il, amb + ZERO_C, rth, vz0, 0.03 / 100, **shape)
            good &= abs(V - 5.6) / 5.6 * 100 <= 7.0 and Iz >= 2e-3
        passed += good
    assert m["yield_pct"] == pytest.approx(100.0 * passed / runs, abs=1e-9)
    assert 0 < m["yield_pct"] < 100  # the case separates passing from failing builds


def test_vz_distribution_is_validated():
    from partpick.errors import InputError

    with pytest.raises(InputError, match=r"vz_distribution.*'gauss' is not one of normal, uniform"):
        _design_requirement(target_V=5.6, max_regulation_error_pct=7.0, vz_distribution="gauss")


def test_yield_refused_for_the_series_role(silicon_part):
    from partpick.errors import InputError

    with pytest.raises(InputError, match=r"--yield: role 'series' has no regulation limit"):
        run_check(make_requirement(), [silicon_part], yield_runs=100)
    with pytest.raises(InputError, match=r"--yield: 0 must be a whole number from 1"):
        run_check(_sedra_requirement((10.0, 10.0)), [_sedra_part()], yield_runs=0)


def test_review_mode_solves_a_given_resistor_even_when_infeasible():
    # A 12 V Zener from 9–14 V with a given 100 Ω: the supply can never reach Vz at its minimum, so
    # `feasible` fails, but the given design is still solved and its checks carry values.
    part = make_part(**dict(DESIGN, vz_V=12.0))
    req = _design_requirement(target_V=12.0, max_regulation_error_pct=10.0, resistor_ohm=100.0)
    cand = run_check(req, [part])["candidates"][0]
    checks = _by_name(cand)
    assert not checks["feasible"]["passed"]
    assert checks["zener_current_min"]["value"] is not None and not checks["zener_current_min"]["passed"]
    assert cand["metrics"]["series_resistor_ohm"] == 100.0
    assert cand["metrics"]["output_min_V"] < 9.0


def test_regulation_at_the_lowest_iz_against_brentq_and_the_knee_curve():
    # The point of lowest Iz found by brute force (brentq per point), Z there from the knee curve written
    # separately (reference_models.zener_impedance), then line = 1000·Z/(R + Z) [mV/V] and load = −(R ∥ Z)
    # [mV/mA] with that point's R (common practice, Sedra & Smith's small-signal shunt analysis).
    part = make_part(**DESIGN)
    req = _design_requirement(target_V=5.6, max_regulation_error_pct=10.0)
    cand = run_check(req, [part])["candidates"][0]
    m = cand["metrics"]
    R0 = m["series_resistor_ohm"]
    shape = dict(izt=20e-3, zzt=5.0, izk=1e-3, zzk=400.0)
    rth = (150.0 - 25.0) / 0.5
    lowest = None
    for vs, il, amb, vz_end, r_end in itertools.product((9.0, 14.0), (0.0, 0.010), (-20.0, 70.0), (-1, 1), (-1, 1)):
        R = R0 * (1 + r_end * 0.05)
        _, Iz, _ = shunt_point(vs, R, il, amb + ZERO_C, rth, 5.6 * (1 + vz_end * 0.05), 0.03 / 100, **shape)
        if lowest is None or Iz < lowest[0]:
            lowest = (Iz, R)
    Iz, R = lowest
    assert Iz < 20e-3  # in the knee region, so Z there differs from Zzt
    Z = zener_impedance(Iz, **shape)
    assert Z > 2 * 5.0
    assert m["line_regulation_worst_mV_per_V"] == pytest.approx(1000.0 * Z / (R + Z), rel=1e-6)
    assert m["load_regulation_worst_mV_per_mA"] == pytest.approx(-(R * Z) / (R + Z), rel=1e-6)
    # At Izt (Zzt = 5 Ω, nominal R) the figures are smaller: the worst corner is the one to sign.
    assert m["line_regulation_mV_per_V"] == pytest.approx(1000.0 * 5.0 / (R0 + 5.0), rel=1e-12)
    assert m["line_regulation_worst_mV_per_V"] > 2 * m["line_regulation_mV_per_V"]


def test_sedra_smith_regulation_at_the_lowest_iz():
    # Book example (from memory): no load, 10 V ± 1 V, R = 0.5 kΩ: the lowest Iz (9 V) is still above Izt's
    # 5 mA? No: (9 − 6.7)/(520) ≈ 4.4 mA < Izt, but with Zzk unknown Z = rz = 20 Ω down to Izk (SPEC §3), so
    # the worst-corner figures equal the book's 38.5 mV/V and −19.2 mV/mA.
    m = run_check(_sedra_requirement((9.0, 11.0)), [_sedra_part()])["candidates"][0]["metrics"]
    assert m["zener_current_min_A"] < 5e-3
    assert m["line_regulation_worst_mV_per_V"] == pytest.approx(38.5, abs=0.05)
    assert m["load_regulation_worst_mV_per_mA"] == pytest.approx(-19.2, abs=0.05)
    # With a load that takes the Zener out of breakdown (Iz = 0 at 10 mA) the output follows the supply:
    # line 1000 mV/V and load −R, the limits of the formulas as Z → ∞.
    off = run_check(_sedra_requirement((10.0, 10.0), load_max=0.011), [_sedra_part()])["candidates"][0]["metrics"]
    assert off["zener_current_min_A"] == 0.0
    assert off["line_regulation_worst_mV_per_V"] == pytest.approx(1000.0)
    assert off["load_regulation_worst_mV_per_mA"] == pytest.approx(-500.0)


def _hot_requirement(**zener):
    """The design's part at a hot ambient (25…110 °C), 12–14 V, 0–10 mA: the resistor works near its class."""
    z = dict(target_V=5.6, max_regulation_error_pct=10.0)
    z.update(zener)
    return make_requirement(role="zener_shunt", supply_min_V=12.0, supply_max_V=14.0, load_min_A=0.0,
                            load_max_A=0.010, ambient_min_C=25.0, ambient_max_C=110.0, zener=z)


def test_resistor_class_uses_the_rating_derated_at_each_corners_ambient():
    # Hand calculation: film resistors keep their class rating to 70 °C and lose it linearly to 155 °C
    # (common practice): at 110 °C the rating is (155 − 110)/85 = 52.9 % of the class. No policy: 100 %.
    part = make_part(**dict(DESIGN, pd_W=2.0))
    cand = run_check(_hot_requirement(), [part])["candidates"][0]
    m = cand["metrics"]
    check = _by_name(cand)["resistor_power"]
    R0 = m["series_resistor_ohm"]
    derate_hot = (155.0 - 110.0) / 85.0
    classes = (0.125, 0.25, 0.5, 1, 2, 3, 5)
    # Without derating the worst power (about 0.146 W) fits the 0.25 W class; at 110 °C the power there
    # (the check's value) needs value/0.529 of class rating, which is above 0.25 W: the 0.5 W class.
    assert min(c for c in classes if c >= m["resistor_power_W"]) == 0.25
    expected_class = min(c for c in classes if c >= check["value"] / derate_hot)
    assert expected_class == 0.5
    assert m["resistor_power_class_W"] == expected_class
    assert check["passed"]
    assert check["corner"]["ambient_C"] == 110.0
    assert check["limit"] == pytest.approx(expected_class * derate_hot, rel=1e-12)
    assert "linear to zero at 155 °C" in check["limit_source"]
    # Overrides: full rating to 100 °C, zero at 130 °C → at 110 °C, (130 − 110)/30 = 2/3 of the class.
    cand2 = run_check(_hot_requirement(resistor_rated_ambient_C=100.0, resistor_zero_power_C=130.0),
                      [part])["candidates"][0]
    check2 = _by_name(cand2)["resistor_power"]
    k2 = cand2["metrics"]["resistor_power_class_W"]
    assert check2["limit"] == pytest.approx(k2 * 2.0 / 3.0, rel=1e-12)
    assert "resistor_rated_ambient_C" in check2["limit_source"]


def _given(zener):
    return {k: v for k, v in zener.to_dict().items() if v is not None}


def test_short_circuit_check_by_hand():
    # An output short puts supply max across the low end of R: P = Vs,max²/(R·(1 − tol)), against 100 % of the
    # class rating derated to the hottest ambient (a fault: the policy's percentage does not apply).
    part = make_part(**dict(DESIGN, pd_W=2.0))
    req = _hot_requirement()
    req = req.with_changes(policy="commercial")
    cand = run_check(req, [part])["candidates"][0]
    m = cand["metrics"]
    sc = _by_name(cand)["short_circuit"]
    R0 = m["series_resistor_ohm"]
    p_short = 14.0 ** 2 / (R0 * 0.95)
    assert sc["value"] == pytest.approx(p_short, rel=1e-12)
    assert m["short_circuit_power_W"] == pytest.approx(p_short, rel=1e-12)
    klass = m["resistor_power_class_W"]
    assert sc["limit"] == pytest.approx(klass * (155.0 - 110.0) / 85.0, rel=1e-12)  # not × 60 %
    assert sc["passed"] == (p_short <= sc["limit"])
    assert sc["corner"]["supply_V"] == 14.0 and sc["corner"]["ambient_C"] == 110.0
    assert sc["corner"]["resistor_end"] == "low" and "output shorted" in sc["note"]
    assert "a fault" in sc["limit_source"]
    # The policy's 60 % applies to resistor_power: its limit at 110 °C is 0.6 × class × 0.529.
    rp = _by_name(cand)["resistor_power"]
    assert rp["limit"] == pytest.approx(0.6 * klass * (155.0 - 110.0) / 85.0, rel=1e-12)

    # A finished design's resistor rating replaces the class in both checks; resistor_power fails only above it.
    small = run_check(req.with_changes(zener=dict(_given(req.zener), resistor_rating_W=0.125)),
                      [part])["candidates"][0]
    checks = _by_name(small)
    assert checks["short_circuit"]["limit"] == pytest.approx(0.125 * 45.0 / 85.0, rel=1e-12)
    assert not checks["short_circuit"]["passed"]
    assert not checks["resistor_power"]["passed"]
    assert "resistor_rating_W" in checks["resistor_power"]["limit_source"]
    big = run_check(req.with_changes(zener=dict(_given(req.zener), resistor_rating_W=3.0)), [part])
    checks = _by_name(big["candidates"][0])
    assert checks["resistor_power"]["passed"] and checks["short_circuit"]["passed"]
    assert checks["short_circuit"]["limit"] == pytest.approx(3.0 * 45.0 / 85.0, rel=1e-12)
    # short_circuit = false: no such check, no such metric.
    off = run_check(req.with_changes(zener=dict(_given(req.zener), short_circuit=False)), [part])
    c = off["candidates"][0]
    assert "short_circuit" not in _by_name(c) and "short_circuit_power_W" not in c["metrics"]
    assert off["requirement"]["zener"]["short_circuit"] is False


def test_new_zener_keys_are_validated_and_echoed():
    from partpick.errors import InputError

    req = _design_requirement(target_V=5.6, max_regulation_error_pct=7.0)
    echo = run_check(req, [make_part(**DESIGN)])["requirement"]["zener"]
    assert echo["short_circuit"] is True and echo["vz_distribution"] == "normal"
    assert echo["resistor_rated_ambient_C"] == 70.0 and echo["resistor_zero_power_C"] == 155.0
    assert echo["resistor_rating_W"] is None
    with pytest.raises(InputError, match=r"short_circuit.*'yes' is not true or false"):
        _design_requirement(target_V=5.6, max_regulation_error_pct=7.0, short_circuit="yes")
    with pytest.raises(InputError, match=r"resistor_zero_power_C.*must be above"):
        _design_requirement(target_V=5.6, max_regulation_error_pct=7.0, resistor_zero_power_C=60.0)
    with pytest.raises(InputError, match=r"resistor_rating_W"):
        _design_requirement(target_V=5.6, max_regulation_error_pct=7.0, resistor_rating_W=0.0)
    with pytest.raises(InputError, match=r"unknown key in \[zener\]"):
        _design_requirement(target_V=5.6, max_regulation_error_pct=7.0, resistor_rating=0.25)


def test_resistor_values_in_json_are_exact():
    # 820 Ω, never 819.9999999 (the E24 value 8.2 × 100, IEC 60063).
    part = make_part(**dict(DESIGN, vz_V=5.1, izk_A=0.25e-3, zzk_ohm=600.0, izt_A=5e-3, zzt_ohm=10.0))
    req = make_requirement(role="zener_shunt", supply_min_V=9.0, supply_max_V=13.0, load_min_A=0.0,
                           load_max_A=4e-3, ambient_min_C=-20.0, ambient_max_C=70.0,
                           zener=dict(target_V=5.1, max_regulation_error_pct=8.0))
    text = json.dumps(run_check(req, [part]))
    assert '"series_resistor_ohm": 820.0' in text
