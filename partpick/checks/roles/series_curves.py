"""Curve data of the ``series`` role (SPEC §4): what the plots of a series diode draw.

- ``forward``: forward I–V at the coldest and the hottest junction
  temperature of the corners, typical and (where ``vf_max_V`` is given) the
  maximum-VF model, the operating point of every corner, the load line of a
  resistive load drawing IL max at the worst-drop corner, and the
  hand-analysis tangent Vth0 + Ron·I at ``load_max_A``;
- ``junction_temperature``: self-heated Tj at IL max against ambient (forward
  and reverse state), with the Tj limit and the derating line;
- ``power``: dissipation at IL max against ambient with Pallow(Ta).

Section layout: `partpick.checks.curves`.
"""

from __future__ import annotations

import math

import numpy as np

from partpick.checks.curves import (AMBIENT_EXTENSION_K, CURVE_POINTS, format_engineering, number,
                                    record_forward_model, record_thermal, thermal_sections)
from partpick.physics.constants import T0_K, celsius_to_kelvin, kelvin_to_celsius
from partpick.physics.leakage import leakage_law
from partpick.physics.thermal import blocking_state, self_heated_forward

__all__ = ["series_curves"]


def series_curves(req: dict, part: dict, candidate: dict, notes: list[str]) -> dict:
    model = record_forward_model(part, notes)
    rth, tj_max, pd, pd_ref = record_thermal(part, req, notes)
    out = {"forward": None, "junction_temperature": None, "power": None}
    if model is None:
        return out
    vf_max, vf_at = number(part, "vf_max_V"), number(part, "vf_max_at_A")
    max_model = model.with_max_vf(vf_max, vf_at) if vf_max is not None and vf_at is not None else None
    if max_model is not None and float(max_model.saturation_current) == float(model.saturation_current):
        notes.append("VF max is not above the typical curve: the typical model is the checked one")
        max_model = None
    checked = max_model if max_model is not None else model

    supply = np.array([req["supply_min_V"], req["supply_max_V"]], dtype=float)
    loads = np.array([req["load_min_A"], req["load_max_A"]], dtype=float)
    ambients_c = np.array([req["ambient_min_C"], req["ambient_max_C"]], dtype=float)
    ambients = celsius_to_kelvin(ambients_c)
    load_max = float(loads.max())

    # Every corner's operating point; the diode passes the load current, so the
    # supply does not move the point (it moves the output, supply − VF).
    I, Ta = np.meshgrid(loads, ambients, indexing="ij")
    steady = self_heated_forward(checked, I, Ta, rth)
    cold_v = checked.voltage(I, Ta)
    runaway = np.asarray(steady.runaway, dtype=bool)
    steady_tj = np.where(runaway, np.nan, steady.junction_temperature)
    if runaway.any():
        notes.append("forward thermal runaway at some corners: their steady points are not drawn")
    tj_cold = float(ambients.min())
    tj_hot = float(np.nanmax(steady_tj)) if np.isfinite(steady_tj).any() else float(ambients.max())

    positive_loads = loads[loads > 0]
    i_high = 1.5 * max(load_max, vf_at or 0.0, 1e-6)
    i_low = min(float(positive_loads.min()) if positive_loads.size else i_high, i_high) * 1e-2
    i_low = min(i_low, i_high * 1e-4)
    current = np.geomspace(i_low, i_high, CURVE_POINTS)
    curves = []
    for label_model, m, role in (("typical", model, "typical"), ("max VF", max_model, "maximum")):
        if m is None:
            continue
        for name, T in (("coldest", tj_cold), ("hottest", tj_hot)):
            t_c = kelvin_to_celsius(T)
            curves.append({
                "label": f"{label_model}, Tj {t_c:.0f} °C ({name})".replace("-", "−"),
                "x": np.asarray(m.voltage(current, T), dtype=float),
                "y": current.copy(),
                "role": f"{role}_{'cold' if name == 'coldest' else 'hot'}",
                "temperature_C": t_c,
            })

    points_x, points_y, corners = [], [], []
    for state, volts, tj in (("cold_start", cold_v, Ta), ("steady", steady.voltage, steady_tj)):
        for i in range(loads.size):
            for j in range(ambients.size):
                if not np.isfinite(tj[i, j]):
                    continue
                points_x.append(float(volts[i, j]))
                points_y.append(float(loads[i]))
                corners.append({"load_A": float(loads[i]), "ambient_C": float(ambients_c[j]), "state": state,
                                "junction_temp_C": float(kelvin_to_celsius(tj[i, j]))})
    points = [{"label": "corner operating points", "x": np.array(points_x), "y": np.array(points_y),
               "corners": corners, "role": "corners"}]
    datasheet = part.get("vf_points") or []
    if datasheet:
        points.append({"label": "datasheet VF points (25 °C)", "x": np.array([p[1] for p in datasheet], float),
                       "y": np.array([p[0] for p in datasheet], float), "corners": [], "role": "datasheet"})

    tangent = None
    load_line = None
    if load_max > 0:
        # The worst-drop corner: the largest VF over corners and both states, at IL max.
        candidates_v = np.concatenate([cold_v[loads == load_max].ravel(),
                                       np.where(runaway, -np.inf, steady.voltage)[loads == load_max].ravel()])
        candidates_t = np.concatenate([Ta[loads == load_max].ravel(), steady_tj[loads == load_max].ravel()])
        worst = int(np.argmax(candidates_v))
        t_worst = float(candidates_t[worst])
        v_op = float(candidates_v[worst])
        vth0, ron = checked.tangent(load_max, t_worst)
        metrics = (candidate or {}).get("metrics") or {}
        tangent = {"vth0_V": float(vth0), "ron_ohm": float(ron), "current_A": load_max,
                   "junction_temp_C": float(kelvin_to_celsius(t_worst)), "voltage_V": v_op}
        if metrics.get("vth0_V") is not None and abs(metrics["vth0_V"] - vth0) > 1e-3:
            notes.append(f"hand model here Vth0 = {vth0:.4f} V differs from the check's {metrics['vth0_V']:.4f} V")
        # Dense in log spacing too, so that the line shows on a log current axis.
        i_line = np.concatenate([[0.0], current])
        curves.append({"label": f"hand model Vth0 + Ron·I ({float(vth0):.3f} V + {format_engineering(ron, 'Ω')})",
                       "x": vth0 + ron * i_line, "y": i_line, "role": "tangent",
                       "temperature_C": tangent["junction_temp_C"]})
        # A resistive load drawing IL max at the lowest supply and the worst-drop Tj:
        # R = (Vs − VF)/IL, its line I = (Vs − V)/R crosses the curve at the operating point.
        vs = float(supply.min())
        if vs > v_op:
            r_load = (vs - v_op) / load_max
            v_line = np.linspace(0.0, float(np.max([c["x"].max() for c in curves])), 2)
            load_line = {"supply_V": vs, "resistance_ohm": r_load, "junction_temp_C": tangent["junction_temp_C"],
                         "current_A": float(checked.loadline(vs, r_load, t_worst))}
            curves.append({"label": f"load line: {format_engineering(vs, 'V')} through "
                                    f"{format_engineering(r_load, 'Ω')} (IL max at Vs min)",
                           "x": v_line, "y": (vs - v_line) / r_load, "role": "load_line",
                           "temperature_C": tangent["junction_temp_C"]})
    out["forward"] = {
        "title": f"{part.get('part_number', '')}: forward I–V",
        "x": {"name": "Forward voltage VF", "unit": "V"},
        "y": {"name": "Forward current IF", "unit": "A"},
        "curves": curves, "points": points, "hlines": [], "vlines": [],
        "tangent": tangent, "load_line": load_line,
        "junction_temps_C": (float(kelvin_to_celsius(tj_cold)), float(kelvin_to_celsius(tj_hot))),
    }

    # Tj against ambient at the worst (largest) load.
    amb_c = np.linspace(ambients_c.min() - AMBIENT_EXTENSION_K, ambients_c.max() + AMBIENT_EXTENSION_K,
                        CURVE_POINTS)
    amb = celsius_to_kelvin(amb_c)
    heat = self_heated_forward(checked, load_max, amb, rth)
    tj_curve = np.where(heat.runaway, np.nan, kelvin_to_celsius(np.where(heat.runaway, T0_K, heat.junction_temperature)))
    tj_curves = [{"label": f"forward state, steady, IL {format_engineering(load_max, 'A')}",
                  "x": amb_c, "y": tj_curve, "role": "tj_forward"}]
    # The continuous reverse voltage of the checks: reverse_V, default the supply reversed (a
    # reverse_transient_V is a pulse: it never heats the junction, SPEC §3).
    vr = number(req, "reverse_V", float(req["supply_max_V"]))
    ir, ir_vr, ir_t = (number(part, k) for k in ("ir_A", "ir_vr_V", "ir_t_C"))
    if ir is not None and ir_vr is not None and rth > 0:
        ir_t = 25.0 if ir_t is None else ir_t
        hot_t = number(part, "ir_hot_t_C")
        law = leakage_law(ir, ir_vr, celsius_to_kelvin(ir_t), number(part, "ir_double_K", 10.0),
                          number(part, "ir_hot_A", math.nan),
                          celsius_to_kelvin(hot_t) if hot_t is not None else math.nan)
        rev = blocking_state(law, vr, amb, rth)
        rev_tj = np.where(rev.runaway, np.nan, kelvin_to_celsius(np.where(rev.runaway, T0_K, rev.junction_temperature)))
        tj_curves.append({"label": f"reverse state, VR {format_engineering(vr, 'V')}", "x": amb_c, "y": rev_tj,
                          "role": "tj_reverse"})
        if np.any(rev.runaway):
            notes.append("reverse-state thermal runaway within the plotted ambient range (gap in the curve)")
    out["junction_temperature"], out["power"] = thermal_sections(
        part, candidate, "power", amb_c, tj_curves, np.where(heat.runaway, np.nan, heat.power), rth, tj_max, pd, pd_ref,
        f"forward dissipation, IL {format_engineering(load_max, 'A')}", req)
    return out
