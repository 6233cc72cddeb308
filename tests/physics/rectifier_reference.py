"""Brute-force reference for the rectifier: `scipy.integrate.solve_ivp` over many cycles until the waveform repeats.

Written independently of `partpick.physics.rectifier`: the capacitor ODE
C·dVc/dt = i(e(t) − Vc) − IL is integrated with an adaptive Runge–Kutta method
(LSODA/Radau are not needed: the right-hand side is smooth), the diode current of
each instant from the exact load line with scipy's own `wrightomega`, cycle after
cycle from Vc = 0.9·crest until Vc at the zero crossing repeats to 1e-7 of the
crest; the last cycle is then sampled densely and the metrics read off it.
"""

from __future__ import annotations

import numpy as np
from scipy.constants import Boltzmann, elementary_charge
from scipy.integrate import solve_ivp
from scipy.special import wrightomega


def loadline(vb, r_total, Is, a):
    """Current from a source vb through r_total into a diode of slope voltage a (exact, Banwell & Jayakumar)."""
    z = np.log(Is * r_total / a) + (vb + Is * r_total) / a
    return a / r_total * np.real(wrightomega(z)) - Is


def reference_cycle(topology, vac, f, R, C, IL, Is, n, Rs, T, *, samples=200_001, max_cycles=4000):
    legs = 2 if topology == "bridge" else 1
    full = topology != "half_wave"
    a = legs * n * Boltzmann * T / elementary_charge
    rt = R + legs * Rs
    vp = np.sqrt(2.0) * vac
    period = (0.5 if full else 1.0) / f
    w = 2 * np.pi * f

    def source(t):
        e = vp * np.sin(w * t)
        return np.abs(e) if full else e

    def rhs(t, y):
        return [(loadline(source(t) - y[0], rt, Is, a) - IL) / C]

    v = 0.9 * vp
    for cycle in range(max_cycles):
        sol = solve_ivp(rhs, (0.0, period), [v], method="RK45", rtol=1e-10, atol=1e-12 * vp, max_step=period / 400)
        v_end = float(sol.y[0, -1])
        if abs(v_end - v) < 1e-7 * vp:
            v = v_end
            break
        # Many cycles: accelerate with no trick beyond running them (the reference stays brute force).
        v = v_end
    else:
        raise RuntimeError("reference did not repeat")
    t = np.linspace(0.0, period, samples)
    sol = solve_ivp(rhs, (0.0, period), [v], method="RK45", rtol=1e-10, atol=1e-12 * vp, max_step=period / 400,
                    t_eval=t)
    vc = sol.y[0]
    i = np.maximum(loadline(source(t) - vc, rt, Is, a), 0.0)
    share = 0.5 if full else 1.0
    peak = i.max()
    dt_deg = (180.0 if full else 360.0) / (samples - 1)
    return {
        "dc_min": vc.min(), "dc_max": vc.max(), "ripple": vc.max() - vc.min(), "peak": peak,
        "avg": share * np.trapezoid(i, t) / period,
        "rms": np.sqrt(share * np.trapezoid(i * i, t) / period),
        "angle": np.count_nonzero(i > 0.01 * peak) * dt_deg,
        "cycles": cycle + 1,
    }
