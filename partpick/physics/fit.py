"""Fit of the forward model (Is, n, Rs) to datasheet (IF, VF) points."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import least_squares

from partpick.physics.constants import BOLTZMANN, ELEMENTARY_CHARGE, T0_K
from partpick.physics.junction import (
    PN_BAND_GAP_EV,
    PN_TEMPERATURE_EXPONENT,
    saturation_current_at,
)

__all__ = ["ForwardFit", "FitRefused", "fit_forward_model", "MAX_RESIDUAL_V", "IDEALITY_BOUNDS"]

MAX_RESIDUAL_V = 5e-3
"""A fit whose worst point misses by more than this is refused [V] (SPEC §3)."""

IDEALITY_BOUNDS = (1.0, 4.0)
_LOG_IS_BOUNDS = (np.log(1e-30), np.log(1e-1))
_RS_MAX_OHM = 1e3
# A parameter within this fraction of the width of its bounds counts as "on the bound".
_ON_BOUND = 1e-4


class FitRefused(ValueError):
    """The points cannot give a physical model; the message says why.

    Attributes
    ----------
    best : ForwardFit or None
        Where the solver got to (reported at 25 °C, with each point's residual), for a fit refused
        on its residual or a bound; None where no fit was tried (bad points).
    advice : str
        What to change, in words ("" when nothing better is known).
    """

    def __init__(self, message: str, best: "ForwardFit | None" = None, advice: str = "") -> None:
        super().__init__(message)
        self.best = best
        self.advice = advice


@dataclass(frozen=True)
class ForwardFit:
    """Result of `fit_forward_model`, reported at 25 °C.

    Attributes
    ----------
    saturation_current : float
        Is at 25 °C [A].
    ideality : float
        n [-].
    series_resistance : float
        Rs [ohm] (0 and not fitted for two points).
    residuals_V : ndarray
        Model minus datasheet voltage at each point, in the order given [V].
    residual_max_V : float
        Largest absolute residual [V].
    fitted_series_resistance : bool
        False when only two points were given and Rs = 0 was assumed.
    note : str
        What was assumed, in words.
    """

    saturation_current: float
    ideality: float
    series_resistance: float
    residuals_V: np.ndarray
    residual_max_V: float
    fitted_series_resistance: bool
    note: str


def _checked_points(current, voltage):
    I = np.asarray(current, dtype=float).ravel()
    V = np.asarray(voltage, dtype=float).ravel()
    if I.shape != V.shape:
        raise FitRefused(f"got {I.size} currents but {V.size} voltages")
    if I.size < 2:
        raise FitRefused(f"a fit needs at least two (IF, VF) points, got {I.size}")
    if not (np.all(np.isfinite(I)) and np.all(np.isfinite(V))):
        raise FitRefused("every point must be a finite number")
    if np.any(I <= 0):
        raise FitRefused(f"forward currents must be > 0, got {float(I[I <= 0][0])!r} A")
    if np.any(V <= 0):
        raise FitRefused(f"forward voltages must be > 0, got {float(V[V <= 0][0])!r} V")
    order = np.argsort(I, kind="stable")
    Is_sorted, Vs_sorted = I[order], V[order]
    if np.any(np.diff(Is_sorted) <= 0):
        raise FitRefused("two points have the same current")
    if np.any(np.diff(Vs_sorted) <= 0):
        k = int(np.argmax(np.diff(Vs_sorted) <= 0))
        raise FitRefused(
            f"points are not monotonic: VF must rise with IF, but {Vs_sorted[k + 1]:g} V at "
            f"{Is_sorted[k + 1]:g} A is not above {Vs_sorted[k]:g} V at {Is_sorted[k]:g} A"
        )
    return I, V


def fit_forward_model(current, voltage, temperature=T0_K, band_gap=PN_BAND_GAP_EV,
                      temperature_exponent=PN_TEMPERATURE_EXPONENT) -> ForwardFit:
    """Fit Is, n and Rs of V = n·VT·ln(1 + I/Is) + I·Rs to datasheet points.

    Parameters
    ----------
    current : array_like
        Forward currents of the points [A].
    voltage : array_like
        Forward voltages of the points [V].
    temperature : float
        Junction temperature the points were read at [K]; the result is moved
        to 25 °C with `saturation_current_at`.
    band_gap, temperature_exponent : float
        Eg [eV] and m [-] used for that move.

    Returns
    -------
    ForwardFit

    Raises
    ------
    FitRefused
        Fewer than two points, non-finite or non-positive values, VF not rising
        with IF, n ending on its bound 1 ≤ n ≤ 4, Rs on its upper bound, or a
        worst residual above 5 mV.

    Notes
    -----
    Bounded nonlinear least squares (`scipy.optimize.least_squares`, trust-region
    reflective) on the voltage residuals with ln Is as the variable, which makes
    the problem well scaled over twenty decades of Is, with the analytic
    Jacobian. The start comes from the linear least-squares solution of the
    large-current form V ≈ n·VT·ln I − n·VT·ln Is + Rs·I (with and without Rs).
    Two points determine Is and n exactly with Rs = 0; three or more fit Is, n
    and Rs.
    """
    I, V = _checked_points(current, voltage)
    T = float(temperature)
    if not np.isfinite(T) or T <= 0:
        raise FitRefused(f"temperature must be a positive number of kelvin, got {temperature!r}")
    VT = BOLTZMANN * T / ELEMENTARY_CHARGE
    with_rs = I.size >= 3

    def residual(x):
        rs = x[2] if with_rs else 0.0
        return x[1] * VT * np.log1p(I * np.exp(-x[0])) + I * rs - V

    def jacobian(x):
        ratio = I * np.exp(-x[0])           # I/Is
        columns = [-x[1] * VT * ratio / (1.0 + ratio), VT * np.log1p(ratio)]
        if with_rs:
            columns.append(I)
        return np.column_stack(columns)

    lower = [_LOG_IS_BOUNDS[0], IDEALITY_BOUNDS[0]] + ([0.0] if with_rs else [])
    upper = [_LOG_IS_BOUNDS[1], IDEALITY_BOUNDS[1]] + ([_RS_MAX_OHM] if with_rs else [])
    # Start: where I ≫ Is the model is linear in (n·VT, −n·VT·ln Is, Rs):
    # V ≈ n·VT·ln I − n·VT·ln Is + Rs·I, solved by linear least squares.
    starts = []
    for use_rs in ((True, False) if with_rs else (False,)):
        design = np.column_stack([VT * np.log(I), np.ones_like(I)] + ([I] if use_rs else []))
        coef = np.linalg.lstsq(design, V, rcond=None)[0]
        n_lin = float(coef[0])
        if not np.isfinite(n_lin) or n_lin <= 0:
            continue
        log_is_lin = -float(coef[1]) / (n_lin * VT)
        rs_lin = float(coef[2]) if use_rs else 0.0
        x0 = [log_is_lin, n_lin] + ([max(rs_lin, 0.0)] if with_rs else [])
        starts.append(np.clip(x0, np.array(lower) + 1e-9, np.array(upper) - 1e-9))
    if not starts:
        starts.append(np.array([np.log(I.min()) - V.min() / (1.5 * VT), 1.5] + ([0.0] if with_rs else [])))
    best = None
    for x0 in starts:
        try:
            sol = least_squares(residual, x0, jac=jacobian, bounds=(lower, upper), method="trf",
                                x_scale="jac", xtol=1e-12, ftol=1e-12, gtol=1e-12, max_nfev=500)
        except (ValueError, FloatingPointError):
            continue
        if best is None or sol.cost < best.cost:
            best = sol
        # An interior solution that meets the residual limit is the minimum sought;
        # the second start only matters where the first ends on a bound or misses.
        interior = np.all(sol.active_mask == 0)
        if sol.success and interior and np.max(np.abs(sol.fun)) <= MAX_RESIDUAL_V:
            break
    if best is None or not np.all(np.isfinite(best.x)):
        raise FitRefused("the least-squares solver found no finite solution for these points")
    x = best.x
    n = float(x[1])
    rs = float(x[2]) if with_rs else 0.0
    residuals = residual(x)
    worst = float(np.max(np.abs(residuals)))
    is_t = float(np.exp(x[0]))
    is_25 = float(saturation_current_at(is_t, T0_K, n, band_gap, temperature_exponent, reference_temperature=T))
    note = "three or more points: Is, n and Rs fitted" if with_rs else "two points: Is and n fitted, Rs = 0 assumed"
    if abs(T - T0_K) > 1e-9:
        note += f"; points at {T - 273.15:g} °C, Is moved to 25 °C with Eg = {band_gap:g} eV, m = {temperature_exponent:g}"
    found = ForwardFit(is_25, n, rs, residuals, worst, with_rs, note)
    width_n = IDEALITY_BOUNDS[1] - IDEALITY_BOUNDS[0]
    if n - IDEALITY_BOUNDS[0] < _ON_BOUND * width_n or IDEALITY_BOUNDS[1] - n < _ON_BOUND * width_n:
        raise FitRefused(
            f"the fit ends on the ideality bound (n = {n:.4g}, allowed {IDEALITY_BOUNDS[0]:g}–"
            f"{IDEALITY_BOUNDS[1]:g}): the points do not describe a junction diode", found,
            "check the points' units (A and V) and that they come from one forward curve at one temperature")
    if with_rs and _RS_MAX_OHM - rs < _ON_BOUND * _RS_MAX_OHM:
        raise FitRefused(f"the fit ends on the series-resistance bound (Rs = {rs:.4g} Ω)", found,
                         "check the points' units (A and V)")
    if worst > MAX_RESIDUAL_V:
        raise FitRefused(
            f"the model misses the points by up to {worst * 1e3:.2f} mV (limit {MAX_RESIDUAL_V * 1e3:g} mV)",
            found, _residual_advice(I, V, T, band_gap, temperature_exponent))
    return found


def _residual_advice(I, V, T, band_gap, temperature_exponent) -> str:
    """What to change when one Is, n, Rs cannot pass within the limit through every point.

    A real junction's curve bends in ways the three-parameter model does not (at high current
    the ideality rises towards 2 — high-level injection; at very low current recombination
    raises it): a wide current range often cannot be met within 5 mV. Refitting without the
    highest or the lowest point says which end the model cannot follow.
    """
    order = np.argsort(I)
    options = []
    if I.size >= 3:
        for label, keep in (("highest", order[:-1]), ("lowest", order[1:])):
            try:
                fit = fit_forward_model(I[keep], V[keep], T, band_gap, temperature_exponent)
            except FitRefused:
                continue
            dropped = order[-1] if label == "highest" else order[0]
            options.append((fit.residual_max_V, label, float(I[dropped]), fit, keep.size))
    span = f"{I.min():.3g} A to {I.max():.3g} A"
    text = (f"one Is, n and Rs cannot follow this curve from {span} within "
            f"{MAX_RESIDUAL_V * 1e3:g} mV (real junctions bend more at the ends)")
    if options:
        worst, label, current, fit, kept = min(options, key=lambda o: o[0])
        met = ("the other three points are met exactly (three points fix Is, n and Rs)" if kept == 3 else
               f"the model meets the other {kept} points within {worst * 1e3:.2f} mV")
        text += (f"; without the {label}-current point ({current:.3g} A) {met}, with n = {fit.ideality:.3f}, "
                 f"Rs = {fit.series_resistance:.3g} Ω: keep the points around the currents the design uses")
    else:
        text += "; keep the points around the currents the design uses, or enter Is, n and Rs by hand"
    return text
