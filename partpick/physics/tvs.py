"""A transient-voltage suppressor clamping a surge: the clamp line, the surge point, the pulse rating.

A TVS in breakdown is modelled as a straight line V = VBR + Rd·I, through the
datasheet's breakdown voltage at its test current IT and its maximum clamping
voltage VC at the peak pulse current IPP. A surge generator of open-circuit
peak Vsurge behind a source resistance drives it; the operating point is
where the generator's line meets the clamp's. The pulse-power rating is given
for one waveform (usually 10/1000 µs) and sometimes a second (8/20 µs); it is
moved to the asked waveform's decay time and derated with temperature.
"""

from __future__ import annotations

import numpy as np

from partpick.physics._validate import finite, nonnegative, positive, scalar_or_array
from partpick.physics.constants import T0_K

__all__ = [
    "PULSE_RANGE_S",
    "ONE_POINT_EXPONENT",
    "breakdown_voltage_at",
    "dynamic_resistance",
    "surge_current",
    "clamp_voltage",
    "pulse_rating_for",
    "derated_pulse_rating",
]

PULSE_RANGE_S = (10e-6, 10e-3)
"""Decay times [s] within which a pulse rating is moved at all; outside, no rating is claimed."""

ONE_POINT_EXPONENT = -0.5
"""Ppp ∝ t^(−1/2) between pulse lengths when a part gives one rating point (common practice, from memory)."""


def breakdown_voltage_at(breakdown_voltage, temperature_coefficient_pct, temperature):
    """VBR at a junction temperature [V], from its 25 °C value and its coefficient.

    Parameters
    ----------
    breakdown_voltage : array_like
        VBR at 25 °C [V].
    temperature_coefficient_pct : array_like
        αVBR [%/K] (positive for avalanche breakdown).
    temperature : array_like
        Junction temperature [K].

    Notes
    -----
    VBR(T) = VBR·(1 + (αVBR/100)·(T − 25 °C)), linear (datasheet practice).
    """
    V = positive("breakdown_voltage", breakdown_voltage)
    a = finite("temperature_coefficient_pct", temperature_coefficient_pct)
    T = positive("temperature", temperature)
    return scalar_or_array(V * (1.0 + (a / 100.0) * (T - T0_K)), breakdown_voltage,
                           temperature_coefficient_pct, temperature)


def dynamic_resistance(clamp_voltage_rated, breakdown_max, peak_current_rated, test_current):
    """Rd = (VC − VBR max)/(IPP − IT) [ohm]: the slope of the clamp line through the datasheet's two points.

    Parameters
    ----------
    clamp_voltage_rated : array_like
        VC [V], the maximum clamping voltage at ``peak_current_rated``.
    breakdown_max : array_like
        VBR max [V] at ``test_current``.
    peak_current_rated : array_like
        IPP [A].
    test_current : array_like
        IT [A], below IPP.

    Raises
    ------
    ValueError
        VC not above VBR max or IPP not above IT (no clamp line through the points).
    """
    VC = positive("clamp_voltage_rated", clamp_voltage_rated)
    VB = positive("breakdown_max", breakdown_max)
    IPP = positive("peak_current_rated", peak_current_rated)
    IT = nonnegative("test_current", test_current)
    if np.any(VC <= VB):
        raise ValueError("clamp_voltage_rated must be above breakdown_max (VC > VBR max)")
    if np.any(IPP <= IT):
        raise ValueError("peak_current_rated must be above test_current (IPP > IT)")
    return scalar_or_array((VC - VB) / (IPP - IT), clamp_voltage_rated, breakdown_max, peak_current_rated,
                           test_current)


def surge_current(surge_voltage, source_resistance, breakdown, resistance):
    """Peak surge current into the clamp [A]: Ip = max(0, (Vsurge − VBR)/(Rsource + Rd)).

    Parameters
    ----------
    surge_voltage : array_like
        Open-circuit peak of the surge generator [V].
    source_resistance : array_like
        Its source resistance [ohm] (2 Ω for the combination wave, 42 Ω with the
        usual coupling network on lines; common practice).
    breakdown : array_like
        VBR of the clamp at its temperature [V].
    resistance : array_like
        Rd of the clamp line [ohm].

    Notes
    -----
    The generator's line V = Vsurge − Rsource·I meets the clamp's V = VBR + Rd·I
    (the test-current offset IT is neglected: it is mA against amperes).
    """
    Vs = nonnegative("surge_voltage", surge_voltage)
    Rsrc = nonnegative("source_resistance", source_resistance)
    VB = positive("breakdown", breakdown)
    Rd = nonnegative("resistance", resistance)
    if np.any(Rsrc + Rd <= 0):
        raise ValueError("source_resistance + resistance must be > 0 (an ideal source into an ideal clamp)")
    return scalar_or_array(np.maximum(0.0, (Vs - VB) / (Rsrc + Rd)), surge_voltage, source_resistance,
                           breakdown, resistance)


def clamp_voltage(breakdown, resistance, current):
    """Clamp voltage [V] at a current: Vc = VBR + Rd·I."""
    VB = positive("breakdown", breakdown)
    Rd = nonnegative("resistance", resistance)
    I = nonnegative("current", current)
    return scalar_or_array(VB + Rd * I, breakdown, resistance, current)


def pulse_rating_for(decay_time, rating, rating_decay, rating2=None, rating2_decay=None):
    """The peak pulse power rating moved to another pulse length [W]; NaN where no rating applies.

    Parameters
    ----------
    decay_time : array_like
        Decay time of the asked waveform (its second figure, e.g. 20 µs of 8/20) [s].
    rating : array_like
        Ppp [W] for a waveform of decay time ``rating_decay`` [s].
    rating2, rating2_decay : array_like, optional
        A second rating point [W] at its decay time [s]; NaN where a part has none.

    Returns
    -------
    float or ndarray
        The rating at ``decay_time``; NaN where ``decay_time`` lies outside
        `PULSE_RANGE_S` (10 µs to 10 ms: the scaling rules mean nothing beyond).

    Notes
    -----
    Two points: a straight line in log P against log t through both,
    P = P1·(t/t1)^k with k = ln(P2/P1)/ln(t2/t1). One point: k = −1/2, the
    usual Ppp ∝ t^(−1/2) of a junction heated from one face (common practice,
    from memory). Pulse energy then grows as t^(1/2).
    """
    t = positive("decay_time", decay_time)
    P1 = positive("rating", rating)
    t1 = positive("rating_decay", rating_decay)
    k = np.full(np.broadcast_shapes(t.shape, P1.shape, t1.shape), ONE_POINT_EXPONENT)
    if rating2 is not None:
        P2 = np.asarray(rating2, dtype=float)
        t2 = np.asarray(rating2_decay, dtype=float)
        two = np.isfinite(P2) & np.isfinite(t2) & (P2 > 0) & (t2 > 0)
        with np.errstate(divide="ignore", invalid="ignore"):
            k2 = np.log(np.where(two, P2, 1.0) / P1) / np.log(np.where(two, t2, 2.0 * t1) / t1)
        two = two & np.isfinite(k2) & (np.where(two, t2, t1) != t1)
        k = np.where(two, k2, k)
    moved = P1 * (t / t1) ** k
    inside = (t >= PULSE_RANGE_S[0] * (1 - 1e-12)) & (t <= PULSE_RANGE_S[1] * (1 + 1e-12))
    return scalar_or_array(np.where(inside, moved, np.nan), decay_time, rating, rating_decay)


def derated_pulse_rating(rating, temperature, tj_max):
    """A 25 °C pulse rating derated linearly to zero at Tj max [W] (full rating at and below 25 °C).

    Notes
    -----
    P(T) = P25·(Tj max − T)/(Tj max − 25 °C), clipped to [0, P25] — the linear
    derating curve TVS datasheets draw (common practice). T is the junction
    temperature before the pulse (the ambient, for a TVS that carries no
    steady current).
    """
    P = nonnegative("rating", rating)
    T = positive("temperature", temperature)
    Tj = positive("tj_max", tj_max)
    if np.any(Tj <= T0_K):
        raise ValueError("tj_max must be above 25 °C")
    return scalar_or_array(P * np.clip((Tj - T) / (Tj - T0_K), 0.0, 1.0), rating, temperature, tj_max)
