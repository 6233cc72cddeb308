"""The thermal path from junction to ambient: board copper, heatsink, rating reference points.

A datasheet RthJA is a figure measured on a standard test board in still air
(JEDEC JESD51), not on the user's board. Where the datasheet gives RthJA at
two copper areas, RthJA on another area is read off the straight line through
the two points in ln(area); a heatsink mount adds the stack RthJC + RthCS + RthSA.

Every function is vectorised (scalars or arrays in, broadcast together) and
works in SI units with temperatures in kelvin; areas are in mm² as the
datasheets state them (only their ratios enter).
"""

from __future__ import annotations

import numpy as np

from partpick.physics._validate import nonnegative, positive, scalar_or_array

__all__ = [
    "board_thermal_resistance",
    "copper_area_for_thermal_resistance",
    "heatsink_thermal_resistance",
    "heatsink_for_thermal_resistance",
    "allowed_power_at",
    "reference_temperature",
    "rated_path_resistance",
]


def board_thermal_resistance(area, small_area, small_resistance, large_area, large_resistance):
    """RthJA on a copper area, linear in ln(area) through the datasheet's two points.

    Parameters
    ----------
    area : array_like
        Copper area of the user's board [mm²], > 0.
    small_area, small_resistance : array_like
        The datasheet's smaller copper area [mm²] and RthJA there [K/W].
    large_area, large_resistance : array_like
        The larger area [mm²] (> ``small_area``) and RthJA there [K/W]
        (≤ ``small_resistance``).

    Returns
    -------
    resistance : float or ndarray
        RthJA [K/W] on ``area``.
    extrapolated : bool or ndarray of bool
        True where ``area`` lies below the smaller area, so the line was
        extended beyond the datasheet (RthJA rises above its smaller-area value).

    Notes
    -----
    RthJA(A) = R1 + (R2 − R1)·ln(A/A1)/ln(A2/A1) for A ≤ A2, and R2 above A2
    (held flat: copper far from the package spreads little more heat, and the
    datasheet says nothing beyond its larger board). Both rules are
    assumptions; a check sheet that uses them says so.

    References
    ----------
    JEDEC JESD51 (series): the test boards and still-air conditions behind a
    datasheet RthJA.
    """
    A = positive("area", area)
    A1 = positive("small_area", small_area)
    R1 = positive("small_resistance", small_resistance)
    A2 = positive("large_area", large_area)
    R2 = positive("large_resistance", large_resistance)
    if np.any(A2 <= A1):
        raise ValueError(f"large_area must be above small_area, got {float(np.min(A2 - A1) + np.min(A1))!r}")
    if np.any(R2 > R1):
        raise ValueError(f"large_resistance must not exceed small_resistance, got {float(np.max(R2))!r}")
    slope = (R2 - R1) / np.log(A2 / A1)  # K/W per neper of area, ≤ 0
    R = np.where(A >= A2, R2, R1 + slope * np.log(A / A1))
    below = A < A1
    return (scalar_or_array(R, area, small_area, small_resistance, large_area, large_resistance),
            bool(below) if np.ndim(below) == 0 and np.ndim(R) == 0 else np.asarray(below))


def copper_area_for_thermal_resistance(resistance, small_area, small_resistance, large_area, large_resistance):
    """The smallest copper area whose RthJA (`board_thermal_resistance`) is at most ``resistance``.

    Returns
    -------
    area : float or ndarray
        [mm²]; ``inf`` where even the larger area's RthJA is above ``resistance``
        (beyond the datasheet's range: more copper is not known to help).
    extrapolated : bool or ndarray of bool
        True where the area lies below the smaller datasheet area.

    Notes
    -----
    The inverse of the ln-area line: A = A1·exp((R − R1)·ln(A2/A1)/(R2 − R1));
    where R1 = R2 (a flat line) any area at or below A1 holds once R ≥ R1.
    """
    R = positive("resistance", resistance)
    A1 = positive("small_area", small_area)
    R1 = positive("small_resistance", small_resistance)
    A2 = positive("large_area", large_area)
    R2 = positive("large_resistance", large_resistance)
    span = R1 - R2
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        exponent = np.where(span > 0, (R1 - R) / np.where(span > 0, span, 1.0), np.where(R >= R1, 0.0, np.inf))
        A = A1 * np.exp(exponent * np.log(A2 / A1))
    A = np.where(R < R2, np.inf, np.minimum(A, A2))
    below = A < A1
    return (scalar_or_array(A, resistance, small_area, small_resistance, large_area, large_resistance),
            bool(below) if np.ndim(below) == 0 and np.ndim(A) == 0 else np.asarray(below))


def heatsink_thermal_resistance(junction_case, case_sink, sink_ambient):
    """RthJA of a heatsink mount: RthJC + RthCS + RthSA [K/W] (a series thermal path)."""
    Rjc = nonnegative("junction_case", junction_case)
    Rcs = nonnegative("case_sink", case_sink)
    Rsa = nonnegative("sink_ambient", sink_ambient)
    return scalar_or_array(Rjc + Rcs + Rsa, junction_case, case_sink, sink_ambient)


def heatsink_for_thermal_resistance(resistance, junction_case, case_sink):
    """The largest RthSA [K/W] that keeps RthJA at or below ``resistance``: R − RthJC − RthCS.

    A value ≤ 0 means no heatsink can hold (the part's own path is already too warm).
    """
    R = nonnegative("resistance", resistance)
    Rjc = nonnegative("junction_case", junction_case)
    Rcs = nonnegative("case_sink", case_sink)
    return scalar_or_array(R - Rjc - Rcs, resistance, junction_case, case_sink)


def allowed_power_at(ambient, tj_max, thermal_resistance):
    """Pallow = (Tj max − Ta)/RthJA in use [W], 0 at and above Tj max.

    Where a requirement or a mount sets the thermal resistance, the allowed
    power follows from it at every ambient (no flat part below a rating
    temperature: that belongs to the datasheet's own Pd curve).
    """
    Ta = positive("ambient", ambient)
    Tj = positive("tj_max", tj_max)
    R = positive("thermal_resistance", thermal_resistance)
    return scalar_or_array(np.maximum(Tj - Ta, 0.0) / R, ambient, tj_max, thermal_resistance)


def reference_temperature(junction_temperature, power, path_resistance):
    """Temperature of a rating reference point (lead, case) at a steady state: Tj − P·Rth [K].

    Parameters
    ----------
    junction_temperature : array_like
        Steady Tj [K].
    power : array_like
        Dissipation [W], ≥ 0.
    path_resistance : array_like
        RthJL or RthJC from the junction to the reference point [K/W], ≥ 0.
    """
    Tj = positive("junction_temperature", junction_temperature)
    P = nonnegative("power", power)
    R = nonnegative("path_resistance", path_resistance)
    return scalar_or_array(Tj - P * R, junction_temperature, power, path_resistance)


def rated_path_resistance(power_rating, tj_max, reference_temperature):
    """The path resistance a Pd rated at a point gives: (Tj max − Tref)/Pd [K/W].

    Rated at the ambient it is RthJA; at the lead RthJL; at the case RthJC — a
    lead- or case-rated Pd never gives RthJA.
    """
    Pd = positive("power_rating", power_rating)
    Tj = positive("tj_max", tj_max)
    Tref = positive("reference_temperature", reference_temperature)
    if np.any(Tj <= Tref):
        raise ValueError(f"tj_max must be above reference_temperature, got {float(np.min(Tj))!r}")
    return scalar_or_array((Tj - Tref) / Pd, power_rating, tj_max, reference_temperature)
