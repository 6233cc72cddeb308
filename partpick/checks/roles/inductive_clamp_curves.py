"""Curve data of the coil clamp: coil current and switch voltage after turn-off, diode only and diode + Zener.

The sections follow `partpick.checks.curves` (title, axes, curves, points,
hlines, vlines). They are drawn at the corner of the largest turn-off current
(supply max, coldest ambient: the lowest winding resistance), the diode at
the ambient; the Zener curve at the low end of its tolerance for the current
(the slowest release) and at the high end for the switch voltage (the largest
stress), as the checks take them.
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np

from partpick.checks.curves import number, record_forward_model
from partpick.physics.coil import DiodeDrop, coil_decay, coil_resistance, periodic_state
from partpick.physics.constants import celsius_to_kelvin

__all__ = ["coil_sections"]

_POINTS = 160


def _trajectory(L, R, drop, I0, vz):
    """Time [s] and current [A] of the decay from I0 to 1e-4·I0 (and zero where a Zener stops it)."""
    currents = np.concatenate([np.geomspace(I0 * 1e-4, I0 * 0.999, _POINTS)[::-1]])
    times = coil_decay(L, R, drop, np.full(currents.shape, I0), currents, vz).time
    t = np.concatenate([[0.0], times])
    i = np.concatenate([[I0], currents])
    if vz > 0:  # with a Zener the current reaches zero in finite time
        t = np.concatenate([t, [float(coil_decay(L, R, drop, I0, 0.0, vz).time)]])
        i = np.concatenate([i, [0.0]])
    return t, i


def coil_sections(requirement: dict, part: dict, candidate: dict | None, notes: list[str]) -> dict:
    """``coil_current`` and ``switch_voltage`` sections for one part (None where the model is missing).

    Parameters
    ----------
    requirement : dict
        The requirement's keys (`Requirement.to_dict`), with its ``coil`` table.
    part : dict
        The part record; its forward model is moved to VF max where given, as the checks do.
    candidate : dict, optional
        The part's JSON entry (the limits drawn come from the requirement).
    """
    coil = SimpleNamespace(**requirement["coil"])
    out = {"coil_current": None, "switch_voltage": None}
    model = record_forward_model(part, notes)
    if model is None:
        notes.append("no forward model: the turn-off curves need the diode's curve")
        return out
    vf_max, vf_at = number(part, "vf_max_V"), number(part, "vf_max_at_A")
    if vf_max is not None and vf_at is not None:
        model = model.with_max_vf(vf_max, vf_at)
    ambient_min = float(requirement["ambient_min_C"])
    ambient_K = float(celsius_to_kelvin(ambient_min))
    supply = float(requirement["supply_max_V"])
    R = float(coil_resistance(coil.resistance_ohm, ambient_K, -coil.resistance_tol_pct / 100.0))
    L = coil.inductance_H
    drop = DiodeDrop.from_model(model, ambient_K)
    drop = DiodeDrop(*(np.ravel(np.asarray(x, float))[0] for x in (drop.saturation_current, drop.ideality,
                                                                   drop.series_resistance, drop.temperature)))
    clamps = [("diode only", 0.0, 0.0, "typical_cold")]
    if coil.zener_V is not None:
        low = coil.zener_V * (1 - coil.zener_tol_pct / 100.0)
        high = coil.zener_V * (1 + coil.zener_tol_pct / 100.0)
        clamps.append((f"diode + Zener {coil.zener_V:g} V", low, high, "maximum_hot"))
    current_curves, voltage_curves, release_points = [], [], []
    def turn_off_current(vz):
        if coil.switching_hz > 0:  # the periodic peak depends on the clamp through the current left at turn-on
            return float(periodic_state(L, R, drop, supply, coil.switching_hz, coil.duty_pct / 100.0,
                                        vz).peak_current)
        return supply / R

    for label, vz_low, vz_high, role in clamps:
        I0 = turn_off_current(vz_low)
        t, i = _trajectory(L, R, drop, I0, vz_low)
        end = f" (Vz low end {vz_low:.3g} V)" if vz_low else ""
        current_curves.append({"label": label + end, "x": t, "y": i, "role": role})
        if coil.dropout_A is not None and coil.dropout_A < I0:
            release = float(coil_decay(L, R, drop, I0, coil.dropout_A, vz_low).time)
            release_points.append((release, coil.dropout_A, label))
        I0_high = turn_off_current(vz_high)
        t2, i2 = _trajectory(L, R, drop, I0_high, vz_high)
        v = supply + np.asarray(drop(i2), float) + np.where(i2 > 0, vz_high, 0.0)
        end = f" (Vz high end {vz_high:.3g} V)" if vz_high else ""
        voltage_curves.append({"label": label + end, "x": t2, "y": v, "role": role})
    pn = part.get("part_number", "")
    corner = f"{supply:g} V, {ambient_min:g} °C, winding {R:.3g} Ω"
    hlines = []
    if coil.dropout_A is not None:
        hlines.append({"label": f"drop-out current {coil.dropout_A:g} A", "value": coil.dropout_A, "role": "limit"})
    vlines = []
    if coil.max_release_s is not None:
        vlines.append({"label": f"release time limit {coil.max_release_s * 1e3:g} ms", "value": coil.max_release_s,
                       "role": "limit"})
    points = []
    if release_points:
        points.append({"label": "release (current reaches drop-out)", "x": np.array([p[0] for p in release_points]),
                       "y": np.array([p[1] for p in release_points]), "corners": [], "role": "corners"})
    out["coil_current"] = {
        "title": f"{pn}: coil current after turn-off ({corner})",
        "x": {"name": "Time after turn-off", "unit": "s"}, "y": {"name": "Coil current", "unit": "A"},
        "curves": current_curves, "points": points, "hlines": hlines, "vlines": vlines,
    }
    limit = coil.switch_max_V * coil.switch_limit_pct / 100.0
    out["switch_voltage"] = {
        "title": f"{pn}: switch voltage after turn-off ({corner})",
        "x": {"name": "Time after turn-off", "unit": "s"}, "y": {"name": "Switch voltage", "unit": "V"},
        "curves": voltage_curves, "points": [],
        "hlines": [{"label": f"switch limit {coil.switch_limit_pct:g} % of {coil.switch_max_V:g} V", "value": limit,
                    "role": "limit"},
                   {"label": f"switch rating {coil.switch_max_V:g} V", "value": coil.switch_max_V, "role": "rating"}],
        "vlines": [],
    }
    return out
