"""The forward branch of a junction: Shockley equation with series resistance.

All functions broadcast their array arguments together (parts × corners) and
return a float when every input was a scalar.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.special import wrightomega

from partpick.physics._validate import finite, nonnegative, positive, scalar_or_array
from partpick.physics.constants import BOLTZMANN, ELEMENTARY_CHARGE, T0_K

__all__ = [
    "thermal_voltage",
    "saturation_current_at",
    "series_resistance_at",
    "forward_voltage",
    "loadline_current",
    "diode_current",
    "ForwardModel",
]

PN_BAND_GAP_EV = 1.11
SCHOTTKY_BAND_GAP_EV = 0.69
PN_TEMPERATURE_EXPONENT = 3.0
SCHOTTKY_TEMPERATURE_EXPONENT = 2.0


def thermal_voltage(temperature):
    """Thermal voltage VT = k·T/q.

    Parameters
    ----------
    temperature : array_like
        Junction temperature [K].

    Returns
    -------
    float or ndarray
        VT [V]; 25.852 mV at 300 K.
    """
    T = positive("temperature", temperature)
    return scalar_or_array(BOLTZMANN * T / ELEMENTARY_CHARGE, temperature)


def saturation_current_at(
    saturation_current,
    temperature,
    ideality,
    band_gap=PN_BAND_GAP_EV,
    temperature_exponent=PN_TEMPERATURE_EXPONENT,
    reference_temperature=T0_K,
):
    """Saturation current scaled from the reference temperature to ``temperature``.

    Parameters
    ----------
    saturation_current : array_like
        Is at ``reference_temperature`` [A].
    temperature : array_like
        Junction temperature [K].
    ideality : array_like
        Ideality factor n [-].
    band_gap : array_like
        Eg [eV]; 1.11 for silicon pn junctions, 0.69 for Schottky barriers.
    temperature_exponent : array_like
        Saturation-current temperature exponent m [-]; 3 pn, 2 Schottky.
    reference_temperature : array_like
        T0 [K], default 298.15 K.

    Returns
    -------
    float or ndarray
        Is(T) [A].

    Notes
    -----
    Is(T) = Is(T0)·(T/T0)^(m/n)·exp((Eg·q/(n·k))·(1/T0 − 1/T)), evaluated in the
    log domain so that neither factor over- or underflows on its own.

    References
    ----------
    S. M. Sze, K. K. Ng, *Physics of Semiconductor Devices*, 3rd ed., Wiley, 2007
    (the junction-diode saturation current and its temperature dependence).
    """
    Is0 = positive("saturation_current", saturation_current)
    T = positive("temperature", temperature)
    n = positive("ideality", ideality)
    Eg = nonnegative("band_gap", band_gap)
    m = finite("temperature_exponent", temperature_exponent)
    T0 = positive("reference_temperature", reference_temperature)
    log_is = (
        np.log(Is0)
        + (m / n) * np.log(T / T0)
        + (Eg * ELEMENTARY_CHARGE / (n * BOLTZMANN)) * (1.0 / T0 - 1.0 / T)
    )
    return scalar_or_array(np.exp(log_is), saturation_current, temperature, ideality, band_gap,
                           temperature_exponent, reference_temperature)


def series_resistance_at(series_resistance, temperature, exponent=0.0, reference_temperature=T0_K):
    """Series resistance at temperature, Rs(T) = Rs·(T/T0)^exponent.

    Parameters
    ----------
    series_resistance : array_like
        Rs at ``reference_temperature`` [ohm].
    temperature : array_like
        Junction temperature [K].
    exponent : array_like
        ``rs_temp_exponent`` [-]; 0 keeps Rs constant.
    reference_temperature : array_like
        T0 [K].
    """
    Rs = nonnegative("series_resistance", series_resistance)
    T = positive("temperature", temperature)
    p = finite("exponent", exponent)
    T0 = positive("reference_temperature", reference_temperature)
    return scalar_or_array(Rs * (T / T0) ** p, series_resistance, temperature, exponent, reference_temperature)


def forward_voltage(current, saturation_current, ideality, series_resistance, temperature=T0_K):
    """Terminal voltage at a forward current: V = n·VT·ln(1 + I/Is) + I·Rs.

    Parameters
    ----------
    current : array_like
        Forward current I [A], > −Is.
    saturation_current : array_like
        Is at ``temperature`` [A].
    ideality : array_like
        n [-].
    series_resistance : array_like
        Rs at ``temperature`` [ohm].
    temperature : array_like
        Junction temperature [K].

    Returns
    -------
    float or ndarray
        V [V].

    Notes
    -----
    The Shockley diode equation I = Is·(exp((V − I·Rs)/(n·VT)) − 1) solved for V.
    ``log1p`` keeps the small-current end exact.

    References
    ----------
    W. Shockley, "The theory of p-n junctions in semiconductors and p-n junction
    transistors", *Bell System Technical Journal* 28(3), 435–489, 1949.
    """
    I = finite("current", current)
    Is = positive("saturation_current", saturation_current)
    n = positive("ideality", ideality)
    Rs = nonnegative("series_resistance", series_resistance)
    VT = BOLTZMANN * positive("temperature", temperature) / ELEMENTARY_CHARGE
    ratio = I / Is
    if np.any(ratio <= -1.0):
        raise ValueError(f"current must be > -saturation_current, got {float(np.min(I))!r}")
    V = n * VT * np.log1p(ratio) + I * Rs
    return scalar_or_array(V, current, saturation_current, ideality, series_resistance, temperature)


def loadline_current(source_voltage, resistance, saturation_current, ideality, series_resistance, temperature=T0_K):
    """Current of a source V through a resistor R into a diode (Is, n, Rs): the load line.

    Parameters
    ----------
    source_voltage : array_like
        Source voltage Vb [V] (may be negative: the diode then blocks, I → −Is).
    resistance : array_like
        External resistance R [ohm], ≥ 0.
    saturation_current, ideality, series_resistance : array_like
        Is [A], n [-], Rs [ohm], all at ``temperature``.
    temperature : array_like
        Junction temperature [K].

    Returns
    -------
    float or ndarray
        I [A].

    Notes
    -----
    With Rt = R + Rs, the exact solution (Banwell & Jayakumar, eq. 3) is
    I = (n·VT/Rt)·W((Is·Rt/(n·VT))·exp((Vb + Is·Rt)/(n·VT))) − Is.
    The Lambert W argument overflows a double for Vb of a few tens of volts, so
    W(e^z) = ω(z) (Wright omega) is used with
    z = ln(Is·Rt/(n·VT)) + (Vb + Is·Rt)/(n·VT). For Rt = 0 the Shockley
    equation is explicit, I = Is·expm1(Vb/(n·VT)).

    References
    ----------
    A. Banwell, A. Jayakumar, "Exact analytical solution for current flow through
    diode with series resistance", *Electronics Letters* 36(4), 291–292, 2000.
    R. M. Corless, D. J. Jeffrey, "The Wright ω function", *Artificial
    Intelligence, Automated Reasoning, and Symbolic Computation*, LNCS 2385, 2002.
    """
    Vb = finite("source_voltage", source_voltage)
    R = nonnegative("resistance", resistance)
    Is = positive("saturation_current", saturation_current)
    n = positive("ideality", ideality)
    Rs = nonnegative("series_resistance", series_resistance)
    VT = BOLTZMANN * positive("temperature", temperature) / ELEMENTARY_CHARGE
    Vb, R, Is, n, Rs, VT = np.broadcast_arrays(Vb, R, Is, n, Rs, VT)
    nVT = n * VT
    Rt = R + Rs
    current = np.empty(Vb.shape)
    has_r = Rt > 0
    if np.any(has_r):
        r = has_r
        z = np.log(Is[r] * Rt[r] / nVT[r]) + (Vb[r] + Is[r] * Rt[r]) / nVT[r]
        omega = np.real(wrightomega(z))
        current[r] = nVT[r] / Rt[r] * omega - Is[r]
    if not np.all(has_r):
        r = ~has_r
        with np.errstate(over="ignore"):
            current[r] = Is[r] * np.expm1(Vb[r] / nVT[r])
        if not np.all(np.isfinite(current[r])):
            raise ValueError("source_voltage too large for a diode with no resistance: the current overflows")
    if not np.all(np.isfinite(current)):
        raise RuntimeError("load-line solution is not finite for some inputs")
    return scalar_or_array(current, source_voltage, resistance, saturation_current, ideality,
                           series_resistance, temperature)


def diode_current(voltage, saturation_current, ideality, series_resistance, temperature=T0_K):
    """Current at a terminal voltage (Shockley equation with Rs, solved exactly).

    The load line with R = 0; see `loadline_current`.
    """
    return loadline_current(voltage, 0.0, saturation_current, ideality, series_resistance, temperature)


@dataclass(frozen=True)
class ForwardModel:
    """A forward branch: Is, n, Rs at 25 °C and how they move with temperature.

    Every attribute is an array (or scalar) broadcastable with the others; a
    model of P parts has shape (P, 1) attributes so that corners broadcast as a
    trailing axis.

    Attributes
    ----------
    saturation_current : array_like
        Is at 25 °C [A].
    ideality : array_like
        n [-].
    series_resistance : array_like
        Rs at 25 °C [ohm].
    band_gap : array_like
        Eg [eV].
    temperature_exponent : array_like
        m [-].
    rs_temperature_exponent : array_like
        Exponent of Rs(T) = Rs·(T/T0)^p [-].
    """

    saturation_current: np.ndarray
    ideality: np.ndarray
    series_resistance: np.ndarray
    band_gap: np.ndarray = PN_BAND_GAP_EV
    temperature_exponent: np.ndarray = PN_TEMPERATURE_EXPONENT
    rs_temperature_exponent: np.ndarray = 0.0

    def __post_init__(self) -> None:
        positive("saturation_current", self.saturation_current)
        positive("ideality", self.ideality)
        nonnegative("series_resistance", self.series_resistance)
        nonnegative("band_gap", self.band_gap)
        finite("temperature_exponent", self.temperature_exponent)
        finite("rs_temperature_exponent", self.rs_temperature_exponent)

    def at(self, temperature):
        """(Is, n, Rs) at junction temperature ``temperature`` [K]."""
        Is = saturation_current_at(self.saturation_current, temperature, self.ideality,
                                   self.band_gap, self.temperature_exponent)
        Rs = series_resistance_at(self.series_resistance, temperature, self.rs_temperature_exponent)
        return Is, np.asarray(self.ideality, dtype=float) if np.ndim(self.ideality) else float(self.ideality), Rs

    def voltage(self, current, temperature=T0_K):
        """Forward voltage [V] at ``current`` [A] and junction temperature [K]."""
        Is, n, Rs = self.at(temperature)
        return forward_voltage(current, Is, n, Rs, temperature)

    def current(self, voltage, temperature=T0_K):
        """Forward current [A] at terminal ``voltage`` [V] and junction temperature [K]."""
        Is, n, Rs = self.at(temperature)
        return diode_current(voltage, Is, n, Rs, temperature)

    def loadline(self, source_voltage, resistance, temperature=T0_K):
        """Current [A] from a source [V] through ``resistance`` [ohm] into this diode."""
        Is, n, Rs = self.at(temperature)
        return loadline_current(source_voltage, resistance, Is, n, Rs, temperature)

    def voltage_temperature_slope(self, current, temperature):
        """∂V/∂T at constant current [V/K], from the model's temperature laws.

        Notes
        -----
        With V = n·VT·ln(1 + I/Is) + I·Rs(T) and
        d ln Is/dT = (m/n)/T + Eg·q/(n·k·T²):
        ∂V/∂T = n·(k/q)·ln(1 + I/Is) − n·VT·(I/(I + Is))·d ln Is/dT + I·Rs(T)·p/T.
        """
        I = finite("current", current)
        T = positive("temperature", temperature)
        Is, n, Rs = self.at(T)
        VT = BOLTZMANN * T / ELEMENTARY_CHARGE
        dlnis = (np.asarray(self.temperature_exponent) / n) / T + (
            np.asarray(self.band_gap) * ELEMENTARY_CHARGE / (n * BOLTZMANN * T**2)
        )
        slope = (n * BOLTZMANN / ELEMENTARY_CHARGE) * np.log1p(I / Is) - n * VT * (I / (I + Is)) * dlnis \
            + I * Rs * np.asarray(self.rs_temperature_exponent) / T
        return scalar_or_array(slope, current, temperature)

    def tangent(self, current, temperature=T0_K):
        """Hand-analysis model tangent to the exact curve at ``current``.

        Returns
        -------
        (vth0, ron) : tuple
            Vth0 [V] and Ron [ohm] with V ≈ Vth0 + Ron·I near the operating point.

        Notes
        -----
        Ron = dV/dI = n·VT/(I + Is) + Rs; Vth0 = V(I) − I·Ron (the piecewise-linear
        diode model of the circuit textbooks).
        """
        I = positive("current", current)
        Is, n, Rs = self.at(temperature)
        VT = BOLTZMANN * positive("temperature", temperature) / ELEMENTARY_CHARGE
        ron = n * VT / (I + Is) + Rs
        vth0 = forward_voltage(I, Is, n, Rs, temperature) - I * ron
        return scalar_or_array(vth0, current, temperature), scalar_or_array(ron, current, temperature)

    def with_max_vf(self, vf_max, at_current) -> "ForwardModel":
        """The model moved to a guaranteed maximum forward voltage.

        Where ``vf_max`` at ``at_current`` (25 °C) lies above the typical curve,
        Is is scaled down so that the curve passes through that point; n and Rs
        are kept. Where ``vf_max`` is NaN (not given) or not above the typical
        curve, or where Rs alone already exceeds it, the model is kept.

        Parameters
        ----------
        vf_max : array_like
            Guaranteed maximum VF [V]; NaN where the part gives none.
        at_current : array_like
            Current of that maximum [A]; NaN where not given.
        """
        vmax = np.asarray(vf_max, dtype=float)
        imax = np.asarray(at_current, dtype=float)
        given = np.isfinite(vmax) & np.isfinite(imax) & (imax > 0)
        Is0 = np.asarray(self.saturation_current, dtype=float)
        n = np.asarray(self.ideality, dtype=float)
        Rs = np.asarray(self.series_resistance, dtype=float)
        VT0 = BOLTZMANN * T0_K / ELEMENTARY_CHARGE
        safe_i = np.where(given, imax, 1.0)
        junction_part = np.where(given, vmax, 0.0) - safe_i * Rs
        typical = n * VT0 * np.log1p(safe_i / Is0) + safe_i * Rs
        move = given & (np.where(given, vmax, -np.inf) > typical) & (junction_part > 0)
        with np.errstate(over="ignore"):
            scaled = safe_i / np.expm1(np.where(move, junction_part, 1.0) / (n * VT0))
        new_is = np.where(move & (scaled > 0), scaled, Is0)
        return ForwardModel(new_is, self.ideality, self.series_resistance, self.band_gap,
                            self.temperature_exponent, self.rs_temperature_exponent)
