"""Diodes rectifying AC into a reservoir capacitor with a constant-current load.

The circuit: an AC source of EMF √2·Vac·sin(ωt) behind its resistance R
(winding and wiring), the conducting diode(s), and the reservoir capacitor C
with the DC load IL across it. Topologies: ``half_wave`` (one diode),
``center_tap`` (two diodes, each fed by its half-winding: the rectified source
is |e|, one diode in the path), ``bridge`` (four legs: |e|, two legs in series
in the path, which is one diode of ideality 2n and resistance 2·Rs).

`periodic_steady_state` finds the cycle that repeats itself, vectorised over
any array shape (parts × corners):

- **Time stepping** by backward Euler. At each step the capacitor is the
  source Vc(k) − h·IL/C behind its companion resistance h/C, added to R in the
  exact load line (Banwell & Jayakumar): every step is one closed form,
  I = (a/Rt)·ω(z) − Is, with a = legs·n·VT, Rt = R + legs·Rs + h/C,
  z = ln(Is·Rt/a) + (Vb + Is·Rt)/a and Vb = e(k+1) − Vc(k) + h·IL/C. ω is the
  Wright omega function, evaluated by `_wright_omega` in a few elementwise
  operations (Winitzki's start and two Fritsch steps), never a root finder.
- **Shooting**: Newton on the capacitor voltage at the source's zero crossing
  (where no diode conducts): F(V0) is Vc after one rectified period, and the
  sensitivity dF/dV0 is carried along the steps
  (dVc(k+1)/dVc(k) = 1 − (h/C)·dI/dVb), so each Newton step costs one pass.
- **Step refinement**: the step count doubles (starting from the previous
  level's V0) until the peak diode current changes by less than
  ``peak_tolerance`` between levels, element by element.

`rectifier_operating_point` adds the junction temperature: the waveform's
current moments give the cycle-average forward power at any Tj, so
Tj = Ta + N·RthJA·P(Tj) is solved by Newton (N diodes in the package), the
cycle is solved again at that Tj, and Tj once more from it. The thermal time
constant of a diode is far above one mains cycle, so the average power sets
Tj (an assumption the check sheet states).

`switch_on_surge`: the first ``duration`` after switch-on at the crest into an
empty capacitor, backward Euler on a graded grid, giving the
peak and ∫i²dt.

References
----------
A. Banwell, A. Jayakumar, "Exact analytical solution for current flow through
diode with series resistance", Electronics Letters 36(4), 291–292, 2000.
R. M. Corless, D. J. Jeffrey, "The Wright ω function", LNCS 2385, 2002.
F. N. Fritsch, R. E. Shafer, W. P. Crowley, "Algorithm 443: solution of the
transcendental equation w·e^w = x", Communications of the ACM 16(2), 1973.
S. Winitzki, "Uniform approximations for transcendental functions", LNCS 2667, 2003.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from partpick.physics._validate import nonnegative, positive
from partpick.physics.constants import BOLTZMANN, ELEMENTARY_CHARGE

__all__ = ["TOPOLOGIES", "legs_in_path", "diodes_in_circuit", "peak_inverse_voltage", "CycleSolution",
           "periodic_steady_state", "RectifierPoint", "rectifier_operating_point", "SurgeSolution",
           "switch_on_surge"]

TOPOLOGIES = ("bridge", "center_tap", "half_wave")
_K_Q = BOLTZMANN / ELEMENTARY_CHARGE
_CONDUCTION_SHARE = 0.01  # SPEC §4a: a pulse is where the current exceeds 1 % of its peak


def legs_in_path(topology: str) -> int:
    """Diodes in series in the conducting path: 2 for a bridge, else 1."""
    _check_topology(topology)
    return 2 if topology == "bridge" else 1


def diodes_in_circuit(topology: str) -> int:
    """Diodes of the rectifier: 4 (bridge), 2 (centre tap), 1 (half wave)."""
    _check_topology(topology)
    return {"bridge": 4, "center_tap": 2, "half_wave": 1}[topology]


def peak_inverse_voltage(topology: str, vac_rms):
    """Peak inverse voltage per diode [V], conservative (no load: the capacitor at the crest).

    Bridge √2·Vac (each leg blocks the output), centre tap and half wave 2·√2·Vac
    (the capacitor plus the opposite crest of the (half-)winding).
    """
    _check_topology(topology)
    factor = 1.0 if topology == "bridge" else 2.0
    return factor * np.sqrt(2.0) * np.asarray(vac_rms, dtype=float)


def _check_topology(topology: str) -> None:
    if topology not in TOPOLOGIES:
        raise ValueError(f"topology must be one of {', '.join(TOPOLOGIES)}, got {topology!r}")


def _wright_omega(z: np.ndarray, iterations: int = 1) -> np.ndarray:
    """ω(z), the solution of ω + ln ω = z, in a few elementwise operations.

    Start: Winitzki's approximation of W(e^z) for z ≤ 1 (relative error < 8 %),
    z − ln z + ln z/z above; then Fritsch steps of third order: one leaves a
    relative error below 4e-7 (what a diode current needs), two below 1e-14.
    ``z`` is clipped at −700, where ω = e^z is below 1e-304 (a current of −Is).
    """
    z = np.maximum(z, -700.0)
    low = z <= 1.0
    L = np.log1p(np.exp(np.minimum(z, 1.0)))
    zh = np.maximum(z, 1.0)
    lz = np.log(zh)
    w = np.where(low, L * (1.0 - np.log1p(L) / (2.0 + L)), zh - lz + lz / zh)
    for _ in range(iterations):
        r = z - w - np.log(w)
        wp1 = 1.0 + w
        q = 2.0 * wp1 * (wp1 + (2.0 / 3.0) * r)
        w = w * (1.0 + (r / wp1) * (q - r) / (q - 2.0 * r))
    return w


@dataclass
class CycleSolution:
    """The periodic steady state, per element (arrays of the broadcast shape).

    Currents are per diode (a bridge leg), averaged over the full source period.
    ``power_moments`` = (⟨i⟩, ⟨i·ln i⟩, ⟨i²⟩) of one diode over the period (i ≥ 0),
    from which its forward power at any junction temperature follows
    (`diode_power`). ``reverse_moment`` = ⟨vr·max(1, vr/ir_vr)⟩ of one diode over
    the period while it blocks, so that its reverse power is that times its IR at
    ir_vr and the junction temperature (SPEC §3: IR in proportion to VR above ir_vr,
    held below). A blocking bridge leg shares the reverse voltage of its pair
    equally: (Vc ± |e|)/2; a centre-tap or half-wave diode blocks Vc − e.
    """

    dc_min: np.ndarray
    dc_max: np.ndarray
    ripple: np.ndarray
    peak_current: np.ndarray
    average_current: np.ndarray
    rms_current: np.ndarray
    conduction_angle_deg: np.ndarray
    capacitor_rms: np.ndarray
    start_voltage: np.ndarray
    steps: np.ndarray
    power_moments: tuple
    reverse_moment: np.ndarray
    window: tuple = ()           # (θ0, θ1) [rad] of the fine passes (phase 0 = zero crossing)
    empty: np.ndarray | None = None  # no steady state: the source cannot supply the load (metrics NaN)
    waveform: dict | None = None

    def diode_power(self, saturation_current, ideality, series_resistance, temperature):
        """Cycle-average forward power of one diode [W] with its model at ``temperature`` [K]."""
        m0, m1, m2 = self.power_moments
        vt = _K_Q * np.asarray(temperature, dtype=float)
        return ideality * vt * (m1 - np.log(saturation_current) * m0) + series_resistance * m2


class _Circuit:
    """The elements' fixed data (flat arrays) and one pass of backward Euler over a phase window."""

    def __init__(self, full_wave, legs, e_peak, omega, period, span, R_path, C, IL, a, Is, vr_rated):
        self.full_wave, self.legs = full_wave, legs
        self.e_peak, self.omega, self.period, self.span = e_peak, omega, period, span
        self.R_path, self.C, self.IL, self.a, self.Is, self.vr_rated = R_path, C, IL, a, Is, vr_rated

    def subset(self, idx) -> "_Circuit":
        return _Circuit(self.full_wave, self.legs, self.e_peak[idx], self.omega, self.period, self.span,
                        self.R_path[idx], self.C[idx], self.IL[idx], self.a[idx], self.Is[idx], self.vr_rated[idx])

    def source(self, theta):
        e = self.e_peak * np.sin(theta)
        return np.abs(e) if self.full_wave else e

    def run(self, v0, theta0, theta1, steps, *, threshold=None, heavy=False, record=False, track=None):
        """Step from θ0 to θ1 (per element) in ``steps`` steps, starting from Vc(0) = v0.

        Before θ0 and after θ1 no diode conducts: Vc falls as IL/C. Returns a dict with
        ``end`` (Vc after the rectified period), ``sens`` (d end/d v0) and ``peak``;
        ``heavy`` adds the moments and the conduction share, ``record`` the samples,
        ``track`` (a current) the first and last step (``first``, ``last``) where it is exceeded.
        """
        dtheta = (theta1 - theta0) / steps
        h = dtheta / self.omega
        C, IL, a, Is = self.C, self.IL, self.a, self.Is
        h_c = h / C
        R_t = self.R_path + h_c
        il_h_c = IL * h_c
        inv_a = 1.0 / a
        # z = ln(Is·Rt/a) + (Vb + Is·Rt)/a with Vb = e − Vc(k) + h·IL/C
        z_const = np.log(Is * R_t / a) + (Is * R_t + il_h_c) * inv_a
        gain = a / R_t
        hc_rt = h_c / R_t
        z = np.empty_like(v0)
        e = np.empty_like(v0)
        vc = v0 - IL * (theta0 / self.omega) / C
        v_start = vc
        sens = np.ones_like(v0)
        peak = np.zeros_like(v0)
        out = {}
        if track is not None:
            first = np.full(v0.shape, steps + 1)
            last = np.zeros(v0.shape, dtype=int)
        if heavy:
            s0 = np.zeros_like(v0)
            s1 = np.zeros_like(v0)
            s2 = np.zeros_like(v0)
            above = np.zeros_like(v0)
            rev = np.zeros_like(v0)
            vmin = vc.copy()
            vmax = np.maximum(v0, vc)
            i_prev = np.zeros_like(v0)
            first_i = None
            samples = [] if record else None
        vc = vc.copy()
        # the source by rotation: (sin, cos) of θ0 + k·dθ from the previous step's, no sin per step
        # (re-anchored every 64 steps so that rounding cannot build up)
        cos_d, sin_d = np.cos(dtheta), np.sin(dtheta)
        for k in range(1, steps + 1):
            if (k - 1) % 64 == 0:
                theta = theta0 + (k - 1) * dtheta
                sn, cs = np.sin(theta), np.cos(theta)
            sn, cs = sn * cos_d + cs * sin_d, cs * cos_d - sn * sin_d
            if heavy:
                theta = theta0 + k * dtheta
            np.multiply(sn, self.e_peak, out=e)
            if self.full_wave:
                np.abs(e, out=e)
            np.subtract(e, vc, out=z)
            z *= inv_a
            z += z_const
            w = _wright_omega(z)
            i = gain * w - Is
            vc += h_c * i
            vc -= il_h_c
            sens *= 1.0 - hc_rt * w / (1.0 + w)  # dVc(k+1)/dVc(k); dI/dVb = 1/(Rt + a/(I + Is))
            np.maximum(peak, i, out=peak)
            if track is not None or heavy:
                ip = np.maximum(i, 0.0)
            if track is not None:
                flowing = ip > track
                np.minimum(first, np.where(flowing, k, steps + 1), out=first)
                last[flowing] = k
            if heavy:
                e = e.copy()  # kept by record; the next step writes a new buffer
                if first_i is None:
                    first_i = ip
                s0 += ip
                s1 += ip * np.log(np.maximum(ip, 1e-300))
                s2 += ip * ip
                hi = np.maximum(ip, i_prev)
                lo = np.minimum(ip, i_prev)
                span = np.where(hi > lo, hi - lo, 1.0)
                above += np.where(lo >= threshold, 1.0, np.where(hi > threshold, (hi - threshold) / span, 0.0))
                rev += self._reverse(vc, e, ip < threshold)
                np.minimum(vmin, vc, out=vmin)
                np.maximum(vmax, vc, out=vmax)
                i_prev = ip
                if record:
                    samples.append((theta, e, vc.copy(), ip))
        t1 = theta1 / self.omega
        end = vc - IL * (self.period - t1) / C
        out.update(end=end, sens=sens, peak=peak)
        if track is not None:
            out.update(first=first, last=last)
        if heavy:
            weight = h / self.period  # each step's share of the rectified period
            share = 0.5 if self.full_wave else 1.0  # one diode carries one pulse in two (full wave)
            outside = self._reverse_outside(v0, v_start, vc, theta0, theta1)
            out.update(
                m=(share * s0 * weight, share * s1 * weight, share * s2 * weight),
                window_mean=(s0 * weight, s2 * weight),
                angle=np.degrees(above * dtheta),
                reverse=rev * weight + outside,
                vmin=np.minimum(vmin, end), vmax=vmax,
                edge=np.maximum(first_i, i_prev),
                samples=samples, dtheta=dtheta,
            )
        return out

    def _reverse(self, vc, e, blocking):
        """One diode's vr·max(1, vr/ir_vr) at one instant (full wave: the mean of its two half-periods)."""
        if self.full_wave:
            own = _reverse_shape((vc - e) / self.legs, self.vr_rated)
            other = _reverse_shape((vc + e) / self.legs, self.vr_rated)
            return 0.5 * (np.where(blocking, own, 0.0) + other)
        return np.where(blocking, _reverse_shape(vc - e, self.vr_rated), 0.0)

    def _reverse_outside(self, v0, v_start, v_end_window, theta0, theta1, points=48):
        """The reverse moment over the phases outside the window (Vc falls linearly there), midpoint rule."""
        u = (np.arange(points) + 0.5) / points
        slope = self.IL / (self.omega * self.C)  # dVc/dθ while no diode conducts
        total = np.zeros_like(v0)
        for start, length, v_first in ((np.zeros_like(theta0), theta0, v0),
                                       (theta1, self.span - theta1, v_end_window)):
            theta = start[:, None] + length[:, None] * u[None, :]
            vc = v_first[:, None] - slope[:, None] * (theta - start[:, None])
            sub = _Circuit(self.full_wave, self.legs, self.e_peak[:, None], self.omega, self.period, self.span,
                           None, None, None, None, None, self.vr_rated[:, None])
            values = sub._reverse(vc, sub.source(theta), np.ones(theta.shape, dtype=bool))
            total += values.mean(axis=1) * length / self.span
        return total


def _reverse_shape(vr, rated_vr):
    vr = np.maximum(vr, 0.0)
    return vr * np.maximum(1.0, vr / rated_vr)


def _newton(circuit, v, theta0, theta1, steps, *, tolerance=1e-5, max_iterations=30, **run):
    """Close the cycle on the grid: Newton on F(V0) − V0 (dF/dV0 carried along the steps).

    Stops when the Newton step is below ``tolerance`` × crest (the step is taken: with
    quadratic convergence what is left is of the order of its square); returns V0, the
    pass at the V0 before that last step (its peak and moments differ from the final
    V0's by far less than the step-size error) and the elements that cannot hold a
    charge: started empty, the capacitor still ends the cycle lower (the source cannot
    supply the load; a constant-current load would take it below zero).
    """
    tol = tolerance * circuit.e_peak + 1e-12
    empty = np.zeros(v.shape, dtype=bool)
    for _ in range(max_iterations):
        res = circuit.run(v, theta0, theta1, steps, **run)
        residual = res["end"] - v
        empty |= (v <= 0.0) & (residual < -1e-9 * circuit.e_peak)
        denom = np.minimum(res["sens"] - 1.0, -1e-12)
        step = np.clip(-residual / denom, -0.1 * circuit.e_peak, 0.1 * circuit.e_peak)
        closed = np.abs(residual) <= 1e-10 * circuit.e_peak  # e.g. no load: F − V0 flat near its root
        step = np.where(empty | closed, 0.0, step)
        moved = np.clip(v + step, 0.0, circuit.e_peak) - v
        v = v + moved
        if np.all(np.abs(moved) <= tol):
            return v, res, empty
        if run.get("track") is not None:  # where the current flows, relative to the last peak
            run["track"] = 1e-4 * res["peak"]
    raise RuntimeError(f"rectifier cycle not closed after {max_iterations} Newton steps "
                       f"(largest residual {np.max(np.abs(residual)):.3g} V)")


def periodic_steady_state(topology: str, vac_rms, frequency, source_resistance, capacitance, load_current,
                          saturation_current, ideality, series_resistance, temperature, *,
                          leakage_rated_voltage=1.0, peak_tolerance=0.005, coarse_steps=64, window_steps=48,
                          max_steps=65536, start_voltage=None, record=False, warm=None) -> CycleSolution:
    """The periodic steady state of the rectifier (see the module notes), vectorised.

    Parameters
    ----------
    topology : str
        ``bridge``, ``center_tap`` or ``half_wave``.
    vac_rms : array_like
        Open-circuit EMF of the (half-)winding [V rms].
    frequency : float
        Source frequency [Hz]; one value for all elements.
    source_resistance : array_like
        R of the winding and wiring [ohm], > 0.
    capacitance : array_like
        Reservoir capacitance [F].
    load_current : array_like
        Constant DC load [A], ≥ 0.
    saturation_current, ideality, series_resistance : array_like
        One diode's (leg's) Is [A], n [-] and Rs [ohm] at the junction temperature.
    temperature : array_like
        Junction temperature [K] (for VT).
    leakage_rated_voltage : array_like
        The datasheet IR's test voltage [V] (for `CycleSolution.reverse_moment`).
    peak_tolerance : float
        The step count doubles until the peak current changes by less than this share.
    coarse_steps, window_steps : int
        Steps of the first, coarse pass over the whole rectified period (which finds
        the conduction window) and of the first pass over the window.
    max_steps : int
        Refinement stops here; elements not settled raise RuntimeError.
    start_voltage : array_like, optional
        A guess of Vc at the zero crossing [V] (e.g. from a neighbouring solve).
    warm : CycleSolution, optional
        A solve of the same elements nearby (e.g. at another junction temperature): its
        start voltage, window and step counts are used, without refinement.
    record : bool
        Keep the samples of the final pass: ``waveform`` = {"phase_rad" (elements × samples),
        "source_V", "capacitor_V", "diode_A"}, phase 0 = the source's zero crossing,
        over the rectified period (outside the conduction window the capacitor falls linearly).

    Returns
    -------
    CycleSolution

    Notes
    -----
    A coarse pass over the whole period (``coarse_steps``) closes the cycle roughly and
    finds where the current exceeds 1e-4 of its peak; the fine passes then step only
    over that window widened by two coarse steps each side, where a diode conducts —
    outside it the capacitor falls linearly, exactly. A window whose edge current is
    above 1e-3 of the peak is widened to the whole period and solved again.

    Raises
    ------
    ValueError
        A bad topology or a value out of range (naming it).
    RuntimeError
        Newton did not close the cycle, or the peak current did not settle by ``max_steps``.
    """
    _check_topology(topology)
    legs = legs_in_path(topology)
    full_wave = topology != "half_wave"
    arrays = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (
        vac_rms, source_resistance, capacitance, load_current, saturation_current, ideality,
        series_resistance, temperature, leakage_rated_voltage)))
    shape = arrays[0].shape
    vac, R, C, IL, Is, n, Rs, T, vr_rated = (x.ravel().copy() for x in arrays)
    for name, value in (("vac_rms", vac), ("source_resistance", R), ("capacitance", C),
                        ("saturation_current", Is), ("ideality", n), ("temperature", T),
                        ("leakage_rated_voltage", vr_rated)):
        positive(name, value)
    nonnegative("load_current", IL)
    nonnegative("series_resistance", Rs)
    freq = np.asarray(frequency, dtype=float)
    f = float(positive("frequency", freq).ravel()[0])
    if not np.all(freq == f):
        raise ValueError("frequency must be one value for all elements")
    omega = 2.0 * np.pi * f
    period = (0.5 if full_wave else 1.0) / f            # the rectified period simulated
    span = np.pi if full_wave else 2.0 * np.pi          # its phase span
    e_peak = np.sqrt(2.0) * vac
    circuit = _Circuit(full_wave, legs, e_peak, omega, period, span, R + legs * Rs, C, IL,
                       legs * n * _K_Q * T, Is, vr_rated)
    size = vac.size
    if warm is not None:
        start_voltage = warm.start_voltage
    if start_voltage is not None:
        v0 = np.broadcast_to(np.asarray(start_voltage, dtype=float), shape).ravel().copy()
    else:  # the crest less the path's drop, less half the sag over a period
        v0 = e_peak - legs * 0.7 - 0.5 * IL * period / C
    v0 = np.clip(v0, 0.05 * e_peak, e_peak)

    out = {key: np.full(size, np.nan) for key in ("dc_min", "dc_max", "peak", "avg", "rms", "angle", "cap_rms",
                                                  "m0", "m1", "m2", "rev")}
    out["steps"] = np.zeros(size, dtype=int)
    samples = {}
    if warm is not None:
        # the window and step count of a neighbouring solve (e.g. at another Tj): one level, no refinement
        theta0 = np.asarray(warm.window[0], dtype=float).ravel().copy()
        theta1 = np.asarray(warm.window[1], dtype=float).ravel().copy()
        level = np.asarray(warm.steps).ravel()
        empty = np.asarray(warm.empty).ravel().copy()
        for steps in np.unique(level[~empty]):
            idx = np.flatnonzero((level == steps) & ~empty)
            sub = circuit.subset(idx)
            # one Newton step from the neighbour's V0 (its error is of the order of the step squared)
            v, res, gone = _newton(sub, v0[idx], theta0[idx], theta1[idx], int(steps), tolerance=1e-3)
            empty[idx] = gone
            res = sub.run(v, theta0[idx], theta1[idx], int(steps), heavy=True, record=record,
                          threshold=_CONDUCTION_SHARE * res["peak"])
            v0[idx] = v
            _store(out, idx, res, circuit.IL[idx], int(steps))
            if record:
                samples = {"fin": res, "idx": idx}
    else:
        # 1. coarse pass over the whole period: the cycle roughly closed, and where the current flows.
        # F(V0) − V0 falls with V0 (dF/dV0 < 1): started empty, a capacitor that still ends lower has
        # no steady state at all (the source cannot supply the load).
        zeros = np.zeros(size)
        whole = np.full(size, span)
        from_empty = circuit.run(zeros, zeros, whole, coarse_steps)["end"]
        empty = from_empty < -1e-9 * e_peak
        v0 = np.where(empty, 0.0, v0)
        v0, flow, gone = _newton(circuit, v0, zeros, whole, coarse_steps, tolerance=1e-3, track=np.zeros(size))
        empty |= gone
        dtheta = span / coarse_steps
        some = flow["last"] > 0
        theta0 = np.where(some, np.maximum((flow["first"] - 3) * dtheta, 0.0), 0.0)
        theta1 = np.where(some, np.minimum((flow["last"] + 2) * dtheta, span), span)
        # 2. fine passes over the window, doubling the steps until the peak current settles
        active = np.flatnonzero(~empty)
        previous = np.full(size, np.nan)
        steps = window_steps
        widened = np.zeros(size, dtype=bool)
        while active.size:
            sub = circuit.subset(active)
            v, res, gone = _newton(sub, v0[active], theta0[active], theta1[active], steps)
            v0[active] = v
            empty[active] = gone
            peak = res["peak"]
            settled = (np.abs(peak - previous[active]) <= peak_tolerance * peak + 1e-9) | gone
            if record:  # the samples are kept for every element at one common level
                settled[:] = settled.all()
            previous[active] = peak
            if settled.any():
                d = np.flatnonzero(settled)
                done = active[d]
                fin = sub.subset(d).run(v[d], theta0[done], theta1[done], steps, heavy=True, record=record,
                                        threshold=_CONDUCTION_SHARE * peak[d])
                cut = (fin["edge"] > 1e-3 * fin["peak"]) & ~widened[done]
                if cut.any():  # the window cut a pulse: those are solved over the whole period again
                    redo = done[cut]
                    theta0[redo], theta1[redo] = 0.0, span
                    widened[redo] = True
                    previous[redo] = np.nan
                    settled[d[cut]] = False
                    keep = ~cut
                    done = done[keep]
                    fin = {k: (_take(val, keep) if k != "samples" else val) for k, val in fin.items()}
                done_ok = ~empty[done]
                _store(out, done[done_ok], {k: _take(val, done_ok) for k, val in fin.items() if k != "samples"},
                       circuit.IL[done[done_ok]], steps)
                if record:
                    samples = {"fin": fin, "idx": done}
            active = active[~settled]
            if active.size and steps * 2 > max_steps:
                raise RuntimeError(f"rectifier peak current did not settle within {peak_tolerance:.1%} by "
                                   f"{steps} steps per window ({active.size} elements)")
            steps *= 2
    # A cycle that takes the capacitor to zero has no steady state with a constant-current load.
    empty |= ~(out["dc_min"] > 0.0) & (out["steps"] > 0)
    for key in out:
        if key != "steps":
            out[key][empty] = np.nan
    out["steps"][empty] = 0
    waveform = _waveform(circuit, samples, v0, theta0, theta1, shape) if record else None
    reshape = (lambda x: x.reshape(shape))
    return CycleSolution(
        dc_min=reshape(out["dc_min"]), dc_max=reshape(out["dc_max"]),
        ripple=reshape(out["dc_max"] - out["dc_min"]), peak_current=reshape(out["peak"]),
        average_current=reshape(out["avg"]), rms_current=reshape(out["rms"]),
        conduction_angle_deg=reshape(out["angle"]), capacitor_rms=reshape(out["cap_rms"]),
        start_voltage=reshape(v0), steps=reshape(out["steps"]),
        power_moments=(reshape(out["m0"]), reshape(out["m1"]), reshape(out["m2"])),
        reverse_moment=reshape(out["rev"]), window=(reshape(theta0), reshape(theta1)), empty=reshape(empty),
        waveform=waveform)


def _take(value, keep):
    if isinstance(value, tuple):
        return tuple(v[keep] for v in value)
    if isinstance(value, np.ndarray) and value.ndim:
        return value[keep]
    return value


def _store(out, idx, fin, IL, steps):
    m0, m1, m2 = fin["m"]
    mean_i, mean_i2 = fin["window_mean"]
    out["dc_min"][idx] = fin["vmin"]
    out["dc_max"][idx] = fin["vmax"]
    out["peak"][idx] = fin["peak"]
    out["avg"][idx] = m0
    out["rms"][idx] = np.sqrt(m2)
    out["angle"][idx] = fin["angle"]
    out["cap_rms"][idx] = np.sqrt(np.maximum(mean_i2 - 2.0 * IL * mean_i + IL ** 2, 0.0))
    out["m0"][idx], out["m1"][idx], out["m2"][idx] = m0, m1, m2
    out["rev"][idx] = fin["reverse"]
    out["steps"][idx] = steps


def _waveform(circuit, samples, v0, theta0, theta1, shape):
    """The recorded cycle on one phase axis per element: the linear fall before and after the window added."""
    fin, idx = samples.get("fin"), samples.get("idx")
    if fin is None or not fin["samples"]:
        return None
    slope = circuit.IL[idx] / (circuit.omega * circuit.C[idx])
    inner_t = np.stack([np.broadcast_to(s[0], idx.shape) for s in fin["samples"]], axis=1)
    inner_v = np.stack([s[2] for s in fin["samples"]], axis=1)
    inner_i = np.stack([s[3] for s in fin["samples"]], axis=1)
    pad = 24
    u = np.linspace(0.0, 1.0, pad)
    before_t = theta0[idx][:, None] * u[None, :]
    before_v = v0[idx][:, None] - slope[:, None] * before_t
    after_t = theta1[idx][:, None] + (circuit.span - theta1[idx])[:, None] * u[None, 1:]
    after_v = inner_v[:, -1:] - slope[:, None] * (after_t - theta1[idx][:, None])
    phase = np.concatenate([before_t, inner_t, after_t], axis=1)
    sub = circuit.subset(idx)
    e_peak = sub.e_peak[:, None]
    source = e_peak * np.sin(phase)
    if circuit.full_wave:
        source = np.abs(source)
    current = np.concatenate([np.zeros_like(before_t), inner_i, np.zeros_like(after_t)], axis=1)
    lead = shape if len(idx) == int(np.prod(shape)) else (len(idx),)
    k = phase.shape[1]
    return {"phase_rad": phase.reshape(lead + (k,)), "source_V": source.reshape(lead + (k,)),
            "capacitor_V": np.concatenate([before_v, inner_v, after_v], axis=1).reshape(lead + (k,)),
            "diode_A": current.reshape(lead + (k,)), "full_wave": circuit.full_wave}


@dataclass
class RectifierPoint:
    """The self-heated periodic steady state (`rectifier_operating_point`)."""

    cycle: CycleSolution
    junction_temperature: np.ndarray   # [K]
    diode_power: np.ndarray            # one diode's cycle-average forward power [W]
    package_power: np.ndarray          # the package's: all its diodes [W]
    runaway: np.ndarray                # no forward thermal balance below 1000 K
    empty: np.ndarray                  # no steady state at all: the source cannot supply the load


def rectifier_operating_point(topology: str, vac_rms, frequency, source_resistance, capacitance, load_current,
                              model, ambient, thermal_resistance, diodes_per_package, *,
                              leakage_rated_voltage=1.0, peak_tolerance=0.005, record=False,
                              passes=2) -> RectifierPoint:
    """The periodic steady state with the junction at its self-heated temperature.

    Parameters
    ----------
    model : partpick.physics.junction.ForwardModel
        One diode's (leg's) forward model at 25 °C (attributes broadcast).
    ambient : array_like
        Ta [K].
    thermal_resistance : array_like
        RthJA of the package [K/W] (it carries ``diodes_per_package`` diodes).
    diodes_per_package : array_like
        4 for a bridge package, 1 for discrete diodes.
    passes : int
        How often the cycle is solved: at Tj = Ta, then at each new Tj.

    Notes
    -----
    Tj = Ta + N·RthJA·P(Tj), P from the cycle's current moments (`CycleSolution.diode_power`),
    by Newton with a numerical slope; the cycle is solved again at the new Tj.
    """
    Ta = positive("ambient", ambient)
    Rth = nonnegative("thermal_resistance", thermal_resistance)
    count = np.asarray(diodes_per_package, dtype=float)
    tj = np.broadcast_to(Ta, np.broadcast_shapes(np.shape(Ta), np.shape(vac_rms), np.shape(load_current),
                                                 np.shape(capacitance), np.shape(model.saturation_current),
                                                 np.shape(Rth))).astype(float)
    cycle = None
    runaway = np.zeros(tj.shape, dtype=bool)
    for p in range(passes):
        Is, n, Rs = model.at(tj)
        cycle = periodic_steady_state(
            topology, vac_rms, frequency, source_resistance, capacitance, load_current, Is, n, Rs, tj,
            leakage_rated_voltage=leakage_rated_voltage, peak_tolerance=peak_tolerance,
            warm=cycle, record=record and p == passes - 1)
        tj, runaway = _thermal_balance(cycle, model, Ta, Rth * count, tj)
    Is, n, Rs = model.at(tj)
    power = cycle.diode_power(Is, n, Rs, tj)
    empty = np.broadcast_to(cycle.empty, tj.shape)
    return RectifierPoint(cycle, tj, power, power * count, runaway & ~empty, empty)


def _thermal_balance(cycle, model, Ta, gain, start):
    """Newton on g(T) = T − Ta − gain·P(T) with the cycle's moments held (no power where no steady state)."""
    def g(T):
        Is, n, Rs = model.at(T)
        return T - Ta - gain * np.nan_to_num(cycle.diode_power(Is, n, Rs, T))

    T = np.array(start, dtype=float)
    for _ in range(50):
        value = g(T)
        slope = (g(T + 0.01) - value) / 0.01
        ok = slope > 1e-6
        step = np.where(ok, -value / np.where(ok, slope, 1.0), 50.0)
        T = np.clip(T + np.clip(step, -100.0, 100.0), np.minimum(Ta, T), 1000.0)
        if np.all(np.abs(step) < 1e-4):
            break
    runaway = (T >= 1000.0) | ~(np.abs(g(T)) < 1e-2)
    return np.where(runaway, Ta, T), runaway


@dataclass
class SurgeSolution:
    peak_current: np.ndarray   # [A], one diode (leg)
    i2t: np.ndarray            # ∫i²dt over the duration [A²s]
    steps: int


def switch_on_surge(topology: str, vac_rms, frequency, source_resistance, capacitance, load_current,
                    saturation_current, ideality, series_resistance, temperature, duration, *,
                    tolerance=0.005, initial_steps=400, max_steps=51200) -> SurgeSolution:
    """Switch-on at the crest into an empty capacitor: peak current and ∫i²dt over ``duration`` [s].

    The source starts at its crest, √2·Vac·cos(ωt) (rectified for full wave), Vc(0) = 0.
    At t = 0+ the capacitor is a short: the peak is the exact load line of the crest
    through R. Backward Euler then steps to ``duration``; the step count
    doubles until peak and ∫i²dt change by less than ``tolerance``.

    The grid is geometric, t_k = h0·(r^k − 1) with t_N = duration and h0 = min(τ, duration),
    τ = (R + legs·Rs)·C: fine where the current falls fast (a fifth of the steps within the
    first 20·τ of a fast pulse), coarser later.
    """
    _check_topology(topology)
    legs = legs_in_path(topology)
    full_wave = topology != "half_wave"
    arrays = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (
        vac_rms, source_resistance, capacitance, load_current, saturation_current, ideality, series_resistance,
        temperature, duration)))
    shape = arrays[0].shape
    vac, R, C, IL, Is, n, Rs, T, dur = (x.ravel() for x in arrays)
    positive("source_resistance", R)
    positive("capacitance", C)
    positive("duration", dur)
    omega = 2.0 * np.pi * float(np.asarray(frequency, dtype=float).ravel()[0])
    a = legs * n * _K_Q * T
    r_path = R + legs * Rs
    e_peak = np.sqrt(2.0) * vac
    # t = 0+: the crest through R into the diode(s), the empty capacitor a short.
    w0 = _wright_omega(np.log(Is * r_path / a) + (e_peak + Is * r_path) / a)
    i0 = np.maximum(a / r_path * w0 - Is, 0.0)
    tau = r_path * C
    previous = None
    steps = initial_steps
    while True:
        # geometric grid t_k = h0·(r^k − 1), t_N = duration: about 80 of 400 steps in the first 20·h0
        h0 = np.minimum(tau, dur)
        log_r = np.log1p(dur / h0) / steps
        vc = np.zeros_like(vac)
        t = np.zeros_like(vac)
        i_prev = i0.copy()
        peak = i0.copy()
        i2t = np.zeros_like(vac)
        for k in range(1, steps + 1):
            t_new = dur if k == steps else h0 * np.expm1(k * log_r)
            h = t_new - t
            e = e_peak * np.cos(omega * t_new)
            if full_wave:
                e = np.abs(e)
            R_t = r_path + h / C
            vb = e - vc + IL * h / C
            w = _wright_omega(np.log(Is * R_t / a) + (vb + Is * R_t) / a)
            i = np.maximum(a / R_t * w - Is, 0.0)
            vc = vc + h * (i - IL) / C
            i2t += 0.5 * (i_prev ** 2 + i ** 2) * h
            peak = np.maximum(peak, i)
            i_prev = i
            t = t_new
        if previous is not None:
            p_prev, q_prev = previous
            if np.all(np.abs(i2t - q_prev) <= tolerance * i2t + 1e-12) and \
                    np.all(np.abs(peak - p_prev) <= tolerance * peak + 1e-9):
                break
        if steps * 2 > max_steps:
            raise RuntimeError(f"switch-on surge did not settle within {tolerance:.1%} by {steps} steps")
        previous = (peak, i2t)
        steps *= 2
    return SurgeSolution(peak.reshape(shape), i2t.reshape(shape), steps)
