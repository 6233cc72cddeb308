"""What changes if B replaces A: the compare table, built from one check result (Qt-free).

Every value comes from the check result (`run_check`'s candidates) or from the
stored part; a delta is the difference of two of those values as shown, part
minus the first part (the reference).
"""

from __future__ import annotations

from dataclasses import dataclass, field

from partpick.gui.widgets import format_value, humanise

__all__ = ["CompareRow", "compare_rows", "unit_of_key", "RATING_KEYS"]

RATING_KEYS = ("kind", "package", "manufacturer", "lifecycle", "price", "vrrm_V", "if_avg_A", "ifsm_A", "pd_W",
               "tj_max_C", "rth_ja_K_per_W", "vz_V", "vz_tol_pct", "ifrm_A", "trr_s", "vwm_V", "vbr_min_V",
               "vbr_max_V", "vc_V", "ipp_A", "ppp_W")
_SUFFIX_UNITS = (("_mV_per_V", "mV/V"), ("_mV_per_mA", "mV/mA"), ("_K_per_W", "K/W"), ("_pct", "%"),
                 ("_ohm", "Ω"), ("_V", "V"), ("_A", "A"), ("_W", "W"), ("_C", "°C"), ("_K", "K"),
                 ("_J", "J"), ("_A2s", "A²s"), ("_s", "s"))


def unit_of_key(key: str) -> str:
    """The unit a key carries in its name (SPEC §5: ``dissipation_W`` → ``W``)."""
    for suffix, unit in _SUFFIX_UNITS:
        if key.endswith(suffix):
            return unit
    return ""


def _label_of_key(key: str) -> str:
    from partpick.library.fields import FIELDS_BY_NAME

    if key in FIELDS_BY_NAME:
        return FIELDS_BY_NAME[key].label
    for suffix, _unit in _SUFFIX_UNITS:
        if key.endswith(suffix):
            return humanise(key[: -len(suffix)])
    return humanise(key)


@dataclass
class CompareRow:
    """One line of the compare table: a label, one cell per part, the deltas against the first part."""

    section: str
    label: str
    cells: list[str]
    deltas: list[str] = field(default_factory=list)
    differs: bool = False
    failing: list[bool] = field(default_factory=list)


def _number_row(section, label, values, unit, failing=None) -> CompareRow:
    cells = [format_value(v, unit, 4) if v is not None else "—" for v in values]
    deltas = [""]
    for v in values[1:]:
        if v is None or values[0] is None:
            deltas.append("")
        else:
            deltas.append(("+" if v - values[0] >= 0 else "") + format_value(v - values[0], unit, 3))
    differs = len({c for c in cells}) > 1
    return CompareRow(section, label, cells, deltas, differs, failing or [False] * len(values))


def compare_rows(result: dict, parts_by_number: dict, part_numbers: list[str]) -> list[CompareRow]:
    """The compare table of two to four parts under one check result.

    Raises ValueError when a part is not among the result's candidates.
    """
    candidates = {c["part_number"]: c for c in result["candidates"]}
    missing = [p for p in part_numbers if p not in candidates]
    if missing:
        raise ValueError(f"not in the shortlist: {', '.join(missing)}")
    chosen = [candidates[p] for p in part_numbers]
    parts = [parts_by_number.get(p) or {} for p in part_numbers]
    rows: list[CompareRow] = []
    results = ["Pass" if c["passed"] else "Fail: " + ", ".join(humanise(n) for n in c["failed_checks"])
               for c in chosen]
    rows.append(CompareRow("Result", "Result", results, [""] * len(chosen), len(set(results)) > 1,
                           [not c["passed"] for c in chosen]))
    rows.append(CompareRow("Result", "Rank", [str(c["rank"]) for c in chosen], [""] * len(chosen),
                           len({c["rank"] for c in chosen}) > 1))
    reference_package = parts[0].get("package")
    same = ["reference" if i == 0 else ("yes" if p.get("package") == reference_package else "no")
            for i, p in enumerate(parts)]
    rows.append(CompareRow("Ratings", "Same package as the first", same, [""] * len(parts), "no" in same))
    for key in RATING_KEYS:
        values = [p.get(key) for p in parts]
        if all(v is None for v in values):
            continue
        if key in ("kind", "package", "manufacturer", "lifecycle"):
            cells = [str(v) if v is not None else "—" for v in values]
            rows.append(CompareRow("Ratings", _label_of_key(key), cells, [""] * len(cells), len(set(cells)) > 1))
        else:
            rows.append(_number_row("Ratings", _label_of_key(key), values, unit_of_key(key)))
    check_names: list[str] = []
    for candidate in chosen:
        for check in candidate["checks"]:
            if check["name"] not in check_names:
                check_names.append(check["name"])
    for name in check_names:
        checks = [next((c for c in cand["checks"] if c["name"] == name), None) for cand in chosen]
        unit = next((c.get("unit") or "" for c in checks if c is not None), "")
        values = [c["value"] if c is not None else None for c in checks]
        failing = [c is not None and not c["passed"] for c in checks]
        rows.append(_number_row("Checks (worst corner)", humanise(name), values, unit, failing))
        margins = [c["margin_pct"] if c is not None else None for c in checks]
        rows.append(_number_row("Checks (worst corner)", f"{humanise(name)} margin", margins, "%", failing))
    metric_keys: list[str] = []
    for candidate in chosen:
        for key in candidate.get("metrics", {}):
            if key not in metric_keys:
                metric_keys.append(key)
    for key in metric_keys:
        values = [c.get("metrics", {}).get(key) for c in chosen]
        if all(v is None for v in values):
            continue
        rows.append(_number_row("Metrics", _label_of_key(key), values, unit_of_key(key)))
    return rows
