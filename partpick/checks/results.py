"""Checks as data: arrays over parts, each naming its worst point, and their JSON form.

A role evaluates every part at a table of *points* (`PointTable`): each point
is one corner (supply × load × ambient) in one state (``cold_start``,
``steady``, ``reverse``) and, for Zener roles, one end of the Vz and resistor
tolerances. A check is computed at every point it concerns; `worst_case_check`
keeps, per part, the point with the smallest margin.

Margin (SPEC §5): how far inside the limit, as % of the limit; negative fails.
For an upper limit 100·(limit − value)/|limit|, for a lower limit
100·(value − limit)/|limit|. A zero limit gives 0 when met and −100 when not.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

__all__ = ["PointTable", "CheckArray", "margin_pct", "worst_case_check", "worst_value", "finite_or_none",
           "object_array", "json_numbers"]


# A check whose margin is within this of zero passes (the value sits on its limit).
_MARGIN_SLACK_PCT = 1e-9


def object_array(values, count: int | None = None) -> np.ndarray:
    """A 1-D object array (strings or None per part) without numpy guessing a shape."""
    if isinstance(values, str) or values is None:
        arr = np.empty(count, dtype=object)
        arr[:] = values
        return arr
    arr = np.empty(len(values), dtype=object)
    arr[:] = list(values)
    return arr


@dataclass(frozen=True)
class PointTable:
    """The points a role evaluates: parallel arrays of length K.

    ``supply_V`` or ``load_A`` may be None for a role without one (an AC
    rectifier has no DC supply); ``extra`` adds a role's own corner columns,
    ``(("vac_Vrms", array), ...)``, to every JSON ``corner`` (key = the unit-named JSON key).
    """

    supply_V: np.ndarray | None
    load_A: np.ndarray | None
    ambient_C: np.ndarray
    state: tuple[str, ...]
    vz_end: tuple[str | None, ...] | None = None
    resistor_end: tuple[str | None, ...] | None = None
    extra: tuple[tuple[str, object], ...] = ()

    def __len__(self) -> int:
        return len(self.state)

    def corner(self, index: int) -> dict | None:
        """The JSON ``corner`` of one point (None for index −1)."""
        if index < 0:
            return None
        out = {}
        if self.supply_V is not None:
            out["supply_V"] = float(self.supply_V[index])
        for key, column in self.extra:
            value = column[index]
            out[key] = value if isinstance(value, str) or value is None else float(value)
        if self.load_A is not None:
            out["load_A"] = float(self.load_A[index])
        out["ambient_C"] = float(self.ambient_C[index])
        out["state"] = self.state[index]
        if self.vz_end is not None:
            out["vz_end"] = self.vz_end[index]
            out["resistor_end"] = self.resistor_end[index]
        return out


@dataclass
class CheckArray:
    """One check over P parts.

    Attributes
    ----------
    name, unit : str
        SPEC §4 check name and the unit of value and limit.
    value, limit, margin : ndarray (P,)
        NaN where not computable (then ``reason`` says why).
    passed : ndarray of bool (P,)
    point : ndarray of int (P,)
        Index into the role's `PointTable`; −1 where no point applies.
    limit_source : ndarray of object (P,)
        Where the limit came from.
    reason : ndarray of object (P,)
        Text where the value is null, else None.
    present : ndarray of bool (P,)
        Whether the check appears on that part's sheet (``data_missing`` only
        where data are missing).
    note : ndarray of object (P,), optional
        A remark the sheet must show beside the value (e.g. leakage scaled above
        its test voltage); JSON ``note`` where not None.
    """

    name: str
    unit: str
    value: np.ndarray
    limit: np.ndarray
    margin: np.ndarray
    passed: np.ndarray
    point: np.ndarray
    limit_source: np.ndarray
    reason: np.ndarray
    present: np.ndarray = field(default=None)
    note: np.ndarray | None = None

    def __post_init__(self) -> None:
        if self.present is None:
            self.present = np.ones(self.value.shape, dtype=bool)

    def entries(self, indices, points: PointTable) -> list[dict | None]:
        """The JSON dicts of this check for the parts ``indices`` (None where the check is not present).

        Columns are converted to Python lists once, so that building many
        candidates costs no per-element numpy indexing.
        """
        idx = np.asarray(indices, dtype=int)
        values = json_numbers(self.value[idx])
        limits = json_numbers(self.limit[idx])
        margins = json_numbers(self.margin[idx])
        passed = self.passed[idx].tolist()
        present = self.present[idx].tolist()
        point = self.point[idx].tolist()
        sources = self.limit_source[idx].tolist()
        reasons = self.reason[idx].tolist()
        notes = self.note[idx].tolist() if self.note is not None else [None] * idx.size
        corners = {p: points.corner(p) for p in set(point)}
        out: list[dict | None] = []
        for j in range(idx.size):
            if not present[j]:
                out.append(None)
                continue
            corner = corners[point[j]]
            entry = {"name": self.name, "value": values[j], "limit": limits[j], "unit": self.unit,
                     "limit_source": sources[j], "margin_pct": margins[j], "passed": passed[j],
                     "corner": dict(corner) if corner is not None else None}
            if reasons[j] is not None:
                entry["reason"] = reasons[j]
            if notes[j] is not None:
                entry["note"] = notes[j]
            out.append(entry)
        return out


def json_numbers(arr: np.ndarray) -> list:
    """A float array as a list with None for NaN and ±Infinity."""
    finite = np.isfinite(arr)
    values = arr.tolist()
    if finite.all():
        return values
    return [v if ok else None for v, ok in zip(values, finite.tolist())]


def finite_or_none(x) -> float | None:
    """A JSON-safe number: None for NaN and ±Infinity."""
    x = float(x)
    return x if math.isfinite(x) else None


def margin_pct(value, limit, sense: str):
    """Margin [% of the limit] of ``value`` against an upper (``"max"``) or lower (``"min"``) limit."""
    value = np.asarray(value, dtype=float)
    limit = np.asarray(limit, dtype=float)
    diff = (limit - value) if sense == "max" else (value - limit)
    denom = np.abs(limit)
    with np.errstate(divide="ignore", invalid="ignore"):
        scaled = 100.0 * diff / np.where(denom > 0, denom, 1.0)
    return np.where(denom > 0, scaled, np.where(diff >= 0, 0.0, -100.0))


def worst_value(values: np.ndarray, sense: str) -> tuple[np.ndarray, np.ndarray]:
    """Per row, the largest (``"max"``) or smallest (``"min"``) value and its column.

    A row holding a NaN gives NaN and the column of its first NaN (the value
    is not known at that point, so the worst case is not known).
    """
    nan = np.isnan(values)
    if sense == "max":
        col = np.argmax(np.where(nan, np.inf, values), axis=1)
    else:
        col = np.argmin(np.where(nan, -np.inf, values), axis=1)
    rows = np.arange(values.shape[0])
    return values[rows, col], col


def worst_case_check(name: str, unit: str, values, limits, point_ids, sense: str, limit_source,
                     *, reasons=(), invalid=None, present=None) -> CheckArray:
    """Build a check from per-point values and limits, keeping each part's smallest margin.

    Parameters
    ----------
    values, limits : array_like (P, K) or broadcastable
        The stress and its limit at each of K points (NaN: not computable).
    point_ids : array_like of int (K,)
        The `PointTable` index of each column.
    sense : str
        ``"max"``: value must stay at or below the limit; ``"min"``: at or above.
    limit_source : str or ndarray of object (P,)
    reasons : sequence of (mask (P,), str or ndarray of object)
        Applied in order where the value is null; the first that matches wins.
    invalid : ndarray of bool (P,), optional
        Parts whose value is not known whatever the arrays say (missing data).
    """
    values = np.atleast_2d(np.asarray(values, dtype=float))
    limits = np.asarray(limits, dtype=float)
    if limits.ndim == 1:
        limits = limits[:, None]
    values, limits = np.broadcast_arrays(values, limits)
    point_ids = np.asarray(point_ids, dtype=int)
    count = values.shape[0]
    margins = margin_pct(values, limits, sense)
    margins = np.where(np.isnan(values) | np.isnan(limits), np.nan, margins)
    col = np.argmin(np.where(np.isnan(margins), -np.inf, margins), axis=1)
    rows = np.arange(count)
    value = values[rows, col].copy()
    limit = limits[rows, col].copy()
    margin = margins[rows, col].copy()
    point = point_ids[col].copy()
    if invalid is not None:
        value[invalid] = np.nan
        margin[invalid] = np.nan
        point[invalid] = -1
        # A limit that depends on the point (Pallow at an ambient) means nothing without one.
        varies = ~np.all(limits == limits[:, :1], axis=1)
        limit[invalid & varies] = np.nan
    passed = np.isfinite(margin) & np.isfinite(value) & (margin >= -_MARGIN_SLACK_PCT)
    # An infinite stress (e.g. power with no allowance left) is reported as null with its reason.
    value[np.isinf(value)] = np.nan
    margin[~np.isfinite(margin)] = np.nan
    reason = object_array(None, count)
    unknown = np.isnan(value)
    open_ = unknown.copy()
    for mask, text in reasons:
        hit = open_ & mask
        if hit.any():
            reason[hit] = text[hit] if isinstance(text, np.ndarray) else text
            open_ &= ~hit
    if open_.any():
        reason[open_] = "not computable at this point"
    if isinstance(limit_source, str):
        limit_source = object_array(limit_source, count)
    return CheckArray(name, unit, value, limit, margin, passed, point, limit_source, reason,
                      present if present is not None else np.ones(count, dtype=bool))
