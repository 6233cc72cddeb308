"""A coil switched on the low side and its clamp: turn-off current, decay, energies, release time.

The coil is an inductance L in series with its winding resistance R. While the
switch is on, L·di/dt = Vs − R·i. When it opens, the current goes on through the
clamp across the coil (a diode, optionally with a Zener in series), and decays
by

    L·di/dt = −(R·i + Vf(i) + Vz)                                      (1)

with Vf(i) the diode's forward curve and Vz the Zener's voltage (0 for a diode
alone). Equation (1) is autonomous, so time, energies and charge follow from
quadratures over the current, not from stepping in time: with s = ln i,
dt = −L·i·ds/F(i), F(i) = R·i + Vf(i) + Vz, and

    t(i_a → i_b) = ∫ L·i/F(i) ds,  E_diode = ∫ L·i²·Vf(i)/F(i) ds,
    E_zener = ∫ L·i²·Vz/F(i) ds,   E_coil = ∫ L·i³·R/F(i) ds,  ∫i²dt = ∫ L·i³/F(i) ds,
    ∫i dt = ∫ L·i²/F(i) ds

over s from ln i_b to ln i_a (Gauss–Legendre, vectorised over every element of
the inputs). The three energies add up to ½·L·(i_a² − i_b²): the energy stored
in the coil leaves through its resistance, the diode and the Zener.

Repetitive switching faster than the coil decays reaches a periodic steady
state; it is closed by shooting on the current at the start of the on-time
(safeguarded Newton in ln i, vectorised) — never by running many cycles.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from partpick.physics._validate import finite, nonnegative, positive, scalar_or_array
from partpick.physics.constants import BOLTZMANN, ELEMENTARY_CHARGE, ZERO_CELSIUS_K

__all__ = [
    "COPPER_TEMPERATURE_COEFFICIENT",
    "coil_resistance",
    "DiodeDrop",
    "DecayResult",
    "coil_decay",
    "PeriodicState",
    "periodic_state",
    "pulse_temperature_rise",
]

COPPER_TEMPERATURE_COEFFICIENT = 0.00393
"""Resistance temperature coefficient of annealed copper at 20 °C [1/K] (common practice)."""

# Below this share of the starting current the decay is taken as finished: the
# energy left is below 1e-18 of the energy at turn-off.
_FLOOR = 1e-9
# Gauss–Legendre rules in s = ln i. 24 nodes over the whole decay (1e-9·I0 to I0) agree with 32 to
# about 1e-8 for the diode curves of the tests; a part of the decay (to a drop-out current) is shorter in
# ln i and takes 12.
_RULES = {n: np.polynomial.legendre.leggauss(n) for n in (12, 24)}
_NODES, _WEIGHTS = _RULES[24]


def coil_resistance(resistance_20C, ambient, tolerance=0.0):
    """Copper winding resistance at a temperature, at one end of its tolerance.

    Parameters
    ----------
    resistance_20C : array_like
        Nominal winding resistance at 20 °C [ohm].
    ambient : array_like
        Winding temperature [K].
    tolerance : array_like
        Signed relative tolerance [-]: −0.1 is the low end of ±10 %.

    Notes
    -----
    R(T) = R20·(1 + α·(T − 20 °C))·(1 + tolerance), α = 0.00393 /K for copper
    (common practice; the linear law holds within about 1 % from −50 °C to 150 °C).
    """
    R20 = positive("resistance_20C", resistance_20C)
    T = positive("ambient", ambient)
    tol = finite("tolerance", tolerance)
    if np.any(tol <= -1.0):
        raise ValueError(f"tolerance must be above -1, got {float(np.min(tol))!r}")
    factor = 1.0 + COPPER_TEMPERATURE_COEFFICIENT * (T - (ZERO_CELSIUS_K + 20.0))
    if np.any(factor <= 0):
        raise ValueError(f"ambient {float(np.min(T))!r} K is too cold for the linear copper law")
    return scalar_or_array(R20 * factor * (1.0 + tol), resistance_20C, ambient, tolerance)


@dataclass(frozen=True)
class DiodeDrop:
    """A diode's forward voltage Vf(i) = n·VT·ln(1 + i/Is) + i·Rs at a fixed junction temperature.

    Attributes
    ----------
    saturation_current : array_like
        Is at the junction temperature [A].
    ideality : array_like
        n [-].
    series_resistance : array_like
        Rs at the junction temperature [ohm].
    temperature : array_like
        Junction temperature [K].
    """

    saturation_current: np.ndarray
    ideality: np.ndarray
    series_resistance: np.ndarray
    temperature: np.ndarray

    def __post_init__(self) -> None:
        positive("saturation_current", self.saturation_current)
        positive("ideality", self.ideality)
        nonnegative("series_resistance", self.series_resistance)
        positive("temperature", self.temperature)

    @classmethod
    def from_model(cls, model, temperature) -> "DiodeDrop":
        """The drop of a `partpick.physics.junction.ForwardModel` at junction temperature [K]."""
        Is, n, Rs = model.at(temperature)
        shape = np.broadcast_shapes(np.shape(Is), np.shape(n), np.shape(Rs), np.shape(temperature))
        b = lambda x: np.broadcast_to(np.asarray(x, dtype=float), shape)  # noqa: E731
        return cls(b(Is), b(n), b(Rs), b(temperature))

    def __call__(self, current):
        """Vf [V] at ``current`` [A] ≥ 0; the parameters broadcast with ``current``."""
        nVT = np.asarray(self.ideality) * BOLTZMANN * np.asarray(self.temperature) / ELEMENTARY_CHARGE
        return nVT * np.log1p(current / np.asarray(self.saturation_current)) \
            + current * np.asarray(self.series_resistance)

    def expanded(self) -> "DiodeDrop":
        """The same drop with a trailing axis on every parameter (for quadrature nodes)."""
        e = lambda x: np.asarray(x, dtype=float)[..., None]  # noqa: E731
        return DiodeDrop(e(self.saturation_current), e(self.ideality), e(self.series_resistance),
                         e(self.temperature))


class _Constant:
    """A constant clamp drop (the hand model), callable like `DiodeDrop`."""

    def __init__(self, voltage):
        self.voltage = nonnegative("constant drop", voltage)

    def __call__(self, current):
        return np.broadcast_to(self.voltage, np.broadcast_shapes(np.shape(self.voltage), np.shape(current)))

    def expanded(self) -> "_Constant":
        out = _Constant.__new__(_Constant)
        out.voltage = self.voltage[..., None]
        return out


def constant_drop(voltage) -> _Constant:
    """A clamp drop that does not depend on current [V] (the constant-drop hand model)."""
    return _Constant(voltage)


@dataclass(frozen=True)
class DecayResult:
    """The decay of a coil current through its clamp from ``i_start`` to ``i_end`` (arrays broadcast).

    Attributes
    ----------
    time : ndarray
        Time taken [s].
    diode_energy, zener_energy, coil_energy : ndarray
        Energy dissipated in the diode, the Zener and the winding resistance [J].
    current_squared_time : ndarray
        ∫ i² dt [A²·s] (the diode's I²t).
    charge : ndarray
        ∫ i dt [C] (the charge through the diode; times the frequency, its average current).
    """

    time: np.ndarray
    diode_energy: np.ndarray
    zener_energy: np.ndarray
    coil_energy: np.ndarray
    current_squared_time: np.ndarray
    charge: np.ndarray


def _quadrature(inductance, resistance, drop, zener, s_low, s_high, with_energy=True, nodes=24):
    """Gauss–Legendre integrals over s = ln i in [s_low, s_high] (arrays of one broadcast shape)."""
    x, weights = _RULES[nodes]
    half = 0.5 * (s_high - s_low)
    mid = 0.5 * (s_high + s_low)
    s = mid[..., None] + half[..., None] * x
    i = np.exp(s)
    L = inductance[..., None]
    vf = drop(i)
    F = resistance[..., None] * i + vf + zener[..., None]
    g = L * i / F                                         # dt/ds
    w = half[..., None] * weights
    time = np.sum(w * g, axis=-1)
    if not with_energy:
        return time
    wg = w * g * i                                        # L·i²/F·w: i·dt
    charge = np.sum(wg, axis=-1)
    i2t = np.sum(wg * i, axis=-1)
    return DecayResult(time, np.sum(wg * vf, axis=-1), charge * zener, i2t * resistance, i2t, charge)


def _decay_time(inductance, resistance, drop, zener, s_low, s_high):
    """The decay time over [s_low, s_high] (1-D arrays): 12 nodes where the span in ln i is ≤ 7, else 24."""
    short = (s_high - s_low) <= 7.0
    if short.all() or not short.any():
        return _quadrature(inductance, resistance, drop.expanded(), zener, s_low, s_high, with_energy=False,
                           nodes=12 if short.all() else 24)
    out = np.empty(s_low.shape)
    for mask, nodes in ((short, 12), (~short, 24)):
        idx = np.flatnonzero(mask)
        out[idx] = _quadrature(inductance[idx], resistance[idx], _subset(drop, s_low.shape, idx)
                               .expanded(), zener[idx], s_low[idx], s_high[idx], with_energy=False, nodes=nodes)
    return out


def _rate(inductance, resistance, drop, zener, current):
    """dt/ds = L·i/F(i) at one current (drop's parameters without the trailing axis)."""
    return inductance * current / (resistance * current + drop(current) + zener)


def coil_decay(inductance, resistance, drop, i_start, i_end=0.0, zener_voltage=0.0, *,
               with_energy: bool = True) -> DecayResult:
    """Time and energies of the clamp current's decay from ``i_start`` to ``i_end``, equation (1).

    Parameters
    ----------
    inductance : array_like
        L [H], > 0.
    resistance : array_like
        Winding resistance R [ohm], > 0.
    drop : DiodeDrop or the result of `constant_drop`
        The diode's forward voltage as a function of current [V].
    i_start : array_like
        Current at turn-off [A], > 0.
    i_end : array_like
        Current at which to stop [A], 0 ≤ i_end < i_start; 0 means the whole
        decay (taken to 1e-9·i_start, where less than 1e-18 of the energy is left).
    zener_voltage : array_like
        Vz of a Zener in series with the diode [V] (0: diode alone).
    with_energy : bool
        False: only the time (the other fields are None), for a release time.

    Returns
    -------
    DecayResult

    Notes
    -----
    With a constant drop Vc = Vf + Vz the decay is i(t) = (I0 + Vc/R)·e^(−t·R/L) − Vc/R,
    so the time from I0 to Id is (L/R)·ln((I0 + Vc/R)/(Id + Vc/R)) (first-order
    circuit, any circuits textbook); the tests hold the quadrature to it.
    """
    L = positive("inductance", inductance)
    R = positive("resistance", resistance)
    I0 = positive("i_start", i_start)
    Id = nonnegative("i_end", i_end)
    Vz = nonnegative("zener_voltage", zener_voltage)
    if np.any(Id >= I0):
        raise ValueError(f"i_end must be below i_start, got i_end {float(np.max(Id))!r}")
    shape = np.broadcast_shapes(L.shape, R.shape, I0.shape, Id.shape, Vz.shape)
    L, R, I0, Id, Vz = (np.broadcast_to(x, shape) for x in (L, R, I0, Id, Vz))
    s_high = np.log(I0)
    s_low = np.log(np.maximum(Id, I0 * _FLOOR))
    # A decay that stops at 1e-3·I0 or above spans less than 7 in ln i: 12 nodes hold it to ~1e-8.
    nodes = 12 if np.all(s_high - s_low <= 7.0) else 24
    result = _quadrature(L, R, drop.expanded(), Vz, s_low, s_high, with_energy=with_energy, nodes=nodes)
    if not with_energy:
        time = float(result) if np.ndim(result) == 0 and all(np.ndim(x) == 0 for x in (inductance, resistance,
                                                                                       i_start, i_end)) else result
        return DecayResult(time, None, None, None, None, None)
    if all(np.ndim(x) == 0 for x in (inductance, resistance, i_start, i_end, zener_voltage)) \
            and np.ndim(np.asarray(drop(np.float64(1.0)))) == 0:
        return DecayResult(*(float(v) for v in (result.time, result.diode_energy, result.zener_energy,
                                                result.coil_energy, result.current_squared_time, result.charge)))
    return result


@dataclass(frozen=True)
class PeriodicState:
    """The periodic steady state of a coil switched on and off at a fixed frequency and duty.

    Attributes
    ----------
    peak_current : ndarray
        Current at the end of the on-time, i.e. at turn-off [A].
    valley_current : ndarray
        Current at the end of the off-time, still in the clamp at turn-on [A]
        (0 where the coil decays fully within the off-time).
    decay : DecayResult
        The off-time's decay from peak to valley (energies per cycle).
    decays_fully : ndarray of bool
        True where the off-time is longer than the whole decay.
    """

    peak_current: np.ndarray
    valley_current: np.ndarray
    decay: DecayResult
    decays_fully: np.ndarray


def periodic_state(inductance, resistance, drop, supply, frequency, duty, zener_voltage=0.0,
                   *, tolerance=1e-9, max_iterations=60) -> PeriodicState:
    """Peak and valley currents of a coil switched repetitively, and the clamp's energies per cycle.

    Parameters
    ----------
    inductance, resistance : array_like
        L [H] and winding R [ohm].
    drop : DiodeDrop or constant drop
        The clamp diode's Vf(i) [V].
    supply : array_like
        Supply voltage during the on-time [V] (the switch's own drop neglected).
    frequency : array_like
        Switching frequency [Hz], > 0.
    duty : array_like
        On-time share of the period [-], 0 < duty < 1.
    zener_voltage : array_like
        Series Zener voltage [V] (0: diode alone).

    Returns
    -------
    PeriodicState

    Notes
    -----
    On-time (closed form): i_p = Vs/R + (i_v − Vs/R)·e^(−t_on·R/L).
    Off-time: the decay (1) from i_p for t_off = (1 − duty)/f ends at i_v.
    The cycle closes where t(i_p(i_v) → i_v) = t_off; this is solved for
    x = ln i_v by Newton steps kept inside a shrinking bracket (bisection when
    a step leaves it), vectorised over all elements. Where even a start from
    zero current decays fully within t_off, i_v = 0 (the clamp current stops
    before the next turn-on).

    Raises
    ------
    RuntimeError
        The shooting did not converge within ``max_iterations``.
    """
    L = positive("inductance", inductance)
    R = positive("resistance", resistance)
    Vs = positive("supply", supply)
    f = positive("frequency", frequency)
    D = finite("duty", duty)
    Vz = nonnegative("zener_voltage", zener_voltage)
    if np.any((D <= 0) | (D >= 1)):
        raise ValueError(f"duty must be within (0, 1), got {float(D.flat[0])!r}")
    shape = np.broadcast_shapes(L.shape, R.shape, Vs.shape, f.shape, D.shape, Vz.shape, _drop_shape(drop))
    # Flat 1-D working arrays (the shooting works on the still-open elements only).
    L, R, Vs, f, D, Vz = (np.broadcast_to(x, shape).astype(float).ravel() for x in (L, R, Vs, f, D, Vz))
    flat_drop = _subset(drop, shape, np.arange(int(np.prod(shape))))
    t_on = D / f
    t_off = (1.0 - D) / f
    final = Vs / R
    k = np.exp(-t_on * R / L)

    def peak(valley):
        return final + (valley - final) * k

    # From zero current: does the coil decay fully within the off-time?
    p0 = peak(np.zeros_like(final))
    s_top = np.log(p0)
    from_zero = _quadrature(L, R, flat_drop.expanded(), Vz, s_top + np.log(_FLOOR), s_top)
    decays_fully = from_zero.time <= t_off
    # Unknown x = ln i_v in (ln(floor·p0), ln final): residual t(p(v) → v) − t_off falls from > 0 to < 0.
    lo = s_top + np.log(_FLOOR)
    hi = np.log(final)
    # Start from the cycle with a constant clamp drop Vc = Vf(p0) + Vz, which closes in closed form:
    # v = ((Vs/R)(1 − k) + Vc/R)·e − Vc/R over (1 − k·e), e = exp(−t_off·R/L) (first-order RL circuit).
    vc_R = (np.asarray(flat_drop(p0), dtype=float) + Vz) / R
    e = np.exp(-t_off * R / L)
    guess = ((final * (1.0 - k) + vc_R) * e - vc_R) / (1.0 - k * e)
    x = np.clip(np.log(np.maximum(guess, p0 * 1e-3)), lo, hi - 1e-9)
    active = np.flatnonzero(~decays_fully)
    for _ in range(max_iterations):
        if active.size == 0:
            break
        xa = x[active]
        va = np.exp(xa)
        Ra, La, Vza, ka = R[active], L[active], Vz[active], k[active]
        pa = final[active] + (va - final[active]) * ka
        sub = _subset(flat_drop, final.shape, active)
        r = _decay_time(La, Ra, sub, Vza, xa, np.log(pa)) - t_off[active]
        # d/dx of the decay time from p(v) to v, x = ln v: g(ln p)·k·v/p − g(x), g = dt/ds = L·i/F(i).
        slope = _rate(La, Ra, sub, Vza, pa) * ka * va / pa - _rate(La, Ra, sub, Vza, va)
        lo_a = np.where(r > 0, xa, lo[active])
        hi_a = np.where(r <= 0, xa, hi[active])
        with np.errstate(divide="ignore", invalid="ignore"):
            new = xa - r / slope
        outside = ~np.isfinite(new) | (new <= lo_a) | (new >= hi_a)
        new = np.where(outside, 0.5 * (lo_a + hi_a), new)
        # Closed at this point: keep it (a step from an exact root may land on the bracket's end).
        closed = np.abs(r) <= tolerance * t_off[active]
        new = np.where(closed, xa, new)
        done = closed | (np.abs(new - xa) < tolerance)
        x[active], lo[active], hi[active] = new, lo_a, hi_a
        active = active[~done]
    else:
        if active.size:
            raise RuntimeError(f"periodic_state: shooting did not converge in {max_iterations} iterations "
                               f"for {active.size} elements")
    valley = np.where(decays_fully, 0.0, np.exp(x))
    peak_current = peak(valley)
    # Where the coil decays fully, the decay from zero is the cycle's; elsewhere from the peak to the valley.
    fields = ("time", "diode_energy", "zener_energy", "coil_energy", "current_squared_time", "charge")
    columns = {f: np.array(getattr(from_zero, f), dtype=float) for f in fields}
    rest = np.flatnonzero(~decays_fully)
    if rest.size:
        part = _quadrature(L[rest], R[rest], _subset(flat_drop, final.shape, rest).expanded(), Vz[rest],
                           np.log(np.maximum(valley[rest], peak_current[rest] * _FLOOR)), np.log(peak_current[rest]))
        for f in fields:
            columns[f][rest] = getattr(part, f)
    decay = DecayResult(*(columns[f].reshape(shape) for f in fields))
    back = lambda a: a.reshape(shape)  # noqa: E731
    return PeriodicState(back(peak_current), back(valley), decay, back(decays_fully))


def _drop_shape(drop) -> tuple:
    if isinstance(drop, _Constant):
        return np.shape(drop.voltage)
    return np.broadcast_shapes(*(np.shape(x) for x in (drop.saturation_current, drop.ideality,
                                                        drop.series_resistance, drop.temperature)))


def _subset(drop, shape, idx):
    """The drop's parameters broadcast to ``shape`` and taken at the flat indices ``idx``."""
    if isinstance(drop, _Constant):
        return _Constant(np.broadcast_to(drop.voltage, shape).flat[idx])
    b = lambda x: np.broadcast_to(np.asarray(x, dtype=float), shape).flat[idx]  # noqa: E731
    return DiodeDrop(b(drop.saturation_current), b(drop.ideality), b(drop.series_resistance),
                     b(drop.temperature))


def pulse_temperature_rise(power, duration, thermal_resistance, time_constant):
    """Junction temperature rise of a rectangular power pulse [K].

    Parameters
    ----------
    power : array_like
        Pulse power [W], ≥ 0.
    duration : array_like
        Pulse length [s], ≥ 0.
    thermal_resistance : array_like
        Steady junction-to-ambient RthJA [K/W].
    time_constant : array_like
        Thermal time constant τ [s]; 0 means "not known": the steady RthJA is
        used (conservative).

    Notes
    -----
    ΔTj = P·Zth(t), Zth(t) = RthJA·min(1, √(t/τ)). The √t law is the
    one-dimensional heat flow into a semi-infinite body at constant power
    (Carslaw & Jaeger, *Conduction of Heat in Solids*, from memory); capping
    it at the steady RthJA is common practice for single pulses.
    """
    P = nonnegative("power", power)
    t = nonnegative("duration", duration)
    Rth = positive("thermal_resistance", thermal_resistance)
    tau = nonnegative("time_constant", time_constant)
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.where(tau > 0, np.sqrt(t / np.where(tau > 0, tau, 1.0)), 1.0)
    return scalar_or_array(P * Rth * np.minimum(1.0, share), power, duration, thermal_resistance, time_constant)
