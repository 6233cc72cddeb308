"""The rectifier's periodic steady state against independent references.

- a brute-force `scipy.integrate.solve_ivp` over many cycles until the waveform
  repeats, with the same diode model (`rectifier_reference.py`), per topology;
- the small-ripple capacitor-input filter formulas of A. S. Sedra, K. C. Smith,
  *Microelectronic Circuits* (the peak rectifier section; from memory):
  Vr = IL/(f·C) half wave, IL/(2f·C) full wave; conduction angle ω·Δt ≈ √(2·Vr/Vp);
  diode current during conduction IL·(1 + π·√(2Vp/Vr)) half wave, IL·(1 + π·√(Vp/(2Vr))) full
  wave; peak IL·(1 + 2π·√(2Vp/Vr)) and IL·(1 + 2π·√(Vp/(2Vr))). They assume an ideal diode,
  no source resistance and Vr ≪ Vp;
- the peak inverse voltage per topology; a package's power as the sum of its legs.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.constants import Boltzmann, elementary_charge
from scipy.integrate import solve_ivp
from scipy.special import wrightomega

from partpick.physics.junction import ForwardModel
from partpick.physics.rectifier import (_wright_omega, peak_inverse_voltage, periodic_steady_state,
                                        rectifier_operating_point, switch_on_surge)
from rectifier_reference import loadline, reference_cycle

TOPOLOGIES = ("bridge", "center_tap", "half_wave")


def test_wright_omega_few_operations_matches_scipy():
    z = np.concatenate([np.linspace(-700.0, 60.0, 20001), np.geomspace(60.0, 1e5, 200)])
    ref = np.real(wrightomega(z))
    assert np.max(np.abs(_wright_omega(z) - ref) / ref) < 5e-7  # one Fritsch step (what a current needs)
    assert np.max(np.abs(_wright_omega(z, iterations=2) - ref) / ref) < 1e-13


# (Vac rms, f, R, C, IL, Is, n, Rs, T): a 12 V secondary and a 230 V mains case, invented diodes
CASES = {
    "secondary": (12.0, 50.0, 0.5, 2200e-6, 1.0, 1e-9, 1.8, 0.02, 300.0),
    "mains": (230.0, 50.0, 8.0, 47e-6, 0.12, 5e-9, 1.9, 0.08, 330.0),
}


@pytest.mark.parametrize("topology", TOPOLOGIES)
@pytest.mark.parametrize("case", sorted(CASES))
def test_steady_state_matches_brute_force_solve_ivp(topology, case):
    args = CASES[case]
    ref = reference_cycle(topology, *args)
    got = periodic_steady_state(topology, *args)
    pairs = {"dc_min": got.dc_min, "ripple": got.ripple, "peak": got.peak_current, "avg": got.average_current,
             "rms": got.rms_current, "angle": got.conduction_angle_deg}
    for key, value in pairs.items():
        assert float(value) == pytest.approx(ref[key], rel=0.01), key  # SPEC: within 1 %
    # charge balance: each diode carries IL (half wave) or IL/2 (full wave) on average
    share = 1.0 if topology == "half_wave" else 0.5
    assert float(got.average_current) == pytest.approx(share * args[4], rel=1e-6)


def test_vectorised_over_parts_and_corners_equals_one_by_one():
    vac = np.array([[10.0, 14.0]])
    Is = np.array([[1e-9], [3e-8]])
    many = periodic_steady_state("bridge", vac, 50.0, 0.7, 1500e-6, 0.6, Is, 1.7, 0.05, 310.0)
    for i in range(2):
        for j in range(2):
            one = periodic_steady_state("bridge", vac[0, j], 50.0, 0.7, 1500e-6, 0.6, Is[i, 0], 1.7, 0.05, 310.0)
            assert float(many.peak_current[i, j]) == pytest.approx(float(one.peak_current), rel=0.006)
            assert float(many.dc_min[i, j]) == pytest.approx(float(one.dc_min), rel=1e-3)


@pytest.mark.parametrize(("topology", "full_wave"), [("half_wave", False), ("bridge", True)])
def test_small_ripple_limit_approaches_the_textbook_formulas(topology, full_wave):
    # 230 V, a nearly ideal diode (n = 1, Is 1 pA, no Rs) and 10 mΩ: Vr/Vp of 1.5-3 %.
    results = {}
    for R in (0.05, 0.01):
        c = periodic_steady_state(topology, 230.0, 50.0, R, 1e-3, 0.5, 1e-12, 1.0, 0.0, 300.0, max_steps=200_000)
        vp = float(c.dc_max)
        pulses = 2 if full_wave else 1
        vr = 0.5 / (pulses * 50.0 * 1e-3)                       # Sedra & Smith: IL/(f·C), IL/(2f·C)
        angle = math.degrees(math.sqrt(2.0 * vr / vp))          # ω·Δt ≈ √(2Vr/Vp)
        root = math.sqrt(vp / (2.0 * vr)) if full_wave else math.sqrt(2.0 * vp / vr)
        during = 0.5 * (1.0 + math.pi * root)                   # average diode current during conduction
        peak = 0.5 * (1.0 + 2.0 * math.pi * root)
        mine_during = float(c.average_current) / (float(c.conduction_angle_deg) / 360.0)
        falling = 1.0 - float(c.conduction_angle_deg) / (180.0 if full_wave else 360.0)
        results[R] = (float(c.ripple) / vr - 1, float(c.conduction_angle_deg) / angle - 1,
                      mine_during / during - 1, float(c.peak_current) / peak - 1, float(c.ripple) / (vr * falling) - 1)
    ripple, angle, during, peak, ripple_falling = results[0.01]
    # The ripple formula ignores the conduction time (it is of the order of the conduction share, 3-7 %
    # here); with the capacitor falling for (1 − Δθ/period) of each period it holds closely.
    assert abs(ripple) < 0.08 and abs(ripple_falling) < 0.01
    assert abs(angle) < 0.15 and abs(during) < 0.20 and abs(peak) < 0.20
    # and the exact model approaches the formulas (R → 0, the textbook's assumption)
    assert abs(results[0.01][3]) < abs(results[0.05][3]) and abs(results[0.01][1]) < abs(results[0.05][1])
    assert peak < 0.0  # a source resistance can only lower the peak below the ideal-source bound


@pytest.mark.parametrize(("topology", "factor"), [("bridge", 1.0), ("center_tap", 2.0), ("half_wave", 2.0)])
def test_peak_inverse_voltage_per_topology(topology, factor):
    # SPEC §4a: bridge √2·Vac, centre tap and half wave 2·√2·Vac (no load: the capacitor at the crest)
    assert float(peak_inverse_voltage(topology, 100.0)) == pytest.approx(factor * math.sqrt(2) * 100.0, rel=1e-12)
    # the simulated reverse voltage at a light load stays below and near that bound
    c = periodic_steady_state(topology, 100.0, 50.0, 1.0, 470e-6, 1e-3, 1e-9, 1.8, 0.02, 300.0, record=True)
    w = c.waveform
    vc, e = w["capacitor_V"].ravel(), w["source_V"].ravel()  # e: the rectified source for full wave
    worst = np.max((vc + e) / 2.0) if topology == "bridge" else np.max(vc + e)  # the opposite crest
    bound = float(peak_inverse_voltage(topology, 100.0))
    assert worst <= bound * (1 + 1e-9) and worst > 0.97 * bound


def test_bridge_package_power_is_the_sum_of_its_legs():
    model = ForwardModel(2e-9, 1.9, 0.05)
    args = ("bridge", 14.0, 50.0, 0.8, 2200e-6, 1.2, model, 320.0, 20.0)
    package = rectifier_operating_point(*args, 4.0, record=True)
    discrete = rectifier_operating_point(*args, 1.0)
    assert float(package.package_power) == pytest.approx(4.0 * float(package.diode_power), rel=1e-12)
    # the package heats all four legs: Tj = Ta + RthJA·(sum of the legs)
    assert float(package.junction_temperature) == pytest.approx(320.0 + 20.0 * float(package.package_power),
                                                                abs=0.05)
    assert float(package.junction_temperature) > float(discrete.junction_temperature)
    # one leg's power integrated from the recorded waveform with the model: ⟨i·VF(i)⟩ over the source period
    w = package.cycle.waveform
    phase, i = w["phase_rad"].ravel(), w["diode_A"].ravel()
    Is, n, Rs = model.at(float(package.junction_temperature))
    vt = Boltzmann * float(package.junction_temperature) / elementary_charge
    p = i * (n * vt * np.log1p(i / Is) + i * Rs)
    leg = 0.5 * np.trapezoid(p, phase) / np.pi  # each leg: one pulse per source period
    assert float(package.diode_power) == pytest.approx(leg, rel=0.01)


def test_switch_on_surge_matches_solve_ivp():
    # Crest into an empty 4700 µF through 0.5 Ω, bridge, no load, for 8.3 ms.
    vac, R, C, Is, n, Rs, T, dur = 24.0, 0.5, 4.7e-3, 2e-9, 1.9, 0.03, 300.0, 8.3e-3
    got = switch_on_surge("bridge", vac, 50.0, R, C, 0.0, Is, n, Rs, T, dur)
    a = 2 * n * Boltzmann * T / elementary_charge
    vp = math.sqrt(2) * vac
    w = 2 * math.pi * 50.0

    def rhs(t, y):
        i = loadline(abs(vp * math.cos(w * t)) - y[0], R + 2 * Rs, Is, a)
        return [i / C, i * i]

    sol = solve_ivp(rhs, (0.0, dur), [0.0, 0.0], method="RK45", rtol=1e-10, atol=1e-12, max_step=dur / 2000)
    i0 = loadline(vp, R + 2 * Rs, Is, a)
    assert float(got.peak_current) == pytest.approx(i0, rel=1e-6)  # t = 0+: the capacitor a short
    assert float(got.i2t) == pytest.approx(sol.y[1, -1], rel=0.01)


def test_bad_input_names_the_value():
    with pytest.raises(ValueError, match="topology"):
        periodic_steady_state("full", 12.0, 50.0, 1.0, 1e-3, 0.5, 1e-9, 1.8, 0.02, 300.0)
    with pytest.raises(ValueError, match="source_resistance"):
        periodic_steady_state("bridge", 12.0, 50.0, 0.0, 1e-3, 0.5, 1e-9, 1.8, 0.02, 300.0)


def test_a_load_above_what_the_source_can_deliver_has_no_steady_state():
    # Into a short (Vc = 0) the bridge delivers on average about (2/π)·(√2·Vac − 2·VF)/R: the
    # upper bound of any DC load (ideal-diode estimate, common practice) — 14 V behind 100 Ω: ~0.11 A.
    loads = np.array([0.02, 1.0])
    c = periodic_steady_state("bridge", 14.0, 50.0, 100.0, 1e-3, loads, 1e-9, 1.8, 0.02, 300.0)
    assert c.empty.tolist() == [False, True]
    assert np.isfinite(c.dc_min[0]) and np.isnan(c.dc_min[1]) and np.isnan(c.peak_current[1])
    point = rectifier_operating_point("bridge", 14.0, 50.0, 100.0, 1e-3, loads, ForwardModel(1e-9, 1.8, 0.02),
                                      300.0, 50.0, 4.0)
    assert point.empty.tolist() == [False, True] and not point.runaway.any()
