"""IEC 60063 preferred numbers (E12, E24, E48, E96) and resistor power classes."""

from __future__ import annotations

import numpy as np

from partpick.physics._validate import positive, scalar_or_array

__all__ = ["SERIES_NAMES", "series_values", "largest_at_most", "smallest_at_least",
           "default_tolerance_pct", "RESISTOR_POWER_CLASSES_W", "smallest_power_class", "resistor_derating",
           "RESISTOR_RATED_AMBIENT_C", "RESISTOR_ZERO_POWER_C"]

# IEC 60063:2015, one decade each. E24 has eight values (2.7 3.0 3.3 3.6 3.9
# 4.3 4.7 8.2) that are not the rounded geometric series, so the lists are
# written out rather than computed.
_E24 = (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3,
        4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1)
_E96 = (1.00, 1.02, 1.05, 1.07, 1.10, 1.13, 1.15, 1.18, 1.21, 1.24, 1.27, 1.30, 1.33, 1.37,
        1.40, 1.43, 1.47, 1.50, 1.54, 1.58, 1.62, 1.65, 1.69, 1.74, 1.78, 1.82, 1.87, 1.91,
        1.96, 2.00, 2.05, 2.10, 2.15, 2.21, 2.26, 2.32, 2.37, 2.43, 2.49, 2.55, 2.61, 2.67,
        2.74, 2.80, 2.87, 2.94, 3.01, 3.09, 3.16, 3.24, 3.32, 3.40, 3.48, 3.57, 3.65, 3.74,
        3.83, 3.92, 4.02, 4.12, 4.22, 4.32, 4.42, 4.53, 4.64, 4.75, 4.87, 4.99, 5.11, 5.23,
        5.36, 5.49, 5.62, 5.76, 5.90, 6.04, 6.19, 6.34, 6.49, 6.65, 6.81, 6.98, 7.15, 7.32,
        7.50, 7.68, 7.87, 8.06, 8.25, 8.45, 8.66, 8.87, 9.09, 9.31, 9.53, 9.76)
_SERIES = {
    "E12": _E24[::2],
    "E24": _E24,
    "E48": _E96[::2],
    "E96": _E96,
}
# The tables' significant digits: 2 for E12/E24, 3 for E48/E96 (IEC 60063 prints them so).
_DIGITS = {"E12": 2, "E24": 2, "E48": 3, "E96": 3}
SERIES_NAMES = tuple(_SERIES)
_TOLERANCE_PCT = {"E12": 5.0, "E24": 5.0, "E48": 1.0, "E96": 1.0}

RESISTOR_POWER_CLASSES_W = (0.125, 0.25, 0.5, 1.0, 2.0, 3.0, 5.0)
"""Standard resistor power ratings [W] (common practice)."""

RESISTOR_RATED_AMBIENT_C = 70.0
"""Film resistors carry their full class rating up to this ambient [°C] (common practice)."""
RESISTOR_ZERO_POWER_C = 155.0
"""... and none at this ambient, linearly in between [°C] (common practice)."""

# Relative slack when comparing against table values, so that 4.7e3 counts as
# exactly the E24 value 4.7 k despite binary rounding.
_REL = 1e-9


def _table(name: str) -> np.ndarray:
    try:
        return np.array(_SERIES[name.upper()], dtype=float)
    except KeyError:
        raise ValueError(f"series must be one of {', '.join(SERIES_NAMES)}, got {name!r}") from None


def series_values(name: str) -> np.ndarray:
    """One decade of the named series, 1.0 ≤ v < 10 (e.g. E24 → 1.0, 1.1, …, 9.1)."""
    return _table(name)


def default_tolerance_pct(name: str) -> float:
    """Usual tolerance of resistors sold in that series [%]: 5 % E12/E24, 1 % E48/E96 (common practice)."""
    _table(name)
    return _TOLERANCE_PCT[name.upper()]


def _exact(table_value, exponent, name: str):
    """table value × 10^exponent as the double nearest the decimal number (820, never 819.9999999).

    The table value is an integer of the table's significant digits (8.2 → 82) and the power of ten
    an exact double (|k| ≤ 22), so one multiplication or division rounds once, to the nearest
    double of the decimal value.
    """
    digits = _DIGITS[name.upper()]
    whole = np.rint(np.asarray(table_value, dtype=float) * 10.0 ** (digits - 1))
    k = np.asarray(exponent, dtype=float) - (digits - 1)
    with np.errstate(over="ignore"):
        up = whole * 10.0 ** np.maximum(k, 0.0)
        down = whole / 10.0 ** np.maximum(-k, 0.0)
    return np.where(k >= 0, up, down)


def _split(x):
    exponent = np.floor(np.log10(x))
    mantissa = x / 10.0**exponent
    # log10 may land a hair below an exact power of ten.
    fix = mantissa >= 10.0 * (1 - _REL)
    exponent = np.where(fix, exponent + 1, exponent)
    mantissa = np.where(fix, mantissa / 10.0, mantissa)
    return mantissa, exponent


def largest_at_most(value, name: str = "E24"):
    """Largest preferred value ≤ ``value``, across decades.

    Parameters
    ----------
    value : array_like
        Upper bound [any unit], > 0.
    name : str
        Series name.
    """
    x = positive("value", value)
    table = _table(name)
    mantissa, exponent = _split(x)
    idx = np.searchsorted(table, mantissa * (1 + _REL), side="right") - 1
    result = np.where(idx >= 0, _exact(table[np.maximum(idx, 0)], exponent, name),
                      _exact(table[-1], exponent - 1, name))
    return scalar_or_array(result, value)


def smallest_at_least(value, name: str = "E24"):
    """Smallest preferred value ≥ ``value``, across decades."""
    x = positive("value", value)
    table = _table(name)
    mantissa, exponent = _split(x)
    idx = np.searchsorted(table, mantissa * (1 - _REL), side="left")
    result = np.where(idx < table.size, _exact(table[np.minimum(idx, table.size - 1)], exponent, name),
                      _exact(table[0], exponent + 1, name))
    return scalar_or_array(result, value)


def smallest_power_class(power, derating_fraction=1.0):
    """Smallest standard class [W] whose derated rating covers ``power`` [W]; NaN above the largest."""
    P = np.asarray(power, dtype=float)
    classes = np.array(RESISTOR_POWER_CLASSES_W)
    usable = classes * float(derating_fraction)
    idx = np.searchsorted(usable, P * (1 - _REL), side="left")
    result = np.where(idx < classes.size, classes[np.minimum(idx, classes.size - 1)], np.nan)
    return scalar_or_array(result, power)


def resistor_derating(ambient, rated_ambient, zero_power):
    """Fraction of a resistor's class rating usable at an ambient (linear derating).

    Parameters
    ----------
    ambient : array_like
        Ambient temperature [K].
    rated_ambient : array_like
        Highest ambient at full rating [K] (70 °C for film resistors, common practice).
    zero_power : array_like
        Ambient at which the rating reaches zero [K], > ``rated_ambient`` (155 °C, common practice).

    Returns
    -------
    ndarray or float
        1 up to ``rated_ambient``, falling linearly to 0 at ``zero_power``, 0 above.
    """
    Ta = positive("ambient", ambient)
    rated = positive("rated_ambient", rated_ambient)
    zero = positive("zero_power", zero_power)
    if np.any(zero <= rated):
        raise ValueError(f"zero_power must be above rated_ambient, got {float(np.min(zero))!r} "
                         f"≤ {float(np.max(rated))!r}")
    return scalar_or_array(np.clip((zero - Ta) / (zero - rated), 0.0, 1.0), ambient, rated_ambient, zero_power)
