"""Checks as data: arrays over parts, each naming its worst point, and their JSON form.

A role evaluates every part at a table of *points* (`PointTable`): each point
is one corner (supply × load × ambient) in one state (``cold_start``,
``steady``, ``reverse``) and, for Zener roles, one end of the Vz and resistor
tolerances. A check is computed at every point it concerns; `worst_case_check`
keeps, per part, the point with the smallest margin.

Margins (SPEC §4, one rule for every check of every role): ``margin`` is how
far inside the limit, in the check's own unit — limit − value for an upper
limit, value − limit for a lower one; ``margin_pct`` = 100·margin/budget, where
the budget is |limit| for voltage, current, power, energy and time checks and
limit − ambient at that point for temperature checks (the share of the allowed
rise still unused). A zero budget gives 0 when met and −100 when not; a
temperature budget ≤ 0 (ambient at or above the limit) fails with −100 and the
reason "ambient at or above the limit". Negative always fails.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

__all__ = ["PointTable", "CheckArray", "margin_of", "margin_pct", "margin_pct_of", "temperature_budget",
           "NO_TEMPERATURE_BUDGET", "worst_case_check", "worst_value", "finite_or_none", "object_array",
           "json_numbers"]


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
    value, limit : ndarray (P,)
        NaN where not computable (then ``reason`` says why).
    margin : ndarray (P,)
        How far inside the limit in the check's own unit (``unit``; K for a
        check in °C); negative fails; NaN where not computable.
    passed : ndarray of bool (P,)
    point : ndarray of int (P,)
        Index into the role's `PointTable`; −1 where no point applies.
    limit_source : ndarray of object (P,)
        Where the limit came from.
    reason : ndarray of object (P,)
        Text where the value is null, else None.
    margin_pct : ndarray (P,)
        The margin as % of its budget (module docstring); what worst points,
        ranking and sensitivity compare.
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
    margin_pct: np.ndarray = field(default=None)
    present: np.ndarray = field(default=None)
    note: np.ndarray | None = None

    def __post_init__(self) -> None:
        if self.present is None:
            self.present = np.ones(self.value.shape, dtype=bool)
        if self.margin_pct is None:
            self.margin_pct = np.asarray(margin_pct_of(self.margin, np.abs(self.limit)), dtype=float)

    def entries(self, indices, points: PointTable) -> list[dict | None]:
        """The JSON dicts of this check for the parts ``indices`` (None where the check is not present).

        Columns are converted to Python lists once, so that building many
        candidates costs no per-element numpy indexing.
        """
        idx = np.asarray(indices, dtype=int)
        values = json_numbers(self.value[idx])
        limits = json_numbers(self.limit[idx])
        margins = json_numbers(self.margin[idx])
        margins_pct = json_numbers(self.margin_pct[idx])
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
                     "limit_source": sources[j], "margin": margins[j], "margin_pct": margins_pct[j],
                     "passed": passed[j],
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


def margin_of(value, limit, sense: str):
    """Margin in the check's own unit: limit − value (``"max"``) or value − limit (``"min"``)."""
    value = np.asarray(value, dtype=float)
    limit = np.asarray(limit, dtype=float)
    return (limit - value) if sense == "max" else (value - limit)


def margin_pct_of(margin, budget):
    """``margin`` as % of ``budget`` (|limit| or a temperature rise); a budget ≤ 0 gives 0 when met, −100 when not."""
    margin = np.asarray(margin, dtype=float)
    denom = np.asarray(budget, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        scaled = 100.0 * margin / np.where(denom > 0, denom, 1.0)
    return np.where(np.isnan(margin), np.nan, np.where(denom > 0, scaled, np.where(margin >= 0, 0.0, -100.0)))


def margin_pct(value, limit, sense: str):
    """Margin [% of the limit] of ``value`` against an upper (``"max"``) or lower (``"min"``) limit."""
    return margin_pct_of(margin_of(value, limit, sense), np.abs(np.asarray(limit, dtype=float)))


def temperature_budget(limit_C, ambient_C):
    """The budget of a temperature check: the allowed rise, limit − ambient [K] (≤ 0: no budget)."""
    return np.asarray(limit_C, dtype=float) - np.asarray(ambient_C, dtype=float)


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


NO_TEMPERATURE_BUDGET = "ambient at or above the limit"
"""The reason of a temperature check whose allowed rise is ≤ 0 (SPEC §4 Margins)."""


def worst_case_check(name: str, unit: str, values, limits, point_ids, sense: str, limit_source,
                     *, reasons=(), invalid=None, present=None, ambient_C=None) -> CheckArray:
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
    ambient_C : array_like (K,) or (P, K), optional
        Makes this a temperature check: the budget of ``margin_pct`` at each point
        is limit − ambient (the allowed rise), and a point whose budget is ≤ 0
        fails with −100 % and the reason `NO_TEMPERATURE_BUDGET`. Without it the
        budget is |limit|.
    """
    values = np.atleast_2d(np.asarray(values, dtype=float))
    limits = np.asarray(limits, dtype=float)
    if limits.ndim == 1:
        limits = limits[:, None]
    values, limits = np.broadcast_arrays(values, limits)
    point_ids = np.asarray(point_ids, dtype=int)
    count = values.shape[0]
    margins = margin_of(values, limits, sense)
    if ambient_C is None:
        budgets = np.abs(limits)
        no_budget = np.zeros(values.shape, dtype=bool)
    else:
        budgets = np.broadcast_to(temperature_budget(limits, ambient_C), values.shape)
        no_budget = ~np.isnan(limits) & (budgets <= 0)
    pcts = margin_pct_of(margins, budgets)
    pcts = np.where(no_budget, -100.0, pcts)
    pcts = np.where(np.isnan(values) | np.isnan(limits), np.nan, pcts)
    margins = np.where(np.isnan(values) | np.isnan(limits), np.nan, margins)
    # the worst point: the smallest margin_pct; a point whose value is unknown is the worst
    col = np.argmin(np.where(np.isnan(pcts), -np.inf, pcts), axis=1)
    # a point without a temperature budget fails whatever its value (unknown or not)
    col = np.where(no_budget.any(axis=1), np.argmax(no_budget, axis=1), col)
    rows = np.arange(count)
    value = values[rows, col].copy()
    limit = limits[rows, col].copy()
    margin = margins[rows, col].copy()
    margin_pct_ = pcts[rows, col].copy()
    budgetless = no_budget[rows, col]
    margin_pct_[budgetless] = -100.0
    point = point_ids[col].copy()
    if invalid is not None:
        value[invalid] = np.nan
        margin[invalid] = np.nan
        margin_pct_[invalid] = np.nan
        point[invalid] = -1
        budgetless = budgetless & ~invalid
        # A limit that depends on the point (Pallow at an ambient) means nothing without one.
        varies = ~np.all(limits == limits[:, :1], axis=1)
        limit[invalid & varies] = np.nan
    passed = (np.isfinite(margin_pct_) & np.isfinite(value) & (margin_pct_ >= -_MARGIN_SLACK_PCT)
              & ~budgetless)
    # An infinite stress (e.g. power with no allowance left) is reported as null with its reason.
    value[np.isinf(value)] = np.nan
    margin[~np.isfinite(margin) | np.isnan(value)] = np.nan
    margin_pct_[~np.isfinite(margin_pct_) & ~budgetless] = np.nan
    reason = object_array(None, count)
    unknown = np.isnan(value) | budgetless
    open_ = unknown.copy()
    if budgetless.any():
        reason[budgetless] = NO_TEMPERATURE_BUDGET
        open_ &= ~budgetless
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
                      margin_pct_, present if present is not None else np.ones(count, dtype=bool))
