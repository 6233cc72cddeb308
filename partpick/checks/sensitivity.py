"""What sets the worst case: the signed sensitivity of each candidate's smallest margin (SPEC §3a).

For each part parameter and requirement value that enters the role, the
change of the candidate's smallest check margin (in margin_pct points) for a
step of +1 % of the value (+1 K for temperatures; an input whose value is 0
moves by an absolute step: 0.01 %/K for coefficients, 1 mA for currents), by
central differences: (m(x + h) − m(x − h))/2, the discrete choices of the base
check held fixed (`Role.choices`). Part parameters are stepped for every
candidate in one stacked evaluation; each requirement value costs two
evaluations over the candidates. The five largest |changes| are kept, signed.

Inputs without a value (a part field not known, a requirement key not given)
do not enter and are not stepped. A part field the checker defaults (Eg, m,
rating temperatures) enters through its default and is stepped from it.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from partpick.checks.limits import _tile_choices
from partpick.checks.policy import resolve_limits
from partpick.checks.role_table import TableValues
from partpick.checks.roles.base import Overrides, Role, RoleResult

__all__ = ["Sensitivity", "sensitivities", "smallest_margin", "requirement_inputs", "TOP_INPUTS"]

TOP_INPUTS = 5
# Requirement keys that do not enter a role's physics or limits (filters and words).
_NOT_INPUTS = {"max_price"}
_STEP_PCT = 1.0


@dataclass
class Sensitivity:
    """The inputs that move each candidate's smallest margin most.

    Attributes
    ----------
    entries : list of list of dict
        Per candidate, up to five ``{"input", "step", "margin_change_pct"}``,
        largest |margin_change_pct| first (the JSON ``sensitivity`` list).
    """

    entries: list[list[dict]]


def smallest_margin(result: RoleResult) -> np.ndarray:
    """(P,) the smallest margin_pct over the checks on each part's sheet (NaN where one is not known)."""
    # a check that passes without a margin (reported "not rated", not checked) bounds nothing
    margins = [np.where(c.present & ~(c.passed & np.isnan(c.margin_pct)), c.margin_pct, np.inf)
               for c in result.checks if c.name != "data_missing"]
    if not margins:
        return np.full(0, np.nan)
    table = np.stack(margins, axis=1)
    out = np.min(np.where(np.isnan(table), -np.inf, table), axis=1)
    return np.where(np.isfinite(out), out, np.nan)


def _is_temperature(key: str) -> bool:
    """Temperatures (and the Tj margin, a temperature difference) step by +1 K."""
    return key.endswith("_C") or key == "tj_margin_K"


def _step(key: str, value: np.ndarray):
    """Per element: (down, up, label) for an input ``key`` at ``value`` (NaN where no step applies).

    The change for one step is (m(up) − m(down))·h/(up − down) with h = the step.
    """
    value = np.asarray(value, dtype=float)
    if _is_temperature(key):
        return value - 1.0, value + 1.0, np.full(value.shape, "+1 K", dtype=object)
    zero = value == 0
    if key.endswith("_pct_per_K"):
        absolute, label0 = 0.01, "+0.01 %/K"
    elif key.endswith("_A"):
        absolute, label0 = 1e-3, "+1 mA"
    else:
        absolute, label0 = np.nan, None
    h = np.where(zero, absolute, np.abs(value) * _STEP_PCT / 100.0)
    label = np.where(zero, label0 or "", "+1 %").astype(object)
    # From zero the step is one-sided (a current or coefficient below 0 may mean nothing): the
    # change is then m(h) − m(0); elsewhere central, (m(x + h) − m(x − h))/2.
    return np.where(zero, value, value - h), value + h, label


def _per_step(key: str, value) -> np.ndarray:
    """The factor turning m(up) − m(down) into the change for one step: 1/2 central, 1 one-sided."""
    down, up, _ = _step(key, value)
    value = np.asarray(value, dtype=float)
    h = np.where(_is_temperature(key), 1.0, up - value)
    with np.errstate(invalid="ignore", divide="ignore"):
        return h / (up - down)


def requirement_inputs(requirement) -> list[tuple[str, str | None, float]]:
    """The numeric requirement values that are given: (key, table or None, value)."""
    out = []
    for f in dataclasses.fields(requirement):
        value = getattr(requirement, f.name)
        if f.name in _NOT_INPUTS or isinstance(value, bool) or not isinstance(value, (int, float)):
            continue
        out.append((f.name, None, float(value)))
    for table in ("zener", "thermal"):
        sub = getattr(requirement, table, None)
        if sub is None:
            continue
        for f in dataclasses.fields(sub):
            value = getattr(sub, f.name)
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                continue
            out.append((f.name, table, float(value)))
        if table == "thermal" and sub.mount == "heatsink" and sub.rth_cs_K_per_W is None:
            out.append(("rth_cs_K_per_W", "thermal", sub.interface))  # enters through its default
    for values in getattr(requirement, "tables", ()):  # a role's own table ([ac], [coil]…), defaults included
        for key, value in values.to_dict().items():
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                continue
            out.append((key, values._table.name, float(value)))
    return out


def _with_value(requirement, key: str, table: str | None, value: float):
    if table is None:
        return dataclasses.replace(requirement, **{key: value})
    for k, values in enumerate(getattr(requirement, "tables", ())):
        if values._table.name == table:
            tables = list(requirement.tables)
            tables[k] = TableValues(values._table, {**values.given, key: value})
            return dataclasses.replace(requirement, tables=tuple(tables))
    return dataclasses.replace(requirement, **{table: dataclasses.replace(getattr(requirement, table),
                                                                          **{key: value})})


def sensitivities(role: Role, requirement, parts, limits: dict, base: RoleResult, index=None,
                  top: int = TOP_INPUTS, policy=None, policy_named: bool = True) -> Sensitivity:
    """The ``top`` signed sensitivities of the smallest margin of the candidates ``index`` (default all).

    With ``policy`` (the `Policy` in force) a stepped requirement key that overrides a
    policy limit (``tj_margin_K``, ``reverse_margin_pct``, …) moves that limit too.
    """
    index = np.arange(parts.count) if index is None else np.asarray(index, dtype=int)
    P = index.size
    if P == 0:
        return Sensitivity([])
    sub = parts.subset(index)
    choices = {k: np.asarray(v)[index] for k, v in role.choices(base).items()}
    names: list[str] = []
    labels: list[np.ndarray] = []
    changes: list[np.ndarray] = []

    # Part parameters: every input stepped down and up, all in one stacked evaluation.
    part_keys = [k for k in role.part_inputs if np.isfinite(sub.value(k)).any()]
    if part_keys:
        copies = 2 * len(part_keys)
        stacked = sub.subset(np.tile(np.arange(P), copies))
        for k, key in enumerate(part_keys):
            down, up, label = _step(key, sub.value(key))
            column = stacked.raw[key]
            column[(2 * k) * P:(2 * k + 1) * P] = down
            column[(2 * k + 1) * P:(2 * k + 2) * P] = up
            labels.append(label)
            names.append(key)
        result = role.evaluate(requirement, stacked, limits, Overrides(choices=_tile_choices(choices,
                                                                                              np.arange(P), copies)))
        m = smallest_margin(result).reshape(copies, P)
        for k, key in enumerate(part_keys):
            changes.append((m[2 * k + 1] - m[2 * k]) * _per_step(key, sub.value(key)))

    # Requirement values: two evaluations each over the candidates.
    held = Overrides(choices=choices)
    for key, table, value in requirement_inputs(requirement):
        down, up, label = _step(key, np.array([value]))
        if not (np.isfinite(down[0]) and np.isfinite(up[0])):
            continue
        margins = []
        for moved in (float(up[0]), float(down[0])):
            req = _with_value(requirement, key, table, moved)
            lim = resolve_limits(policy, req, named=policy_named) if policy is not None else limits
            margins.append(smallest_margin(role.evaluate(req, sub, lim, held)))
        m_up, m_down = margins
        names.append(f"{table}.{key}" if table else key)
        labels.append(np.full(P, label[0], dtype=object))
        changes.append((m_up - m_down) * _per_step(key, np.array([value]))[0])

    if not changes:
        return Sensitivity([[] for _ in range(P)])
    table = np.stack(changes, axis=1)  # (P, N)
    label_table = np.stack([np.asarray(lab, dtype=object) for lab in labels], axis=1)
    entries = []
    for j in range(P):
        row = table[j]
        usable = np.flatnonzero(np.isfinite(row) & (np.abs(row) > 1e-9) & (label_table[j] != ""))
        order = usable[np.argsort(-np.abs(row[usable]), kind="stable")][:top]
        entries.append([{"input": names[n], "step": str(label_table[j, n]), "margin_change_pct": float(row[n])}
                        for n in order])
    return Sensitivity(entries)
