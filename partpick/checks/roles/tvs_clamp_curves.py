"""Curve data of the surge clamp: the clamp's V–I line with the surge point, and the rating against pulse length.

Sections as in `partpick.checks.curves`. ``clamp_line``: the clamp line at
VBR min (coldest ambient) and VBR max (hottest), the surge generator's line
near the operating points, the surge points at both ends, the datasheet's
two points, the protected maximum and the clamp limit. ``pulse_rating``:
the part's pulse rating moved over 10 µs–10 ms (log–log), at 25 °C and derated
at the hottest ambient, the policy's share of it, the rating points and the
surge's pulse power at its decay time.
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np

from partpick.library.fields import parse_waveform
from partpick.physics.constants import celsius_to_kelvin
from partpick.physics.tvs import PULSE_RANGE_S, breakdown_voltage_at, derated_pulse_rating, pulse_rating_for

__all__ = ["tvs_sections"]

_POINTS = 121


def _number(part, key):
    value = part.get(key)
    return None if value is None else float(value)


def tvs_sections(requirement: dict, part: dict, candidate: dict | None, notes: list[str]) -> dict:
    """``clamp_line`` and ``pulse_rating`` sections for one TVS part (None where data are missing)."""
    from partpick.checks.roles.tvs_clamp import DEFAULT_PPP_WAVEFORM, DEFAULT_VBR_TC_PCT_PER_K

    surge = SimpleNamespace(**requirement["surge"])
    ambient_min, ambient_max = float(requirement["ambient_min_C"]), float(requirement["ambient_max_C"])
    out = {"clamp_line": None, "pulse_rating": None}
    values = {k: _number(part, k) for k in ("vbr_min_V", "vbr_max_V", "vc_V", "ipp_A", "it_A", "ppp_W",
                                               "tj_max_C", "vbr_tc_pct_per_K", "ppp2_W")}
    if any(values[k] is None for k in ("vbr_min_V", "vbr_max_V", "vc_V", "ipp_A", "it_A")) \
            or values["vc_V"] <= values["vbr_max_V"] or values["ipp_A"] <= values["it_A"]:
        notes.append("breakdown and clamping data incomplete: no clamp line")
        return out
    pn = part.get("part_number", "")
    tc = values["vbr_tc_pct_per_K"] if values["vbr_tc_pct_per_K"] is not None else DEFAULT_VBR_TC_PCT_PER_K
    rd = (values["vc_V"] - values["vbr_max_V"]) / (values["ipp_A"] - values["it_A"])
    cold = float(celsius_to_kelvin(ambient_min))
    hot = float(celsius_to_kelvin(ambient_max))
    ends = [("VBR min", values["vbr_min_V"], cold, ambient_min, "typical_cold"),
            ("VBR max", values["vbr_max_V"], hot, ambient_max, "maximum_hot")]
    ip = {}
    for name, vbr, T, amb, _ in ends:
        v = float(breakdown_voltage_at(vbr, tc, T))
        ip[name] = (v, max(0.0, (surge.surge_V - v) / (surge.surge_source_ohm + rd)))
    i_top = 1.25 * max(max(c for _, c in ip.values()), values["ipp_A"])
    current = np.linspace(0.0, i_top, _POINTS)
    curves = [{"label": f"clamp line, {name} at {amb:g} °C", "x": current, "y": ip[name][0] + rd * current,
               "role": role} for name, _, _, amb, role in ends]
    # The generator's line, only where it crosses the plotted voltages (its open-circuit end is far above).
    v_top = 1.5 * max(surge.protected_max_V, max(v + rd * c for v, c in ip.values()))
    i_from = max(0.0, (surge.surge_V - v_top) / surge.surge_source_ohm)
    i_to = min(i_top, surge.surge_V / surge.surge_source_ohm)  # down to 0 V, the short-circuit current
    gen_i = np.linspace(i_from, i_to, _POINTS)
    curves.append({"label": f"surge source {surge.surge_V:g} V behind {surge.surge_source_ohm:g} Ω",
                   "x": gen_i, "y": surge.surge_V - surge.surge_source_ohm * gen_i, "role": "load_line"})
    points = [
        {"label": "surge operating points", "x": np.array([c for _, c in ip.values()]),
         "y": np.array([v + rd * c for v, c in ip.values()]), "corners": [], "role": "corners"},
        {"label": "datasheet points (IT, VBR max) and (IPP, VC)", "x": np.array([values["it_A"], values["ipp_A"]]),
         "y": np.array([values["vbr_max_V"], values["vc_V"]]), "corners": [], "role": "datasheet"},
    ]
    limit = surge.protected_max_V * surge.clamp_limit_pct / 100.0
    out["clamp_line"] = {
        "title": f"{pn}: clamp line and surge point ({surge.surge_waveform} µs)",
        "x": {"name": "Clamp current", "unit": "A"}, "y": {"name": "Clamp voltage", "unit": "V"},
        "curves": curves, "points": points,
        "hlines": [{"label": f"protected maximum {surge.protected_max_V:g} V", "value": surge.protected_max_V,
                    "role": "rating"},
                   {"label": f"clamp limit {surge.clamp_limit_pct:g} % of it", "value": limit, "role": "limit"},
                   {"label": f"line maximum {surge.line_max_V:g} V", "value": surge.line_max_V, "role": "range"}],
        "vlines": [],
    }
    if values["ppp_W"] is None or values["tj_max_C"] is None:
        notes.append("no pulse rating (ppp_W, tj_max_C): no rating curve")
        return out
    ppp_t = parse_waveform(part.get("ppp_waveform") or DEFAULT_PPP_WAVEFORM)[1]
    ppp2_t = parse_waveform(part["ppp2_waveform"])[1] if part.get("ppp2_waveform") else np.nan
    ppp2 = values["ppp2_W"] if values["ppp2_W"] is not None else np.nan
    durations = np.geomspace(PULSE_RANGE_S[0], PULSE_RANGE_S[1], _POINTS)
    moved = pulse_rating_for(durations, values["ppp_W"], ppp_t, ppp2, ppp2_t)
    tj_max = float(celsius_to_kelvin(values["tj_max_C"]))
    derated = derated_pulse_rating(moved, hot, tj_max)
    share = 1.0
    for check in (candidate or {}).get("checks", []) or []:
        if check.get("name") == "pulse_power" and check.get("limit_source"):
            text = check["limit_source"].split(":", 1)[-1].strip()
            try:
                share = float(text.split("%")[0]) / 100.0
            except ValueError:
                share = 1.0
    curves = [{"label": "pulse rating at 25 °C", "x": durations, "y": moved, "role": "rating"},
              {"label": f"derated at {ambient_max:g} °C", "x": durations, "y": derated,
               "role": "typical_hot"}]
    if abs(share - 1.0) > 1e-9:
        curves.append({"label": f"× {100 * share:g} % (policy)", "x": durations, "y": share * derated,
                       "role": "derating"})
    rating_x = [ppp_t] + ([ppp2_t] if np.isfinite(ppp2) and np.isfinite(ppp2_t) else [])
    rating_y = [values["ppp_W"]] + ([ppp2] if len(rating_x) == 2 else [])
    decay = parse_waveform(surge.surge_waveform)[1]
    power = [v * c for v, c in ((ip[k][0] + rd * ip[k][1], ip[k][1]) for k in ip)]
    points = [{"label": "datasheet rating points (25 °C)", "x": np.array(rating_x), "y": np.array(rating_y),
               "corners": [], "role": "datasheet"},
              {"label": f"surge pulse power at {decay * 1e6:g} µs", "x": np.array([decay]),
               "y": np.array([max(power)]), "corners": [], "role": "corners"}]
    out["pulse_rating"] = {
        "title": f"{pn}: pulse rating against pulse length (decay time)",
        "x": {"name": "Pulse decay time", "unit": "s"}, "y": {"name": "Peak pulse power", "unit": "W"},
        "curves": curves, "points": points, "hlines": [],
        "vlines": [{"label": f"surge {surge.surge_waveform} µs", "value": decay, "role": "range"}],
        "log_x": True, "log_y": True,
    }
    return out
