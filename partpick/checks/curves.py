"""Curve data for one part under one requirement: what the plots draw (numpy only).

`curves_for` evaluates the physics core over the ranges a designer and a
reviewer look at and returns plain dicts of numpy arrays, each section with
its axis names and base units, so that `partpick.plots` can draw the same
data in the window and in the reports:

- ``forward`` (series role): forward I–V at the coldest and the hottest
  junction temperature of the corners, typical and (where ``vf_max_V`` is
  given) the maximum-VF model, the operating point of every corner, the load
  line of a resistive load drawing IL max at the worst-drop corner, and the
  hand-analysis tangent Vth0 + Ron·I at ``load_max_A``;
- ``breakdown`` (Zener shunt): the Zener I–V (Iz against Vz) for both ends of
  the Vz tolerance, cold and hot, the corner operating points and the
  resistor's load lines;
- ``zener_output`` (Zener shunt): output against supply from 0 to 1.3 × the
  maximum supply, at min and max load, for the low and the high end of the
  tolerances, with the allowed band, so that the knee where regulation is
  lost shows;
- ``junction_temperature``: self-heated Tj at the worst load against ambient
  from ambient_min − 10 K to ambient_max + 10 K, with the Tj limit and the Tj
  the part reaches when it dissipates its allowed power (the derating line:
  the power check passes where the Tj curve lies below it);
- ``power``: dissipation at the worst load against ambient with the allowed
  power Pallow(Ta) and the policy's share of it.

A section is a dict with ``title``, ``x`` and ``y`` (``{"name", "unit"}``),
``curves`` (``label``, ``x``, ``y``, ``role``), ``points`` (``label``, ``x``,
``y``, ``corners``), ``hlines``/``vlines`` (``label``, ``value``, ``role``)
and optionally ``band`` (``label``, ``low``, ``high``). Temperatures on axes
are in °C (what a designer reads); the physics inside runs in kelvin.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping

import numpy as np

from partpick.physics.constants import T0_K, celsius_to_kelvin, kelvin_to_celsius
from partpick.physics.eseries import default_tolerance_pct
from partpick.physics.junction import (
    PN_BAND_GAP_EV,
    PN_TEMPERATURE_EXPONENT,
    SCHOTTKY_BAND_GAP_EV,
    SCHOTTKY_TEMPERATURE_EXPONENT,
    ForwardModel,
)
from partpick.physics.leakage import reverse_current
from partpick.physics.thermal import allowed_power, reverse_thermal_state, self_heated_forward
from partpick.physics.zener import ZenerModel, solve_shunt
from partpick.units import format_engineering

__all__ = ["curves_for", "format_engineering", "corner_label", "SUPPLY_SPAN", "AMBIENT_EXTENSION_K"]

SUPPLY_SPAN = 1.3
"""The Zener output curve runs from 0 to this multiple of ``supply_max_V``."""

AMBIENT_EXTENSION_K = 10.0
"""The Tj-against-ambient curve extends this far beyond the ambient range [K]."""

_CURVE_POINTS = 241


# --- formatting shared with plots and report (the formatter itself lives in partpick.units) ----------


def corner_label(supply_V=None, load_A=None, ambient_C=None, state=None) -> str:
    """A corner in the app's words: "11.0 V · 1.00 A · −20 °C" (parts that are None are left out)."""
    parts = []
    if supply_V is not None:
        parts.append(format_engineering(supply_V, "V"))
    if load_A is not None:
        parts.append(format_engineering(load_A, "A"))
    if ambient_C is not None:
        parts.append(f"{'−' if ambient_C < 0 else ''}{abs(ambient_C):.0f} °C")
    if state is not None:
        parts.append(state.replace("_", " "))
    return " · ".join(parts)


# --- inputs ------------------------------------------------------------------------------------
def _requirement_dict(requirement) -> dict:
    """The requirement as a dict of SPEC §5 TOML keys (a `Requirement`, a dataclass or a dict)."""
    if isinstance(requirement, Mapping):
        return dict(requirement)
    if hasattr(requirement, "to_dict"):
        return dict(requirement.to_dict())
    if dataclasses.is_dataclass(requirement):
        return dataclasses.asdict(requirement)
    raise TypeError(f"requirement must be a Requirement or a dict of requirement keys, got {type(requirement).__name__}")


def _number(mapping: Mapping, key: str, default=None):
    value = mapping.get(key) if mapping is not None else None
    if value is None:
        return default
    value = float(value)
    return value if math.isfinite(value) else default


def _forward_model(part: dict, notes: list[str]) -> ForwardModel | None:
    schottky = part.get("kind") == "schottky"
    band_gap = _number(part, "eg_eV", SCHOTTKY_BAND_GAP_EV if schottky else PN_BAND_GAP_EV)
    exponent = _number(part, "is_temp_exponent",
                       SCHOTTKY_TEMPERATURE_EXPONENT if schottky else PN_TEMPERATURE_EXPONENT)
    rs_exponent = _number(part, "rs_temp_exponent", 0.0)
    Is, n, Rs = (_number(part, key) for key in ("is_A", "n", "rs_ohm"))
    if Is is None or n is None or Rs is None:
        points = part.get("vf_points") or []
        if len(points) < 2:
            notes.append("no forward model (is_A, n, rs_ohm) and too few VF points: no forward curve")
            return None
        current, voltage = (np.array(column, dtype=float) for column in zip(*points))
        # imported here: scipy.optimize costs half a second of start-up that a
        # JSON or table rendering never needs
        from partpick.physics.fit import FitRefused, fit_forward_model

        try:
            fit = fit_forward_model(current, voltage, T0_K, band_gap, exponent)
        except FitRefused as exc:
            notes.append(f"forward model not given and the fit to the VF points was refused: {exc}")
            return None
        Is, n, Rs = fit.saturation_current, fit.ideality, fit.series_resistance
        notes.append("forward model fitted here to the part's VF points (not stored in the library)")
    return ForwardModel(Is, n, Rs, band_gap, exponent, rs_exponent)


def _thermal(part: dict, req: dict, notes: list[str]):
    """(RthJA [K/W], Tj max [°C] or None, Pd [W] or None, Pd reference [°C]), as the checks resolve them.

    Pd and RthJA give each other (SPEC §3: RthJA = (Tj max − pd_ref_C)/Pd); a design RthJA from the
    requirement replaces the part's, and the allowed power follows from it.
    """
    tj_max = _number(part, "tj_max_C")
    pd_ref = _number(part, "pd_ref_C", 25.0)
    pd = _number(part, "pd_W")
    rth = _number(part, "rth_ja_K_per_W")
    rates = tj_max is not None and tj_max > pd_ref
    design = _number(req, "rth_ja_K_per_W")
    if design is not None:
        rth = design
        pd = (tj_max - pd_ref) / rth if rates else None
        notes.append(f"RthJA = {rth:g} K/W from the requirement (the design's board) replaces the part's")
    elif rth is None and pd is not None and rates:
        rth = (tj_max - pd_ref) / pd
    elif pd is None and rth is not None and rates:
        pd = (tj_max - pd_ref) / rth
    if rth is None:
        notes.append("no RthJA or Pd: self-heating is not shown (Tj = Ta)")
        rth = 0.0
    return rth, tj_max, pd, pd_ref


def _check(candidate: dict, name: str) -> dict | None:
    for check in (candidate or {}).get("checks", []) or []:
        if check.get("name") == name:
            return check
    return None


def _tj_limit(candidate: dict, tj_max: float | None):
    check = _check(candidate, "junction_temp")
    if check is not None and check.get("limit") is not None:
        source = check.get("limit_source") or "check limit"
        return float(check["limit"]), f"Tj limit ({source})"
    if tj_max is not None:
        return tj_max, "Tj max (rating)"
    return None, None


def _power_fraction(candidate: dict, name: str, pd, tj_max, pd_ref) -> tuple[float, str]:
    """The share of Pallow the power check allows, read back from the candidate's check (1 = the rating).

    The series check states it directly (% of Pallow); the Zener check gives the allowed power in W at
    its worst corner, which is that share of Pallow at the corner's ambient.
    """
    check = _check(candidate, name)
    if check is None or check.get("limit") is None:
        return 1.0, "rating"
    unit = check.get("unit") or ""
    limit = float(check["limit"])
    source = check.get("limit_source") or ""
    if unit.startswith("%"):
        return limit / 100.0, source
    corner = check.get("corner") or {}
    if unit == "W" and corner.get("ambient_C") is not None and pd and tj_max is not None and tj_max > pd_ref:
        rated = float(allowed_power(celsius_to_kelvin(corner["ambient_C"]), pd, celsius_to_kelvin(tj_max),
                                    celsius_to_kelvin(pd_ref)))
        if rated > 0:
            return limit / rated, source
    return 1.0, "rating"


# --- series role -------------------------------------------------------------------------------
def _series_curves(req: dict, part: dict, candidate: dict, notes: list[str]) -> dict:
    model = _forward_model(part, notes)
    rth, tj_max, pd, pd_ref = _thermal(part, req, notes)
    out = {"forward": None, "junction_temperature": None, "power": None}
    if model is None:
        return out
    vf_max, vf_at = _number(part, "vf_max_V"), _number(part, "vf_max_at_A")
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
    current = np.geomspace(i_low, i_high, _CURVE_POINTS)
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
                        _CURVE_POINTS)
    amb = celsius_to_kelvin(amb_c)
    heat = self_heated_forward(checked, load_max, amb, rth)
    tj_curve = np.where(heat.runaway, np.nan, kelvin_to_celsius(np.where(heat.runaway, T0_K, heat.junction_temperature)))
    tj_curves = [{"label": f"forward state, steady, IL {format_engineering(load_max, 'A')}",
                  "x": amb_c, "y": tj_curve, "role": "tj_forward"}]
    # The reverse voltage of the checks: reverse_V (default the supply reversed), or the transient if larger.
    vr = max(_number(req, "reverse_V", float(req["supply_max_V"])), _number(req, "reverse_transient_V", 0.0))
    ir, ir_vr, ir_t = (_number(part, k) for k in ("ir_A", "ir_vr_V", "ir_t_C"))
    if ir is not None and ir_vr is not None and rth > 0:
        ir_t = 25.0 if ir_t is None else ir_t
        doubling = _number(part, "ir_double_K", 10.0)
        p0 = vr * reverse_current(ir, ir_vr, celsius_to_kelvin(ir_t), vr, amb, doubling)
        rev = reverse_thermal_state(p0, doubling, amb, rth)
        rev_tj = np.where(rev.runaway, np.nan, kelvin_to_celsius(np.where(rev.runaway, T0_K, rev.junction_temperature)))
        tj_curves.append({"label": f"reverse state, VR {format_engineering(vr, 'V')}", "x": amb_c, "y": rev_tj,
                          "role": "tj_reverse"})
        if np.any(rev.runaway):
            notes.append("reverse-state thermal runaway within the plotted ambient range (gap in the curve)")
    out["junction_temperature"], out["power"] = _thermal_sections(
        part, candidate, "power", amb_c, tj_curves, np.where(heat.runaway, np.nan, heat.power), rth, tj_max, pd, pd_ref,
        f"forward dissipation, IL {format_engineering(load_max, 'A')}", req)
    return out


# --- Zener shunt role --------------------------------------------------------------------------
def _zener_parameters(part: dict) -> dict:
    """The ZenerModel arguments of the part, without the voltage (which carries the tolerance end)."""
    return dict(test_current=float(part["izt_A"]), test_impedance=float(part["zzt_ohm"]),
                knee_current=_number(part, "izk_A", math.nan), knee_impedance=_number(part, "zzk_ohm", math.nan),
                temperature_coefficient=_number(part, "vz_tc_pct_per_K", 0.0) / 100.0)


class _ShuntBatch:
    """Collects shunt-regulator operating points and solves them all in one vectorised call.

    `solve_shunt` iterates until its slowest element converges, so one call over every
    point the curves need costs little more than the slowest single point.
    """

    def __init__(self, parameters: dict, thermal_resistance: float):
        self._parameters = parameters
        self._rth = thermal_resistance
        self._jobs: list[tuple[str, tuple, list[np.ndarray]]] = []

    def add(self, key: str, vz, supply, resistance, load, ambient_C) -> None:
        arrays = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in
                                       (vz, supply, resistance, load, celsius_to_kelvin(np.asarray(ambient_C, float)))))
        self._jobs.append((key, arrays[0].shape, [a.ravel() for a in arrays]))

    def solve(self) -> dict:
        columns = [np.concatenate([job[2][i] for job in self._jobs]) for i in range(5)]
        vz, supply, resistance, load, ambient = columns
        point = solve_shunt(ZenerModel(vz, **self._parameters), supply, resistance, load, ambient, self._rth)
        fields = {name: np.asarray(getattr(point, name), dtype=float)
                  for name in ("output_voltage", "zener_current", "junction_temperature", "power")}
        fields["collapsed"] = np.asarray(point.collapsed, dtype=bool)
        out, start = {}, 0
        for key, shape, flat in self._jobs:
            size = flat[0].size
            out[key] = {name: values[start:start + size].reshape(shape) for name, values in fields.items()}
            start += size
        return out


def _zener_curves(req: dict, part: dict, candidate: dict, notes: list[str]) -> dict:
    out = {"breakdown": None, "zener_output": None, "junction_temperature": None, "power": None}
    zreq = req.get("zener") or {}
    missing = [k for k in ("vz_V", "vz_tol_pct", "izt_A", "zzt_ohm") if _number(part, k) is None]
    if missing:
        notes.append(f"Zener data missing ({', '.join(missing)}): no Zener curves")
        return out
    metrics = (candidate or {}).get("metrics") or {}
    resistor = metrics.get("series_resistor_ohm")
    if resistor is None:
        resistor = _number(zreq, "resistor_ohm")
    if resistor is None or not resistor > 0:
        notes.append("no series resistor (the design is not feasible): no Zener curves")
        return out
    resistor = float(resistor)
    series = zreq.get("resistor_series") or "E24"
    tol_r = _number(zreq, "resistor_tolerance_pct", default_tolerance_pct(series)) / 100.0
    r_end = {"low": resistor * (1 - tol_r), "high": resistor * (1 + tol_r)}
    rth, tj_max, pd, pd_ref = _thermal(part, req, notes)
    parameters = _zener_parameters(part)
    tol = float(part["vz_tol_pct"]) / 100.0
    vz_end = {"low": float(part["vz_V"]) * (1 - tol), "high": float(part["vz_V"]) * (1 + tol)}
    models = {end: ZenerModel(v, **parameters) for end, v in vz_end.items()}
    tc = _number(part, "vz_tc_pct_per_K", 0.0)
    amb_c = {"min": float(req["ambient_min_C"]), "max": float(req["ambient_max_C"])}
    # The ambient that lowers Vz goes with the low end, the one that raises it with the high end.
    lowers = "max" if tc < 0 else "min"
    raises = "min" if tc < 0 else "max"
    ends = (("low", "high", lowers), ("high", "low", raises))  # (Vz end, resistor end, ambient end)
    loads = {"min": float(req["load_min_A"]), "max": float(req["load_max_A"])}
    s_min, s_max = float(req["supply_min_V"]), float(req["supply_max_V"])
    target = float(zreq["target_V"])
    error = float(zreq["max_regulation_error_pct"]) / 100.0

    supply = np.union1d(np.linspace(0.0, SUPPLY_SPAN * s_max, _CURVE_POINTS), [s_min, s_max])
    amb_grid_c = np.linspace(amb_c["min"] - AMBIENT_EXTENSION_K, amb_c["max"] + AMBIENT_EXTENSION_K, _CURVE_POINTS)
    batch = _ShuntBatch(parameters, rth)
    for v_end, res_end, amb_end in ends:
        for load_end in ("min", "max"):
            batch.add(f"output {v_end} {load_end}", vz_end[v_end], supply, r_end[res_end], loads[load_end],
                      amb_c[amb_end])
    # Every corner × both tolerance ends, axes (supply, load, ambient, resistor end, Vz end).
    batch.add("corners", np.array([vz_end["low"], vz_end["high"]])[None, None, None, None, :],
              np.array([s_min, s_max])[:, None, None, None, None],
              np.array([r_end["low"], r_end["high"]])[None, None, None, :, None],
              np.array([loads["min"], loads["max"]])[None, :, None, None, None],
              np.array([amb_c["min"], amb_c["max"]])[None, None, :, None, None])
    # The Zener's worst thermal case: max supply, min load, every tolerance end, across ambient.
    batch.add("thermal", np.array([vz_end["low"], vz_end["high"]])[None, None, :], s_max,
              np.array([r_end["low"], r_end["high"]])[None, :, None], loads["min"], amb_grid_c[:, None, None])
    solved = batch.solve()

    curves, px, py, pc = [], [], [], []
    for v_end, res_end, amb_end in ends:
        for load_end in ("min", "max"):
            sol = solved[f"output {v_end} {load_end}"]
            label = (f"Vz {v_end}, R {res_end} ({format_engineering(r_end[res_end], 'Ω')}), "
                     f"IL {format_engineering(loads[load_end], 'A')}, {corner_label(ambient_C=amb_c[amb_end])}")
            curves.append({"label": label, "x": supply.copy(), "y": sol["output_voltage"],
                           "role": f"output_{v_end}_load_{load_end}", "vz_end": v_end, "resistor_end": res_end,
                           "load_A": loads[load_end], "ambient_C": amb_c[amb_end],
                           "resistance_ohm": r_end[res_end]})
            for s in (s_min, s_max):
                i = int(np.flatnonzero(supply == s)[0])
                px.append(float(sol["output_voltage"][i]))
                py.append(s)
                pc.append({"supply_V": s, "load_A": loads[load_end], "ambient_C": amb_c[amb_end],
                           "vz_end": v_end, "resistor_end": res_end,
                           "zener_current_A": float(sol["zener_current"][i])})
    band = {"label": f"allowed: {target:g} V ± {100 * error:g} %", "low": target * (1 - error),
            "high": target * (1 + error)}
    out["zener_output"] = {
        "title": f"{part.get('part_number', '')}: output against supply (R = {format_engineering(resistor, 'Ω')})",
        "x": {"name": "Supply voltage", "unit": "V"}, "y": {"name": "Output voltage", "unit": "V"},
        "curves": curves,
        "points": [{"label": "corners (supply min and max)", "x": np.array(py), "y": np.array(px), "corners": pc,
                    "role": "corners"}],
        "hlines": [],
        "vlines": [{"label": "supply min", "value": s_min, "role": "range"},
                   {"label": "supply max", "value": s_max, "role": "range"}],
        "band": band, "resistance_ohm": resistor, "resistor_tolerance_pct": 100 * tol_r,
    }

    # The breakdown characteristic with every corner's operating point and the resistor's load lines.
    corner = solved["corners"]
    izk = _number(part, "izk_A")
    izt = float(part["izt_A"])
    iz_all = corner["zener_current"]
    tj_all = corner["junction_temperature"]
    i_high = 1.5 * max(float(iz_all.max()), izt)
    i_low = min((izk if izk is not None else 0.05 * izt) / 20.0, i_high * 1e-3)
    current = np.geomspace(i_low, i_high, _CURVE_POINTS)
    tj_cold = float(celsius_to_kelvin(amb_c["min"]))
    tj_hot = float(tj_all.max())
    bd_curves = []
    for end in ("low", "high"):
        for name, T in (("coldest", tj_cold), ("hottest", tj_hot)):
            bd_curves.append({"label": f"Vz {end} end, Tj {corner_label(ambient_C=kelvin_to_celsius(T))} ({name})",
                              "x": np.asarray(models[end].voltage_at(current, T), float), "y": current.copy(),
                              "role": f"{'maximum' if end == 'high' else 'typical'}_{'cold' if name == 'coldest' else 'hot'}",
                              "temperature_C": float(kelvin_to_celsius(T))})
    v_span = np.array([min(c["x"].min() for c in bd_curves), max(c["x"].max() for c in bd_curves)])
    for s, l_end, res_end in ((s_min, "max", "high"), (s_max, "min", "low")):
        r = r_end[res_end]
        bd_curves.append({"label": f"load line {format_engineering(s, 'V')}, R {format_engineering(r, 'Ω')}, "
                                   f"IL {format_engineering(loads[l_end], 'A')}",
                          "x": v_span.copy(), "y": (s - v_span) / r - loads[l_end], "role": "load_line"})
    live = ~corner["collapsed"]
    corners = []
    names = {"s": (s_min, s_max), "l": (loads["min"], loads["max"]), "a": (amb_c["min"], amb_c["max"]),
             "r": ("low", "high"), "v": ("low", "high")}
    for idx in zip(*np.nonzero(live)):
        i_s, i_l, i_a, i_r, i_v = idx
        corners.append({"supply_V": names["s"][i_s], "load_A": names["l"][i_l], "ambient_C": names["a"][i_a],
                        "resistor_end": names["r"][i_r], "vz_end": names["v"][i_v],
                        "junction_temp_C": float(kelvin_to_celsius(tj_all[idx]))})
    iz_min = _number(zreq, "min_zener_current_A", izk)
    out["breakdown"] = {
        "title": f"{part.get('part_number', '')}: Zener I–V",
        "x": {"name": "Zener voltage Vz", "unit": "V"}, "y": {"name": "Zener current Iz", "unit": "A"},
        "curves": bd_curves,
        "points": [{"label": "corner operating points", "x": corner["output_voltage"][live],
                    "y": iz_all[live], "corners": corners, "role": "corners"}],
        "hlines": ([{"label": f"Iz min {format_engineering(iz_min, 'A')}", "value": iz_min, "role": "limit"}]
                   if iz_min is not None else []),
        "vlines": [],
        "junction_temps_C": (float(kelvin_to_celsius(tj_cold)), float(kelvin_to_celsius(tj_hot))),
    }

    hot = solved["thermal"]
    tj_curve = kelvin_to_celsius(hot["junction_temperature"].max(axis=(1, 2)))
    power = hot["power"].max(axis=(1, 2))
    worst = f"Vs {format_engineering(s_max, 'V')}, IL {format_engineering(loads['min'], 'A')}, worst ends"
    tj_curves = [{"label": f"Zener Tj ({worst})", "x": amb_grid_c, "y": tj_curve, "role": "tj_forward"}]
    out["junction_temperature"], out["power"] = _thermal_sections(
        part, candidate, "zener_power", amb_grid_c, tj_curves, power, rth, tj_max, pd, pd_ref,
        f"Zener dissipation ({worst})", req)
    return out


def _thermal_sections(part, candidate, power_check, amb_c, tj_curves, power, rth, tj_max, pd, pd_ref,
                      power_label, req):
    """The Tj-against-ambient and power-against-ambient sections (shared by both roles)."""
    limit, limit_label = _tj_limit(candidate, tj_max)
    hlines = []
    if limit is not None:
        hlines.append({"label": f"{limit_label}: {corner_label(ambient_C=limit)}", "value": limit, "role": "limit"})
    if tj_max is not None and (limit is None or abs(limit - tj_max) > 1e-9):
        hlines.append({"label": f"Tj max (rating): {corner_label(ambient_C=tj_max)}", "value": tj_max,
                       "role": "rating"})
    fraction, source = _power_fraction(candidate, power_check, pd, tj_max, pd_ref)
    curves = list(tj_curves)
    power_curves = [{"label": power_label, "x": amb_c, "y": np.asarray(power, float), "role": "power"}]
    if pd is not None and tj_max is not None and tj_max > pd_ref:
        p_allow = allowed_power(celsius_to_kelvin(amb_c), pd, celsius_to_kelvin(tj_max), celsius_to_kelvin(pd_ref))
        share = f" × {100 * fraction:.3g} %" if abs(fraction - 1.0) > 1e-9 else ""
        curves.append({"label": f"Tj at allowed power{share} (derating line)", "x": amb_c,
                       "y": amb_c + fraction * p_allow * rth, "role": "derating"})
        power_curves.append({"label": "allowed power Pallow(Ta) (rating)", "x": amb_c, "y": p_allow,
                             "role": "rating"})
        if share:
            power_curves.append({"label": f"Pallow{share}" + (f" ({source})" if source else ""), "x": amb_c,
                                 "y": fraction * p_allow, "role": "derating"})
    vlines = [{"label": "ambient min", "value": float(req["ambient_min_C"]), "role": "range"},
              {"label": "ambient max", "value": float(req["ambient_max_C"]), "role": "range"}]
    pn = part.get("part_number", "")
    tj_section = {"title": f"{pn}: junction temperature against ambient",
                  "x": {"name": "Ambient Ta", "unit": "°C"}, "y": {"name": "Junction temperature Tj", "unit": "°C"},
                  "curves": curves, "points": [], "hlines": hlines, "vlines": vlines,
                  "thermal_resistance_K_per_W": rth, "power_fraction": fraction}
    power_section = {"title": f"{pn}: dissipation against ambient",
                     "x": {"name": "Ambient Ta", "unit": "°C"}, "y": {"name": "Power", "unit": "W"},
                     "curves": power_curves, "points": [], "hlines": [], "vlines": [dict(v) for v in vlines]}
    return tj_section, power_section


# --- entry point -------------------------------------------------------------------------------
def curves_for(requirement, part: dict, candidate: dict | None = None) -> dict:
    """Curve data of one part under one requirement.

    Parameters
    ----------
    requirement : Requirement or dict
        The requirement (SPEC §5 keys; temperatures in °C as the keys say).
    part : dict
        The part record (SPEC §5 CSV keys, SI units, None = not known).
    candidate : dict, optional
        The part's entry in the check result; its ``metrics["series_resistor_ohm"]``
        sets the Zener resistor, its ``junction_temp`` and power checks give the
        limit lines.

    Returns
    -------
    dict
        ``part_number``, ``role``, ``notes`` (list of str: what could not be
        drawn and why) and the sections ``forward``, ``breakdown``,
        ``zener_output``, ``junction_temperature``, ``power`` (None where the
        role or the data do not give one). Arrays are float64 numpy arrays,
        free of NaN except where a gap marks thermal runaway.
    """
    req = _requirement_dict(requirement)
    role = req.get("role")
    notes: list[str] = []
    result = {"part_number": part.get("part_number"), "role": role, "notes": notes,
              "forward": None, "breakdown": None, "zener_output": None, "junction_temperature": None, "power": None}
    if role == "series":
        result.update(_series_curves(req, part, candidate or {}, notes))
    elif role == "zener_shunt":
        result.update(_zener_curves(req, part, candidate or {}, notes))
    else:
        raise ValueError(f"requirement role must be 'series' or 'zener_shunt', got {role!r}")
    return result
