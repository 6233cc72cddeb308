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
