"""Junction temperature: allowed power, forward self-heating, reverse runaway.

JEDEC JESD51 defines RthJA on a standard board in still air; Tj = Ta + P·RthJA.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.special import lambertw

from partpick.physics._validate import nonnegative, positive, scalar_or_array
from partpick.physics.constants import BOLTZMANN, ELEMENTARY_CHARGE, T0_K
from partpick.physics.junction import ForwardModel

__all__ = [
    "allowed_power",
    "blocking_state",
    "derated_current",
    "thermal_resistance_from_rating",
    "power_rating_from_thermal_resistance",
    "ForwardOperatingPoint",
    "self_heated_forward",
    "ReverseState",
    "reverse_thermal_state",
]


def allowed_power(ambient, power_rating, tj_max, reference_temperature):
    """Allowed dissipation at an ambient: flat to the rating temperature, then linear to zero at Tj max.

    Parameters
    ----------
    ambient : array_like
        Ambient temperature Ta [K].
    power_rating : array_like
        Pd [W] at and below ``reference_temperature``.
    tj_max : array_like
        Maximum junction temperature [K].
    reference_temperature : array_like
        Temperature up to which Pd applies (``pd_ref_C``) [K].

    Returns
    -------
    float or ndarray
        Pallow [W], ≥ 0.

    Notes
    -----
    Pallow(Ta) = Pd for Ta ≤ Tref, Pd·(Tj max − Ta)/(Tj max − Tref) above, 0 beyond
    Tj max (the linear derating curve of datasheets; JEDEC JESD51).
    """
    Ta = positive("ambient", ambient)
    Pd = nonnegative("power_rating", power_rating)
    Tj = positive("tj_max", tj_max)
    Tref = positive("reference_temperature", reference_temperature)
    if np.any(Tj <= Tref):
        raise ValueError(f"tj_max must be above reference_temperature, got {float(np.min(Tj))!r}")
    fraction = np.clip((Tj - Ta) / (Tj - Tref), 0.0, 1.0)
    return scalar_or_array(Pd * fraction, ambient, power_rating, tj_max, reference_temperature)


def derated_current(ambient, current_rating, tj_max, reference_temperature):
    """IF(AV) derated the same way as power above its rating temperature [A]; see `allowed_power`."""
    return allowed_power(ambient, current_rating, tj_max, reference_temperature)


def thermal_resistance_from_rating(power_rating, tj_max, reference_temperature):
    """RthJA = (Tj max − Tref)/Pd [K/W] for a part that gives only Pd."""
    Pd = positive("power_rating", power_rating)
    Tj = positive("tj_max", tj_max)
    Tref = positive("reference_temperature", reference_temperature)
    return scalar_or_array((Tj - Tref) / Pd, power_rating, tj_max, reference_temperature)


def power_rating_from_thermal_resistance(thermal_resistance, tj_max, reference_temperature):
    """Pd = (Tj max − Tref)/RthJA [W] for a part that gives only RthJA."""
    Rth = positive("thermal_resistance", thermal_resistance)
    Tj = positive("tj_max", tj_max)
    Tref = positive("reference_temperature", reference_temperature)
    return scalar_or_array((Tj - Tref) / Rth, thermal_resistance, tj_max, reference_temperature)


@dataclass(frozen=True)
class ForwardOperatingPoint:
    """Self-heated forward state: arrays of the broadcast shape.

    Attributes
    ----------
    voltage : ndarray
        Forward voltage [V] at the solved junction temperature.
    junction_temperature : ndarray
        Tj [K]; NaN where ``runaway``.
    power : ndarray
        I·V [W].
    runaway : ndarray of bool
        True where Tj = Ta + P(Tj)·RthJA has no solution below 1500 K (forward
        thermal runaway, or a balance no datasheet part could survive).
    """

    voltage: np.ndarray
    junction_temperature: np.ndarray
    power: np.ndarray
    runaway: np.ndarray


# Beyond this junction temperature the model is far outside any datasheet and
# the iteration is declared a runaway rather than followed further.
_RUNAWAY_TEMPERATURE_K = 1500.0


def self_heated_forward(model: ForwardModel, current, ambient, thermal_resistance,
                        *, tolerance=1e-3, max_iterations=60) -> ForwardOperatingPoint:
    """Solve Tj = Ta + I·V(I, Tj)·RthJA for the forward state, vectorised.

    Parameters
    ----------
    model : ForwardModel
        The part's forward branch (attributes broadcast with the other inputs).
    current : array_like
        Forward current [A], ≥ 0.
    ambient : array_like
        Ambient temperature [K].
    thermal_resistance : array_like
        RthJA [K/W], ≥ 0.
    tolerance : float
        Largest Newton step [K] at which the iteration stops; the error left is
        of the order of the square of that step times Rth·I·|∂²V/∂T²|/2.

    Returns
    -------
    ForwardOperatingPoint

    Notes
    -----
    Newton's method on g(T) = T − Ta − Rth·I·V(I, T), with
    g'(T) = 1 − Rth·I·∂V/∂T (see `ForwardModel.voltage_temperature_slope`). At
    small currents ∂V/∂T < 0 and the root is unique and stable; where Rs rises
    with temperature enough that Rth·I·∂V/∂T ≥ 1, the fixed point is lost
    (runaway). Plain fixed-point iteration converges only linearly, at rate
    Rth·I·|∂V/∂T|. The loop evaluates V and ∂V/∂T together from the temperature
    laws of `saturation_current_at` and `series_resistance_at` written out
    inline (one pass of transcendental functions per iteration), since the
    inputs were validated once on entry.
    """
    I = nonnegative("current", current)
    Ta = positive("ambient", ambient)
    Rth = nonnegative("thermal_resistance", thermal_resistance)
    Is0 = np.asarray(model.saturation_current, dtype=float)
    n = np.asarray(model.ideality, dtype=float)
    Rs0 = np.asarray(model.series_resistance, dtype=float)
    Eg = np.asarray(model.band_gap, dtype=float)
    m = np.asarray(model.temperature_exponent, dtype=float)
    p = np.asarray(model.rs_temperature_exponent, dtype=float)
    shape = np.broadcast_shapes(I.shape, Ta.shape, Rth.shape, Is0.shape, n.shape, Rs0.shape, Eg.shape,
                                m.shape, p.shape)
    k_q = BOLTZMANN / ELEMENTARY_CHARGE
    conducting = I > 0
    # Log domain: with e = Is/I, ln(1 + I/Is) = ln(I/Is) + ln(1 + e) and I/(I + Is) = 1/(1 + e),
    # so each iteration needs one ln T, one exp and one log1p (and T^p where Rs varies).
    # ln(I/Is(T)) = c1 − a·ln(T/T0) + b/T with a = m/n, b = Eg·q/(n·k), c1 = ln I − ln Is0 − b/T0.
    a = m / n
    b = Eg / (n * k_q)
    c1 = np.broadcast_to(np.log(np.where(conducting, I, 1.0)) - np.log(Is0) - b / T0_K, shape).copy()
    nk = n * k_q
    rs_varies = bool(np.any(p != 0))
    I_Rth = I * Rth
    I_Rs0 = I * Rs0

    def voltage_and_slope(T):
        log_t = np.log(T * (1.0 / T0_K))
        inv_t = 1.0 / T
        ln_ratio = c1 - a * log_t + b * inv_t
        e = np.exp(-ln_ratio)
        L = ln_ratio + np.log1p(e)
        nkL = nk * L
        dV = nkL - nk * (a + b * inv_t) / (1.0 + e)
        if rs_varies:
            i_rs = I_Rs0 * np.exp(p * log_t)
            V = nkL * T + i_rs
            dV += i_rs * p * inv_t
        else:
            V = nkL * T + I_Rs0
        return V, dV

    T = np.broadcast_to(Ta, shape).astype(float)
    runaway = np.zeros(shape, dtype=bool)
    any_off = not conducting.all()
    for _ in range(max_iterations):
        V, dV = voltage_and_slope(T)
        if any_off:
            V = np.where(conducting, V, 0.0)
            dV = np.where(conducting, dV, 0.0)
        g = T - Ta - I_Rth * V          # g(Ta) ≤ 0 always
        dg = 1.0 - I_Rth * dV
        rising = dg > 0
        # No root at or below the cut-off: g still negative where it has stopped rising,
        # or at the cut-off itself.
        runaway |= (g < 0) & (~rising | (T >= _RUNAWAY_TEMPERATURE_K))
        if rising.all():
            step = g / dg
        else:
            # past the root on a falling stretch of g: fall back halfway towards Ta
            step = np.where(rising, g / np.where(rising, dg, 1.0), 0.5 * (T - Ta))
        step[runaway] = 0.0
        T = np.clip(T - step, 0.5 * Ta, _RUNAWAY_TEMPERATURE_K)
        # Newton converges quadratically: after a step δ the error left is about
        # |g''/(2g')|·δ², below 1e-6 K for δ < tolerance on any datasheet part.
        if np.max(np.abs(step)) < tolerance:
            break
    else:
        raise RuntimeError("self_heated_forward: Newton iteration on Tj did not converge")
    # V at the final T to first order in the last (sub-tolerance) step.
    V = V - dV * step
    Tj = np.where(runaway, np.nan, T)
    return ForwardOperatingPoint(voltage=V, junction_temperature=Tj, power=I * V, runaway=runaway)


@dataclass(frozen=True)
class ReverseState:
    """Reverse-state thermal equilibrium of a blocking diode.

    Attributes
    ----------
    junction_temperature : ndarray
        The stable solution of Tj = Ta + PR(Tj)·RthJA [K]; NaN where none exists.
    unstable_temperature : ndarray
        The unstable solution [K] (above it the junction runs away); +inf where
        PR is zero, NaN where no solution exists.
    runaway : ndarray of bool
        True where no stable solution exists.
    loop_gain : ndarray
        RthJA·dPR/dTj at the stable solution [-] (< 1 when stable).
    """

    junction_temperature: np.ndarray
    unstable_temperature: np.ndarray
    runaway: np.ndarray
    loop_gain: np.ndarray


def reverse_thermal_state(reverse_power_at_ambient, doubling_interval, ambient, thermal_resistance) -> ReverseState:
    """Equilibrium junction temperature of a blocking diode whose leakage doubles every ``doubling_interval``.

    Parameters
    ----------
    reverse_power_at_ambient : array_like
        PR = VR·IR(Ta) with the junction at ambient [W].
    doubling_interval : array_like
        Temperature rise that doubles the leakage [K].
    ambient : array_like
        Ta [K].
    thermal_resistance : array_like
        RthJA [K/W].

    Returns
    -------
    ReverseState

    Notes
    -----
    With PR(Tj) = P0·2^((Tj − Ta)/d) and x = Tj − Ta, the balance x = Rth·P0·e^(c·x),
    c = ln 2/d, has the solutions x = −W(−a)/c with a = c·Rth·P0: the principal
    branch W0 gives the stable point, W−1 the unstable one, and for a > 1/e there
    is none (thermal runaway). The loop gain Rth·dPR/dTj at the stable point is
    c·x = −W0(−a) < 1.
    """
    P0 = nonnegative("reverse_power_at_ambient", reverse_power_at_ambient)
    d = positive("doubling_interval", doubling_interval)
    Ta = positive("ambient", ambient)
    Rth = nonnegative("thermal_resistance", thermal_resistance)
    P0, d, Ta, Rth = np.broadcast_arrays(P0, d, Ta, Rth)
    c = np.log(2.0) / d
    a = c * Rth * P0
    runaway = a > np.exp(-1.0)
    arg = -np.where(runaway, 0.0, a)
    w0 = np.real(lambertw(arg, 0))
    with np.errstate(divide="ignore"):
        wm1 = np.where(arg < 0, np.real(lambertw(np.where(arg < 0, arg, -0.1), -1)), -np.inf)
    stable = Ta - w0 / c
    unstable = Ta - wm1 / c
    tj = np.where(runaway, np.nan, stable)
    unstable = np.where(runaway, np.nan, unstable)
    gain = np.where(runaway, np.nan, -w0)
    out = [scalar_or_array(x, reverse_power_at_ambient, doubling_interval, ambient, thermal_resistance)
           for x in (tj, unstable, runaway, gain)]
    return ReverseState(out[0], out[1], bool(out[2]) if np.ndim(out[2]) == 0 else out[2], out[3])


def blocking_state(law, reverse_voltage, ambient, thermal_resistance, power_per_ampere=None) -> ReverseState:
    """Equilibria of Tj = Ta + VR·IR(VR, Tj)·RthJA for a `partpick.physics.leakage.LeakageLaw`, vectorised.

    Parameters
    ----------
    law : LeakageLaw
        The parts' leakage against temperature (one or two exponential segments).
    reverse_voltage : array_like
        Continuous reverse voltage [V].
    ambient : array_like
        Ta [K].
    thermal_resistance : array_like
        RthJA [K/W].
    power_per_ampere : array_like, optional
        PR per ampere of the law's leakage at its test voltage [W/A], for a reverse voltage that
        varies (an AC rectifier's cycle average ⟨vr·max(1, vr/VR0)⟩); replaces VR·max(1, VR/VR0).

    Returns
    -------
    ReverseState
        The stable solution (NaN where none exists: runaway from any start), the
        unstable one (a junction that starts at or above it runs away; +inf where
        there is no leakage), and the loop gain RthJA·dPR/dTj at the stable point.

    Notes
    -----
    On each segment PR = A·e^(c·(T − Tref)), so with u = Tj − Ta the balance is
    u = K·e^(c·u), K = RthJA·A·e^(c·(Ta − Tref)), solved in closed form: u = −W(−c·K)/c,
    principal branch and branch −1 (Lambert W), none where c·K > 1/e. A root counts
    where it lies on its own segment. The law is convex (the hot segment is the
    steeper), so there are at most two roots: the lower is stable, the upper unstable.
    """
    VR = nonnegative("reverse_voltage", reverse_voltage)
    Ta = positive("ambient", ambient)
    Rth = nonnegative("thermal_resistance", thermal_resistance)
    scale = VR * np.maximum(1.0, VR / law.rated_voltage)
    if power_per_ampere is not None:
        scale = nonnegative("power_per_ampere", power_per_ampere)
    hot = law.hot_temperature
    c1 = np.log(2.0) / law.low_interval
    c2 = np.log(2.0) / law.high_interval
    at_hot = law.rated_current * np.exp2((np.where(np.isfinite(hot), hot, law.rated_temperature)
                                          - law.rated_temperature) / law.low_interval)
    segments = ((law.rated_current, law.rated_temperature, c1, lambda T: T <= hot),
                (at_hot, np.where(np.isfinite(hot), hot, law.rated_temperature), c2,
                 lambda T: np.isfinite(hot) & (T > hot)))
    roots, rates = [], []
    for amplitude, reference, c, on_segment in segments:
        with np.errstate(over="ignore", invalid="ignore"):
            K = Rth * scale * amplitude * np.exp(c * (Ta - reference))
        a = c * K
        solvable = np.isfinite(a) & (a <= np.exp(-1.0))
        arg = -np.where(solvable, a, 0.0)
        w0 = np.real(lambertw(arg, 0))
        with np.errstate(divide="ignore", invalid="ignore"):
            wm1 = np.where(arg < 0, np.real(lambertw(np.where(arg < 0, arg, -0.1), -1)), -np.inf)
        for w in (w0, wm1):
            T = Ta - w / c
            valid = solvable & on_segment(T)
            roots.append(np.where(valid, T, np.inf))
            rates.append(np.broadcast_to(c, np.shape(T)))
    table = np.stack(np.broadcast_arrays(*roots), axis=-1)
    rate_table = np.stack(np.broadcast_arrays(*rates), axis=-1)
    order = np.argsort(table, axis=-1)
    ranked = np.take_along_axis(table, order, axis=-1)
    stable = ranked[..., 0]
    unstable = ranked[..., 1]
    runaway = ~np.isfinite(stable)
    rate = np.take_along_axis(rate_table, order[..., :1], axis=-1)[..., 0]
    no_leak = np.broadcast_to(scale * law.rated_current * Rth == 0, stable.shape)
    stable = np.where(no_leak, np.broadcast_to(Ta, stable.shape), stable)
    unstable = np.where(no_leak, np.inf, unstable)
    runaway = runaway & ~no_leak
    tj = np.where(runaway, np.nan, stable)
    gain = np.where(runaway, np.nan, np.where(no_leak, 0.0, rate * (tj - Ta)))
    unstable = np.where(runaway, np.nan, unstable)
    return ReverseState(tj, unstable, runaway, gain)
