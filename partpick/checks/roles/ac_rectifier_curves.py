"""Curve data of the ``ac_rectifier`` role (SPEC §4a): what the plots of an AC rectifier draw.

- ``ac_cycle``: one period of the source EMF (both half-windings' rectified
  share for full wave) and the capacitor voltage at the worst corner (the
  corner of the largest diode peak current), with the ripple trough marked;
- ``ac_current``: the diode currents over the same period, the conduction
  pulse (where the current exceeds 1 % of its peak) and its peak marked;
- ``forward``: the diode's (one leg's) forward I–V at the coldest and the
  hottest junction temperature, the conduction range (1 % of the peak to the
  peak) shaded, the average and the peak current marked;
- ``junction_temperature`` and ``power``: the self-heated Tj and the package's
  cycle-average power at the worst corner against ambient.

Section layout: `partpick.checks.curves`.
"""

from __future__ import annotations

import numpy as np

from partpick.checks.curves import (AMBIENT_EXTENSION_K, CURVE_POINTS, corner_label, format_engineering, number,
                                    record_forward_model, record_thermal, thermal_sections)
from partpick.physics.constants import celsius_to_kelvin, kelvin_to_celsius
from partpick.physics.junction import ForwardModel
from partpick.physics.rectifier import rectifier_operating_point

__all__ = ["ac_rectifier_curves", "ac_rectifier_curves_many", "worst_corner"]

_THERMAL_POINTS = 21  # each point is a periodic steady state: fewer than the other roles' curves


def worst_corner(req: dict, candidate: dict) -> dict:
    """The corner of the largest diode peak current (the candidate's ``repetitive_peak`` check), else
    AC max · load max · ambient min · capacitance high end."""
    for check in (candidate or {}).get("checks", []) or []:
        corner = check.get("corner") or {}
        if check.get("name") == "repetitive_peak" and corner.get("vac_Vrms") is not None:
            return dict(corner)
    ac = req["ac"]
    tol = float(ac.get("capacitance_tol_pct") or 20.0) / 100.0
    return {"vac_Vrms": float(ac["vac_max_Vrms"]), "load_A": float(req["load_max_A"]),
            "ambient_C": float(req["ambient_min_C"]), "capacitance_F": float(ac["capacitance_F"]) * (1 + tol),
            "state": "steady"}


def ac_rectifier_curves(req: dict, part: dict, candidate: dict, notes: list[str]) -> dict:
    return ac_rectifier_curves_many(req, [part], [candidate], [notes])[0]


def ac_rectifier_curves_many(req: dict, parts: list, candidates: list, notes_list: list) -> list[dict]:
    """The sections of several parts from one vectorised solve (the window plots up to four).

    Each part's row: element 0 its worst corner, then the ambient sweep of its Tj and power
    curves at that corner's AC voltage, load and capacitance; a solve costs its steps, not
    its elements, so one call for every part costs about what one part's does.
    """
    ac = req["ac"]
    topology = ac["topology"]
    f = float(ac["frequency_Hz"])
    amb_c = np.linspace(float(req["ambient_min_C"]) - AMBIENT_EXTENSION_K,
                        float(req["ambient_max_C"]) + AMBIENT_EXTENSION_K, _THERMAL_POINTS)
    outs = [{"ac_cycle": None, "ac_current": None, "forward": None, "junction_temperature": None, "power": None}
            for _ in parts]
    rows = []
    for j, (part, candidate, notes) in enumerate(zip(parts, candidates, notes_list)):
        model = record_forward_model(part, notes)
        if model is None:
            continue
        vf_max, vf_at = number(part, "vf_max_V"), number(part, "vf_max_at_A")
        if vf_max is not None and vf_at is not None:
            model = model.with_max_vf(vf_max, vf_at)
        rows.append((j, model, record_thermal(part, req, notes), worst_corner(req, candidate)))
    if not rows:
        return outs
    col = lambda values: np.array(values, dtype=float)[:, None]  # noqa: E731 - one row per part
    fields = ("saturation_current", "ideality", "series_resistance", "band_gap", "temperature_exponent",
              "rs_temperature_exponent")
    model = ForwardModel(*(col([float(np.asarray(getattr(r[1], name))) for r in rows]) for name in fields))
    corners = [r[3] for r in rows]
    ambients = celsius_to_kelvin(np.concatenate([col([c["ambient_C"] for c in corners]),
                                                 np.broadcast_to(amb_c, (len(rows), amb_c.size))], axis=1))
    per_package = col([4.0 if parts[r[0]].get("kind") == "bridge" else 1.0 for r in rows])
    solved = rectifier_operating_point(
        topology, col([c["vac_Vrms"] for c in corners]), f, float(ac["source_ohm"]),
        col([c["capacitance_F"] for c in corners]), col([c["load_A"] for c in corners]), model, ambients,
        col([r[2][0] for r in rows]), per_package,
        leakage_rated_voltage=col([number(parts[r[0]], "ir_vr_V", 1.0) for r in rows]), record=True)
    for k, (j, part_model, (rth, tj_max, pd, pd_ref), corner) in enumerate(rows):
        part, candidate, out = parts[j], candidates[j], outs[j]
        point = _element(solved, (k, 0))
        wave = point.cycle.waveform
        pn = part.get("part_number", "")
        where = " · ".join((format_engineering(corner["vac_Vrms"], "V") + " rms",
                            corner_label(load_A=corner["load_A"], ambient_C=corner["ambient_C"]),
                            format_engineering(corner["capacitance_F"], "F")))
        if wave is not None:
            out["ac_cycle"], out["ac_current"] = _cycle_sections(pn, topology, wave, f, point, corner, where, ac)
        out["forward"] = _forward_section(pn, part_model, point, corner, req, where, part)
        sweep = _element(solved, (k, slice(1, None)))
        tj = np.where(sweep.runaway, np.nan, kelvin_to_celsius(sweep.junction_temperature))
        label = f"{'package' if per_package[k, 0] > 1 else 'diode'}, steady ({where.split(' · ')[0]}, " \
                f"{format_engineering(corner['load_A'], 'A')}, {format_engineering(corner['capacitance_F'], 'F')})"
        tj_curves = [{"label": f"Tj of the {label}", "x": amb_c, "y": tj, "role": "tj_forward"}]
        out["junction_temperature"], out["power"] = thermal_sections(
            part, candidate, "power", amb_c, tj_curves, np.where(sweep.runaway, np.nan, sweep.package_power), rth,
            tj_max, pd, pd_ref, f"cycle-average power of the {label}", req)
    return outs


def _element(point, index):
    """One element (or a slice) of a solved `RectifierPoint`: ``index`` into its element axes."""
    from dataclasses import fields, replace

    cycle = point.cycle
    take = lambda x: x[index] if isinstance(x, np.ndarray) and x.ndim else x  # noqa: E731
    values = {f.name: take(getattr(cycle, f.name)) for f in fields(cycle)
              if f.name not in ("power_moments", "window", "waveform")}
    values["power_moments"] = tuple(take(m) for m in cycle.power_moments)
    values["window"] = tuple(take(w) for w in cycle.window)
    wave = cycle.waveform
    values["waveform"] = None if wave is None else {k: (v[index] if isinstance(v, np.ndarray) else v)
                                                    for k, v in wave.items()}
    return replace(point, cycle=replace(cycle, **values), junction_temperature=take(point.junction_temperature),
                   diode_power=take(point.diode_power), package_power=take(point.package_power),
                   runaway=take(point.runaway))


def _cycle_sections(pn, topology, wave, f, point, corner, where, ac):
    """One source period in ms: EMF and capacitor voltage; diode currents with the pulse and its peak."""
    phase = np.asarray(wave["phase_rad"], dtype=float).ravel()
    vc = np.asarray(wave["capacitor_V"], dtype=float).ravel()
    cur = np.asarray(wave["diode_A"], dtype=float).ravel()
    e_peak = np.sqrt(2.0) * corner["vac_Vrms"]
    period_ms = 1000.0 / f
    if wave["full_wave"]:  # the rectified half-period twice: diode 1 in the first half, diode 2 in the second
        t = np.concatenate([phase, np.pi + phase[1:]]) / (2 * np.pi) * period_ms
        vc_full = np.concatenate([vc, vc[1:]])
        first = np.concatenate([cur, np.zeros(phase.size - 1)])
        second = np.concatenate([np.zeros(phase.size), cur[1:]])
    else:
        t = phase / (2 * np.pi) * period_ms
        vc_full, first, second = vc, cur, None
    emf = e_peak * np.sin(2 * np.pi * t / period_ms)
    names = {"bridge": ("legs D1+D4", "legs D2+D3"), "center_tap": ("diode D1", "diode D2"),
             "half_wave": ("diode D1", None)}[topology]
    curves = [{"label": "source EMF e(t)", "x": t, "y": emf, "role": "typical_cold"},
              {"label": "capacitor voltage Vc(t)", "x": t, "y": vc_full, "role": "typical_hot"}]
    if wave["full_wave"]:
        curves.insert(1, {"label": "source EMF, rectified |e(t)|", "x": t, "y": np.abs(emf), "role": "maximum_cold"})
    trough = int(np.argmin(vc_full))
    crest = int(np.argmax(vc_full))
    cycle = {
        "title": f"{pn}: one AC cycle at the worst corner ({where})",
        "x": {"name": "Time", "unit": "s"}, "y": {"name": "Voltage", "unit": "V"},
        "curves": [dict(c, x=c["x"] / 1000.0) for c in curves],
        "points": [{"label": "ripple trough and crest", "x": np.array([t[trough], t[crest]]) / 1000.0,
                    "y": np.array([vc_full[trough], vc_full[crest]]), "corners": [corner, corner], "role": "corners"}],
        "hlines": [{"label": f"min DC {format_engineering(ac['min_dc_V'], 'V')}", "value": float(ac["min_dc_V"]),
                    "role": "limit"}] if ac.get("min_dc_V") is not None else [],
        "vlines": [], "corner": corner,
        "ripple_Vpp": float(vc_full.max() - vc_full.min()),
    }
    peak = float(point.cycle.peak_current)
    threshold = 0.01 * peak
    on = np.flatnonzero(first > threshold)
    c_curves = [{"label": f"current in {names[0]}", "x": t / 1000.0, "y": first, "role": "typical_hot"}]
    if second is not None:
        c_curves.append({"label": f"current in {names[1]}", "x": t / 1000.0, "y": second, "role": "maximum_hot"})
    vlines = []
    if on.size:
        start, end = t[on[0]], t[on[-1]]
        angle = float(point.cycle.conduction_angle_deg)
        vlines = [{"label": "pulse", "value": start / 1000.0, "role": "range"},
                  {"label": f"{angle:.0f}°", "value": end / 1000.0, "role": "range"}]
    k = int(np.argmax(first))
    current = {
        "title": f"{pn}: diode currents over one AC cycle ({where})",
        "x": {"name": "Time", "unit": "s"}, "y": {"name": "Diode current", "unit": "A"},
        "curves": c_curves,
        "points": [{"label": f"peak {format_engineering(first[k], 'A')}; pulse (above 1 % of the peak) "
                             f"{float(point.cycle.conduction_angle_deg):.1f}°", "x": np.array([t[k] / 1000.0]),
                    "y": np.array([first[k]]), "corners": [corner], "role": "corners"}],
        "hlines": [{"label": f"average per diode {format_engineering(float(point.cycle.average_current), 'A')}",
                    "value": float(point.cycle.average_current), "role": "range"}],
        "vlines": vlines, "corner": corner, "peak_A": float(first[k]),
    }
    return cycle, current


def _forward_section(pn, model, point, corner, req, where, part):
    """One diode's (leg's) I–V, cold and at the worst corner's Tj, with the conduction range shaded."""
    peak = float(point.cycle.peak_current)
    avg = float(point.cycle.average_current)
    tj = float(np.ravel(point.junction_temperature)[0])
    cold = float(celsius_to_kelvin(float(req["ambient_min_C"])))
    current = np.geomspace(max(peak, 1e-6) * 1e-4, max(peak, 1e-6) * 1.3, CURVE_POINTS)
    curves = []
    for name, T, role in (("coldest", cold, "typical_cold"), ("worst corner", tj, "typical_hot")):
        curves.append({"label": f"{'leg' if part.get('kind') == 'bridge' else 'diode'} VF, Tj "
                                f"{corner_label(ambient_C=kelvin_to_celsius(T))} ({name})",
                       "x": np.asarray(model.voltage(current, T), dtype=float), "y": current.copy(), "role": role,
                       "temperature_C": float(kelvin_to_celsius(T))})
    v_peak = float(model.voltage(peak, tj)) if peak > 0 else 0.0
    return {
        "title": f"{pn}: forward I–V and the conduction range ({where})",
        "x": {"name": "Forward voltage VF", "unit": "V"}, "y": {"name": "Forward current IF", "unit": "A"},
        "curves": curves,
        "points": [{"label": "pulse peak", "x": np.array([v_peak]), "y": np.array([peak]), "corners": [corner],
                    "role": "corners"}],
        "hlines": [{"label": f"average per diode {format_engineering(avg, 'A')}", "value": avg, "role": "range"}],
        "vlines": [],
        "band": {"label": "conduction range (1 % of peak to peak)", "low": 0.01 * peak, "high": peak},
        "junction_temps_C": (float(kelvin_to_celsius(cold)), float(kelvin_to_celsius(tj))),
    }
