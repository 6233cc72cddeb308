"""The Zener breakdown branch and the self-heated shunt-regulator operating point.

Breakdown voltage as a function of current is built from the datasheet's
test point (Vz at Izt, Zzt) and knee point (Izk, Zzk):

- Iz ≥ Izt: Z = Zzt, so Vz rises linearly, ΔV = Zzt·(Iz − Izt);
- Izk ≤ Iz < Izt: ln Z is linear in ln Iz from Zzk to Zzt, Z = Zzt·(Iz/Izt)^s with
  s = ln(Zzt/Zzk)/ln(Izt/Izk), integrated in closed form;
- Iz < Izk (the part no longer regulates; used for plots and for the solver to
  find where regulation is lost): an exponential knee Iz = Izk·exp((V − Vk)/(Zzk·Izk)),
  whose slope equals Zzk at Izk so the curve is smooth.

Temperature: Vz(Iz, Tj) = Vz·(1 + αVz·(Tj − 25 °C)) + ΔV(Iz).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from partpick.physics._validate import finite, nonnegative, positive, scalar_or_array
from partpick.physics.constants import T0_K

__all__ = ["ZenerModel", "ShuntPoint", "solve_shunt"]

# Where the knee current is not known, the plotting knee is put at this
# fraction of Izt (an assumption for curves only; checks that need Izk report
# the missing datum instead).
_ASSUMED_KNEE_FRACTION = 0.05


@dataclass(frozen=True)
class ZenerModel:
    """A Zener diode's breakdown branch (arrays broadcast together).

    Attributes
    ----------
    voltage : array_like
        Vz at Izt and 25 °C [V] (the tolerance end being studied).
    test_current : array_like
        Izt [A].
    test_impedance : array_like
        Zzt [ohm].
    knee_current : array_like
        Izk [A]; NaN where unknown (then a knee at 5 % of Izt is drawn).
    knee_impedance : array_like
        Zzk [ohm]; NaN where unknown (then Z = Zzt down to Izk).
    temperature_coefficient : array_like
        αVz [1/K] (the datasheet's %/K divided by 100).
    """

    voltage: np.ndarray
    test_current: np.ndarray
    test_impedance: np.ndarray
    knee_current: np.ndarray = np.nan
    knee_impedance: np.ndarray = np.nan
    temperature_coefficient: np.ndarray = 0.0

    def __post_init__(self) -> None:
        positive("voltage", self.voltage)
        positive("test_current", self.test_current)
        positive("test_impedance", self.test_impedance)
        finite("temperature_coefficient", self.temperature_coefficient)
        izk = np.asarray(self.knee_current, dtype=float)
        if np.any(np.isfinite(izk) & ((izk <= 0) | (izk >= np.asarray(self.test_current)))):
            raise ValueError(f"knee_current must be in (0, test_current), got {float(np.nanmin(izk))!r}")
        zzk = np.asarray(self.knee_impedance, dtype=float)
        if np.any(np.isfinite(zzk) & (zzk <= 0)):
            raise ValueError(f"knee_impedance must be > 0, got {float(np.nanmin(zzk))!r}")

    # --- the shape of the curve -------------------------------------------------
    def _shape(self):
        Izt = np.asarray(self.test_current, dtype=float)
        Zzt = np.asarray(self.test_impedance, dtype=float)
        izk = np.asarray(self.knee_current, dtype=float)
        Izk = np.where(np.isfinite(izk), izk, _ASSUMED_KNEE_FRACTION * Izt)
        zzk = np.asarray(self.knee_impedance, dtype=float)
        Zzk = np.where(np.isfinite(zzk) & np.isfinite(izk), zzk, Zzt)
        s = np.log(Zzt / Zzk) / np.log(Izt / Izk)
        # ΔV at the knee point (≤ 0), from the closed-form integral of Z.
        dv_knee = _interp_delta(np.log(Izk / Izt), s, Zzt * Izt)
        return Izt, Zzt, Izk, Zzk, s, dv_knee

    def base_voltage(self, junction_temperature):
        """Vz at Izt and junction temperature [V]: Vz·(1 + αVz·(Tj − 25 °C))."""
        T = positive("junction_temperature", junction_temperature)
        return np.asarray(self.voltage) * (1.0 + np.asarray(self.temperature_coefficient) * (T - T0_K))

    def delta_voltage(self, current):
        """ΔV(Iz) = Vz(Iz) − Vz(Izt) at constant temperature [V] (zero at Izt)."""
        I = positive("current", current)
        Izt, Zzt, Izk, Zzk, s, dv_knee = self._shape()
        above = Zzt * (I - Izt)
        knee_region = _interp_delta(np.log(np.maximum(I, Izk) / Izt), s, Zzt * Izt)
        below = dv_knee + Zzk * Izk * np.log(np.minimum(I, Izk) / Izk)
        return np.where(I >= Izt, above, np.where(I >= Izk, knee_region, below))

    def voltage_at(self, current, junction_temperature=T0_K):
        """Vz(Iz, Tj) [V] (named ``voltage_at`` because ``voltage`` is the Vz parameter)."""
        result = self.base_voltage(junction_temperature) + self.delta_voltage(current)
        return scalar_or_array(result, current, junction_temperature)

    def impedance(self, current):
        """Dynamic impedance dVz/dIz [ohm] at ``current`` [A]."""
        I = positive("current", current)
        Izt, Zzt, Izk, Zzk, s, _ = self._shape()
        inner = Zzt * (np.clip(I, Izk, Izt) / Izt) ** s
        result = np.where(I >= Izt, Zzt, np.where(I >= Izk, inner, Zzk * Izk / I))
        return scalar_or_array(result, current)

    def current(self, voltage, junction_temperature=T0_K):
        """Zener current [A] at a reverse voltage [V] (inverse of `voltage_at`; > 0 everywhere)."""
        V = finite("voltage", voltage)
        d = V - self.base_voltage(junction_temperature)
        Izt, Zzt, Izk, Zzk, s, dv_knee = self._shape()
        above = Izt + np.maximum(d, 0.0) / Zzt
        sp1 = s + 1.0
        small = np.abs(sp1) < 1e-9
        x = np.clip(d, dv_knee, 0.0) / (Zzt * Izt)
        with np.errstate(invalid="ignore", divide="ignore"):
            u = np.where(small, x, np.log1p(np.where(small, 0.0, x * sp1)) / np.where(small, 1.0, sp1))
        knee_region = Izt * np.exp(u)
        below = Izk * np.exp((np.minimum(d, dv_knee) - dv_knee) / (Zzk * Izk))
        result = np.where(d >= 0, above, np.where(d >= dv_knee, knee_region, below))
        return scalar_or_array(result, voltage, junction_temperature)


def _interp_delta(u, s, scale):
    """∫ from Izt down to Iz of Z dI with Z = Zzt·(I/Izt)^s, u = ln(Iz/Izt) ≤ 0; `scale` = Zzt·Izt.

    Equals scale·expm1((s+1)·u)/(s+1), with the limit scale·u at s = −1.
    """
    sp1 = s + 1.0
    small = np.abs(sp1) < 1e-9
    safe = np.where(small, 1.0, sp1)
    return scale * np.where(small, u, np.expm1(safe * u) / safe)


@dataclass(frozen=True)
class ShuntPoint:
    """Operating point of a series resistor + Zener shunt regulator with a current load.

    Attributes
    ----------
    output_voltage : ndarray
        Vout [V].
    zener_current : ndarray
        Iz [A] (0 where the load takes more than the resistor can pass).
    junction_temperature : ndarray
        Zener Tj [K].
    power : ndarray
        Zener dissipation Vout·Iz [W].
    collapsed : ndarray of bool
        True where Vs − IL·R ≤ 0: no output can be held at all.
    """

    output_voltage: np.ndarray
    zener_current: np.ndarray
    junction_temperature: np.ndarray
    power: np.ndarray
    collapsed: np.ndarray


def solve_shunt(model: ZenerModel, supply, resistance, load_current, ambient, thermal_resistance,
                *, tolerance=1e-12, max_iterations=100) -> ShuntPoint:
    """Solve Vout, Iz and Tj of a shunt regulator together, vectorised.

    Parameters
    ----------
    model : ZenerModel
        Zener branch (the tolerance end under study).
    supply : array_like
        Supply voltage Vs [V].
    resistance : array_like
        Series resistor R [ohm], > 0.
    load_current : array_like
        Load current IL [A], ≥ 0 (a current sink across the Zener).
    ambient : array_like
        Ta [K].
    thermal_resistance : array_like
        Zener RthJA [K/W].

    Notes
    -----
    Kirchhoff's current law gives Iz(V) = (Vs − V)/R − IL and self-heating
    Tj(V) = Ta + V·Iz(V)·RthJA, so the one unknown is V, the root of
    f(V) = Iz(V) − Izener(V, Tj(V)) on (0, Vs − IL·R). Newton steps on f are
    safeguarded by bisection inside the bracket, which always holds the root.
    """
    Vs = finite("supply", supply)
    R = positive("resistance", resistance)
    IL = nonnegative("load_current", load_current)
    Ta = positive("ambient", ambient)
    Rth = nonnegative("thermal_resistance", thermal_resistance)
    shape = np.broadcast_shapes(Vs.shape, R.shape, IL.shape, Ta.shape, Rth.shape,
                                *(np.shape(getattr(model, f)) for f in
                                  ("voltage", "test_current", "test_impedance", "knee_current",
                                   "knee_impedance", "temperature_coefficient")))
    Vs, R, IL, Ta, Rth = (np.broadcast_to(x, shape).astype(float) for x in (Vs, R, IL, Ta, Rth))
    v_open = Vs - IL * R
    collapsed = v_open <= 0
    hi = np.where(collapsed, 1.0, v_open)
    lo = np.zeros(shape)
    alpha_vz = np.asarray(model.voltage) * np.asarray(model.temperature_coefficient)

    def kcl(V):
        return (Vs - V) / R - IL

    def tj(V):
        return np.maximum(Ta + V * np.maximum(kcl(V), 0.0) * Rth, 1.0)

    V = 0.5 * hi
    for _ in range(max_iterations):
        T = tj(V)
        iz_model = model.current(V, T)
        f = kcl(V) - iz_model
        lo = np.where(f > 0, V, lo)
        hi = np.where(f > 0, hi, V)
        Z = model.impedance(np.maximum(iz_model, 1e-300))
        dtj = Rth * (kcl(V) - V / R)
        df = -1.0 / R - (1.0 - alpha_vz * dtj) / Z
        newton = V - f / np.where(df < 0, df, -1.0 / R)
        inside = (newton > lo) & (newton < hi) & (df < 0)
        V_next = np.where(inside, newton, 0.5 * (lo + hi))
        done = np.abs(V_next - V) <= tolerance * np.maximum(1.0, np.abs(V))
        V = V_next
        if np.all(done | collapsed):
            break
    else:
        raise RuntimeError("solve_shunt: Newton/bisection on the output voltage did not converge")
    V = np.where(collapsed, 0.0, V)
    Iz = np.where(collapsed, 0.0, np.maximum(kcl(V), 0.0))
    T = np.where(collapsed, Ta, tj(V))
    return ShuntPoint(output_voltage=V, zener_current=Iz, junction_temperature=T, power=V * Iz,
                      collapsed=collapsed)
