"""The machine and terminal formats of a check result: JSON, CSV and the text table."""

from __future__ import annotations

import csv
import io
import json
import math

from partpick.report.words import (
    CHECK_LABELS,
    cautions_of,
    price_text,
    short_reason,
    KEY_METRICS,
    METRIC_LABELS,
    METRIC_ORDER,
    ROLE_LABELS,
    clean_text,
    corner_text,
    first_failing,
    format_value,
    margin_text,
    metric_unit,
    smallest_margin,
)

__all__ = ["render_json", "render_csv", "render_table", "guard_cell", "find_non_finite", "shortlist_rows",
           "pass_count_text", "delta_text", "check_sheet_lines"]


# --- JSON --------------------------------------------------------------------------------------
def find_non_finite(value, path: str = "result") -> str | None:
    """The path of the first NaN or Infinity inside ``value`` (None when there is none)."""
    if isinstance(value, float) and not math.isfinite(value):
        return path
    if isinstance(value, dict):
        for key, item in value.items():
            found = find_non_finite(item, f"{path}.{key}")
            if found:
                return found
    elif isinstance(value, (list, tuple)):
        for index, item in enumerate(value):
            found = find_non_finite(item, f"{path}[{index}]")
            if found:
                return found
    return None


def render_json(result: dict) -> bytes:
    """The result as JSON text (UTF-8): the result's own key order, indented, no NaN/Infinity.

    Raises
    ------
    ValueError
        The result holds a non-finite number (naming where) or a value that is not a JSON type.
    """
    bad = find_non_finite(result)
    if bad:
        raise ValueError(f"{bad} is not a finite number; a result must carry null instead of NaN or Infinity")
    text = json.dumps(result, indent=2, ensure_ascii=False, allow_nan=False)
    return (text + "\n").encode("utf-8")


# --- CSV ---------------------------------------------------------------------------------------
_FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r", "'")


def guard_cell(text: str) -> str:
    """SPEC §5's formula-injection guard: a text cell starting with = + - @ tab CR or ' gets one leading '."""
    return "'" + text if text.startswith(_FORMULA_STARTS) else text


def _cell(value) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        if not math.isfinite(value):
            raise ValueError(f"a result value is not finite ({value!r})")
        return repr(float(value)) if isinstance(value, float) else str(value)
    return guard_cell(str(value))


def _delta_cell(value):
    """A delta as one cell: numbers and flags as they are, a change of lifecycle as 'active → nrnd'."""
    if isinstance(value, dict) and set(value) == {"from", "to"}:
        return f"{value['from'] or '—'} → {value['to'] or '—'}"
    if isinstance(value, (dict, list)):
        return json.dumps(value, ensure_ascii=False, allow_nan=False)
    return value


def pass_count_text(result: dict) -> str:
    """'2 of 3 candidates pass' (from the result's summary when it has one: --top lists fewer)."""
    candidates = result.get("candidates", [])
    summary = result.get("summary") or {}
    passing = summary.get("passing", sum(1 for c in candidates if c.get("passed")))
    total = summary.get("candidates", len(candidates))
    text = f"{passing} of {total} candidates pass every check"
    listed = summary.get("listed", len(candidates))
    if listed != total:
        text += f"; {listed} listed"
    return text


def _check_names(candidates: list[dict]) -> list[str]:
    names: list[str] = []
    for candidate in candidates:
        for check in candidate.get("checks", []):
            if check.get("name") not in names:
                names.append(check.get("name"))
    return names


# The CSV columns of each check, ``<check>_<field>``, straight from the JSON check.
_CHECK_FIELDS = ("value", "unit", "limit", "limit_source", "margin", "margin_pct", "passed")


def render_csv(result: dict, parts_by_number: dict | None = None) -> bytes:
    """One row per candidate: rank, part, pass/fail, first failing check, every metric, every check's
    value, unit, limit, limit source, margin (in the check's unit; K for °C), margin % and pass; price
    and lifecycle from the library. Text cells are formula-guarded."""
    candidates = result.get("candidates", [])
    parts_by_number = parts_by_number or {}
    metrics = [k for k in METRIC_ORDER if any(k in (c.get("metrics") or {}) for c in candidates)]
    extra_metrics = sorted({k for c in candidates for k in (c.get("metrics") or {})} - set(metrics))
    checks = _check_names(candidates)
    deltas = sorted({k for c in candidates for k in (c.get("deltas") or {})})
    header = (["rank", "part_number", "kind", "package", "passed", "failed_checks", "first_failing_check",
               "first_failing_margin_pct", "smallest_margin_pct", "price", "lifecycle"]
              + metrics + extra_metrics
              + [f"{name}_{field}" for name in checks for field in _CHECK_FIELDS]
              + [f"delta_{k}" for k in deltas])
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\r\n")
    writer.writerow(header)
    for c in candidates:
        part = parts_by_number.get(c.get("part_number")) or {}
        first = first_failing(c)
        by_name = {k.get("name"): k for k in c.get("checks", [])}
        row = [c.get("rank"), c.get("part_number"), c.get("kind"), c.get("package"), c.get("passed"),
               ";".join(c.get("failed_checks") or []), first.get("name") if first else None,
               first.get("margin_pct") if first else None, smallest_margin(c), part.get("price"),
               part.get("lifecycle")]
        row += [(c.get("metrics") or {}).get(k) for k in metrics + extra_metrics]
        for name in checks:
            check = by_name.get(name) or {}
            row += [check.get(field) for field in _CHECK_FIELDS]
        delta = c.get("deltas") or {}
        row += [_delta_cell(delta.get(k)) for k in deltas]
        writer.writerow([_cell(v) for v in row])
    return out.getvalue().encode("utf-8")


# --- text table --------------------------------------------------------------------------------
def _margin_text(value) -> str:
    return "—" if value is None else f"{value:+.1f} %".replace("-", "−")


_SHORT_HEADERS = {"yield_pct": "Yield per build over every corner (95 % interval)"}


def yield_text(metrics: dict) -> str:
    """``yield_pct`` with its 95 % Wilson interval: "99.50 % (99.10–99.80 %)"; "—" without a yield run."""
    value = metrics.get("yield_pct")
    if value is None:
        return "—"
    low, high = metrics.get("yield_low_pct"), metrics.get("yield_high_pct")
    if low is None or high is None:
        return f"{value:.2f} %"
    return f"{value:.2f} % ({low:.2f}–{high:.2f} %)"


def shortlist_rows(result: dict, parts_by_number: dict | None = None) -> tuple[list[str], list[list[str]]]:
    """Header and rows of the ranked shortlist, as text (shared by the table and the HTML report)."""
    role = (result.get("requirement") or {}).get("role", "series")
    keys = KEY_METRICS.get(role, KEY_METRICS["series"])
    if any((c.get("metrics") or {}).get("yield_pct") is not None for c in result.get("candidates", [])):
        keys = keys + ("yield_pct",)
    header = ["Rank", "Part", "Kind", "Package", "Result", "First failing check", "Smallest margin"]
    header += [_SHORT_HEADERS.get(k, METRIC_LABELS[k]) for k in keys] + ["Price", "Lifecycle"]
    parts_by_number = parts_by_number or {}
    rows = []
    for c in result.get("candidates", []):
        first = first_failing(c)
        if first is None:
            failing = "—"
        else:
            failing = CHECK_LABELS.get(first.get("name"), clean_text(first.get("name")))
            if first.get("margin_pct") is not None:  # the shortlist compares in %; the sheet adds the unit
                failing += f" ({_margin_text(first['margin_pct'])})"
            elif first.get("reason"):
                failing += f" ({short_reason(first['reason'])})"
            more = len(c.get("failed_checks") or []) - 1
            if more > 0:
                failing += f" +{more} more"
        part = parts_by_number.get(c.get("part_number")) or {}
        metrics = c.get("metrics") or {}
        row = [str(c.get("rank", "")), clean_text(c.get("part_number")), clean_text(c.get("kind")),
               clean_text(c.get("package") or "—"), "pass" if c.get("passed") else "FAIL", failing,
               _margin_text(smallest_margin(c))]
        row += [yield_text(metrics) if k == "yield_pct" else format_value(metrics.get(k), metric_unit(k))
                for k in keys]
        row += [price_text(part.get("price")),
                clean_text(part.get("lifecycle") or "—")]
        rows.append(row)
    return header, rows


def delta_text(value, key: str) -> str:
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, (int, float)):
        unit = metric_unit(key)
        sign = "+" if value > 0 else ""
        return sign + format_value(value, unit) if unit else f"{value:+.4g}".replace("-", "−")
    return clean_text(_delta_cell(value))


def check_sheet_lines(candidate: dict, role: str | None = None) -> list[str]:
    """One part's check sheet as text: every check with its worst value, limit, result and margin,
    worst corner and limit source, then the worst-case metrics (``check --part P --format table``)."""
    verdict = "passes every check" if candidate.get("passed") else \
        "fails: " + ", ".join(CHECK_LABELS.get(n, n) for n in candidate.get("failed_checks") or [])
    lines = [f"Check sheet: {clean_text(candidate.get('part_number'))} (rank {candidate.get('rank')}, "
             f"{clean_text(candidate.get('kind'))}, {clean_text(candidate.get('package') or '—')}): {verdict}", ""]
    header = ["Check", "Worst value", "Limit", "Result", "Margin", "Worst corner", "Limit source"]
    rows = []
    for check in candidate.get("checks", []):
        unit = check.get("unit") or ""
        value = format_value(check.get("value"), unit) if check.get("value") is not None else \
            f"— ({clean_text(check.get('reason') or 'not computable')})"
        rows.append([CHECK_LABELS.get(check.get("name"), clean_text(check.get("name"))), value,
                     format_value(check.get("limit"), unit), "pass" if check.get("passed") else "FAIL",
                     margin_text(check, role), corner_text(check.get("corner")),
                     clean_text(check.get("limit_source") or "")])
    lines += _aligned(header, rows, numeric={1, 2, 4})
    notes = [(CHECK_LABELS.get(c.get("name"), clean_text(c.get("name"))), clean_text(c["note"]))
             for c in candidate.get("checks", []) if c.get("note")]
    if notes:  # what a value means where the corner alone does not say it (e.g. the output short)
        lines += ["", "Notes:"] + [f"  {label}: {text}" for label, text in notes]
    metrics = candidate.get("metrics") or {}
    keys = [k for k in METRIC_ORDER if k in metrics] + sorted(set(metrics) - set(METRIC_ORDER))
    if keys:
        lines += ["", "Worst-case values:"]
        lines += _aligned(["Metric", "Value"], [[METRIC_LABELS.get(k, k), format_value(metrics[k], metric_unit(k))]
                                                for k in keys], numeric={1})
    return lines


def _aligned(header: list[str], rows: list[list[str]], numeric=frozenset()) -> list[str]:
    widths = [max(len(r[i]) for r in [header] + rows) for i in range(len(header))]

    def fmt(row):
        return "  ".join((c.rjust(w) if i in numeric else c.ljust(w)) for i, (c, w) in enumerate(zip(row, widths))).rstrip()

    return [fmt(header), "  ".join("-" * w for w in widths)] + [fmt(r) for r in rows]


def limits_lines(candidates: list[dict]) -> list[str]:
    """The operating limits and the largest sensitivity of each candidate that has them (SPEC §3a)."""
    out = []
    for c in candidates:
        block = c.get("operating_limits") or {}
        if block.get("summary") is None:
            continue
        line = f"  {clean_text(c.get('part_number'))}: {clean_text(block['summary'])}"
        top = (c.get("sensitivity") or [])[:2]
        if top:
            line += "; worst case set by " + ", ".join(
                f"{clean_text(x['input'])} ({x['step']}: {x['margin_change_pct']:+.2g} % points)".replace("-", "−")
                for x in top)
        out.append(line)
    if out:
        out = ["", "Operating limits (each alone) and what sets the worst case:"] + out
    return out


def policy_lines(policy: dict) -> list[str]:
    """The limits in force per kind group, each with where it came from (SPEC §4: every output says so).

    One line per group and source: ``pn, policy commercial: reverse_pct 80 %, …``.
    """
    limits = policy.get("limits") or {}
    out = []
    for group, entries in limits.items():
        if not isinstance(entries, dict):
            continue
        by_source: dict[str, list[str]] = {}
        for key, entry in entries.items():
            if not isinstance(entry, dict) or "source" not in entry:
                continue
            value = entry.get("value")
            text = "none" if value is None else f"{value:g} {entry.get('unit') or ''}".rstrip()
            by_source.setdefault(clean_text(entry["source"]), []).append(f"{clean_text(key)} {text}")
        for source, items in by_source.items():
            out.append(f"  {clean_text(group)}, {source}: " + ", ".join(items))
    if out:
        out = ["", "Limits in force (per kind group, with where each came from):"] + out
    return out


def render_table(result: dict, parts_by_number: dict | None = None, *, part: str | None = None) -> bytes:
    """The ranked shortlist as an aligned text table for a terminal."""
    req = result.get("requirement") or {}
    policy = result.get("policy") or {}
    library = result.get("library") or {}
    lines = [
        f"Requirement: {clean_text(req.get('name', ''))} "
        f"({ROLE_LABELS.get(req.get('role'), clean_text(req.get('role')))})",
        f"Derating policy: {clean_text(policy.get('name', req.get('policy', '')))}"
        f"   Objective: {clean_text(req.get('objective', ''))}",
        f"Library: {clean_text(library.get('location', ''))}",
        f"Shortlist: {pass_count_text(result)}",
    ]
    reference = result.get("reference")
    if reference:
        lines.append(f"Substitutes for {clean_text(reference.get('part_number'))} "
                     f"(which {'passes' if reference.get('passed') else 'fails'} this requirement)")
    lines.append("")
    header, rows = shortlist_rows(result, parts_by_number)
    if rows:
        widths = [max(len(r[i]) for r in [header] + rows) for i in range(len(header))]
        numeric = {0} | set(range(6, len(header) - 2))
        def fmt(row):
            cells = [(cell.rjust(w) if i in numeric else cell.ljust(w)) for i, (cell, w) in enumerate(zip(row, widths))]
            return "  ".join(cells).rstrip()
        lines.append(fmt(header))
        lines.append("  ".join("-" * w for w in widths))
        lines.extend(fmt(r) for r in rows)
        deltas = [(c.get("part_number"), c["deltas"]) for c in result.get("candidates", []) if c.get("deltas")]
        if deltas:
            lines += ["", "Changes against the reference part:"]
            for number, delta in deltas:
                items = [f"{k} {delta_text(v, k)}" for k, v in delta.items() if v is not None]
                lines.append(f"  {clean_text(number)}: " + ", ".join(items))
        lines += limits_lines(result.get("candidates", []))
        lines += policy_lines(policy)
    else:
        lines.append("No candidates: no part of the kinds this role considers passed the filters.")
    subject = next((c for c in result.get("candidates", []) if c.get("part_number") == part), None) \
        if part is not None else None
    if subject is not None:
        lines += [""] + check_sheet_lines(subject, req.get("role"))
    lines += [""] + [f"CAUTION: {clean_text(c)}" for c in cautions_of(result)]
    return ("\n".join(lines) + "\n").encode("utf-8")
