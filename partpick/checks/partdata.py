"""Part records as arrays: defaults, missing data, thermal data and per-part limits.

Parts arrive as plain dicts (SPEC §5 CSV keys, `partpick.library.fields`).
Here they become one float array per field (NaN = not known), the checker's
defaults are filled in where a field is optional, and placeholders stand in
for missing data so that the vectorised physics (which refuses NaN) can run
over the whole set; the parts concerned fail ``data_missing`` and their
dependent values are masked.
"""

from __future__ import annotations

from operator import itemgetter

import numpy as np

from partpick.library.fields import KINDS, PART_FIELDS, kind_group
from partpick.physics.constants import ZERO_CELSIUS_K
from partpick.physics.thermal import allowed_power, power_rating_from_thermal_resistance
from partpick.physics.thermal_path import (allowed_power_at, board_thermal_resistance, heatsink_thermal_resistance,
                                           rated_path_resistance, reference_temperature)

from partpick.checks.results import object_array

__all__ = ["PART_DEFAULTS", "RS_TEMP_DEFAULT_NOTE", "PartArrays", "Needs", "ThermalData", "thermal_data", "thermal_needs", "limit_array",
           "tj_limit", "GROUP_CODES"]

# The name `Needs` uses for "a Pd rated at the ambient" (a lead- or case-rated Pd does not give RthJA).
AMBIENT_PD = "pd_W rated at ambient"

GROUP_CODES = {"pn": 0, "schottky": 1, "zener": 2, "tvs": 3}
_GROUP_NAMES = ("pn", "schottky", "zener", "tvs")

# Defaults the checker applies to optional part fields (not stored in the
# library). Pairs are (pn and Zener, Schottky) where they differ.
PART_DEFAULTS = {
    "eg_eV": (1.11, 0.69),          # SPEC §3: Si pn junction, Schottky barrier
    "is_temp_exponent": (3.0, 2.0),  # SPEC §3
    "rs_temp_exponent": (1.5, 1.5),  # SPEC §3: Rs(T) = Rs·(T/T0)^1.5, common practice for bulk silicon
    "if_ref_C": (25.0, 25.0),
    "pd_ref_C": (25.0, 25.0),
    "ifsm_ms": (8.3, 8.3),           # half sine at 60 Hz, the usual IFSM pulse
    "ir_double_K": (10.0, 10.0),     # leakage doubles every 10 K (common practice)
    "ir_t_C": (25.0, 25.0),          # datasheets state IR max at 25 °C unless they say otherwise
}

RS_TEMP_DEFAULT_NOTE = ("Rs(T) = Rs·(T/T0)^1.5: the part gives no rs_temp_exponent, so the default 1.5 is used "
                        "(common practice for bulk silicon)")
"""The check-sheet note of a part whose Rs temperature exponent is the default (SPEC §3)."""

# Fields the checker reads as numbers: every numeric column of the part record.
NUMERIC_FIELDS = tuple(spec.name for spec in PART_FIELDS if spec.type == "float")
# Text fields the checker reads (choices it compares, names it reports).
TEXT_FIELDS = ("part_number", "kind", "package", "lifecycle", "junction", "pd_ref_point", "if_ref_point",
               "bidirectional", "ppp_waveform", "ppp2_waveform")
_NUMERIC_GETTER = itemgetter(*NUMERIC_FIELDS)


class PartArrays:
    """The numeric fields of P parts as arrays (NaN = not known), with their text fields.

    Build it once per library state and pass it to `partpick.checks.service.evaluate`
    in place of the list of dicts to skip the conversion on every re-check.
    """

    def __init__(self, parts: list[dict]):
        self.parts = list(parts)
        self.count = len(self.parts)
        texts = itemgetter(*TEXT_FIELDS)
        try:
            rows = list(map(_NUMERIC_GETTER, self.parts))
            text_rows = list(map(texts, self.parts))
        except KeyError:  # records without every key (hand-made in tests and scripts)
            rows = [tuple(p.get(n) for n in NUMERIC_FIELDS) for p in self.parts]
            text_rows = [tuple(p.get(n) for n in TEXT_FIELDS) for p in self.parts]
        try:
            table = np.array(rows, dtype=float).reshape(self.count, len(NUMERIC_FIELDS))
        except (TypeError, ValueError) as exc:
            raise ValueError(f"a numeric part field holds a value that is not a number ({exc})") from None
        self.raw = {name: table[:, j] for j, name in enumerate(NUMERIC_FIELDS)}
        columns = list(zip(*text_rows)) if text_rows else [()] * len(TEXT_FIELDS)
        # Object arrays: a subset is one fancy-indexing step, not a loop.
        for name, column in zip(TEXT_FIELDS, columns):
            setattr(self, name, object_array(column))
        self._records = object_array(self.parts)
        self._finish()

    def _finish(self) -> None:
        # Kinds outside KINDS are never candidates; they keep the pn code.
        self.group = np.full(self.count, GROUP_CODES["pn"], dtype=np.int8)
        for kind in KINDS:
            # TVS parts have pulse-power limits of their own (group "tvs"), not a diode group's.
            self.group[self.kind == kind] = GROUP_CODES.get(kind_group(kind), GROUP_CODES["pn"])
        bridge_schottky = (self.kind == "bridge") & (self.junction == "schottky")
        self.group[bridge_schottky] = GROUP_CODES["schottky"]
        self.schottky = self.group == GROUP_CODES["schottky"]

    def subset(self, index) -> "PartArrays":
        """The parts at ``index`` (an integer array), without converting the dicts again."""
        index = np.asarray(index, dtype=int)
        new = object.__new__(PartArrays)
        new._records = self._records[index]
        new.parts = new._records.tolist()
        new.count = index.size
        new.raw = {name: arr[index] for name, arr in self.raw.items()}
        for name in TEXT_FIELDS:
            setattr(new, name, getattr(self, name)[index])
        new.group = self.group[index]
        new.schottky = self.schottky[index]
        return new

    def known(self, name: str) -> np.ndarray:
        if name == AMBIENT_PD:  # a Pd rated at the lead or case gives no RthJA (SPEC §3)
            return np.isfinite(self.raw["pd_W"]) & (self.pd_ref_point != "lead") & (self.pd_ref_point != "case")
        return np.isfinite(self.raw[name])

    def value(self, name: str, placeholder: float | None = None) -> np.ndarray:
        """The field, its checker default where one exists, else ``placeholder`` where not known."""
        arr = self.raw[name]
        if name in PART_DEFAULTS:
            pn, schottky = PART_DEFAULTS[name]
            default = np.where(self.schottky, schottky, pn) if pn != schottky else pn
            return np.where(np.isfinite(arr), arr, default)
        if placeholder is None:
            return arr
        return np.where(np.isfinite(arr), arr, placeholder)


class Needs:
    """Which fields each check needs, and which parts lack them.

    ``require(check, *alternatives)``: each alternative is a field name or a
    tuple of names any one of which will do.
    """

    def __init__(self, parts: PartArrays):
        self.parts = parts
        self._by_check: dict[str, list[tuple[str, ...]]] = {}

    def require(self, check: str, *alternatives) -> None:
        groups = self._by_check.setdefault(check, [])
        for alt in alternatives:
            groups.append((alt,) if isinstance(alt, str) else tuple(alt))

    def _missing_group(self, group: tuple[str, ...]) -> np.ndarray:
        mask = np.ones(self.parts.count, dtype=bool)
        for name in group:
            mask &= ~self.parts.known(name)
        return mask

    def missing(self, check: str) -> np.ndarray:
        """(P,) True where the part lacks something ``check`` needs."""
        mask = np.zeros(self.parts.count, dtype=bool)
        for group in self._by_check.get(check, ()):
            mask |= self._missing_group(group)
        return mask

    def reason(self, check: str) -> np.ndarray:
        """(P,) text naming the missing fields for ``check`` (None where nothing is missing)."""
        return self._describe([check])

    def any_missing(self) -> np.ndarray:
        mask = np.zeros(self.parts.count, dtype=bool)
        for check in self._by_check:
            mask |= self.missing(check)
        return mask

    def data_missing_reason(self) -> np.ndarray:
        """(P,) text for the ``data_missing`` check: the fields and the checks they block."""
        return self._describe(list(self._by_check), with_checks=True)

    def _describe(self, checks: list[str], with_checks: bool = False) -> np.ndarray:
        groups = list(dict.fromkeys(g for c in checks for g in self._by_check.get(c, ())))
        count = self.parts.count
        out = object_array(None, count)
        if not groups:
            return out
        masks = np.stack([self._missing_group(g) for g in groups], axis=1)  # (P, G)
        if not masks.any():
            return out
        # One text per distinct pattern of missing groups, not one per part.
        codes = masks.astype(np.int64) @ (np.int64(1) << np.arange(len(groups), dtype=np.int64))
        unique_codes, inverse = np.unique(codes, return_inverse=True)
        patterns = ((unique_codes[:, None] >> np.arange(len(groups))) & 1).astype(bool)
        inverse = np.asarray(inverse).reshape(-1)
        texts = []
        for pattern in patterns:
            if not pattern.any():
                texts.append(None)
                continue
            names = [" or ".join(groups[j]) for j in np.flatnonzero(pattern)]
            text = "not known: " + ", ".join(names)
            if with_checks:
                blocked = [c for c in checks if any(g in [groups[j] for j in np.flatnonzero(pattern)]
                                                    for g in self._by_check[c])]
                text += f" (needed by {', '.join(blocked)})"
            texts.append(text)
        return object_array(texts)[inverse]


_BOARD_FIELDS = ("rth_ja_K_per_W", "rth_ja_area_mm2", "rth_ja_large_K_per_W", "rth_ja_large_area_mm2")
_RATED_AT_POINT = ("lead", "case")


def thermal_needs(requirement) -> list[tuple[str, ...]]:
    """The part fields the thermal path in use needs (SPEC §3a), as `Needs.require` alternatives.

    ``requirement`` may be a `Requirement` or, as before, the design's RthJA (a number or None).
    """
    design_rth, mount = _thermal_inputs(requirement)
    if mount is not None and mount.mount == "board":
        return [("tj_max_C",)] + [(f,) for f in _BOARD_FIELDS]
    if mount is not None and mount.mount == "heatsink":
        return [("tj_max_C",), ("rth_jc_K_per_W",)]
    if design_rth is not None:
        return [("tj_max_C",)]
    return [("tj_max_C",), (AMBIENT_PD, "rth_ja_K_per_W")]


def _thermal_inputs(requirement):
    if requirement is None or isinstance(requirement, (int, float)):
        return requirement, None
    return requirement.rth_ja_K_per_W, getattr(requirement, "thermal", None)


class ThermalData:
    """The thermal path of P parts: RthJA in use, Pd, Tj max, rating temperatures [K, K/W, W].

    Attributes
    ----------
    thermal_resistance : ndarray (P,)
        RthJA in use [K/W] (the part's, the design's, the mount's, or an override).
    power_rating : ndarray (P,)
        Pd as the part gives it (or derived from its RthJA) [W].
    in_use : ndarray of bool (P,)
        Where Pallow follows from the thermal resistance in use, (Tj max − Ta)/RthJA,
        rather than from the datasheet's Pd curve (a requirement, mount or override
        sets it, or the part's Pd is rated at the lead or case).
    missing : ndarray of bool (P,)
        Placeholders stand in (data the path needs are not known).
    junction_lead, junction_case : ndarray (P,)
        RthJL and RthJC [K/W], given or from a lead/case-rated Pd; NaN where not known.
    notes : ndarray of object (P,)
        The assumptions behind the RthJA in use (None where it is the datasheet's own).
    extrapolated : ndarray of bool (P,)
        A board RthJA read below the smaller datasheet area.
    """

    def __init__(self, thermal_resistance, power_rating, tj_max_K, pd_ref_K, missing, *, in_use=None,
                 junction_lead=None, junction_case=None, notes=None, extrapolated=None):
        count = np.shape(thermal_resistance)[0]
        self.thermal_resistance = thermal_resistance
        self.power_rating = power_rating
        self.tj_max_K = tj_max_K
        self.pd_ref_K = pd_ref_K
        self.missing = missing
        self.in_use = np.zeros(count, dtype=bool) if in_use is None else in_use
        nan = np.full(count, np.nan)
        self.junction_lead = nan if junction_lead is None else junction_lead
        self.junction_case = nan if junction_case is None else junction_case
        self.notes = object_array(None, count) if notes is None else notes
        self.extrapolated = np.zeros(count, dtype=bool) if extrapolated is None else extrapolated

    def allowed_power(self, ambient_K) -> np.ndarray:
        """Pallow at ambients ``ambient_K`` (P, K) [W] (SPEC §3: the Pd curve, or (Tj max − Ta)/RthJA in use)."""
        Ta = np.asarray(ambient_K, dtype=float)
        Ta = np.broadcast_to(Ta, np.broadcast_shapes(Ta.shape, (self.tj_max_K.size, 1)))
        tj = self.tj_max_K[:, None]
        curve = allowed_power(Ta, self.power_rating[:, None], tj, self.pd_ref_K[:, None])
        path = allowed_power_at(Ta, tj, self.thermal_resistance[:, None])
        return np.where(self.in_use[:, None], path, curve)

    def rating_temperature(self, parts: "PartArrays", ambient_K, junction_K, power) -> np.ndarray:
        """The temperature IF(AV) is derated from at each point [K] (SPEC §3a ``if_ref_point``).

        Ambient-rated parts: Ta. Lead- or case-rated: Tj − P·RthJL (RthJC) at the point's
        steady state; where that path resistance is not known, Tj itself (conservative).
        """
        Ta = np.asarray(ambient_K, dtype=float)
        point = parts.if_ref_point
        path = np.where(point == "lead", self.junction_lead, np.where(point == "case", self.junction_case, 0.0))
        path = np.where(np.isfinite(path), path, 0.0)
        Tj = np.where(np.isfinite(junction_K), junction_K, Ta)
        P = np.where(np.isfinite(power), np.maximum(power, 0.0), 0.0)
        at_point = reference_temperature(np.maximum(Tj, 1.0), P, path[:, None])
        return np.where(_member(point, _RATED_AT_POINT)[:, None], np.maximum(at_point, Ta), Ta)


def _member(values, allowed) -> np.ndarray:
    mask = np.zeros(values.shape, dtype=bool)
    for item in allowed:
        mask |= values == item
    return mask


def thermal_data(parts: PartArrays, requirement, thermal_resistance=None) -> ThermalData:
    """Each part's thermal path (SPEC §3, §3a).

    Parameters
    ----------
    requirement : Requirement, or float or None
        The requirement (its ``rth_ja_K_per_W`` and ``[thermal]`` mount), or — the older
        form — the design's RthJA alone.
    thermal_resistance : ndarray (P,), optional
        RthJA in use per part, replacing every other source (operating limits);
        NaN keeps that part's own path.

    Notes
    -----
    Without a mount or design value, Pd and the datasheet RthJA give each other
    (RthJA = (Tj max − pd_ref_C)/Pd) — but a Pd rated at the lead or case gives
    RthJL or RthJC, never RthJA. A board mount reads RthJA off the line through
    the part's two copper areas in ln(area); a heatsink mount adds
    RthJC + RthCS + RthSA. Placeholders (RthJA 100 K/W, Pd 1 W, Tj max 150 °C)
    stand in where data are missing; ``missing`` marks those parts.
    """
    design_rth, mount = _thermal_inputs(requirement)
    count = parts.count
    tj_known = parts.known("tj_max_C")
    tj_max_K = parts.value("tj_max_C", 150.0) + ZERO_CELSIUS_K  # °C → K at the boundary
    pd_ref_K = parts.value("pd_ref_C") + ZERO_CELSIUS_K
    # A rating temperature at or above Tj max cannot derate; the library refuses such
    # parts, but a placeholder Tj max may sit below a real pd_ref_C.
    pd_ref_K = np.minimum(pd_ref_K, tj_max_K - 1.0)
    pd = parts.raw["pd_W"]
    rth_part = parts.raw["rth_ja_K_per_W"]
    have_pd = np.isfinite(pd)
    safe_pd = np.where(have_pd, pd, 1.0)
    point = parts.pd_ref_point
    at_lead = have_pd & (point == "lead")
    at_case = have_pd & (point == "case")
    pd_path = rated_path_resistance(safe_pd, tj_max_K, pd_ref_K)
    junction_lead = np.where(parts.known("rth_jl_K_per_W"), parts.raw["rth_jl_K_per_W"],
                             np.where(at_lead, pd_path, np.nan))
    junction_case = np.where(parts.known("rth_jc_K_per_W"), parts.raw["rth_jc_K_per_W"],
                             np.where(at_case, pd_path, np.nan))
    ambient_pd = have_pd & ~(at_lead | at_case)  # only an ambient-rated Pd gives RthJA
    have_rth = np.isfinite(rth_part)
    datasheet_rth = np.where(have_rth, rth_part, np.where(ambient_pd, pd_path, 100.0))
    power = np.where(have_pd, pd, power_rating_from_thermal_resistance(np.where(have_rth, rth_part, 100.0),
                                                                      tj_max_K, pd_ref_K))
    notes = object_array(None, count)
    extrapolated = np.zeros(count, dtype=bool)
    if mount is not None and mount.mount == "board":
        known = np.logical_and.reduce([parts.known(f) for f in _BOARD_FIELDS])
        a1 = parts.value("rth_ja_area_mm2", 100.0)
        r1 = parts.value("rth_ja_K_per_W", 100.0)
        a2 = np.where(known, parts.value("rth_ja_large_area_mm2", 1000.0), a1 * 10.0)
        r2 = np.where(known, parts.value("rth_ja_large_K_per_W", 50.0), np.minimum(r1, 50.0))
        r2 = np.minimum(r2, r1)
        rth, extrapolated = board_thermal_resistance(mount.copper_area_mm2, a1, r1, a2, r2)
        rth = np.where(known, rth, 100.0)
        extrapolated = np.asarray(extrapolated) & known
        missing = ~tj_known | ~known
        area = mount.copper_area_mm2
        texts = {}
        for j in np.flatnonzero(known):
            if extrapolated[j]:
                how = (f"extrapolated below the datasheet's smaller area ({a1[j]:g} mm²): the line in ln(area) "
                       "through its two points extended, RthJA rises")
            elif area >= a2[j]:
                how = f"held flat above the datasheet's larger area ({a2[j]:g} mm²), an assumption"
            else:
                how = f"interpolated linearly in ln(area) between {a1[j]:g} mm² and {a2[j]:g} mm²"
            texts[j] = f"board mount: RthJA {rth[j]:.3g} K/W on {area:g} mm² of copper, {how}"
        for j, text in texts.items():
            notes[j] = text
        in_use = np.ones(count, dtype=bool)
    elif mount is not None and mount.mount == "heatsink":
        known = parts.known("rth_jc_K_per_W")
        jc = parts.value("rth_jc_K_per_W", 1.0)
        cs = mount.interface
        rth = heatsink_thermal_resistance(jc, cs, mount.rth_sa_K_per_W)
        missing = ~tj_known | ~known
        cs_text = (f"RthCS {cs:g} K/W" if mount.rth_cs_K_per_W is not None else
                   f"RthCS {cs:g} K/W (default: an insulating pad, from memory)")
        for j in np.flatnonzero(known):
            notes[j] = (f"heatsink mount: RthJA = RthJC {jc[j]:g} + {cs_text} + RthSA {mount.rth_sa_K_per_W:g} "
                        f"= {rth[j]:.3g} K/W")
        in_use = np.ones(count, dtype=bool)
    elif design_rth is not None:
        rth = np.full(count, float(design_rth))
        missing = ~tj_known
        in_use = np.ones(count, dtype=bool)
    else:
        missing = ~tj_known | ~(ambient_pd | have_rth)
        rth = np.where(missing, 100.0, datasheet_rth)
        in_use = (at_lead | at_case) & ~missing
    if thermal_resistance is not None:  # NaN rows keep their own path
        given = np.isfinite(np.asarray(thermal_resistance, dtype=float))
        rth = np.where(given, thermal_resistance, rth)
        in_use = in_use | given
    power = np.where(missing, 1.0, power)
    return ThermalData(np.asarray(rth, float), np.asarray(power, float), tj_max_K, pd_ref_K, missing,
                       in_use=in_use, junction_lead=junction_lead, junction_case=junction_case, notes=notes,
                       extrapolated=extrapolated)


def limit_array(limits: dict, groups: np.ndarray, key: str) -> tuple[np.ndarray, list]:
    """Per-part values of one limit, with the source text per kind group.

    Returns
    -------
    values : ndarray (P,)
        NaN where the group's limit is None (e.g. no Tj cap).
    sources : list of str
        The source for each group code (index with ``groups``).
    """
    table = np.array([np.nan if limits[g][key].value is None else limits[g][key].value
                      for g in _GROUP_NAMES])
    sources = [limits[g][key].source for g in _GROUP_NAMES]
    return table[groups], sources


def tj_limit(limits: dict, groups: np.ndarray, tj_max_C: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The Tj limit in force [°C]: the stricter of the cap and Tj max − margin, and its source (P,)."""
    cap, cap_src = limit_array(limits, groups, "tj_cap_C")
    margin, margin_src = limit_array(limits, groups, "tj_margin_K")
    by_margin = tj_max_C - margin
    use_cap = np.isfinite(cap) & (cap < by_margin)
    value = np.where(use_cap, cap, by_margin)
    cap_text = object_array([f"{cap_src[g]}: Tj cap {limits[n]['tj_cap_C'].value or 0:g} °C"
                             for g, n in enumerate(_GROUP_NAMES)])
    margin_text = object_array([
        f"{margin_src[g]}: Tj max − {limits[n]['tj_margin_K'].value:g} K" if limits[n]["tj_margin_K"].value
        else f"{margin_src[g]}: Tj max (rating)" for g, n in enumerate(_GROUP_NAMES)])
    source = np.where(use_cap, cap_text[groups], margin_text[groups])
    return value, source
