"""Independent reference solutions for the checker tests, written from the equations of SPEC §3.

Nothing here calls partpick: each corner is solved on its own with scipy's
bracketed root finder `brentq`, and the Zener ΔV integral with `quad`.
"""

from __future__ import annotations

import math

from scipy import constants
from scipy.integrate import quad
from scipy.optimize import brentq

K_B, Q = constants.k, constants.e  # CODATA, as SPEC §3 asks
T0 = constants.zero_Celsius + 25.0


def saturation_current(is0, T, n, eg, m):
    """Is(T) = Is(T0)·(T/T0)^(m/n)·exp((Eg·q/(n·k))·(1/T0 − 1/T)) (standard junction model, Sze)."""
    return is0 * (T / T0) ** (m / n) * math.exp(eg * Q / (n * K_B) * (1 / T0 - 1 / T))


def forward_voltage(I, T, is0, n, rs, eg=1.11, m=3.0, p=0.0):
    """Shockley with series resistance: V = n·VT·ln(1 + I/Is(T)) + I·Rs·(T/T0)^p."""
    return n * K_B * T / Q * math.log1p(I / saturation_current(is0, T, n, eg, m)) + I * rs * (T / T0) ** p


def steady_junction(I, Ta, rth, **model):
    """Self-heated forward Tj [K]: the root of T − Ta − Rth·I·V(I, T) (brentq)."""
    return brentq(lambda T: T - Ta - rth * I * forward_voltage(I, T, **model), Ta, Ta + 1500.0, xtol=1e-12)


def leakage(T, VR, ir, ir_vr, ir_t, d=10.0):
    """Datasheet IR doubled every d kelvin, scaled with VR above the rated VR (SPEC §3)."""
    return ir * 2.0 ** ((T - ir_t) / d) * max(1.0, VR / ir_vr)


def reverse_junction(Ta, rth, VR, **leak):
    """The stable reverse-state Tj [K] (the lowest root of T − Ta − Rth·VR·IR(T)), or None when there is none.

    g(T) = T − Ta − Rth·VR·IR(T) is concave (IR is exponential); it has a maximum where g'(T) = 0, i.e.
    Rth·VR·IR(T)·ln2/d = 1. A stable root exists when g at that maximum is ≥ 0.
    """
    d = leak.get("d", 10.0)
    c = math.log(2.0) / d
    p0 = VR * leakage(Ta, VR, **leak)
    if p0 == 0:
        return Ta
    # IR(T) = IR(Ta)·e^(c(T − Ta)); g' = 0 at T* = Ta + ln(1/(c·Rth·P0))/c.
    t_star = Ta + math.log(1.0 / (c * rth * p0)) / c
    g = lambda T: T - Ta - rth * VR * leakage(T, VR, **leak)  # noqa: E731
    if t_star <= Ta or g(t_star) < 0:
        return None
    return brentq(g, Ta, t_star, xtol=1e-12)


def zener_impedance(I, izt, zzt, izk, zzk):
    """Z(Iz) of SPEC §3: Zzt above Izt; ln Z linear in ln Iz from Zzk at Izk to Zzt at Izt."""
    if I >= izt:
        return zzt
    s = (math.log(I) - math.log(izk)) / (math.log(izt) - math.log(izk))
    return math.exp(math.log(zzk) + s * (math.log(zzt) - math.log(zzk)))


def zener_delta_v(I, izt, zzt, izk, zzk):
    """ΔV(Iz) = ∫ from Izt to Iz of Z dI (numerical quadrature)."""
    value, _ = quad(lambda x: zener_impedance(x, izt, zzt, izk, zzk), izt, I, epsabs=1e-13, epsrel=1e-12)
    return value


def zener_voltage_self_heated(Iz, Ta, rth, vz0, alpha, **shape):
    """Vz(Iz, Tj) with Tj = Ta + Vz·Iz·Rth, solved by brentq on Vz."""
    dv = zener_delta_v(Iz, **shape)

    def f(V):
        tj = Ta + V * Iz * rth
        return vz0 * (1 + alpha * (tj - T0)) + dv - V

    return brentq(f, 0.2 * vz0, 5.0 * vz0, xtol=1e-13)


def shunt_point(Vs, R, IL, Ta, rth, vz0, alpha, **shape):
    """(Vout, Iz, Tj) of the shunt regulator at one point, Iz ≥ Izk assumed (brentq on Iz)."""
    izk = shape["izk"]

    def h(Iz):
        return Vs - R * (Iz + IL) - zener_voltage_self_heated(Iz, Ta, rth, vz0, alpha, **shape)

    hi = Vs / R
    Iz = brentq(h, izk, hi, xtol=1e-15)
    V = zener_voltage_self_heated(Iz, Ta, rth, vz0, alpha, **shape)
    return V, Iz, Ta + V * Iz * rth
