"""Fit of Is, n, Rs from datasheet points."""

import numpy as np
import pytest

from partpick.physics.constants import T0_K, celsius_to_kelvin
from partpick.physics.fit import FitRefused, fit_forward_model
from partpick.physics.junction import forward_voltage, saturation_current_at


@pytest.mark.parametrize(
    "i_s, n, rs",
    [(2e-9, 1.8, 0.04), (1e-6, 1.1, 0.015), (3e-12, 1.9, 0.8), (1e-14, 1.05, 0.0), (5e-8, 2.6, 2.0)],
)
def test_fit_recovers_the_parameters_it_was_generated_from(i_s, n, rs):
    currents = np.array([1e-3, 1e-2, 0.1, 0.5, 1.0, 3.0])
    voltages = forward_voltage(currents, i_s, n, rs, T0_K)
    fit = fit_forward_model(currents, voltages)
    assert fit.saturation_current == pytest.approx(i_s, rel=1e-5)
    assert fit.ideality == pytest.approx(n, rel=1e-6)
    assert fit.series_resistance == pytest.approx(rs, abs=1e-6)
    assert fit.residual_max_V < 1e-9
    assert fit.fitted_series_resistance


def test_fit_of_rounded_datasheet_reads_is_close():
    # Points read off a curve to 1 mV, as a designer would: residuals stay within that.
    currents = np.array([0.01, 0.1, 0.5, 1.0, 2.0])
    voltages = np.round(forward_voltage(currents, 2e-9, 1.8, 0.04, T0_K), 3)
    fit = fit_forward_model(currents, voltages)
    assert fit.residual_max_V <= 0.6e-3
    assert fit.ideality == pytest.approx(1.8, rel=0.03)


def test_two_points_fit_is_and_n_with_rs_zero():
    currents = np.array([1e-3, 1e-1])
    voltages = forward_voltage(currents, 1e-12, 1.6, 0.0, T0_K)
    fit = fit_forward_model(currents, voltages)
    assert not fit.fitted_series_resistance
    assert fit.series_resistance == 0.0
    assert "Rs = 0 assumed" in fit.note
    assert fit.ideality == pytest.approx(1.6, rel=1e-9)
    assert fit.saturation_current == pytest.approx(1e-12, rel=1e-7)


def test_points_at_another_temperature_are_reported_at_25_C():
    t = celsius_to_kelvin(100.0)
    currents = np.array([1e-3, 1e-2, 0.1, 1.0])
    is_hot = saturation_current_at(2e-9, t, 1.8)
    voltages = forward_voltage(currents, is_hot, 1.8, 0.04, t)
    fit = fit_forward_model(currents, voltages, temperature=t)
    assert fit.saturation_current == pytest.approx(2e-9, rel=1e-5)
    assert "100 °C" in fit.note


def test_points_given_in_any_order():
    currents = np.array([1.0, 1e-3, 0.1, 1e-2])
    voltages = forward_voltage(currents, 2e-9, 1.8, 0.04, T0_K)
    fit = fit_forward_model(currents, voltages)
    assert fit.ideality == pytest.approx(1.8, rel=1e-6)
    assert fit.residuals_V.shape == (4,)


@pytest.mark.parametrize(
    "currents, voltages, match",
    [
        ([1e-3], [0.6], "at least two"),
        ([], [], "at least two"),
        ([1e-3, 1e-2], [0.7, 0.6], "not monotonic"),
        ([1e-3, 1e-3], [0.6, 0.7], "same current"),
        ([-1e-3, 1e-2], [0.6, 0.7], "currents must be > 0"),
        ([1e-3, 1e-2], [0.6, np.nan], "finite"),
        ([1e-3, 1e-2], [0.6], "2 currents but 1 voltages"),
        # 10 mV per decade is n ≈ 0.17: non-physical, ends on the n ≥ 1 bound
        ([1e-3, 1e-2, 1e-1], [0.60, 0.61, 0.62], "ideality bound"),
        # a kink no diode makes: the model misses by far more than 5 mV
        ([1e-3, 1e-2, 1e-1, 1.0], [0.60, 0.62, 0.90, 0.95], "misses the points"),
    ],
)
def test_fit_refusals(currents, voltages, match):
    with pytest.raises(FitRefused, match=match):
        fit_forward_model(currents, voltages)


# A plausible rectifier curve (invented points, read as from a datasheet graph): 100 mV per decade at
# low current, then the bend of high-level injection. One Is, n, Rs cannot follow all four within 5 mV.
_RECTIFIER_I = [10e-3, 100e-3, 1.0, 5.0]
_RECTIFIER_V = [0.65, 0.75, 0.92, 1.15]


def test_a_refused_fit_carries_the_best_model_found_and_what_to_change():
    from scipy.optimize import minimize

    from partpick.physics.junction import forward_voltage

    with pytest.raises(FitRefused, match="misses the points") as refusal:
        fit_forward_model(_RECTIFIER_I, _RECTIFIER_V)
    best = refusal.value.best
    assert best is not None and best.fitted_series_resistance
    # its residuals are the model's own misses, evaluated here independently of the fit code
    model_v = forward_voltage(np.array(_RECTIFIER_I), best.saturation_current, best.ideality,
                              best.series_resistance)
    assert best.residuals_V == pytest.approx(model_v - np.array(_RECTIFIER_V), abs=1e-9)
    assert best.residual_max_V == pytest.approx(np.max(np.abs(model_v - _RECTIFIER_V)), abs=1e-12)
    assert best.residual_max_V > 5e-3

    # Independent check that it is the least-squares optimum: Nelder–Mead (scipy.optimize.minimize,
    # derivative-free) on the same sum of squares from a different start finds nothing better.
    def cost(x):
        log_is, n, rs = x
        if not 1.0 <= n <= 4.0 or rs < 0:
            return 1e9
        return float(np.sum((forward_voltage(np.array(_RECTIFIER_I), np.exp(log_is), n, rs)
                             - np.array(_RECTIFIER_V)) ** 2))

    other = minimize(cost, [np.log(1e-9), 1.5, 0.05], method="Nelder-Mead",
                     options={"xatol": 1e-10, "fatol": 1e-16, "maxiter": 20000, "maxfev": 40000})
    ours = cost([np.log(best.saturation_current), best.ideality, best.series_resistance])
    assert ours <= other.fun * (1 + 1e-6) + 1e-15
    # what to change: the end the model cannot follow, and that the other three then fix Is, n, Rs
    assert "without the highest-current point (5 A)" in refusal.value.advice
    assert "met exactly" in refusal.value.advice


def test_bad_points_are_refused_without_a_best_model():
    with pytest.raises(FitRefused, match="not monotonic") as refusal:
        fit_forward_model([1e-3, 1e-2], [0.7, 0.6])
    assert refusal.value.best is None
