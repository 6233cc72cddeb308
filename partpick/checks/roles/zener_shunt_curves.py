"""Curve data of the ``zener_shunt`` role (SPEC §4): what the plots of a Zener shunt regulator draw.

- ``breakdown``: the Zener I–V (Iz against Vz) for both ends of the Vz
  tolerance, cold and hot, the corner operating points and the resistor's
  load lines;
- ``zener_output``: output against supply from 0 to `SUPPLY_SPAN` × the
  maximum supply, at min and max load, for the low and the high end of the
  tolerances, with the allowed band, so that the knee where regulation is
  lost shows;
- ``junction_temperature`` and ``power``: the Zener at max supply and min
  load (its worst thermal case) against ambient.

Section layout: `partpick.checks.curves`.
"""

from __future__ import annotations

import math

import numpy as np

from partpick.checks.curves import (AMBIENT_EXTENSION_K, CURVE_POINTS, corner_label, format_engineering, number,
                                    record_thermal, thermal_sections)
from partpick.physics.constants import celsius_to_kelvin, kelvin_to_celsius
from partpick.physics.eseries import default_tolerance_pct
from partpick.physics.zener import ZenerModel, solve_shunt

__all__ = ["zener_shunt_curves", "SUPPLY_SPAN"]

SUPPLY_SPAN = 1.3
"""The Zener output curve runs from 0 to this multiple of ``supply_max_V``."""


def _zener_parameters(part: dict) -> dict:
    """The ZenerModel arguments of the part, without the voltage (which carries the tolerance end)."""
    return dict(test_current=float(part["izt_A"]), test_impedance=float(part["zzt_ohm"]),
                knee_current=number(part, "izk_A", math.nan), knee_impedance=number(part, "zzk_ohm", math.nan),
                temperature_coefficient=number(part, "vz_tc_pct_per_K", 0.0) / 100.0)


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


def zener_shunt_curves(req: dict, part: dict, candidate: dict, notes: list[str]) -> dict:
    out = {"breakdown": None, "zener_output": None, "junction_temperature": None, "power": None}
    zreq = req.get("zener") or {}
    missing = [k for k in ("vz_V", "vz_tol_pct", "izt_A", "zzt_ohm") if number(part, k) is None]
    if missing:
        notes.append(f"Zener data missing ({', '.join(missing)}): no Zener curves")
        return out
    metrics = (candidate or {}).get("metrics") or {}
    resistor = metrics.get("series_resistor_ohm")
    if resistor is None:
        resistor = number(zreq, "resistor_ohm")
    if resistor is None or not resistor > 0:
        notes.append("no series resistor (the design is not feasible): no Zener curves")
        return out
    resistor = float(resistor)
    series = zreq.get("resistor_series") or "E24"
    tol_r = number(zreq, "resistor_tolerance_pct", default_tolerance_pct(series)) / 100.0
    r_end = {"low": resistor * (1 - tol_r), "high": resistor * (1 + tol_r)}
    rth, tj_max, pd, pd_ref = record_thermal(part, req, notes)
    parameters = _zener_parameters(part)
    tol = float(part["vz_tol_pct"]) / 100.0
    vz_end = {"low": float(part["vz_V"]) * (1 - tol), "high": float(part["vz_V"]) * (1 + tol)}
    models = {end: ZenerModel(v, **parameters) for end, v in vz_end.items()}
    tc = number(part, "vz_tc_pct_per_K", 0.0)
    amb_c = {"min": float(req["ambient_min_C"]), "max": float(req["ambient_max_C"])}
    # The ambient that lowers Vz goes with the low end, the one that raises it with the high end.
    lowers = "max" if tc < 0 else "min"
    raises = "min" if tc < 0 else "max"
    ends = (("low", "high", lowers), ("high", "low", raises))  # (Vz end, resistor end, ambient end)
    loads = {"min": float(req["load_min_A"]), "max": float(req["load_max_A"])}
    s_min, s_max = float(req["supply_min_V"]), float(req["supply_max_V"])
    target = float(zreq["target_V"])
    error = float(zreq["max_regulation_error_pct"]) / 100.0

    supply = np.union1d(np.linspace(0.0, SUPPLY_SPAN * s_max, CURVE_POINTS), [s_min, s_max])
    amb_grid_c = np.linspace(amb_c["min"] - AMBIENT_EXTENSION_K, amb_c["max"] + AMBIENT_EXTENSION_K, CURVE_POINTS)
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
    izk = number(part, "izk_A")
    izt = float(part["izt_A"])
    iz_all = corner["zener_current"]
    tj_all = corner["junction_temperature"]
    i_high = 1.5 * max(float(iz_all.max()), izt)
    i_low = min((izk if izk is not None else 0.05 * izt) / 20.0, i_high * 1e-3)
    current = np.geomspace(i_low, i_high, CURVE_POINTS)
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
    iz_min = number(zreq, "min_zener_current_A", izk)
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
    out["junction_temperature"], out["power"] = thermal_sections(
        part, candidate, "zener_power", amb_grid_c, tj_curves, power, rth, tj_max, pd, pd_ref,
        f"Zener dissipation ({worst})", req)
    return out
