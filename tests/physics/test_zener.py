"""Zener branch and shunt regulator, against the textbook worked example and brentq."""

import numpy as np
import pytest
from scipy.optimize import brentq

from partpick.physics.constants import T0_K, celsius_to_kelvin
from partpick.physics.zener import ZenerModel, solve_shunt

# Sedra & Smith, Microelectronic Circuits, Zener shunt regulator example (numbered 3.8 in one
# edition; from memory): Vz = 6.8 V at Izt = 5 mA, rz = 20 Ω, Izk = 0.2 mA, supply 10 V ± 1 V,
# R = 0.5 kΩ. Model Vz0 = 6.7 V.
BOOK = ZenerModel(voltage=6.8, test_current=5e-3, test_impedance=20.0, knee_current=0.2e-3)


def test_sedra_smith_no_load_output_and_current():
    # Book: no load, Iz = 6.35 mA, Vo = 6.83 V.
    point = solve_shunt(BOOK, 10.0, 500.0, 0.0, T0_K, 0.0)
    assert point.zener_current == pytest.approx(6.35e-3, abs=0.005e-3)
    assert point.output_voltage == pytest.approx(6.83, abs=0.005)


def test_sedra_smith_line_regulation():
    # Book: line regulation rz/(R + rz) = 38.5 mV/V.
    lo = solve_shunt(BOOK, 9.0, 500.0, 0.0, T0_K, 0.0)
    hi = solve_shunt(BOOK, 11.0, 500.0, 0.0, T0_K, 0.0)
    slope = (hi.output_voltage - lo.output_voltage) / 2.0
    assert slope * 1e3 == pytest.approx(38.5, abs=0.05)


def test_sedra_smith_load_regulation_and_loads():
    # Book: load regulation −(rz ∥ R) = −19.2 mV/mA (rounded in the book to −rz = −20 mV/mA).
    no_load = solve_shunt(BOOK, 10.0, 500.0, 0.0, T0_K, 0.0)
    one_ma = solve_shunt(BOOK, 10.0, 500.0, 1e-3, T0_K, 0.0)
    assert (one_ma.output_voltage - no_load.output_voltage) * 1e3 == pytest.approx(-19.2, abs=0.05)
    # Book: a 2 kΩ load (about 3.4 mA) drops the output by about 65 mV (−68 mV with −rz).
    load = 6.83 / 2000.0
    loaded = solve_shunt(BOOK, 10.0, 500.0, load, T0_K, 0.0)
    assert (loaded.output_voltage - no_load.output_voltage) * 1e3 == pytest.approx(-65, abs=2)
    # Book: with a 0.5 kΩ load the Zener leaves breakdown and Vo = 5.0 V (10 V halved); as a
    # current load that is 10 mA: the divider of R and the load sets the output.
    heavy = solve_shunt(BOOK, 10.0, 500.0, 10e-3, T0_K, 0.0)
    assert heavy.output_voltage == pytest.approx(5.0, abs=1e-6)
    assert heavy.zener_current < BOOK.knee_current


def test_knee_curve_is_continuous_and_impedance_matches_datasheet_points():
    model = ZenerModel(5.1, 20e-3, 7.0, 1e-3, 500.0, 2e-4)
    for i in (1e-3, 20e-3):
        h = i * 1e-7
        numeric = (model.voltage_at(i + h, 330.0) - model.voltage_at(i - h, 330.0)) / (2 * h)
        assert numeric == pytest.approx(model.impedance(i), rel=1e-4)
    assert model.impedance(1e-3) == pytest.approx(500.0)
    assert model.impedance(20e-3) == pytest.approx(7.0)
    assert model.impedance(50e-3) == pytest.approx(7.0)
    # ΔV(Izt) = 0 (SPEC §3)
    assert model.voltage_at(20e-3, T0_K) == pytest.approx(5.1)
    currents = np.logspace(-8, -0.5, 200)
    v = model.voltage_at(currents, 330.0)
    assert np.all(np.diff(v) > 0)
    assert model.current(v, 330.0) == pytest.approx(currents, rel=1e-9)


def test_interpolated_impedance_is_log_log_linear():
    # SPEC §3: between Izk and Izt, ln Z is linear in ln Iz from Zzk to Zzt.
    model = ZenerModel(12.0, 10e-3, 10.0, 0.25e-3, 400.0, 7e-4)
    geometric_mid = np.sqrt(10e-3 * 0.25e-3)
    assert model.impedance(geometric_mid) == pytest.approx(np.sqrt(10.0 * 400.0), rel=1e-12)


def test_unknown_knee_impedance_keeps_zzt_down_to_izk():
    model = ZenerModel(9.1, 10e-3, 8.0, 0.5e-3, np.nan, 0.0)
    assert model.impedance(0.6e-3) == pytest.approx(8.0)


def test_temperature_coefficient_moves_breakdown_voltage():
    # Vz(Iz, Tj) = Vz·(1 + αVz·(Tj − 25 °C)) + ΔV(Iz) (SPEC §3): +0.06 %/K for 50 K on 12 V is +0.36 V.
    model = ZenerModel(12.0, 10e-3, 10.0, 0.25e-3, 400.0, 6e-4)
    assert model.voltage_at(10e-3, T0_K + 50) - model.voltage_at(10e-3, T0_K) == pytest.approx(0.36)


def test_self_heated_shunt_matches_brentq():
    model = ZenerModel(np.array([[5.1], [12.0], [3.3]]), np.array([[20e-3], [10e-3], [20e-3]]),
                       np.array([[7.0], [10.0], [28.0]]), np.array([[1e-3], [0.25e-3], [1e-3]]),
                       np.array([[500.0], [400.0], [400.0]]), np.array([[2e-4], [6e-4], [-7e-4]]))
    supply = np.array([9.0, 15.0, 24.0])
    load = np.array([0.0, 5e-3, 20e-3])
    ambient = celsius_to_kelvin(np.array([-20.0, 25.0, 70.0]))
    rth, resistance = 300.0, 330.0
    point = solve_shunt(model, supply, resistance, load, ambient, rth)
    for p in range(3):
        single = ZenerModel(*(np.asarray(getattr(model, f))[p, 0] for f in (
            "voltage", "test_current", "test_impedance", "knee_current", "knee_impedance",
            "temperature_coefficient")))
        for c in range(3):
            def balance(v):
                iz = (supply[c] - v) / resistance - load[c]
                tj = ambient[c] + v * iz * rth
                return iz - single.current(v, tj)
            v_ref = brentq(balance, 1e-9, supply[c] - load[c] * resistance, xtol=1e-14)
            assert point.output_voltage[p, c] == pytest.approx(v_ref, abs=1e-9)
            iz = (supply[c] - v_ref) / resistance - load[c]
            assert point.junction_temperature[p, c] == pytest.approx(ambient[c] + v_ref * iz * rth, abs=1e-6)


def test_collapsed_supply_is_flagged():
    point = solve_shunt(BOOK, 5.0, 1000.0, 10e-3, T0_K, 0.0)
    assert bool(point.collapsed)
    assert point.zener_current == 0.0


@pytest.mark.parametrize(
    "call, match",
    [
        (lambda: ZenerModel(-5.1, 5e-3, 10.0), "voltage must be > 0"),
        (lambda: ZenerModel(5.1, 5e-3, 0.0), "test_impedance must be > 0"),
        (lambda: ZenerModel(5.1, 5e-3, 10.0, knee_current=6e-3), "knee_current must be in"),
        (lambda: solve_shunt(BOOK, 10.0, 0.0, 0.0, T0_K, 0.0), "resistance must be > 0"),
        (lambda: solve_shunt(BOOK, np.nan, 100.0, 0.0, T0_K, 0.0), "supply must be finite"),
    ],
)
def test_bad_arguments_are_refused_by_name(call, match):
    with pytest.raises(ValueError, match=match):
        call()
