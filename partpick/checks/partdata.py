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
from partpick.physics.thermal import thermal_resistance_from_rating, power_rating_from_thermal_resistance

from partpick.checks.results import object_array

__all__ = ["PART_DEFAULTS", "PartArrays", "Needs", "ThermalData", "thermal_data", "limit_array",
           "tj_limit", "GROUP_CODES"]

GROUP_CODES = {"pn": 0, "schottky": 1, "zener": 2, "tvs": 3}
_GROUP_NAMES = ("pn", "schottky", "zener", "tvs")

# Defaults the checker applies to optional part fields (not stored in the
# library). Pairs are (pn and Zener, Schottky) where they differ.
PART_DEFAULTS = {
    "eg_eV": (1.11, 0.69),          # SPEC §3: Si pn junction, Schottky barrier
    "is_temp_exponent": (3.0, 2.0),  # SPEC §3
    "rs_temp_exponent": (0.0, 0.0),
    "if_ref_C": (25.0, 25.0),
    "pd_ref_C": (25.0, 25.0),
    "ifsm_ms": (8.3, 8.3),           # half sine at 60 Hz, the usual IFSM pulse
    "ir_double_K": (10.0, 10.0),     # leakage doubles every 10 K (common practice)
    "ir_t_C": (25.0, 25.0),          # datasheets state IR max at 25 °C unless they say otherwise
}

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


class ThermalData:
    """RthJA, Pd, Tj max and the rating temperatures of P parts [K, K/W, W]."""

    def __init__(self, thermal_resistance, power_rating, tj_max_K, pd_ref_K, missing):
        self.thermal_resistance = thermal_resistance
        self.power_rating = power_rating
        self.tj_max_K = tj_max_K
        self.pd_ref_K = pd_ref_K
        self.missing = missing


def thermal_data(parts: PartArrays, design_rth: float | None) -> ThermalData:
    """Each part's RthJA and Pd (either gives the other, SPEC §3); the design's RthJA replaces every part's.

    Placeholders (RthJA 100 K/W, Pd 1 W, Tj max 150 °C) stand in where data are
    missing; ``missing`` marks those parts.
    """
    tj_known = parts.known("tj_max_C")
    tj_max_K = parts.value("tj_max_C", 150.0) + ZERO_CELSIUS_K  # °C → K at the boundary
    pd_ref_K = parts.value("pd_ref_C") + ZERO_CELSIUS_K
    # A rating temperature at or above Tj max cannot derate; the library refuses such
    # parts, but a placeholder Tj max may sit below a real pd_ref_C.
    pd_ref_K = np.minimum(pd_ref_K, tj_max_K - 1.0)
    pd = parts.raw["pd_W"]
    rth = parts.raw["rth_ja_K_per_W"]
    if design_rth is not None:
        rth = np.full(parts.count, float(design_rth))
        power = power_rating_from_thermal_resistance(rth, tj_max_K, pd_ref_K)
        missing = ~tj_known
    else:
        have_pd = np.isfinite(pd)
        have_rth = np.isfinite(rth)
        missing = ~tj_known | ~(have_pd | have_rth)
        safe_pd = np.where(have_pd, pd, 1.0)
        safe_rth = np.where(have_rth, rth, 100.0)
        rth = np.where(have_rth, rth, thermal_resistance_from_rating(safe_pd, tj_max_K, pd_ref_K))
        power = np.where(have_pd, pd, power_rating_from_thermal_resistance(safe_rth, tj_max_K, pd_ref_K))
        rth = np.where(missing, 100.0, rth)
        power = np.where(missing, 1.0, power)
    return ThermalData(np.asarray(rth, float), np.asarray(power, float), tj_max_K, pd_ref_K, missing)


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
