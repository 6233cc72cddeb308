"""Reverse leakage from the datasheet's maximum IR, scaled in temperature and voltage.

Real leakage is set by surface and bulk generation paths and is orders of
magnitude above the ideal saturation current, so it is taken from the
datasheet, not from Is.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from partpick.physics._validate import nonnegative, positive, scalar_or_array

__all__ = ["reverse_current", "LeakageLaw", "leakage_law"]


def reverse_current(rated_current, rated_voltage, rated_temperature, reverse_voltage, temperature,
                    doubling_interval=10.0):
    """Reverse leakage at a reverse voltage and junction temperature.

    Parameters
    ----------
    rated_current : array_like
        Datasheet maximum IR [A] at ``rated_voltage`` and ``rated_temperature``.
    rated_voltage : array_like
        VR of that figure [V].
    rated_temperature : array_like
        Tj of that figure [K].
    reverse_voltage : array_like
        Applied reverse voltage [V], ≥ 0.
    temperature : array_like
        Junction temperature [K].
    doubling_interval : array_like
        Temperature rise that doubles the leakage [K]; 10 K is common practice,
        the real interval depends on mechanism and device.

    Returns
    -------
    float or ndarray
        IR [A].

    Notes
    -----
    IR = IR,rated·2^((T − T_rated)/d)·max(1, VR/VR,rated): doubling every d kelvin,
    and in proportion to voltage above the rated VR (below it the rated figure is
    kept, which errs on the safe side).
    """
    I0 = nonnegative("rated_current", rated_current)
    V0 = positive("rated_voltage", rated_voltage)
    T0 = positive("rated_temperature", rated_temperature)
    VR = nonnegative("reverse_voltage", reverse_voltage)
    T = positive("temperature", temperature)
    d = positive("doubling_interval", doubling_interval)
    result = I0 * np.exp2((T - T0) / d) * np.maximum(1.0, VR / V0)
    return scalar_or_array(result, rated_current, rated_voltage, rated_temperature, reverse_voltage,
                           temperature, doubling_interval)


@dataclass(frozen=True)
class LeakageLaw:
    """Reverse leakage against temperature from one or two datasheet points (SPEC §3).

    IR(VR, T) = f(VR)·I0·2^((T − T0)/d_low) up to the hot point Th, and
    f(VR)·Ih·2^((T − Th)/d_high) above it, with f(VR) = max(1, VR/V0): in
    proportion to voltage above the datasheet's test voltage, held at the datasheet
    value below it. With a hot point (Ih at Th, same V0) the doubling interval
    between the two points is d_two = (Th − T0)·ln 2/ln(Ih/I0), and above Th the
    law steepens to d_high = min(d_two, d); without one, d_low = d_high = d
    everywhere (Th = +inf). Since d_high ≤ d_low the law is convex in T.

    Attributes
    ----------
    rated_current, rated_voltage, rated_temperature : ndarray
        I0 [A] at V0 [V] and T0 [K].
    hot_current, hot_temperature : ndarray
        Ih [A] and Th [K]; Th = +inf where the part gives no hot point.
    low_interval, high_interval : ndarray
        d_low and d_high [K].
    two_point : ndarray of bool
        Where the interval came from the two datasheet points.
    """

    rated_current: np.ndarray
    rated_voltage: np.ndarray
    rated_temperature: np.ndarray
    hot_current: np.ndarray
    hot_temperature: np.ndarray
    low_interval: np.ndarray
    high_interval: np.ndarray
    two_point: np.ndarray

    def current(self, reverse_voltage, temperature) -> np.ndarray:
        """IR [A] at reverse voltage [V] and junction temperature [K] (arrays broadcast)."""
        T = np.asarray(temperature, dtype=float)
        scale = np.maximum(1.0, np.asarray(reverse_voltage, dtype=float) / self.rated_voltage)
        below = self.rated_current * np.exp2((np.minimum(T, self.hot_temperature) - self.rated_temperature)
                                             / self.low_interval)
        above = np.exp2(np.maximum(T - self.hot_temperature, 0.0) / self.high_interval)
        return scale * below * np.where(np.isfinite(self.hot_temperature), above, 1.0)


def leakage_law(rated_current, rated_voltage, rated_temperature, doubling_interval=10.0,
                hot_current=np.nan, hot_temperature=np.nan) -> LeakageLaw:
    """The `LeakageLaw` of parts (arrays broadcast; NaN hot values: no hot point).

    Parameters
    ----------
    rated_current, rated_voltage, rated_temperature : array_like
        Datasheet maximum IR [A] at VR [V] and Tj [K].
    doubling_interval : array_like
        The part's ``ir_double_K`` or the 10 K default [K] (common practice).
    hot_current, hot_temperature : array_like
        The datasheet's hot maximum IR [A] at Tj [K] (same VR); NaN where not given.
        A hot point must lie above the rated one in both (validated by the library).
    """
    I0 = nonnegative("rated_current", rated_current)
    V0 = positive("rated_voltage", rated_voltage)
    T0 = positive("rated_temperature", rated_temperature)
    d = positive("doubling_interval", doubling_interval)
    Ih = np.asarray(hot_current, dtype=float)
    Th = np.asarray(hot_temperature, dtype=float)
    I0, V0, T0, d, Ih, Th = np.broadcast_arrays(I0, V0, T0, d, Ih, Th)
    two = np.isfinite(Ih) & np.isfinite(Th) & (Th > T0) & (Ih > I0) & (I0 > 0)
    with np.errstate(divide="ignore", invalid="ignore"):
        d_two = np.where(two, (Th - T0) * np.log(2.0) / np.log(np.where(two, Ih / np.where(I0 > 0, I0, 1.0), 2.0)),
                         d)
    return LeakageLaw(I0.astype(float), V0.astype(float), T0.astype(float),
                      np.where(two, Ih, np.nan), np.where(two, Th, np.inf),
                      d_two, np.where(two, np.minimum(d_two, d), d), two)
