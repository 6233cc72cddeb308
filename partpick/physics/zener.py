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
# Below this fraction of Izt the Zener current is taken as none at all (the solver's lower bracket).
_NEGLIGIBLE_CURRENT_FRACTION = 1e-12


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
        object.__setattr__(self, "_curve", self._compute_shape())

    # --- the shape of the curve -------------------------------------------------
    def _shape(self):
        return self._curve

    def _compute_shape(self):
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
        return self._delta(positive("current", current))

    def _delta(self, I):
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
        return scalar_or_array(self._impedance(positive("current", current)), current)

    def _impedance(self, I):
        Izt, Zzt, Izk, Zzk, s, _ = self._shape()
        inner = Zzt * (np.clip(I, Izk, Izt) / Izt) ** s
        return np.where(I >= Izt, Zzt, np.where(I >= Izk, inner, Zzk * Izk / I))

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


# Rows of solve_shunt's per-element table.
(_VS, _R, _IL, _TA, _RTH, _VZ, _ALPHA, _LN_IZT, _IZT, _ZZT, _LN_IZK, _ZZKIZK, _S, _DV_KNEE,
 _SCALE, _VZ_ALPHA, _SMALL, _SAFE) = range(18)
_ROWS = 18


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
    Kirchhoff's laws give V(Iz) = Vs − (Iz + IL)·R and the self-heating
    Tj(Iz) = Ta + V(Iz)·Iz·RthJA, so the one unknown is Iz, the root of
    h = Vz(Iz, Tj(Iz)) − V(Iz), solved in u = ln Iz by Newton's method
    safeguarded by bisection (the bracket always holds the root). A Zener whose
    breakdown voltage at 1e-12·Izt is already above Vs − IL·R carries no current.
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
    Izt, Zzt, Izk, Zzk, slope, dv_knee = model._shape()
    # Every per-element input as one row of a (rows, N) table: dropping the converged elements
    # is then one indexing step over the table, not one per input. The rows after "dv_knee" are
    # products the iteration needs on every pass, formed once (the same operations, so the same
    # numbers, as forming them inside the loop).
    columns = (Vs, R, IL, Ta, Rth, np.asarray(model.voltage, dtype=float),
               np.asarray(model.temperature_coefficient, dtype=float), np.log(Izt), Izt, Zzt, np.log(Izk),
               Zzk * Izk, slope, dv_knee)
    size = int(np.prod(shape, dtype=np.int64))
    table = np.empty((_ROWS, size))
    for row, value in enumerate(columns):
        table[row].reshape(shape)[...] = value
    table[_SCALE] = table[_ZZT] * table[_IZT]
    table[_VZ_ALPHA] = table[_VZ] * table[_ALPHA]
    sp1 = table[_S] + 1.0
    table[_SMALL] = np.abs(sp1) < 1e-9
    table[_SAFE] = np.where(table[_SMALL] != 0, 1.0, sp1)

    # The unknown is u = ln Iz. Kirchhoff gives V(Iz) = Vs − (Iz + IL)·R and the
    # self-heating Tj(Iz) = Ta + V·Iz·RthJA explicitly, and the root of
    # h(u) = Vz(Iz, Tj) − V(Iz) is unique (h rises with Iz). Below the knee Vz is
    # linear in u, above it both terms are smooth, so Newton in u is well behaved.
    def state(w, u):
        iz = np.exp(u)
        v = w[_VS] - (iz + w[_IL]) * w[_R]
        tj = np.maximum(w[_TA] + np.maximum(v, 0.0) * iz * w[_RTH], 1.0)
        rel_t = u - w[_LN_IZT]
        above = rel_t >= 0
        delta = np.where(above, w[_ZZT] * (iz - w[_IZT]),
                         w[_DV_KNEE] + w[_ZZKIZK] * (np.minimum(u, w[_LN_IZK]) - w[_LN_IZK]))
        z = np.where(above, w[_ZZT], w[_ZZKIZK] / iz)
        # Between Izk and Izt (ln Z linear in ln Iz): the exponentials are taken only there, the
        # costly part of a pass. There u is already within [ln Izk, ln Izt), so u − ln Izt is
        # the clipped offset `_interp_delta` takes and min(u − ln Izt, 0) is u − ln Izt.
        knee = np.flatnonzero(~above & (u >= w[_LN_IZK]))
        if knee.size:
            rel = rel_t[knee]
            safe = w[_SAFE, knee]
            delta[knee] = w[_SCALE, knee] * np.where(w[_SMALL, knee] != 0, rel, np.expm1(safe * rel) / safe)
            z[knee] = w[_ZZT, knee] * np.exp(w[_S, knee] * rel)
        h = w[_VZ] * (1.0 + w[_ALPHA] * (tj - T0_K)) + delta - v
        return iz, v, h, z

    flat_collapsed = collapsed.ravel()
    iz_max = np.where(flat_collapsed, 1.0, np.maximum(table[_VS] - table[_IL] * table[_R], 1e-300) / table[_R])
    u_hi = np.log(iz_max)
    u_lo = np.minimum(np.log(_NEGLIGIBLE_CURRENT_FRACTION * table[_IZT]), u_hi - 1.0)
    # Where even a negligible current in breakdown needs more than Vs − IL·R, the
    # Zener does not conduct: Iz ≈ 0 and V = Vs − IL·R.
    _, _, h_lo, _ = state(table, u_lo)
    off = flat_collapsed | (h_lo >= 0)
    vz_cold = table[_VZ] * (1.0 + table[_ALPHA] * (table[_TA] - T0_K))
    iz_guess = np.clip((table[_VS] - vz_cold) / table[_R] - table[_IL], np.exp(u_lo), 0.5 * iz_max)
    u_result = np.where(off, u_lo, np.log(iz_guess))

    # Work only on the elements still iterating. A converged element is written back at once
    # and no longer counts (`alive`); the table is compacted once a quarter of it is converged
    # (compacting costs about half a pass, so dropping a few elements at a time would not pay).
    index = np.flatnonzero(~off)
    work = table.take(index, axis=1)  # C order: each row stays contiguous
    u = u_result[index]
    lo, hi = u_lo[index], u_hi[index]
    step_before = hi - lo
    alive = np.ones(index.size, dtype=bool)
    remaining = index.size
    for _ in range(max_iterations):
        if remaining == 0:
            break
        iz, v, h, z = state(work, u)
        negative = h < 0
        lo = np.where(negative, u, lo)
        hi = np.where(negative, hi, u)
        z_plus_r = z + work[_R]
        dtj = work[_RTH] * (v - iz * work[_R])
        dh = iz * (z_plus_r + work[_VZ_ALPHA] * dtj)
        rising = dh > 0
        newton = u - h / np.where(rising, dh, 1.0)
        # Safeguarded Newton ("rtsafe", Press et al., Numerical Recipes): bisect where
        # the step leaves the bracket or does not at least halve the step before it.
        slow = np.abs(2.0 * h) > np.abs(step_before * dh)
        use_newton = (newton >= lo) & (newton <= hi) & rising & ~slow
        u_next = np.where(use_newton, newton, 0.5 * (lo + hi))
        step = np.abs(u_next - u)
        # a step in ln Iz is a relative step in Iz; the voltage error it leaves is Iz·(Z + R)·step
        done = (step * iz * z_plus_r <= tolerance * np.maximum(1.0, np.abs(v))) | (h == 0)
        done &= alive
        finished = int(np.count_nonzero(done))
        if finished:
            u_result[index[done]] = u_next[done]
            alive &= ~done
            remaining -= finished
        if remaining and 4 * (alive.size - remaining) >= alive.size:
            keep = np.flatnonzero(alive)
            index = index[keep]
            work = work.take(keep, axis=1)
            u, lo, hi, step_before = u_next[keep], lo[keep], hi[keep], step[keep]
            alive = np.ones(keep.size, dtype=bool)
        else:
            u, step_before = u_next, step
    else:
        if remaining:
            raise RuntimeError("solve_shunt: safeguarded Newton on ln Iz did not converge")
    u_result = u_result.reshape(shape)
    off = off.reshape(shape)
    Iz = np.where(off, 0.0, np.exp(u_result))
    V = np.where(collapsed, 0.0, Vs - (Iz + IL) * R)
    T = np.where(collapsed, Ta, np.maximum(Ta + np.maximum(V, 0.0) * Iz * Rth, 1.0))
    return ShuntPoint(output_voltage=V, zener_current=Iz, junction_temperature=T, power=V * Iz,
                      collapsed=collapsed)
