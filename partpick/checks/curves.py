"""Curve data for one part under one requirement: what the plots draw (numpy only).

`curves_for` asks the requirement's role (`partpick.checks.roles`) for its
sections — each role builds its own in its ``<role>_curves`` module
(``series_curves``: forward I–V, Tj and power against ambient;
``zener_shunt_curves``: breakdown I–V, output against supply, Tj and power) —
and returns plain dicts of numpy arrays, each section with its axis names and
base units, so that `partpick.plots` can draw the same data in the window and
in the reports. What every role shares lives here: number formatting and
corner words, reading a part record's forward model and thermal data, the
limit lines read back from a candidate's checks, and the Tj- and
power-against-ambient sections.

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

from partpick.checks.partdata import PART_DEFAULTS
from partpick.physics.constants import T0_K, celsius_to_kelvin
from partpick.physics.junction import (
    PN_BAND_GAP_EV,
    PN_TEMPERATURE_EXPONENT,
    SCHOTTKY_BAND_GAP_EV,
    SCHOTTKY_TEMPERATURE_EXPONENT,
    ForwardModel,
)
from partpick.physics.thermal import allowed_power
from partpick.units import format_engineering

__all__ = ["curves_for", "format_engineering", "corner_label", "AMBIENT_EXTENSION_K",
           "COMMON_SECTIONS", "CURVE_POINTS", "number", "record_forward_model", "record_thermal", "check_of",
           "tj_limit_line", "power_fraction", "thermal_sections", "requirement_dict", "curves_for_many"]

AMBIENT_EXTENSION_K = 10.0
"""The Tj-against-ambient curve extends this far beyond the ambient range [K]."""

CURVE_POINTS = 241
"""Samples along every curve."""

COMMON_SECTIONS = ("forward", "breakdown", "zener_output", "junction_temperature", "power")
"""Sections every result carries (None where the role gives none), so readers need not test for keys."""


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
def requirement_dict(requirement) -> dict:
    """The requirement as a dict of SPEC §5 TOML keys (a `Requirement`, a dataclass or a dict)."""
    if isinstance(requirement, Mapping):
        return dict(requirement)
    if hasattr(requirement, "to_dict"):
        return dict(requirement.to_dict())
    if dataclasses.is_dataclass(requirement):
        return dataclasses.asdict(requirement)
    raise TypeError(f"requirement must be a Requirement or a dict of requirement keys, got {type(requirement).__name__}")


def number(mapping: Mapping, key: str, default=None):
    value = mapping.get(key) if mapping is not None else None
    if value is None:
        return default
    value = float(value)
    return value if math.isfinite(value) else default


def record_forward_model(part: dict, notes: list[str]) -> ForwardModel | None:
    schottky = part.get("kind") == "schottky" or (part.get("kind") == "bridge" and part.get("junction") == "schottky")
    band_gap = number(part, "eg_eV", SCHOTTKY_BAND_GAP_EV if schottky else PN_BAND_GAP_EV)
    exponent = number(part, "is_temp_exponent",
                       SCHOTTKY_TEMPERATURE_EXPONENT if schottky else PN_TEMPERATURE_EXPONENT)
    rs_exponent = number(part, "rs_temp_exponent", PART_DEFAULTS["rs_temp_exponent"][1 if schottky else 0])
    Is, n, Rs = (number(part, key) for key in ("is_A", "n", "rs_ohm"))
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


def record_thermal(part: dict, req: dict, notes: list[str]):
    """(RthJA [K/W], Tj max [°C] or None, Pd [W] or None, Pd reference [°C]), as the checks resolve them.

    Pd and RthJA give each other (SPEC §3: RthJA = (Tj max − pd_ref_C)/Pd); a design RthJA from the
    requirement replaces the part's, and the allowed power follows from it.
    """
    tj_max = number(part, "tj_max_C")
    pd_ref = number(part, "pd_ref_C", 25.0)
    pd = number(part, "pd_W")
    rth = number(part, "rth_ja_K_per_W")
    rates = tj_max is not None and tj_max > pd_ref
    design = number(req, "rth_ja_K_per_W")
    mount_rth = _mount_thermal_resistance(part, req.get("thermal") or {}, notes)
    in_use = design if design is not None else mount_rth
    if in_use is None and part.get("pd_ref_point") in ("lead", "case") and rth is not None:
        in_use = rth  # a lead- or case-rated Pd gives no RthJA: Pallow follows the part's RthJA
    if in_use is not None:
        rth = in_use
        if design is not None:
            notes.append(f"RthJA = {rth:g} K/W from the requirement (the design's board) replaces the part's")
        # Pallow = (Tj max − Ta)/RthJA in use at every ambient (SPEC §3): the rating curve of
        # `allowed_power` with its reference at absolute zero is exactly that line.
        pd_ref = -273.15 + 1e-6
        pd = (tj_max - pd_ref) / rth if tj_max is not None else None
    elif rth is None and pd is not None and rates:
        rth = (tj_max - pd_ref) / pd
    elif pd is None and rth is not None and rates:
        pd = (tj_max - pd_ref) / rth
    if rth is None:
        notes.append("no RthJA or Pd: self-heating is not shown (Tj = Ta)")
        rth = 0.0
    return rth, tj_max, pd, pd_ref


def _mount_thermal_resistance(part: dict, mount: dict, notes: list[str]) -> float | None:
    """RthJA of the requirement's [thermal] mount for one part (as `partdata.thermal_data`), or None."""
    from partpick.physics.thermal_path import board_thermal_resistance, heatsink_thermal_resistance

    kind = mount.get("mount")
    if kind == "board":
        values = [number(part, k) for k in ("rth_ja_area_mm2", "rth_ja_K_per_W", "rth_ja_large_area_mm2",
                                             "rth_ja_large_K_per_W")]
        if None in values or mount.get("copper_area_mm2") is None:
            return None
        rth, _ = board_thermal_resistance(float(mount["copper_area_mm2"]), *values)
        notes.append(f"board mount: RthJA {rth:.3g} K/W on {mount['copper_area_mm2']:g} mm² of copper")
        return float(rth)
    if kind == "heatsink":
        jc = number(part, "rth_jc_K_per_W")
        if jc is None or mount.get("rth_sa_K_per_W") is None:
            return None
        rth = heatsink_thermal_resistance(jc, float(mount.get("rth_cs_K_per_W", 1.0)), float(mount["rth_sa_K_per_W"]))
        notes.append(f"heatsink mount: RthJA = RthJC + RthCS + RthSA = {rth:.3g} K/W")
        return float(rth)
    return None


def check_of(candidate: dict, name: str) -> dict | None:
    for check in (candidate or {}).get("checks", []) or []:
        if check.get("name") == name:
            return check
    return None


def tj_limit_line(candidate: dict, tj_max: float | None):
    check = check_of(candidate, "junction_temp")
    if check is not None and check.get("limit") is not None:
        source = check.get("limit_source") or "check limit"
        return float(check["limit"]), f"Tj limit ({source})"
    if tj_max is not None:
        return tj_max, "Tj max (rating)"
    return None, None


def power_fraction(candidate: dict, name: str, pd, tj_max, pd_ref) -> tuple[float, str]:
    """The share of Pallow the power check allows, read back from the candidate's check (1 = the rating).

    The series check states it directly (% of Pallow); the Zener check gives the allowed power in W at
    its worst corner, which is that share of Pallow at the corner's ambient.
    """
    check = check_of(candidate, name)
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


def thermal_sections(part, candidate, power_check, amb_c, tj_curves, power, rth, tj_max, pd, pd_ref,
                      power_label, req):
    """The Tj-against-ambient and power-against-ambient sections (shared by the roles)."""
    limit, limit_label = tj_limit_line(candidate, tj_max)
    hlines = []
    if limit is not None:
        hlines.append({"label": f"{limit_label}: {corner_label(ambient_C=limit)}", "value": limit, "role": "limit"})
    if tj_max is not None and (limit is None or abs(limit - tj_max) > 1e-9):
        hlines.append({"label": f"Tj max (rating): {corner_label(ambient_C=tj_max)}", "value": tj_max,
                       "role": "rating"})
    fraction, source = power_fraction(candidate, power_check, pd, tj_max, pd_ref)
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
        The part's entry in the check result; its metrics (e.g. the Zener
        resistor) and checks (the limit lines) are drawn where the role uses them.

    Returns
    -------
    dict
        ``part_number``, ``role``, ``notes`` (list of str: what could not be
        drawn and why) and the role's sections (`Role.curve_plots`; the common
        ones ``forward``, ``breakdown``, ``zener_output``,
        ``junction_temperature``, ``power`` are always present, None where the
        role or the data do not give one). Arrays are float64 numpy arrays,
        free of NaN except where a gap marks thermal runaway.
    """
    from partpick.checks.roles import ROLES

    req = requirement_dict(requirement)
    role = req.get("role")
    if role not in ROLES:
        raise ValueError(f"requirement role must be one of {', '.join(ROLES)}, got {role!r}")
    notes: list[str] = []
    result = {"part_number": part.get("part_number"), "role": role, "notes": notes,
              **{name: None for name in COMMON_SECTIONS}}
    result.update({section: None for section, _title, _options in ROLES[role].curve_plots})
    result.update(ROLES[role].curves(req, part, candidate or {}, notes))
    return result


def curves_for_many(requirement, parts: list[dict], candidates: list[dict | None]) -> list[dict]:
    """`curves_for` of several parts under one requirement, in one call of the role (`Role.curves_many`)."""
    from partpick.checks.roles import ROLES

    req = requirement_dict(requirement)
    role = req.get("role")
    if role not in ROLES:
        raise ValueError(f"requirement role must be one of {', '.join(ROLES)}, got {role!r}")
    notes_list: list[list[str]] = [[] for _ in parts]
    results = []
    for part, notes in zip(parts, notes_list):
        result = {"part_number": part.get("part_number"), "role": role, "notes": notes,
                  **{name: None for name in COMMON_SECTIONS}}
        result.update({section: None for section, _title, _options in ROLES[role].curve_plots})
        results.append(result)
    sections = ROLES[role].curves_many(req, list(parts), [c or {} for c in candidates], notes_list)
    for result, found in zip(results, sections):
        result.update(found)
    return results
