"""Reverse leakage from the datasheet's maximum IR, scaled in temperature and voltage.

Real leakage is set by surface and bulk generation paths and is orders of
magnitude above the ideal saturation current, so it is taken from the
datasheet, not from Is.
"""

from __future__ import annotations

import numpy as np

from partpick.physics._validate import nonnegative, positive, scalar_or_array

__all__ = ["reverse_current"]


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
