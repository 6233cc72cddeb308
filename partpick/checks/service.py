"""The checker's entry points, shared by the CLI and the desktop app.

`run_check(requirement, parts, *, policies, library, top, part, substitutes_for, yield_runs, seed)`
    The JSON result of SPEC §5 as a plain dict (only JSON types, never NaN or
    Infinity), plus ``"subject_passed"`` for the exit code. In substitutes
    mode (``substitutes_for``) the candidates are the substitutes, each with
    ``deltas``, and ``"reference"`` holds the reference part's own candidate
    entry. ``"summary"`` counts the candidates evaluated, those passing and
    those listed (``--top`` lists fewer). With ``reviewer`` it carries
    ``"reviewer"`` for the reports. A check may carry ``"note"`` (e.g. leakage
    scaled above its test voltage) for the check sheet.

`evaluate(requirement, parts, *, policies)` → `Evaluation`
    The arrays behind a result: the role's `RoleResult` (checks, metrics,
    worst points, internals) over the candidates, and the `Ranking`. The GUI
    can keep one and re-render without recomputing.

`candidate_details(requirement, part, *, policies=None)` → dict
    What the curves and the check sheet need for one part, as plain Python
    (floats, lists, None):

    - ``role``: ``"series"`` or ``"zener_shunt"``; ``points``: every point the
      role evaluated, as ``corner`` dicts, in column order;
    - ``parameters``: the resolved model — series: ``is_A`` (the checked model,
      moved to VF max where given), ``is_A_typical``, ``n``, ``rs_ohm``,
      ``eg_eV``, ``is_temp_exponent``, ``rs_temp_exponent``,
      ``rth_ja_K_per_W``, ``pd_W``, ``tj_max_C``, ``tj_limit_C``,
      ``hand_model_tj_C``; zener_shunt: ``vz_V``, ``vz_low_V``, ``vz_high_V``,
      ``izt_A``, ``zzt_ohm``, ``izk_A``, ``zzk_ohm``, ``vz_tc_per_K`` [1/K],
      ``iz_min_A``, ``resistor_ohm`` (the chosen or given resistor),
      ``resistor_tolerance_pct``, ``resistor_source``, ``vz_high_at_iz_min_V``,
      ``rth_ja_K_per_W``, ``pd_W``, ``tj_max_C``, ``tj_limit_C``, ``feasible``;
    - ``per_point``: arrays over ``points`` — series: ``cold_voltage_V``,
      ``steady_voltage_V``, ``steady_tj_C`` (over the 8 corners), ``reverse_tj_C``;
      zener_shunt: ``output_voltage_V``, ``zener_current_A``, ``zener_tj_C``;
    - ``metric_corners``: metric name → the corner dict where it was found;
    - ``candidate``: the part's JSON candidate entry (checks, metrics).
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass
from operator import itemgetter

import numpy as np

from partpick import __version__
from partpick.checks.cautions import result_cautions
from partpick.checks.partdata import PartArrays
from partpick.checks.policy import (BUILTIN_POLICIES, GROUPS, LIMIT_DESCRIPTIONS, NO_POLICY_NOTE, Policy,
                                    resolve_limits)
from partpick.checks.limits import OperatingLimits, operating_limits
from partpick.checks.ranking import Ranking, rank_candidates
from partpick.checks.results import PointTable, finite_or_none, json_numbers, object_array
from partpick.checks.roles import ROLES, Role, RoleResult
from partpick.checks.sensitivity import Sensitivity, sensitivities
from partpick.errors import InputError

__all__ = ["run_check", "evaluate", "Evaluation", "candidate_details", "select_candidates", "resolve_policy",
           "why_no_candidates", "analyse_candidates", "analyse_parts", "limits_json", "not_analysed_block",
           "ANALYSED_CANDIDATES"]

_LIMIT_UNITS = {"reverse_pct": "%", "current_pct": "%", "power_pct": "%", "tj_cap_C": "°C", "tj_margin_K": "K",
                "resistor_power_pct": "%", "surge_pct": "%",
                "pulse_power_pct": "%"}
_MAX_YIELD_RUNS = 1_000_000
# Operating limits and sensitivity cost about 20 evaluations each: they are computed for the
# candidates a reader looks at (SPEC §9: the 20 shown), not for a whole 10,000-part list.
ANALYSED_CANDIDATES = 20


@dataclass
class Evaluation:
    """Everything computed for one requirement over its candidates."""

    requirement: object
    role: Role
    policy: Policy
    policy_named: bool
    limits: dict
    parts: PartArrays
    result: RoleResult
    ranking: Ranking

    def index_of(self, part_number: str) -> int | None:
        hits = np.flatnonzero(self.parts.part_number == part_number)
        return int(hits[0]) if hits.size else None


def resolve_policy(requirement, policies: dict | None) -> tuple[Policy, bool]:
    """The policy the requirement names (InputError if unknown) and whether one was named."""
    known = dict(BUILTIN_POLICIES)
    if policies:
        known.update(policies)
    name = requirement.policy_name
    if name not in known:
        close = difflib.get_close_matches(name, list(known), n=1, cutoff=0.6)
        hint = f" (did you mean '{close[0]}'?)" if close else ""
        raise InputError(f"{requirement.source}: policy {name!r} is neither built in nor in the library "
                         f"(known: {', '.join(sorted(known))}){hint}")
    return known[name], requirement.policy is not None


def _member(values: np.ndarray, allowed) -> np.ndarray:
    """(P,) True where a text field is one of ``allowed`` (None never is)."""
    mask = np.zeros(values.shape, dtype=bool)
    for item in set(allowed):
        mask |= values == item
    return mask


def _filter_mask(kind, package, lifecycle, price, req) -> np.ndarray:
    """(P,) True where a part passes the requirement's filters (SPEC §4 "Candidates")."""
    keep = np.ones(kind.shape, dtype=bool)
    if req.kinds is not None:
        keep &= _member(kind, req.kinds)
    if req.packages is not None:
        wanted = {p.strip().casefold() for p in req.packages}
        keep &= np.fromiter(((p or "").strip().casefold() in wanted for p in package), dtype=bool,
                            count=kind.size)
    if req.lifecycle is not None:
        keep &= _member(lifecycle, req.lifecycle)
    if req.max_price is not None:
        keep &= np.isfinite(price) & (price <= req.max_price)  # an unknown price cannot be shown to fit
    return keep


_SELECT_FIELDS = ("part_number", "kind", "package", "lifecycle", "price")


def select_candidates(requirement, parts, *, keep: tuple[str, ...] = ()) -> PartArrays:
    """The parts the role considers that pass the requirement's filters, and the parts named in ``keep``.

    Parameters
    ----------
    parts : list of dict or PartArrays
        Only the selected dicts are converted to arrays.
    keep : tuple of str
        Part numbers evaluated whatever the filters say (``--part``, ``--substitutes-for``).

    Raises
    ------
    InputError
        A part named in ``keep`` is not in the library or is of a kind the role does not consider.
    """
    if isinstance(parts, PartArrays):
        numbers, kind, package, lifecycle = parts.part_number, parts.kind, parts.package, parts.lifecycle
        price = parts.raw["price"]
    else:
        try:
            rows = list(map(itemgetter(*_SELECT_FIELDS), parts))
        except KeyError:
            rows = [tuple(p.get(n) for n in _SELECT_FIELDS) for p in parts]
        columns = list(zip(*rows)) if rows else [()] * len(_SELECT_FIELDS)
        numbers, kind, package, lifecycle = (object_array(c) for c in columns[:4])
        price = np.array(columns[4], dtype=float).reshape(-1)
    role = ROLES[requirement.role]
    considered = _member(kind, role.candidate_kinds(requirement))
    mask = considered & _filter_mask(kind, package, lifecycle, price, requirement)
    if keep:
        index_of = {n: i for i, n in enumerate(numbers.tolist())}
        for number in keep:
            if number not in index_of:
                close = difflib.get_close_matches(number, [n for n in index_of if isinstance(n, str)], n=1)
                hint = f" (did you mean '{close[0]}'?)" if close else ""
                raise InputError(f"part {number!r} is not in the library{hint}")
            i = index_of[number]
            if not considered[i]:
                raise InputError(f"part {number!r} is a {kind[i]} part; role {role.name!r} considers "
                                 f"{', '.join(role.candidate_kinds(requirement))} here")
            mask[i] = True
    index = np.flatnonzero(mask)
    if isinstance(parts, PartArrays):
        return parts.subset(index)
    return PartArrays([parts[i] for i in index])


_KIND_WORDS = {"rectifier": "rectifier", "signal": "signal", "schottky": "Schottky",
               "fast_recovery": "fast-recovery", "zener": "Zener", "bridge": "bridge", "tvs": "TVS"}


def why_no_candidates(requirement, parts) -> str:
    """Why ``requirement`` leaves no candidate in ``parts`` (words for the window and the CLI), or "".

    The first reason that alone explains the empty list wins: an empty library, no part of a kind
    the role considers, then each filter on its own (kinds, packages, lifecycle, price), then the
    filters together. Returns "" when there are candidates.
    """
    if isinstance(parts, PartArrays):
        kind, package, lifecycle, price = parts.kind, parts.package, parts.lifecycle, parts.raw["price"]
    else:
        kind = object_array([p.get("kind") for p in parts])
        package = object_array([p.get("package") for p in parts])
        lifecycle = object_array([p.get("lifecycle") for p in parts])
        price = np.array([np.nan if p.get("price") is None else p["price"] for p in parts], dtype=float)
    role = ROLES[requirement.role]
    if kind.size == 0:
        return "the library has no parts yet: add one (Part ▸ Add part…) or import a CSV (Library ▸ Import CSV…)"
    considered = _member(kind, role.kinds)
    if not considered.any():
        if len(role.kinds) == 1:
            return f"no {_KIND_WORDS.get(role.kinds[0], role.kinds[0])} parts in this library"
        words = ", ".join(_KIND_WORDS.get(k, k) for k in role.kinds)
        return f"no parts of the kinds the {role.label} role considers ({words}) in this library"
    if not (considered & _filter_mask(kind, package, lifecycle, price, requirement)).any():
        from dataclasses import replace

        blank = {"kinds": None, "packages": None, "lifecycle": None, "max_price": None}
        alone = []
        for key, words in (("kinds", "the Kinds filter"), ("packages", "the package filter"),
                           ("lifecycle", "the lifecycle filter"), ("max_price", "the price limit")):
            value = getattr(requirement, key)
            if value is None:
                continue
            only = replace(requirement, **dict(blank, **{key: value}))
            shown = ", ".join(value) if isinstance(value, tuple) else f"{value:g}"
            if key == "kinds" and not set(value) & set(role.kinds):
                return (f"the Kinds filter ({shown}) keeps no kind the {role.label} role considers "
                        f"({', '.join(_KIND_WORDS.get(k, k) for k in role.kinds)})")
            if not (considered & _filter_mask(kind, package, lifecycle, price, only)).any():
                if key == "max_price":
                    return f"no part with a known price is at most {shown} (the price limit)"
                return f"{words} {shown} matches no part"
            alone.append(f"{words} {shown}")
        return "the filters together (" + "; ".join(alone) + ") match no part"
    return ""


def evaluate(requirement, parts, *, policies: dict | None = None, keep: tuple[str, ...] = ()) -> Evaluation:
    """Evaluate every candidate (vectorised over parts × points) and rank them.

    ``parts`` is a list of part dicts or a `PartArrays` built once from them.
    """
    policy, named = resolve_policy(requirement, policies)
    role = ROLES[requirement.role]
    limits = resolve_limits(policy, requirement, named=named)
    candidates = select_candidates(requirement, parts, keep=keep)
    if candidates.count == 0:  # nothing to evaluate (the physics wants at least one element)
        empty = np.zeros(0)
        result = RoleResult(PointTable(empty, empty, empty, ()), [], {})
    else:
        result = role.evaluate(requirement, candidates, limits)
    ranking = rank_candidates(result, candidates, requirement.objective, role.objective_metrics)
    return Evaluation(requirement, role, policy, named, limits, candidates, result, ranking)


# ---------------------------------------------------------------------------
# JSON building

def _policy_block(evaluation: Evaluation) -> dict:
    groups = sorted({(k if k in ("zener", "schottky", "tvs") else "pn")
                     for k in evaluation.role.kinds}, key=GROUPS.index)
    block = {
        "name": evaluation.policy.name,
        "description": evaluation.policy.description,
        "limits": {g: {key: {"value": lim.value, "unit": _LIMIT_UNITS[key], "description": LIMIT_DESCRIPTIONS[key],
                             "source": lim.source}
                       for key, lim in evaluation.limits[g].items()} for g in groups},
    }
    if not evaluation.policy_named:
        block["note"] = NO_POLICY_NOTE
    return block


def _candidate_entries(evaluation: Evaluation, indices) -> list[dict]:
    res = evaluation.result
    parts = evaluation.parts
    indices = np.asarray(indices, dtype=int)
    columns = [c.entries(indices, res.points) for c in res.checks]
    metric_lists = {name: json_numbers(arr[indices]) for name, arr in res.metrics.items()}
    numbers = parts.part_number[indices].tolist()
    kinds = parts.kind[indices].tolist()
    packages = parts.package[indices].tolist()
    ranks = evaluation.ranking.rank[indices].tolist()
    passed = evaluation.ranking.passed[indices].tolist()
    entries = []
    for j in range(indices.size):
        sheet = [col[j] for col in columns if col[j] is not None]
        failing = sorted((-math.inf if e["margin_pct"] is None else e["margin_pct"], k, e["name"])
                         for k, e in enumerate(sheet) if not e["passed"])
        entries.append({
            "rank": ranks[j],
            "part_number": numbers[j],
            "kind": kinds[j],
            "package": packages[j],
            "passed": passed[j],
            "failed_checks": [name for _, _, name in failing],
            "checks": sheet,
            "metrics": {name: values[j] for name, values in metric_lists.items()},
        })
    return entries


def _smallest_margin(entry: dict) -> float | None:
    margins = [c["margin_pct"] for c in entry["checks"]]
    if any(m is None for m in margins) or not margins:
        return None
    return min(margins)


def _deltas(entry: dict, reference: dict, parts_by_number: dict, role: Role) -> dict:
    def diff(a, b):
        return None if a is None or b is None else a - b

    mine = parts_by_number[entry["part_number"]]
    ref = parts_by_number[reference["part_number"]]
    pkg_a = (mine.get("package") or "").strip().casefold()
    pkg_b = (ref.get("package") or "").strip().casefold()
    out = {"same_package": bool(pkg_a) and pkg_a == pkg_b}
    for key in (role.objective_metrics["drop"].lstrip("-"), role.objective_metrics["dissipation"].lstrip("-"),
                "junction_temp_C"):
        out[key] = diff(entry["metrics"].get(key), reference["metrics"].get(key))
    out["smallest_margin_pct"] = diff(_smallest_margin(entry), _smallest_margin(reference))
    out["price"] = diff(mine.get("price"), ref.get("price"))
    out["lifecycle"] = {"from": ref.get("lifecycle"), "to": mine.get("lifecycle")}
    return out


def analyse_candidates(evaluation: Evaluation, index) -> tuple[OperatingLimits, Sensitivity]:
    """Operating limits and "what sets the worst case" of the candidates ``index`` (SPEC §3a)."""
    index = np.asarray(index, dtype=int)
    ev = evaluation
    limits = operating_limits(ev.role, ev.requirement, ev.parts, ev.limits, ev.result, index)
    sens = sensitivities(ev.role, ev.requirement, ev.parts, ev.limits, ev.result, index, policy=ev.policy,
                         policy_named=ev.policy_named)
    return limits, sens


def limits_json(limits: OperatingLimits, j: int) -> tuple[dict, dict]:
    """The metrics (SPEC §3a names) and the ``operating_limits`` block of candidate ``j``."""
    metrics = {k: finite_or_none(v[j]) for k, v in limits.values.items()}
    notes = {k: t[j] for k, t in limits.notes.items() if t[j] is not None}
    return metrics, {"summary": limits.summary[j], "notes": notes}


def analyse_parts(requirement, parts, part_numbers, *, policies: dict | None = None) -> dict[str, dict]:
    """Operating limits and sensitivity of the named candidates, as the JSON result carries them.

    For the window: the selected part first, the rest of the shortlist after. Each part's
    numbers equal those of ``run_check`` (a role evaluates every part on its own).

    Returns
    -------
    dict
        part number → ``{"metrics": {...limits}, "operating_limits": {...}, "sensitivity": [...]}``.
    """
    numbers = [n for n in dict.fromkeys(part_numbers)]
    if not numbers:
        return {}
    wanted = set(numbers)
    records = parts.parts if isinstance(parts, PartArrays) else parts
    chosen = [p for p in records if p.get("part_number") in wanted]
    ev = evaluate(requirement, chosen, policies=policies, keep=tuple(numbers))
    index = np.array([ev.index_of(n) for n in numbers], dtype=int)
    limits, sens = analyse_candidates(ev, index)
    out = {}
    for j, number in enumerate(numbers):
        metrics, block = limits_json(limits, j)
        out[number] = {"metrics": metrics, "operating_limits": block, "sensitivity": sens.entries[j]}
    return out


def _add_limits_and_sensitivity(evaluation: Evaluation, index, entries: list[dict], skipped: int) -> None:
    index = np.asarray(index, dtype=int)
    if index.size:
        limits, sens = analyse_candidates(evaluation, index)
    for j, entry in enumerate(entries):
        if j < index.size:
            metrics, block = limits_json(limits, j)
            entry["metrics"].update(metrics)
            entry["operating_limits"] = block
            entry["sensitivity"] = sens.entries[j]
        else:
            entry["operating_limits"] = not_analysed_block(index.size, skipped)
            entry["sensitivity"] = None


def not_analysed_block(analysed: int, skipped: int) -> dict:
    """The ``operating_limits`` of a listed candidate beyond the first ``analysed`` (none computed)."""
    if analysed == 0:
        return {"summary": None, "notes": {}, "reason": (
            "not computed: for this role operating limits and sensitivity are computed on demand "
            "(--limits-for N, or --part P for one part)")}
    return {"summary": None, "notes": {}, "reason": (
        f"not computed: operating limits and sensitivity are computed for the first {analysed} candidates "
        f"listed ({skipped} more listed)")}


def run_check(requirement, parts: list[dict], *, policies: dict | None = None, library: dict | None = None,
              top: int | None = None, part: str | None = None, substitutes_for: str | None = None,
              yield_runs: int | None = None, seed: int = 0, reviewer: str | None = None,
              analyse: int | None = -1) -> dict:
    """Check ``parts`` against ``requirement`` and return the SPEC §5 JSON result dict.

    Parameters
    ----------
    requirement : Requirement
    parts : list of dict or PartArrays
        Part records (``Library.list_parts()``), or a `PartArrays` built from them once.
    policies : dict of str to Policy
        The library's policies; the built-ins are always available.
    library : dict
        ``{"location": ..., "content_hash": ...}``, echoed.
    top : int, optional
        List only the first N candidates (the subject stays the whole list).
    part : str, optional
        The subject is this part; only it is listed.
    substitutes_for : str, optional
        The subject is the parts that pass in place of this one.
    yield_runs : int, optional
        Monte Carlo builds per listed candidate (zener_shunt only).
    seed : int
        Seed of the Monte Carlo.
    reviewer : str, optional
        Echoed as ``"reviewer"`` for the reports.
    analyse : int, optional
        Operating limits and sensitivity (SPEC §3a) for the first N candidates
        listed (default −1: the role's `Role.analysed_candidates`, else `ANALYSED_CANDIDATES`,
        at least the one part of ``part``; 0 or None: none); the others carry
        ``"operating_limits"`` with the reason and ``"sensitivity": null``.

    Raises
    ------
    InputError
        Unknown policy or part, a part of the wrong kind, conflicting options.
    """
    if part is not None and substitutes_for is not None:
        raise InputError("--part and --substitutes-for cannot be combined (each names the command's subject)")
    if top is not None and (isinstance(top, bool) or not isinstance(top, int) or top < 1):
        raise InputError(f"--top: {top!r} must be a whole number of at least 1")
    role = ROLES[requirement.role]
    if yield_runs is not None:
        if isinstance(yield_runs, bool) or not isinstance(yield_runs, int) or not 1 <= yield_runs <= _MAX_YIELD_RUNS:
            raise InputError(f"--yield: {yield_runs!r} must be a whole number from 1 to {_MAX_YIELD_RUNS}")
        if not role.supports_yield:
            raise InputError(f"--yield: role {role.name!r} has no regulation limit to count builds against "
                             "(yield applies to zener_shunt)")
    if analyse == -1:  # the role's default: some roles compute these on demand only (SPEC §9)
        analyse = ANALYSED_CANDIDATES if role.analysed_candidates is None else role.analysed_candidates
        if part is not None:
            analyse = max(analyse, 1)
    keep = tuple(x for x in (part, substitutes_for) if x is not None)
    evaluation = evaluate(requirement, parts, policies=policies, keep=keep)
    ranking = evaluation.ranking
    order = ranking.order
    parts_by_number = {p["part_number"]: p for p in evaluation.parts.parts}
    out = {
        "partpick_version": __version__,
        "requirement": requirement.to_dict(),
        "policy": _policy_block(evaluation),
        "library": dict(library or {"location": None, "content_hash": None}),
    }
    reference = None
    if part is not None:
        listed = np.array([evaluation.index_of(part)])
        subject_passed = bool(ranking.passed[listed[0]])
    elif substitutes_for is not None:
        ref_index = evaluation.index_of(substitutes_for)
        listed = order[ranking.passed[order] & (order != ref_index)]
        subject_passed = listed.size > 0
        reference = _candidate_entries(evaluation, np.array([ref_index]))[0]
    else:
        listed = order
        subject_passed = bool(ranking.passed.any())
    if top is not None and part is None:
        listed = listed[:top]
    entries = _candidate_entries(evaluation, listed)
    if yield_runs is not None and listed.size:
        yields = role.yield_pct(requirement, evaluation.parts, evaluation.result, listed, yield_runs, seed)
        for entry, y in zip(entries, yields):
            entry["metrics"]["yield_pct"] = finite_or_none(y)
    _add_limits_and_sensitivity(evaluation, listed[:analyse] if analyse else listed[:0], entries,
                                listed.size - min(analyse or 0, listed.size))
    if reference is not None:
        for entry in entries:
            entry["deltas"] = _deltas(entry, reference, parts_by_number, role)
        out["reference"] = reference
    out["candidates"] = entries
    out["summary"] = {"candidates": int(evaluation.parts.count), "passing": int(ranking.passed.sum()),
                      "listed": len(entries)}
    if reviewer:
        out["reviewer"] = reviewer
    out["cautions"] = result_cautions(role.cautions)  # SPEC §7: general, the role's own, the assumptions
    if role.method_notes:
        out["method"] = list(role.method_notes)
    out["subject_passed"] = subject_passed
    return out


def _plain(x):
    if isinstance(x, np.ndarray):
        return [_plain(v) for v in x.tolist()]
    if isinstance(x, (np.floating, float)):
        return finite_or_none(x)
    if isinstance(x, (np.bool_, bool)):
        return bool(x)
    if isinstance(x, (np.integer,)):
        return int(x)
    if isinstance(x, list):
        return [_plain(v) for v in x]
    return x


def candidate_details(requirement, part: dict, *, policies: dict | None = None) -> dict:
    """The resolved parameters, per-point solutions and worst corners of one part (see the module docstring).

    Raises
    ------
    InputError
        The part is of a kind the requirement's role does not consider, or the policy is unknown.
    """
    role = ROLES[requirement.role]
    if part.get("kind") not in role.candidate_kinds(requirement):
        raise InputError(f"part {part.get('part_number')!r} is a {part.get('kind')} part; role {role.name!r} "
                         f"considers {', '.join(role.candidate_kinds(requirement))} here")
    policy, named = resolve_policy(requirement, policies)
    limits = resolve_limits(policy, requirement, named=named)
    parts = PartArrays([part])
    result = role.evaluate(requirement, parts, limits)
    ranking = rank_candidates(result, parts, requirement.objective, role.objective_metrics)
    evaluation = Evaluation(requirement, role, policy, named, limits, parts, result, ranking)
    points = result.points
    per_point_keys = {"cold_voltage_V", "steady_voltage_V", "steady_tj_C", "output_voltage_V", "zener_current_A",
                      "zener_tj_C"}
    parameters, per_point = {}, {}
    for key, arr in result.internals.items():
        value = arr[0]
        if key in per_point_keys:
            per_point[key] = _plain(np.asarray(value, dtype=float))
        elif key not in ("forward_bad", "reverse_bad"):
            parameters[key] = _plain(value)
    if "reverse_tj_C" in parameters:
        per_point["reverse_tj_C"] = parameters.pop("reverse_tj_C")
    return {
        "role": role.name,
        "points": [points.corner(i) for i in range(len(points))],
        "parameters": parameters,
        "per_point": per_point,
        "metric_corners": {k: points.corner(int(v[0])) for k, v in result.metric_points.items()},
        "candidate": _candidate_entries(evaluation, np.array([0]))[0],
    }
