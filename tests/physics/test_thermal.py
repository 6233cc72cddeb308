"""Thermal: derating, forward self-heating, reverse runaway, leakage."""

import numpy as np
import pytest
from scipy.optimize import brentq

from partpick.physics.constants import T0_K, celsius_to_kelvin
from partpick.physics.junction import ForwardModel
from partpick.physics.leakage import reverse_current
from partpick.physics.thermal import (
    allowed_power,
    power_rating_from_thermal_resistance,
    reverse_thermal_state,
    self_heated_forward,
    thermal_resistance_from_rating,
)


def test_linear_derating_jesd51_style():
    # REFERENCES.md (JEDEC JESD51 definitions): P(Ta) = Pd·(Tj max − Ta)/(Tj max − 25 °C) above 25 °C,
    # RthJA = (Tj max − 25 °C)/Pd. A 1 W part with Tj max 150 °C: 0.6 W at 75 °C, 125 K/W.
    tj_max = celsius_to_kelvin(150.0)
    assert allowed_power(celsius_to_kelvin(75.0), 1.0, tj_max, T0_K) == pytest.approx(0.6)
    assert allowed_power(celsius_to_kelvin(-40.0), 1.0, tj_max, T0_K) == pytest.approx(1.0)
    assert allowed_power(celsius_to_kelvin(160.0), 1.0, tj_max, T0_K) == 0.0
    assert thermal_resistance_from_rating(1.0, tj_max, T0_K) == pytest.approx(125.0)
    assert power_rating_from_thermal_resistance(125.0, tj_max, T0_K) == pytest.approx(1.0)


def test_self_heating_matches_brentq_per_corner():
    # Independent solution: brentq on T − Ta − Rth·I·V(I, T) for each part and corner.
    model = ForwardModel(np.array([[1e-9], [3e-6], [1e-12]]), np.array([[1.8], [1.1], [1.5]]),
                         np.array([[0.05], [0.02], [0.3]]), band_gap=np.array([[1.11], [0.69], [1.11]]),
                         temperature_exponent=np.array([[3.0], [2.0], [3.0]]),
                         rs_temperature_exponent=np.array([[0.0], [0.5], [1.0]]))
    current = np.array([0.01, 0.5, 1.0, 2.0])
    ambient = celsius_to_kelvin(np.array([-40.0, 25.0, 85.0, 85.0]))
    rth = 40.0
    op = self_heated_forward(model, current, ambient, rth)
    assert not op.runaway.any()
    for p in range(3):
        single = ForwardModel(model.saturation_current[p, 0], model.ideality[p, 0], model.series_resistance[p, 0],
                              model.band_gap[p, 0], model.temperature_exponent[p, 0],
                              model.rs_temperature_exponent[p, 0])
        for c in range(4):
            def balance(t):
                return t - ambient[c] - rth * current[c] * single.voltage(current[c], t)
            tj = brentq(balance, ambient[c], ambient[c] + 1000.0, xtol=1e-12)
            assert op.junction_temperature[p, c] == pytest.approx(tj, abs=1e-7)
            assert op.voltage[p, c] == pytest.approx(single.voltage(current[c], tj), rel=1e-10)


def test_self_heating_flags_forward_runaway():
    # Rs rising steeply with temperature at high current: Rth·I·dV/dT ≥ 1, no fixed point.
    model = ForwardModel(1e-9, 1.8, 1.0, rs_temperature_exponent=3.0)
    op = self_heated_forward(model, 5.0, celsius_to_kelvin(25.0), 100.0)
    assert bool(op.runaway)
    assert np.isnan(op.junction_temperature)


def test_reverse_state_closed_form_agrees_with_brentq():
    # x = Tj − Ta solves x = Rth·P0·2^(x/d); check the Lambert-W result against brentq.
    ambient, rth, d = celsius_to_kelvin(60.0), 50.0, 10.0
    p0 = np.array([0.0, 0.01, 0.05, 0.1, 0.2])
    state = reverse_thermal_state(p0, d, ambient, rth)
    stable = p0 * rth * np.log(2) / d <= np.exp(-1)
    assert list(state.runaway) == list(~stable)
    for k in np.flatnonzero(stable & (p0 > 0)):
        def balance(x):
            return x - rth * p0[k] * 2 ** (x / d)
        c = np.log(2) / d
        x_peak = np.log(1 / (c * rth * p0[k])) / c  # the balance peaks where c·Rth·P0·e^(c·x) = 1
        x0 = brentq(balance, 0.0, x_peak)
        assert state.junction_temperature[k] == pytest.approx(ambient + x0, abs=1e-8)
        x1 = brentq(balance, x_peak, 1e4)
        assert state.unstable_temperature[k] == pytest.approx(ambient + x1, abs=1e-6)
        assert state.loop_gain[k] < 1.0
    assert state.junction_temperature[0] == ambient
    assert np.isnan(state.junction_temperature[-1])


def test_leakage_doubles_every_10_K_and_scales_with_voltage():
    # Common practice: reverse leakage roughly doubles every 10 K.
    i25 = reverse_current(1e-6, 40.0, T0_K, 40.0, T0_K)
    i35 = reverse_current(1e-6, 40.0, T0_K, 40.0, T0_K + 10.0)
    assert i35 / i25 == pytest.approx(2.0)
    assert reverse_current(1e-6, 40.0, T0_K, 40.0, T0_K + 100.0) == pytest.approx(1024e-6)
    # in proportion above the rated voltage, the rated figure kept below it
    assert reverse_current(1e-6, 40.0, T0_K, 60.0, T0_K) == pytest.approx(1.5e-6)
    assert reverse_current(1e-6, 40.0, T0_K, 10.0, T0_K) == pytest.approx(1e-6)
    # a per-part interval
    assert reverse_current(1e-6, 40.0, T0_K, 40.0, T0_K + 7.0, doubling_interval=7.0) == pytest.approx(2e-6)


@pytest.mark.parametrize(
    "call, match",
    [
        (lambda: allowed_power(300.0, 1.0, 290.0, T0_K), "tj_max must be above"),
        (lambda: allowed_power(300.0, -1.0, 400.0, T0_K), "power_rating must be ≥ 0"),
        (lambda: thermal_resistance_from_rating(0.0, 400.0, T0_K), "power_rating must be > 0"),
        (lambda: reverse_current(1e-6, 0.0, T0_K, 5.0, T0_K), "rated_voltage must be > 0"),
        (lambda: reverse_thermal_state(0.1, 0.0, 300.0, 10.0), "doubling_interval must be > 0"),
        (lambda: self_heated_forward(ForwardModel(1e-14, 1.0, 0.0), -1.0, 300.0, 10.0), "current must be ≥ 0"),
    ],
)
def test_bad_arguments_are_refused_by_name(call, match):
    with pytest.raises(ValueError, match=match):
        call()
