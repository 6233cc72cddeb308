"""Curve data (partpick.checks.curves) against the physics, re-derived here by hand or by scipy's brentq.

Reference formulas: the Shockley equation with series resistance (W. Shockley, Bell System Technical
Journal 28(3), 1949), Is(T) scaling (Sze & Ng, Physics of Semiconductor Devices, 3rd ed., 2007),
Tj = Ta + P·RthJA (JEDEC JESD51), and Kirchhoff's current law for the shunt regulator.
"""

import math

import numpy as np
import pytest
from plot_data import SCHOTTKY, SERIES_REQ, ZENER, ZENER_CANDIDATE, ZENER_REQ
from scipy import constants
from scipy.optimize import brentq

from partpick.checks.curves import corner_label, curves_for, format_engineering
from partpick.checks.roles.zener_shunt_curves import SUPPLY_SPAN
from partpick.physics.zener import ZenerModel, solve_shunt

K0 = constants.zero_Celsius


def _vt(T):
    return constants.k * T / constants.e


def _is_at(is25, T, n, eg, m):
    # Sze & Ng: Is(T) = Is(T0)·(T/T0)^(m/n)·exp((Eg·q/(n·k))·(1/T0 − 1/T))
    T0 = K0 + 25.0
    return is25 * (T / T0) ** (m / n) * math.exp(eg * constants.e / (n * constants.k) * (1 / T0 - 1 / T))


def _shockley_v(I, T, is25=2e-6, n=1.3, rs=0.06, eg=0.69, m=2.0, p=1.5):
    # Schottky defaults Eg 0.69 eV and m = 2, and Rs(T) = Rs·(T/T0)^1.5 (SPEC §3 defaults).
    return n * _vt(T) * math.log1p(I / _is_at(is25, T, n, eg, m)) + I * rs * (T / (K0 + 25.0)) ** p


def _max_vf_is25(vf_max=0.55, at=1.0, n=1.3, rs=0.06):
    # Is that puts the 25 °C curve through the guaranteed maximum: I = Is·expm1((V − I·Rs)/(n·VT0)).
    return at / math.expm1((vf_max - at * rs) / (n * _vt(K0 + 25.0)))


def _curve(section, role):
    matches = [c for c in section["curves"] if c["role"] == role]
    assert len(matches) == 1, f"expected one {role} curve, got {[c['role'] for c in section['curves']]}"
    return matches[0]


def test_forward_cold_curves_follow_shockley(series_curves):
    fwd = series_curves["forward"]
    T = K0 - 20.0  # the coldest junction temperature is the coldest ambient (cold start)
    typical = _curve(fwd, "typical_cold")
    for i in (0, 80, 160, 240):
        I = typical["y"][i]
        assert typical["x"][i] == pytest.approx(_shockley_v(I, T), abs=1e-9)
    maximum = _curve(fwd, "maximum_cold")
    is_max = _max_vf_is25()
    for i in (0, 120, 240):
        I = maximum["y"][i]
        assert maximum["x"][i] == pytest.approx(_shockley_v(I, T, is25=is_max), abs=1e-9)


def test_forward_hot_curve_at_the_hottest_steady_tj(series_curves):
    fwd = series_curves["forward"]
    points = fwd["points"][0]
    steady = [c for c in points["corners"] if c["state"] == "steady"]
    hottest = max(c["junction_temp_C"] for c in steady)
    assert fwd["junction_temps_C"][1] == pytest.approx(hottest)
    hot = _curve(fwd, "maximum_hot")
    I = hot["y"][200]
    assert hot["x"][200] == pytest.approx(_shockley_v(I, K0 + hottest, is25=_max_vf_is25()), abs=1e-9)


def test_operating_points_lie_on_the_checked_curves(series_curves):
    fwd = series_curves["forward"]
    points = fwd["points"][0]
    is_max = _max_vf_is25()  # the part gives VF max, so the checks use the maximum-VF model
    for x, y, corner in zip(points["x"], points["y"], points["corners"]):
        T = K0 + corner["junction_temp_C"]
        assert x == pytest.approx(_shockley_v(y, T, is25=is_max), abs=1e-9)
        if corner["state"] == "cold_start":
            assert corner["junction_temp_C"] == pytest.approx(corner["ambient_C"])
        else:
            # Self-heated: Tj = Ta + I·V·RthJA (JEDEC JESD51), RthJA 80 K/W from the part.
            assert corner["junction_temp_C"] == pytest.approx(corner["ambient_C"] + y * x * 80.0, abs=1e-6)
    # The coldest corner sits on the drawn cold curve, the hottest on the drawn hot curve.
    cold = _curve(fwd, "maximum_cold")
    hot = _curve(fwd, "maximum_hot")
    cold_pt = [(x, y) for x, y, c in zip(points["x"], points["y"], points["corners"])
               if c["state"] == "cold_start" and c["ambient_C"] == -20.0 and c["load_A"] == 1.0][0]
    assert np.interp(cold_pt[1], cold["y"], cold["x"]) == pytest.approx(cold_pt[0], abs=2e-4)
    hot_pt = max(zip(points["x"], points["y"], points["corners"]), key=lambda p: p[2]["junction_temp_C"])
    assert np.interp(hot_pt[1], hot["y"], hot["x"]) == pytest.approx(hot_pt[0], abs=2e-4)


def test_tangent_is_the_derivative_at_load_max(series_curves):
    tangent = series_curves["forward"]["tangent"]
    I, T = 1.0, K0 + tangent["junction_temp_C"]
    is_max = _max_vf_is25()
    h = 1e-6
    ron_numeric = (_shockley_v(I + h, T, is25=is_max) - _shockley_v(I - h, T, is25=is_max)) / (2 * h)
    assert tangent["ron_ohm"] == pytest.approx(ron_numeric, rel=1e-6)
    assert tangent["vth0_V"] + tangent["ron_ohm"] * I == pytest.approx(_shockley_v(I, T, is25=is_max), abs=1e-12)
    # The worst-drop corner: the largest VF at IL max over both states (a Schottky's VF falls with
    # temperature, so it is the cold start at the coldest ambient).
    assert tangent["junction_temp_C"] == pytest.approx(-20.0)
    line = _curve(series_curves["forward"], "tangent")
    assert np.allclose(line["x"], tangent["vth0_V"] + tangent["ron_ohm"] * line["y"])


def test_load_line_meets_the_curve_at_the_operating_point(series_curves):
    load = series_curves["forward"]["load_line"]
    T = K0 + load["junction_temp_C"]
    is_max = _max_vf_is25()
    # Independent solution of Vs = I·R + V(I) with scipy's bracketing root finder.
    current = brentq(lambda i: load["supply_V"] - i * load["resistance_ohm"] - _shockley_v(i, T, is25=is_max),
                     1e-9, load["supply_V"] / load["resistance_ohm"], xtol=1e-14)
    assert current == pytest.approx(1.0, rel=1e-9)
    assert load["current_A"] == pytest.approx(current, rel=1e-9)


def test_tj_against_ambient_and_the_derating_line(series_curves):
    tj = series_curves["junction_temperature"]
    power = series_curves["power"]
    forward = _curve(tj, "tj_forward")
    dissipation = _curve(power, "power")
    assert forward["x"][0] == pytest.approx(-30.0) and forward["x"][-1] == pytest.approx(80.0)
    assert np.allclose(forward["y"], forward["x"] + dissipation["y"] * 80.0, atol=1e-6)
    # Linear derating from Pd = (150 − 25)/80 W at 25 °C to 0 at Tj max: Ta + Pallow·RthJA = Tj max
    # above 25 °C and Ta + 125 K below (JEDEC JESD51 derating curve, SPEC §3).
    derating = _curve(tj, "derating")
    above = derating["x"] >= 25.0
    assert np.allclose(derating["y"][above], 150.0)
    assert np.allclose(derating["y"][~above], derating["x"][~above] + 125.0)
    assert [h["value"] for h in tj["hlines"]] == [150.0]


def test_reverse_state_curve_has_a_gap_where_it_runs_away(series_curves):
    rev = _curve(series_curves["junction_temperature"], "tj_reverse")
    finite = np.isfinite(rev["y"])
    assert finite[0] and not finite[-1]  # leaky Schottky: stable when cold, runaway when hot
    # Where stable: Tj = Ta + 30 V·IR(Tj)·80 K/W with IR doubling every 9 K from 0.5 mA at 25 °C.
    x, y = rev["x"][finite], rev["y"][finite]
    for ta, t in zip(x[::40], y[::40]):
        ir = 5e-4 * 2 ** ((t - 25.0) / 9.0)
        assert t == pytest.approx(ta + 30.0 * ir * 80.0, abs=1e-6)


def test_zener_output_at_supply_max_equals_solve_shunt(zener_curves):
    out = zener_curves["zener_output"]
    supply = out["curves"][0]["x"]
    assert supply[0] == 0.0 and supply[-1] == pytest.approx(SUPPLY_SPAN * 14.0)
    i = int(np.flatnonzero(supply == 14.0)[0])
    rth = (150.0 - 25.0) / 0.5  # RthJA from Pd: (Tj max − Tref)/Pd (SPEC §3)
    for curve in out["curves"]:
        vz = 5.1 * (1.05 if curve["vz_end"] == "high" else 0.95)
        model = ZenerModel(vz, 0.005, 30.0, 0.00025, 500.0, 0.0002)
        r = 820.0 * (1.05 if curve["resistor_end"] == "high" else 0.95)
        direct = solve_shunt(model, 14.0, r, curve["load_A"], K0 + curve["ambient_C"], rth)
        assert curve["y"][i] == pytest.approx(float(direct.output_voltage), abs=1e-9)
        # Kirchhoff: Iz = (Vs − V)/R − IL and V = Vz(Iz, Tj), Tj = Ta + V·Iz·RthJA, solved with brentq.
        def residual(v):
            iz = (14.0 - v) / r - curve["load_A"]
            tj = K0 + curve["ambient_C"] + v * iz * rth
            return model.voltage_at(iz, tj) - v
        v_ref = brentq(residual, 4.0, 14.0 - curve["load_A"] * r - 1e-9, xtol=1e-13)
        assert curve["y"][i] == pytest.approx(v_ref, abs=1e-8)


def test_zener_output_shows_the_knee(zener_curves):
    out = zener_curves["zener_output"]
    no_load = [c for c in out["curves"] if c["load_A"] == 0.0]
    for curve in no_load:
        # Far below the knee the Zener takes almost nothing: Vout ≈ Vs.
        j = int(np.argmin(np.abs(curve["x"] - 2.0)))
        assert curve["y"][j] == pytest.approx(curve["x"][j], abs=1e-3)
    loaded = [c for c in out["curves"] if c["load_A"] == 0.005]
    for curve in loaded:
        # The load takes all the current the resistor passes until Vs = IL·R: no output below it.
        below = curve["x"] < 0.005 * curve["resistance_ohm"]
        assert np.all(curve["y"][below] == 0.0)
    band = out["band"]
    assert (band["low"], band["high"]) == pytest.approx((5.1 * 0.92, 5.1 * 1.08))
    assert [v["value"] for v in out["vlines"]] == [10.0, 14.0]


def test_zener_points_and_tj(zener_curves):
    bd = zener_curves["breakdown"]
    pts = bd["points"][0]
    assert len(pts["corners"]) == 32  # 2 supplies × 2 loads × 2 ambients × 2 resistor ends × 2 Vz ends
    rth = 250.0
    for v, iz, c in list(zip(pts["x"], pts["y"], pts["corners"]))[::5]:
        r = 820.0 * (1.05 if c["resistor_end"] == "high" else 0.95)
        assert iz == pytest.approx((c["supply_V"] - v) / r - c["load_A"], rel=1e-9)
        assert c["junction_temp_C"] == pytest.approx(c["ambient_C"] + v * iz * rth, abs=1e-6)
    assert [h["value"] for h in bd["hlines"]] == [0.00025]  # Iz min defaults to the part's Izk
    tj = zener_curves["junction_temperature"]
    assert [h["value"] for h in tj["hlines"]] == [125.0, 150.0]  # the check's limit, then the rating
    worst = _curve(tj, "tj_forward")
    power = _curve(zener_curves["power"], "power")
    assert np.allclose(worst["y"], worst["x"] + power["y"] * rth, atol=1e-6)


def test_missing_data_is_reported_not_drawn():
    part = dict(SCHOTTKY, is_A=None, n=None, rs_ohm=None, vf_points=[])
    data = curves_for(SERIES_REQ, part, {})
    assert data["forward"] is None and data["junction_temperature"] is None
    assert any("no forward model" in note for note in data["notes"])
    infeasible = dict(ZENER_CANDIDATE, metrics={"series_resistor_ohm": None})
    data = curves_for(ZENER_REQ, ZENER, infeasible)
    assert data["zener_output"] is None
    assert any("not feasible" in note for note in data["notes"])
    with pytest.raises(ValueError, match="role"):
        curves_for(dict(SERIES_REQ, role="bridge"), SCHOTTKY, {})


def test_fitted_when_only_points_are_given():
    # Points on an exact Shockley curve (Is 2 µA, n 1.3, Rs 0.06 Ω at 25 °C) are fitted back.
    pts = [(i, _shockley_v(i, K0 + 25.0)) for i in (0.01, 0.1, 0.5, 1.0, 2.0)]
    part = dict(SCHOTTKY, is_A=None, n=None, rs_ohm=None, vf_points=pts, vf_max_V=None, vf_max_at_A=None)
    data = curves_for(SERIES_REQ, part, {})
    typical = _curve(data["forward"], "typical_cold")
    assert typical["x"][200] == pytest.approx(_shockley_v(typical["y"][200], K0 - 20.0), abs=2e-4)
    assert any("fitted" in note for note in data["notes"])


def test_curve_arrays_are_finite_where_no_runaway(series_curves, zener_curves):
    for data in (series_curves, zener_curves):
        for name in ("forward", "breakdown", "zener_output", "junction_temperature", "power"):
            section = data[name]
            if section is None:
                continue
            for curve in section["curves"]:
                assert curve["x"].dtype == float and curve["y"].dtype == float
                if curve["role"] not in ("tj_reverse",):
                    assert np.all(np.isfinite(curve["x"])) and np.all(np.isfinite(curve["y"])), curve["label"]
            assert section["x"]["unit"] in ("V", "°C") and section["y"]["unit"] in ("A", "V", "°C", "W")


def test_engineering_format():
    assert format_engineering(0.0123, "A") == "12.3 mA"
    assert format_engineering(1.0, "A") == "1.00 A"
    assert format_engineering(999.96e-3, "V") == "1.00 V"  # rounding carries into the next prefix
    assert format_engineering(4.7e3, "Ω") == "4.70 kΩ"
    assert format_engineering(-20.0, "°C") == "−20.0 °C"
    assert format_engineering(2e-9, "A") == "2.00 nA"
    assert format_engineering(None, "V") == "—"
    with pytest.raises(ValueError, match="not a finite"):
        format_engineering(float("nan"), "V")
    assert corner_label(11.0, 1.0, -20.0) == "11.0 V · 1.00 A · −20 °C"  # SPEC §8's example


def test_ratios_and_temperatures_take_no_prefix():
    assert format_engineering(0.5, "% of Pallow") == "0.500 % of Pallow"
    assert format_engineering(0.004, "%") == "0.00400 %"
    assert format_engineering(1200.0, "°C") == "1.20e+03 °C"
    assert format_engineering(25.0, "K") == "25.0 K"
