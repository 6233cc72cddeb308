"""Forward branch: constants, Shockley equation, Lambert-W load line, temperature laws."""

import numpy as np
import pytest
from scipy import constants
from scipy.optimize import brentq

from partpick.physics.constants import BOLTZMANN, ELEMENTARY_CHARGE, T0_K, celsius_to_kelvin
from partpick.physics.junction import (
    ForwardModel,
    diode_current,
    forward_voltage,
    loadline_current,
    saturation_current_at,
    thermal_voltage,
)


def test_constants_are_codata():
    # CODATA 2018 exact values, as scipy.constants carries them.
    assert BOLTZMANN == constants.k == 1.380649e-23
    assert ELEMENTARY_CHARGE == constants.e == 1.602176634e-19
    assert T0_K == pytest.approx(298.15, abs=1e-12)
    assert celsius_to_kelvin(25.0) == pytest.approx(298.15)


def test_thermal_voltage_near_26_mV_at_room_temperature():
    # k·T/q with CODATA constants: 25.852 mV at 300 K (REFERENCES.md); "about 26 mV" (common practice).
    assert thermal_voltage(300.0) == pytest.approx(constants.k * 300 / constants.e, rel=1e-15)
    assert thermal_voltage(300.0) == pytest.approx(25.852e-3, abs=1e-6)
    assert thermal_voltage(T0_K) == pytest.approx(26e-3, abs=0.5e-3)


def test_boost_lambert_w_diode_example():
    # Boost.Math documentation, Lambert W diode example (applying Banwell & Jayakumar,
    # Electronics Letters 36(4), 2000): Is = 25 fA, n = 1, VT = 1.38e-23·298/1.6e-19 = 25.7025 mV,
    # R = 249 Ω + 0.3 Ω, V = 0.9 V → I = 1.08485 mA.
    vt = 1.38e-23 * 298 / 1.6e-19
    temperature = vt * ELEMENTARY_CHARGE / BOLTZMANN  # the temperature that gives the book's VT
    current = loadline_current(0.9, 249.0, 25e-15, 1.0, 0.3, temperature)
    assert current == pytest.approx(1.08485e-3, rel=1e-5)


def test_wright_omega_form_does_not_overflow_at_100_V():
    # REFERENCES.md: at V = 100 V the plain Lambert W argument overflows a double.
    vt = 1.38e-23 * 298 / 1.6e-19
    argument_exponent = (100 + 25e-15 * 249.3) / vt
    assert argument_exponent > np.log(np.finfo(float).max)  # the plain form would overflow
    temperature = vt * ELEMENTARY_CHARGE / BOLTZMANN
    current = loadline_current(100.0, 249.0, 25e-15, 1.0, 0.3, temperature)
    assert np.isfinite(current)
    # KCL: the residual of V = I·R + Vdiode(I) is at rounding level.
    v_diode = forward_voltage(current, 25e-15, 1.0, 0.3, temperature)
    assert current * 249.0 + v_diode == pytest.approx(100.0, rel=1e-12)


def _brentq_current(vb, r, i_s, n, rs, temperature):
    """Independent solution: bracket and solve Vb = I·R + V(I) with scipy's brentq."""
    def balance(i):
        return i * r + forward_voltage(i, i_s, n, rs, temperature) - vb
    hi = vb / r if r > 0 else 1e6
    return brentq(balance, 0.0, hi, xtol=1e-300, rtol=4 * np.finfo(float).eps, maxiter=500)


def test_loadline_matches_brentq_over_a_wide_grid():
    # Grid of issue 2: currents 1 µA…1 kA, sources up to 10 kV, Is 1e-18…1e-6 A,
    # n 0.8…3, Rs 0…100 Ω; relative error < 1e-9 with no overflow or NaN.
    rng = np.random.default_rng(20261201)
    checked = 0
    for i_s in (1e-18, 1e-15, 1e-12, 1e-9, 1e-6):
        for n in (0.8, 1.0, 1.5, 2.0, 3.0):
            for rs in (0.0, 0.01, 1.0, 100.0):
                for target in (1e-6, 1e-3, 1.0, 1e3):
                    for r_load in (1e-3, 1.0, 1e3):
                        vb = target * r_load + forward_voltage(target, i_s, n, rs, T0_K)
                        if vb > 1e4:
                            continue
                        current = loadline_current(vb, r_load, i_s, n, rs, T0_K)
                        reference = _brentq_current(vb, r_load, i_s, n, rs, T0_K)
                        assert np.isfinite(current)
                        assert current == pytest.approx(reference, rel=1e-9), (i_s, n, rs, target, r_load)
                        checked += 1
    # a random sample including 10 kV sources
    vb = rng.uniform(0.0, 1e4, 200)
    r_load = 10 ** rng.uniform(0, 4, 200)
    i_s = 10 ** rng.uniform(-18, -6, 200)
    n = rng.uniform(0.8, 3, 200)
    rs = rng.uniform(0, 100, 200)
    currents = loadline_current(vb, r_load, i_s, n, rs, T0_K)
    for k in range(200):
        assert currents[k] == pytest.approx(_brentq_current(vb[k], r_load[k], i_s[k], n[k], rs[k], T0_K), rel=1e-9)
    assert checked > 500


def test_loadline_is_vectorised_and_returns_scalars_for_scalars():
    grid = loadline_current(np.array([[1.0], [5.0]]), 100.0, np.array([1e-14, 1e-9]), 1.2, 0.1)
    assert grid.shape == (2, 2)
    assert isinstance(loadline_current(1.0, 100.0, 1e-14, 1.0, 0.0), float)


def test_diode_current_inverts_forward_voltage():
    i = np.logspace(-9, 2, 12)
    v = forward_voltage(i, 1e-12, 1.7, 0.05, 330.0)
    assert diode_current(v, 1e-12, 1.7, 0.05, 330.0) == pytest.approx(i, rel=1e-10)
    # Rs = 0: the explicit branch
    v0 = forward_voltage(i, 1e-12, 1.7, 0.0, 330.0)
    assert diode_current(v0, 1e-12, 1.7, 0.0, 330.0) == pytest.approx(i, rel=1e-10)


def test_silicon_junction_carries_about_1_mA_near_0_6_to_0_7_V():
    # Common practice (REFERENCES.md): Is between 1e-15 and 1e-14 A gives about 1 mA near 0.6–0.7 V,
    # very little below 0.5 V.
    for i_s in (1e-15, 1e-14):
        v = forward_voltage(1e-3, i_s, 1.0, 0.0, T0_K)
        assert 0.6 <= v <= 0.72
        assert diode_current(0.5, i_s, 1.0, 0.0, T0_K) < 1e-5


def test_thousandfold_current_for_about_0_2_V():
    # Common practice: near that point the current grows about a thousandfold for about 0.2 V
    # more (n slightly above 1): n·VT·ln(1000) = 0.18 V at n = 1.0, 0.20 V at n = 1.1.
    dv = forward_voltage(1.0, 1e-14, 1.1, 0.0) - forward_voltage(1e-3, 1e-14, 1.1, 0.0)
    assert dv == pytest.approx(0.2, abs=0.02)


def test_sedra_smith_1_mA_diode_saturation_current():
    # Sedra & Smith, Microelectronic Circuits (from memory): 0.7 V at 1 mA with n = 1 and the
    # book's VT = 25 mV gives Is ≈ 6.9e-16 A.
    temperature = 25e-3 * ELEMENTARY_CHARGE / BOLTZMANN
    model_v = forward_voltage(1e-3, 6.9e-16, 1.0, 0.0, temperature)
    assert model_v == pytest.approx(0.7, abs=1e-3)


def test_forward_voltage_falls_about_2_mV_per_kelvin():
    # Common practice: about −2 mV/K at constant small current; REFERENCES.md gives about
    # −1.8 mV/K for Is = 1e-14 A, n = 1 at 1 mA with this model.
    model = ForwardModel(1e-14, 1.0, 0.0)
    slope = (model.voltage(1e-3, T0_K + 1) - model.voltage(1e-3, T0_K - 1)) / 2
    assert slope == pytest.approx(-1.8e-3, abs=0.1e-3)
    assert slope == pytest.approx(model.voltage_temperature_slope(1e-3, T0_K), rel=1e-4)
    assert -2.5e-3 < slope < -1.5e-3


def test_forward_coefficient_turns_positive_at_high_current_when_rs_rises():
    # SPEC §3: a positive coefficient at high currents where Rs grows with temperature.
    model = ForwardModel(1e-9, 1.8, 0.1, rs_temperature_exponent=1.5)
    assert model.voltage_temperature_slope(1e-3, T0_K) < 0
    assert model.voltage_temperature_slope(10.0, T0_K) > 0
    numeric = (model.voltage(10.0, T0_K + 0.5) - model.voltage(10.0, T0_K - 0.5))
    assert numeric == pytest.approx(model.voltage_temperature_slope(10.0, T0_K), rel=1e-3)


def test_saturation_current_temperature_law():
    # Independent evaluation of Is(T) = Is0·(T/T0)^(m/n)·exp((Eg·q/(n·k))·(1/T0 − 1/T)).
    T = 373.15
    expected = 1e-14 * (T / T0_K) ** 3 * np.exp(1.11 * constants.e / constants.k * (1 / T0_K - 1 / T))
    assert saturation_current_at(1e-14, T, 1.0) == pytest.approx(expected, rel=1e-12)
    assert saturation_current_at(1e-14, T0_K, 1.7) == pytest.approx(1e-14, rel=1e-15)


def test_tangent_model_touches_the_curve():
    model = ForwardModel(2e-9, 1.8, 0.04)
    vth0, ron = model.tangent(1.0, 350.0)
    h = 1e-6
    numeric_ron = (model.voltage(1.0 + h, 350.0) - model.voltage(1.0 - h, 350.0)) / (2 * h)
    assert ron == pytest.approx(numeric_ron, rel=1e-6)
    assert vth0 + ron * 1.0 == pytest.approx(model.voltage(1.0, 350.0), rel=1e-12)
    # V(I) is concave in I (d²V/dI² = −n·VT/(I + Is)² < 0), so the tangent lies above the curve
    # on both sides of the tangent point.
    for i in (0.3, 3.0):
        assert vth0 + ron * i > model.voltage(i, 350.0)


def test_max_vf_moves_saturation_current_down_through_the_point():
    model = ForwardModel(np.array([2e-9, 2e-9, 2e-9]), 1.8, 0.04)
    vmax = np.array([1.1, np.nan, 0.5])  # above typical, not given, below typical
    moved = model.with_max_vf(vmax, np.array([1.0, np.nan, 1.0]))
    assert moved.voltage(1.0, T0_K)[0] == pytest.approx(1.1, rel=1e-12)
    assert moved.saturation_current[1] == 2e-9
    assert moved.saturation_current[2] == 2e-9
    assert moved.saturation_current[0] < 2e-9


@pytest.mark.parametrize(
    "call, match",
    [
        (lambda: thermal_voltage(-1.0), "temperature must be > 0"),
        (lambda: thermal_voltage(np.nan), "temperature must be finite"),
        (lambda: forward_voltage(1e-3, 0.0, 1.0, 0.0), "saturation_current must be > 0"),
        (lambda: forward_voltage(1e-3, 1e-14, 1.0, -1.0), "series_resistance must be ≥ 0"),
        (lambda: forward_voltage(np.inf, 1e-14, 1.0, 0.0), "current must be finite"),
        (lambda: forward_voltage(-1.0, 1e-14, 1.0, 0.0), "current must be > -saturation_current"),
        (lambda: loadline_current(1.0, -5.0, 1e-14, 1.0, 0.0), "resistance must be ≥ 0"),
        (lambda: loadline_current(1e4, 0.0, 1e-14, 1.0, 0.0), "current overflows"),
        (lambda: ForwardModel(1e-14, 0.0, 0.0), "ideality must be > 0"),
        (lambda: saturation_current_at(1e-14, 300.0, 1.0, band_gap=-1), "band_gap must be ≥ 0"),
    ],
)
def test_bad_arguments_are_refused_by_name(call, match):
    with pytest.raises(ValueError, match=match):
        call()
