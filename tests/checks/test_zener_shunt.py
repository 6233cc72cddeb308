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
from reference_models import shunt_point, zener_voltage_self_heated

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


def test_yield_is_seeded_and_matches_a_closed_form():
    # With Z = rz down to Izk and αVz = 0 the regulator is linear: Vo = Vz0 + rz·(Vs − Vz0 − IL·R)/(R + rz),
    # Vz0 = Vz − rz·Izt (Sedra & Smith's model). Every build here stays above Izk, so the closed form holds.
    part = _sedra_part(vz_tol_pct=5.0)
    req = _sedra_requirement((10.0, 11.0), load_max=1e-3, resistor_tolerance_pct=5.0, max_regulation_error_pct=4.0)
    runs = 2000
    first = run_check(req, [part], yield_runs=runs, seed=7)["candidates"][0]["metrics"]["yield_pct"]
    again = run_check(req, [part], yield_runs=runs, seed=7)["candidates"][0]["metrics"]["yield_pct"]
    other = run_check(req, [part], yield_runs=runs, seed=8)["candidates"][0]["metrics"]["yield_pct"]
    assert first == again and other != first
    d = draws(runs, 7)
    vz = 6.8 * (1 + 0.05 / 3 * d["vz"])
    R = 500.0 * (1 + 0.05 / 3 * d["resistor"])
    vs = 10.0 + d["supply"] * 1.0
    ok = np.ones(runs, dtype=bool)
    for il in (0.0, 1e-3):
        vz0 = vz - 20.0 * 5e-3
        vo = vz0 + 20.0 * (vs - vz0 - il * R) / (R + 20.0)
        iz = (vs - vo) / R - il
        assert iz.min() > 0.2e-3
        ok &= np.abs(vo - 6.83) / 6.83 * 100 <= 4.0
    assert first == pytest.approx(100.0 * ok.mean(), abs=1e-9)
    assert 0 < first < 100


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
