"""Coil turn-off: the clamp decay against closed forms and an independent ODE solver.

References
----------
- First-order RL circuit discharging into a constant voltage (any circuits
  textbook, e.g. Hayt & Kemmerly, *Engineering Circuit Analysis*, the source-free
  and driven RL circuit; from memory): i(t) = (I0 + Vc/R)·e^(−tR/L) − Vc/R.
- Energy stored in an inductor ½·L·I² (same).
- `scipy.integrate.solve_ivp` (Radau, tight tolerances) on L·di/dt = −(R·i + Vf(i) + Vz),
  integrating the power of each element alongside: a reference written as time
  stepping, where the code under test integrates over the current.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from partpick.physics.coil import (DiodeDrop, coil_decay, coil_resistance, constant_drop, periodic_state,
                                   pulse_temperature_rise)

# An invented 1 A flyback diode (Is, n, Rs at 25 °C) and a 24 V valve coil.
DIODE = DiodeDrop(2e-9, 1.9, 0.06, 298.15)
L_COIL, R_COIL = 0.12, 48.0


def _reference_decay(L, R, drop, I0, i_end, zener=0.0):
    """Time stepping with solve_ivp: current and the energies of diode, Zener and coil."""
    def rhs(t, y):
        i = max(y[0], 0.0)
        vf = float(drop(i))
        return [-(R * i + vf + zener) / L, vf * i, zener * i, R * i * i, i * i, i]

    stop = lambda t, y: y[0] - i_end  # noqa: E731
    stop.terminal = True
    sol = solve_ivp(rhs, [0.0, 100 * L / R], [I0, 0, 0, 0, 0, 0], method="Radau", rtol=1e-10,
                    atol=[I0 * 1e-12, 1e-16, 1e-16, 1e-16, 1e-16, 1e-16], events=stop)
    assert sol.status == 1, sol.message
    t = sol.t_events[0][0]
    return t, sol.y_events[0][0]


@pytest.mark.parametrize("L, R, I0, Vc, Id", [
    (0.12, 48.0, 0.5, 0.8, 0.05),     # diode-only hand model
    (0.12, 48.0, 0.5, 36.0, 0.05),    # diode + 36 V Zener
    (1e-3, 2.0, 10.0, 1.2, 1.0),      # a motor-like coil
    (5.0, 500.0, 0.048, 0.7, 1e-3),   # a large relay
])
def test_constant_drop_matches_closed_form(L, R, I0, Vc, Id):
    result = coil_decay(L, R, constant_drop(Vc), I0, Id)
    # (L/R)·ln((I0 + Vc/R)/(Id + Vc/R)), first-order RL circuit (textbook closed form).
    assert result.time == pytest.approx((L / R) * math.log((I0 + Vc / R) / (Id + Vc / R)), rel=1e-9)
    total = coil_decay(L, R, constant_drop(Vc), I0)
    tau = L / R
    # Clamp energy Vc·∫i dt over the whole decay, from the closed-form i(t):
    # ∫i dt = τ·(I0 − (Vc/R)·ln(1 + I0·R/Vc)).
    clamp = Vc * tau * (I0 - (Vc / R) * math.log1p(I0 * R / Vc))
    assert total.diode_energy == pytest.approx(clamp, rel=1e-6)
    assert total.coil_energy == pytest.approx(0.5 * L * I0**2 - clamp, rel=1e-6)
    assert total.diode_energy + total.coil_energy == pytest.approx(0.5 * L * I0**2, rel=1e-9)


@pytest.mark.parametrize("zener", [0.0, 15.0, 47.0])
@pytest.mark.parametrize("I0, Id", [(0.5, 0.08), (0.5, 0.0005), (2.0, 0.2)])
def test_real_curve_matches_solve_ivp(zener, I0, Id):
    result = coil_decay(L_COIL, R_COIL, DIODE, I0, Id, zener)
    t_ref, y = _reference_decay(L_COIL, R_COIL, DIODE, I0, Id, zener)
    assert result.time == pytest.approx(t_ref, rel=5e-3)
    assert result.diode_energy == pytest.approx(y[1], rel=5e-3)
    assert result.coil_energy == pytest.approx(y[3], rel=5e-3)
    assert result.current_squared_time == pytest.approx(y[4], rel=5e-3)
    assert result.charge == pytest.approx(y[5], rel=5e-3)
    if zener:
        assert result.zener_energy == pytest.approx(y[2], rel=5e-3)
    # What the coil gave up, ½·L·(I0² − Id²), left through diode, Zener and winding (0.5 %).
    given = 0.5 * L_COIL * (I0**2 - Id**2)
    assert result.diode_energy + result.zener_energy + result.coil_energy == pytest.approx(given, rel=5e-3)
    assert y[1] + y[2] + y[3] == pytest.approx(given, rel=5e-3)  # the reference conserves it too


def test_vectorised_over_parts_and_corners():
    drop = DiodeDrop(np.array([[2e-9], [1e-6]]), np.array([[1.9], [1.05]]), np.array([[0.06], [0.02]]),
                     np.array([[253.15, 358.15]]))
    I0 = np.array([[0.6, 0.45]])
    result = coil_decay(L_COIL, R_COIL, drop, I0, 0.05, 0.0)
    assert result.time.shape == (2, 2)
    for p in range(2):
        for c in range(2):
            one = DiodeDrop(float(drop.saturation_current[p, 0]), float(drop.ideality[p, 0]),
                            float(drop.series_resistance[p, 0]), float(drop.temperature[0, c]))
            t_ref, _ = _reference_decay(L_COIL, R_COIL, one, float(I0[0, c]), 0.05)
            assert result.time[p, c] == pytest.approx(t_ref, rel=5e-3)


def test_zener_shortens_release():
    slow = coil_decay(L_COIL, R_COIL, DIODE, 0.5, 0.1)
    fast = coil_decay(L_COIL, R_COIL, DIODE, 0.5, 0.1, 36.0)
    assert fast.time < 0.5 * slow.time
    assert fast.zener_energy > fast.diode_energy


def _brute_force_cycles(L, R, drop, Vs, f, duty, zener, cycles=400):
    """Many whole cycles with solve_ivp until the waveform repeats; returns (peak, valley)."""
    t_on, t_off = duty / f, (1 - duty) / f
    i = 0.0
    for _ in range(cycles):
        i = Vs / R + (i - Vs / R) * math.exp(-t_on * R / L)
        peak = i

        def rhs(t, y):
            c = max(y[0], 0.0)
            return [-(R * c + float(drop(c)) + zener) / L if c > 0 else 0.0]

        sol = solve_ivp(rhs, [0, t_off], [peak], method="Radau", rtol=1e-10, atol=1e-13)
        i = max(float(sol.y[0, -1]), 0.0)
    return peak, i


@pytest.mark.parametrize("f, duty, zener", [(200.0, 0.5, 0.0), (500.0, 0.3, 0.0), (1000.0, 0.6, 10.0)])
def test_periodic_state_matches_many_cycles(f, duty, zener):
    state = periodic_state(L_COIL, R_COIL, DIODE, 24.0, f, duty, zener)
    peak, valley = _brute_force_cycles(L_COIL, R_COIL, DIODE, 24.0, f, duty, zener, cycles=60)
    assert float(state.peak_current) == pytest.approx(peak, rel=5e-3)
    assert float(state.valley_current) == pytest.approx(valley, rel=5e-3)
    assert not bool(state.decays_fully)
    # Per cycle the coil gives up ½·L·(ip² − iv²) during the off-time.
    d = state.decay
    given = 0.5 * L_COIL * (float(state.peak_current) ** 2 - float(state.valley_current) ** 2)
    assert float(d.diode_energy + d.zener_energy + d.coil_energy) == pytest.approx(given, rel=5e-3)


def test_slow_switching_decays_fully():
    # τ = L/R = 2.5 ms; 10 Hz at 50 % leaves 50 ms off: the current reaches zero.
    state = periodic_state(L_COIL, R_COIL, DIODE, 24.0, 10.0, 0.5)
    assert bool(state.decays_fully)
    assert float(state.valley_current) == 0.0
    # On for 20 τ from zero: the peak is Vs/R to 1e-8.
    assert float(state.peak_current) == pytest.approx(24.0 / R_COIL, rel=1e-8)


def test_copper_resistance_hand_calculation():
    # 48 Ω at 20 °C: at 70 °C, 48·(1 + 0.00393·50) = 57.432 Ω (α of copper, common practice);
    # at −20 °C with −10 %: 48·(1 − 0.1572)·0.9 = 36.409 Ω.
    assert coil_resistance(48.0, 343.15) == pytest.approx(57.432, rel=1e-9)
    assert coil_resistance(48.0, 253.15, -0.10) == pytest.approx(36.40896, rel=1e-6)


def test_pulse_temperature_rise_hand_calculation():
    # 10 W for 1 ms into RthJA 50 K/W with τ = 100 ms: Zth = 50·√0.01 = 5 K/W → 50 K.
    assert pulse_temperature_rise(10.0, 1e-3, 50.0, 0.1) == pytest.approx(50.0, rel=1e-12)
    # Longer than τ: the steady RthJA, 500 K; τ unknown (0): the steady RthJA as well (conservative).
    assert pulse_temperature_rise(10.0, 0.5, 50.0, 0.1) == pytest.approx(500.0)
    assert pulse_temperature_rise(10.0, 1e-3, 50.0, 0.0) == pytest.approx(500.0)


def test_bad_input_is_refused():
    with pytest.raises(ValueError, match="inductance must be > 0"):
        coil_decay(0.0, 1.0, DIODE, 1.0)
    with pytest.raises(ValueError, match="i_end must be below i_start"):
        coil_decay(1.0, 1.0, DIODE, 1.0, 2.0)
    with pytest.raises(ValueError, match="duty must be within"):
        periodic_state(1.0, 1.0, DIODE, 24.0, 100.0, 1.0)
    with pytest.raises(ValueError, match="resistance_20C must be > 0"):
        coil_resistance(-1.0, 300.0)
    with pytest.raises(ValueError, match="saturation_current must be > 0"):
        DiodeDrop(0.0, 1.0, 0.0, 300.0)


def test_periodic_state_closes_both_phases_over_a_wide_grid():
    # Random coils, diodes, Zeners, frequencies 0.1 Hz–1 MHz and duties 1–99 %: the on-time's closed form
    # carries the valley to the peak, the off-time's decay (time stepped here by the quadrature itself)
    # takes exactly t_off from peak to valley, and the energy balances — or the coil decays fully in t_off.
    rng = np.random.default_rng(7)
    n = 3000
    L, R, Vs = 10 ** rng.uniform(-5, 1, n), 10 ** rng.uniform(-1, 3, n), 10 ** rng.uniform(0, 2.5, n)
    f, duty = 10 ** rng.uniform(-1, 6, n), rng.uniform(0.01, 0.99, n)
    vz = np.where(rng.random(n) < 0.5, 0.0, 10 ** rng.uniform(0, 2, n))
    drop = DiodeDrop(10 ** rng.uniform(-12, -5, n), rng.uniform(1, 2, n), rng.uniform(0, 0.5, n),
                     rng.uniform(230, 400, n))
    state = periodic_state(L, R, drop, Vs, f, duty, vz)
    k = np.exp(-duty / f * R / L)
    assert state.peak_current == pytest.approx(Vs / R + (state.valley_current - Vs / R) * k, rel=1e-12)
    t_off = (1 - duty) / f
    open_ = ~state.decays_fully
    assert 0.1 < open_.mean() < 0.9  # both cases are exercised
    assert state.decay.time[open_] == pytest.approx(t_off[open_], rel=1e-6)
    assert np.all(state.decay.time[~open_] <= t_off[~open_])
    check = coil_decay(L[open_], R[open_], _subset_drop(drop, open_), state.peak_current[open_],
                       state.valley_current[open_], vz[open_])
    assert check.time == pytest.approx(t_off[open_], rel=1e-6)
    d = state.decay
    given = 0.5 * L * (state.peak_current**2 - state.valley_current**2)
    assert d.diode_energy + d.zener_energy + d.coil_energy == pytest.approx(given, rel=1e-6)


def _subset_drop(drop, mask):
    return DiodeDrop(drop.saturation_current[mask], drop.ideality[mask], drop.series_resistance[mask],
                     drop.temperature[mask])
