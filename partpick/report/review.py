"""The review report (SPEC §5 "Reports") as HTML, shared by the ``html`` and ``pdf`` formats.

The HTML keeps to what both a browser and Qt's rich-text engine (QTextDocument,
used for the PDF) lay out alike: tables with border attributes, a small style
sheet, images by reference. Every piece of user text — part numbers, makers,
the requirement's name, the reviewer, the library location, limit sources —
goes through `html.escape`.
"""

from __future__ import annotations

import datetime as _dt
import html

from partpick import __version__
from partpick.checks.cautions import ASSUMPTION_CAUTIONS
from partpick.library.fields import FIELD_NAMES
from partpick.report.plain import delta_text, pass_count_text, shortlist_rows
from partpick.report.words import (
    CAUTIONS,
    cautions_of,
    CHECK_LABELS,
    FORMULAS,
    LIMIT_ORDER,
    METRIC_LABELS,
    METRIC_ORDER,
    OBJECTIVE_LABELS,
    RATING_OF_CHECK,
    ROLE_LABELS,
    clean_text,
    corner_text,
    format_value,
    margin_text,
    metric_unit,
)

__all__ = ["review_html", "subject_candidate", "curve_images", "IMAGE_PLOTS", "check_sheet_html"]

# Which plots the report shows per role: (image name, caption, draw function name, options).
IMAGE_PLOTS = {
    "series": (
        ("forward-linear", "Forward I–V, linear current axis", "draw_forward", {}),
        ("forward-log", "Forward I–V, logarithmic current axis", "draw_forward", {"log_current": True}),
        ("junction-temperature", "Junction temperature against ambient", "draw_junction_temperature", {}),
        ("power", "Dissipation against ambient", "draw_power", {}),
    ),
    "zener_shunt": (
        ("zener-output", "Output against supply with the allowed band", "draw_zener_output", {}),
        ("zener-iv", "Zener I–V with the corner operating points", "draw_breakdown", {"log_current": True}),
        ("junction-temperature", "Junction temperature against ambient", "draw_junction_temperature", {}),
        ("power", "Dissipation against ambient", "draw_power", {}),
    ),
}

_STYLE = """
body { font-family: 'DejaVu Sans', sans-serif; font-size: 9pt; color: #111; }
h1 { font-size: 15pt; margin-bottom: 2pt; }
h2 { font-size: 12pt; margin-top: 14pt; border-bottom: 1px solid #888; }
h3 { font-size: 10pt; margin-top: 8pt; }
table { border-collapse: collapse; margin-bottom: 6pt; font-size: 7.5pt; }
th { background-color: #e4e8ee; text-align: left; }
td, th { padding: 2pt 4pt; vertical-align: top; }
td.num { text-align: right; }
.shortlist table { font-size: 7pt; }
.fail { color: #b00000; font-weight: bold; }
.pass { color: #106010; font-weight: bold; }
.caution { background-color: #fff4d6; border: 1px solid #d9a400; padding: 4pt; }
.small { font-size: 8pt; color: #444; }
"""


def e(value) -> str:
    """User text, escaped for HTML (None → '—')."""
    if value is None:
        return "—"
    return html.escape(clean_text(value), quote=True)


def _table(header: list[str] | None, rows: list[list[str]], numeric: set[int] = frozenset(),
           raw: bool = False, widths: list[int] | None = None) -> str:
    """An HTML table; cells are escaped unless ``raw`` (then they are already HTML).

    ``widths`` are column widths in % of the page (Qt's layout otherwise shares the width evenly).
    """
    out = ['<table border="1" cellspacing="0" cellpadding="3" width="100%">']
    if header and widths and len(widths) != len(header):
        widths = None  # a mismatch must never cost a column
    if header:
        out.append("<tr>")
        for i, h in enumerate(header):
            width = f' width="{widths[i]}%"' if widths else ""
            out.append(f"<th{width}>{e(h)}</th>")
        out.append("</tr>")
    for row in rows:
        out.append("<tr>")
        for i, cell in enumerate(row):
            text = cell if raw else e(cell)
            cls = ' class="num" align="right"' if i in numeric else ""
            out.append(f"<td{cls}>{text}</td>")
        out.append("</tr>")
    out.append("</table>")
    return "".join(out)


def _failing_name(text: str) -> str:
    """The first failing check's name alone ("Junction temperature (−44.2 %) +1 more" → its name, and
    "+1 more" kept): its margin is in the margin column, and a narrow column wraps less."""
    name, _, rest = text.partition(" (")
    more = rest.rsplit(" +", 1)
    return name + (f" +{more[1]}" if len(more) == 2 else "")


def shortlist_widths(header: list[str], rows: list[list[str]]) -> list[int]:
    """Column widths [%] of the report's shortlist, from what each column must hold unbroken.

    A column is at least as wide as its longest header word and its longest cell (numbers keep
    their unit on the same line), so Qt's layout never breaks a heading mid-word ("Dissipati on");
    the widths are shares of the page, summing to 100.
    """
    def longest_word(text: str) -> int:
        return max((len(w) for w in str(text).split()), default=1)

    need = []
    for i, title in enumerate(header):
        cells = [r[i] for r in rows if i < len(r)]
        # Headings and part numbers are bold (about a third wider); every cell has its padding.
        words = max([1.2 * longest_word(title)] + [(1.2 if i == 1 else 1.0) * longest_word(c) for c in cells])
        # A number with its unit stays on one line; text columns (part, result) wrap at spaces.
        whole = max([len(c) for c in cells] or [1]) if i >= 3 else 0
        need.append(max(words, whole, 2) + 1.0)
    total = float(sum(need))
    widths = [max(3, int(round(100 * n / total))) for n in need]
    widths[max(range(len(widths)), key=lambda i: widths[i])] += 100 - sum(widths)
    return widths


def _shortlist_widths(columns: int) -> list[int]:
    """Column widths [%] of the HTML shortlist: #, part, result, then the numbers, price and lifecycle."""
    if columns == 10:
        return [4, 15, 17, 8, 10, 10, 7, 10, 7, 12]
    return [4, 14, 16, 8, 9, 9, 7, 9, 7, 6, 11]  # with the Yield column


SENSITIVITY_IMAGE = "sensitivity"


def subject_candidate(result: dict, part: str | None = None) -> dict | None:
    """The candidate whose check sheet the report shows: ``part`` (``--part``), else the top-ranked one."""
    candidates = result.get("candidates", [])
    wanted = part if part is not None else result.get("part")
    if wanted is not None:
        for c in candidates:
            if c.get("part_number") == wanted:
                return c
        raise ValueError(f"part {wanted!r} is not among the result's candidates")
    return candidates[0] if candidates else None


def curve_images(requirement, part_record: dict | None, candidate: dict | None) -> tuple[list[tuple], list[str]]:
    """PNG images of the subject's curves: ([(name, caption, png bytes)], notes).

    Draws with `partpick.plots` (off-screen Qt) from `partpick.checks.curves`.
    """
    if candidate is None:
        return [], ["no candidate: no curves"]
    if part_record is None:
        return [], [f"the part record of {candidate.get('part_number')} was not given: no curves"]
    from partpick import plots
    from partpick.checks.curves import curves_for

    data = curves_for(requirement, part_record, candidate)
    images = []
    if data["role"] not in IMAGE_PLOTS:  # a role without its own list: every plot it declares
        from partpick.checks.roles import ROLES

        for section, title, options in ROLES[data["role"]].curve_plots:
            if data.get(section) is not None:
                draw = (lambda plot_item, curves, _s=section, _o=dict(options):
                        plots.draw_section(plot_item, curves.get(_s), **_o))
                images.append((section.replace("_", "-") + ("-log" if options.get("log_y") else ""), title,
                               plots.section_png(draw, data)))
    for name, caption, draw_name, options in IMAGE_PLOTS.get(data["role"], ()):
        section = {"draw_forward": "forward", "draw_breakdown": "breakdown", "draw_zener_output": "zener_output",
                   "draw_junction_temperature": "junction_temperature", "draw_power": "power"}[draw_name]
        if data.get(section) is None:
            continue
        images.append((name, caption, plots.section_png(getattr(plots, draw_name), data, **options)))
    if candidate.get("sensitivity"):
        images.append((SENSITIVITY_IMAGE, "What sets the worst case: smallest margin change per input step",
                       plots.section_png(plots.draw_sensitivity, candidate["sensitivity"], width=820,
                                         height=90 + 46 * len(candidate["sensitivity"]))))
    return images, list(data["notes"])


def _requirement_rows(requirement: dict) -> list[list[str]]:
    rows = []
    for key, value in requirement.items():
        if isinstance(value, dict):
            for sub, subvalue in value.items():
                rows.append([f"{key}.{sub}", _plain(subvalue, sub)])
        else:
            rows.append([key, _plain(value, key)])
    return rows


def _plain(value, key: str = "") -> str:
    if value is None:
        return "— (not used)"
    if isinstance(value, (list, tuple)):
        return ", ".join(clean_text(v) for v in value)
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, (int, float)):
        unit = metric_unit(key)
        return f"{value:g} {unit}".rstrip()
    return clean_text(value)


def _policy_rows(policy: dict) -> list[list[str]]:
    """Rows (group, limit, value, source) from the result's policy block, whatever its nesting."""
    rows: list[list[str]] = []
    limits = policy.get("limits", {k: v for k, v in policy.items() if k not in ("name", "description", "note")})

    def walk(prefix: list[str], node):
        if isinstance(node, dict) and "source" in node and "value" in node:
            group = prefix[0] if len(prefix) > 1 else ""
            name = ".".join(prefix[1:] if len(prefix) > 1 else prefix)
            if node.get("description"):
                name = f"{name} ({clean_text(node['description'])})"
            value = _plain(node["value"], prefix[-1])
            if node.get("unit") and node["value"] is not None and not value.endswith(node["unit"]):
                value = f"{node['value']:g} {node['unit']}"
            rows.append([group, name, value, clean_text(node["source"])])
        elif isinstance(node, dict):
            for key, value in node.items():
                walk(prefix + [str(key)], value)
        elif isinstance(node, list):
            for item in node:
                if isinstance(item, dict):
                    name = item.get("name") or item.get("key") or ""
                    rows.append([clean_text(item.get("group", "")), clean_text(name),
                                 _plain(item.get("value"), str(name)), clean_text(item.get("source", ""))])
        else:
            rows.append(["", ".".join(prefix), _plain(node, prefix[-1] if prefix else ""), ""])

    walk([], limits)
    return rows


_STRESS_CHECKS = ("reverse_voltage", "forward_current", "zener_power", "surge")


def _check_sheet(candidate: dict, part_record: dict | None, role: str | None = None) -> str:
    part_record = part_record or {}
    rows = []
    for check in candidate.get("checks", []):
        name = check.get("name", "")
        unit = check.get("unit") or ""
        value, limit = check.get("value"), check.get("limit")
        rating_text = "—"
        rating = RATING_OF_CHECK.get(name)
        if rating is not None and part_record.get(rating[0]) is not None:
            rated = part_record[rating[0]]
            rating_text = f"{rating[1]} {format_value(rated, rating[2])}"
            # The stress ratio of derating practice, applied / rated, for the stresses that have one.
            if name in _STRESS_CHECKS and rating[2] == unit and value is not None and rated:
                rating_text += f"; stress {100.0 * value / rated:.1f} %"
        passed = check.get("passed")
        margin = margin_text(check, role)
        status = (f'<span class="{"pass" if passed else "fail"}">{"pass" if passed else "FAIL"}</span>'
                  + ("" if margin == "—" else f"<br/>{e(margin)}"))
        if value is not None:
            value_text = format_value(value, unit)
        else:
            value_text = f"— ({clean_text(check.get('reason') or 'not computable')})"
        note = f'<br/><span class="small">{e(check["note"])}</span>' if check.get("note") else ""
        rows.append([e(CHECK_LABELS.get(name, name)) + f'<br/><span class="small">{e(name)}</span>' + note,
                     e(value_text), e(format_value(limit, unit)), status, e(rating_text),
                     e(corner_text(check.get("corner"))), e(check.get("limit_source"))])
    header = ["Check", "Worst value", "Limit", "Result, margin", "Rating; stress ratio", "Worst corner",
              "Limit source"]
    return _table(header, rows, numeric={1, 2}, raw=True, widths=[16, 11, 9, 16, 15, 18, 15])


def check_sheet_html(candidate: dict, part_record: dict | None, role: str | None = None) -> str:
    """One part's check sheet as an HTML fragment (the report's, for the window's check-sheet view)."""
    verdict = "passes every check" if candidate.get("passed") else \
        "fails: " + ", ".join(CHECK_LABELS.get(n, n) for n in candidate.get("failed_checks") or [])
    return (f"<style>{_STYLE}</style><h2>Check sheet: {e(candidate['part_number'])}</h2>"
            f"<p>Rank {e(candidate.get('rank'))}, {e(candidate.get('kind'))}, package "
            f"{e(candidate.get('package'))}: <b>{e(verdict)}</b>.</p>"
            + _check_sheet(candidate, part_record, role) + "<h3>Worst-case values</h3>" + _metrics_table(candidate)
            + '<p class="caution"><b>Caution.</b> ' + " ".join(e(c) for c in CAUTIONS) + "</p>")


def _limits_section(candidate: dict, sensitivity_img: str | None) -> str:
    """Operating limits and "what sets the worst case" of the check sheet (SPEC §3a)."""
    block = candidate.get("operating_limits") or {}
    metrics = candidate.get("metrics") or {}
    out = ["<h3>Operating limits</h3>"]
    if block.get("summary") is None:
        out.append(f"<p>{e(block.get('reason') or 'not computed')}</p>")
    else:
        out.append(f"<p><b>{e(block['summary'])}</b> (each limit alone, the rest of the requirement as given; "
                   "discrete choices held).</p>")
        notes = block.get("notes") or {}
        rows = [[METRIC_LABELS.get(k, k), k, format_value(metrics.get(k), metric_unit(k)), notes.get(k) or ""]
                for k in LIMIT_ORDER if k in metrics]
        out.append(_table(["Limit", "Key", "Value", "Note"], rows, numeric={2}, widths=[24, 24, 14, 38]))
    out.append("<h3>What sets the worst case</h3>")
    entries = candidate.get("sensitivity")
    if not entries:
        out.append("<p>" + ("not computed for this candidate" if entries is None else
                            "no input moves the smallest margin (or it is not known)") + "</p>")
        return "\n".join(out)
    rows = [[x["input"], x["step"], f"{x['margin_change_pct']:+.3g}".replace("-", "−")] for x in entries]
    out.append("<p>Change of the smallest check margin (in % points) for one step of each input, "
               "largest first:</p>")
    out.append(_table(["Input", "Step", "Margin change [% points]"], rows, numeric={2}, widths=[45, 20, 35]))
    if sensitivity_img:
        out.append(f'<p><img src="{e(sensitivity_img)}" width="620" alt="What sets the worst case"/></p>')
    return "\n".join(out)


def _metrics_table(candidate: dict) -> str:
    metrics = {k: v for k, v in (candidate.get("metrics") or {}).items() if k not in LIMIT_ORDER}
    keys = [k for k in METRIC_ORDER if k in metrics] + sorted(set(metrics) - set(METRIC_ORDER))
    rows = [[METRIC_LABELS.get(k, k), k, format_value(metrics[k], metric_unit(k))] for k in keys]
    return _table(["Metric", "Key", "Worst-case value"], rows, numeric={2})


# Every stored part column that is known (the TVS, thermal-path and recovery columns included).
_PART_FIELDS_SHOWN = tuple(name for name in FIELD_NAMES if name not in ("part_number", "vf_points"))


def _part_table(part_record: dict) -> str:
    rows = []
    for key in _PART_FIELDS_SHOWN:
        value = part_record.get(key)
        if value is None or value == "":
            continue
        rows.append([key, _plain(value, key)])
    points = part_record.get("vf_points") or []
    if points:
        rows.append(["vf_points", "; ".join(f"{format_value(i, 'A')} : {format_value(v, 'V')}" for i, v in points)])
    return _table(["Field", "Value"], rows)


def review_html(result: dict, *, parts_by_number: dict, requirement, reviewer: str | None = None,
                part: str | None = None, now: _dt.datetime | None = None, image_src=None,
                images: list[tuple] | None = None, image_notes: list[str] | None = None) -> str:
    """The review report as an HTML document.

    Parameters
    ----------
    result : dict
        The JSON result of `partpick.checks.service.run_check` (SPEC §5).
    parts_by_number : dict
        Part records by part number (for ratings and curves).
    requirement : Requirement or dict
        The requirement checked (for the curves).
    reviewer : str, optional
        Who reviews; shown as given (escaped).
    part : str, optional
        The part of the check sheet (``--part``); default the top-ranked candidate.
    now : datetime, optional
        The report's date (default: now, UTC).
    image_src : callable, optional
        ``(name, png bytes) -> src`` for the ``<img>`` tags; default a ``data:`` URI.
    images, image_notes : optional
        Pre-rendered curve images ``[(name, caption, png)]`` and notes; rendered here when None.
    """
    import base64

    if image_src is None:
        def image_src(name, png):
            return "data:image/png;base64," + base64.b64encode(png).decode("ascii")
    now = now or _dt.datetime.now(_dt.timezone.utc)
    reviewer = reviewer if reviewer is not None else result.get("reviewer")
    req = result.get("requirement") or {}
    policy = result.get("policy") or {}
    library = result.get("library") or {}
    subject = subject_candidate(result, part)
    record = parts_by_number.get(subject["part_number"]) if subject else None
    if images is None:
        images, image_notes = curve_images(requirement, record, subject)
    image_notes = image_notes or []

    out = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8"/>',
           f"<title>partpick review: {e(req.get('name', ''))}</title>", f"<style>{_STYLE}</style></head><body>"]
    out.append(f"<h1>Review report: {e(req.get('name', ''))}</h1>")
    info = [
        ["partpick version", result.get("partpick_version", __version__)],
        ["Date", now.strftime("%Y-%m-%d %H:%M %Z").strip()],
        ["Reviewer", reviewer if reviewer else "— (not given)"],
        ["Role", ROLE_LABELS.get(req.get("role"), req.get("role"))],
        ["Library", library.get("location")],
        ["Library content hash", library.get("content_hash")],
        ["Check sheet for", subject["part_number"] if subject else "— (no candidates)"],
    ]
    out.append(_table(None, info))
    for caution in cautions_of(result):  # SPEC §7: general and the role's own here, all at the end
        if caution in ASSUMPTION_CAUTIONS:
            continue
        out.append(f'<p class="caution"><b>Caution.</b> {e(caution)}</p>')

    out.append("<h2>Requirement</h2>")
    out.append(_table(["Key", "Value"], _requirement_rows(req)))
    out.append("<h2>Derating policy</h2>")
    out.append(f"<p><b>{e(policy.get('name', req.get('policy')))}</b>"
               + (f" — {e(policy.get('description'))}" if policy.get("description") else "") + "</p>")
    if policy.get("note"):
        out.append(f"<p>{e(policy['note'])}</p>")
    rows = _policy_rows(policy)
    if rows:
        out.append(_table(["Kind group", "Limit", "Value", "Source"], rows, widths=[12, 46, 12, 30]))
    out.append(f"<p>Objective: {e(OBJECTIVE_LABELS.get(req.get('objective'), req.get('objective')))}</p>")

    candidates = result.get("candidates", [])
    out.append(f"<h2>Shortlist</h2><p>{e(pass_count_text(result))}.</p>")
    reference = result.get("reference")
    if reference:
        out.append(f"<p>Substitutes for <b>{e(reference.get('part_number'))}</b>, which "
                   f"{'passes' if reference.get('passed') else 'fails'} this requirement; "
                   "the table lists the parts that pass in its place.</p>")
    header, rows = shortlist_rows(result, parts_by_number)
    if rows:
        # Narrower for a portrait page: kind and package under the part, the first failing check
        # under the result.
        cells = []
        for row in rows:
            # Numbers keep their unit on their line (a no-break space), so a column never breaks "122.9 °C".
            row = list(row)
            row[5] = _failing_name(row[5])
            rank, number, kind, package, verdict, failing, margin, *rest = \
                [e(x) if i in (1, 2, 3, 4, 5) else e(x).replace(" ", "&nbsp;") for i, x in enumerate(row)]
            cls = "pass" if verdict == "pass" else "fail"
            *values, price, lifecycle = rest
            # Kind, package, price and lifecycle under the part number: two columns fewer, so the
            # numbers keep room on a portrait page.
            cells.append([rank, f'<b>{number}</b><br/><span class="small">{kind}, {package}<br/>'
                                f'{price} · {lifecycle}</span>',
                          f'<span class="{cls}">{verdict}</span>'
                          + (f'<br/><span class="small">{failing}</span>' if failing != "—" else ""),
                          margin, *values])
        # What each column must hold unbroken: the part number (the rest wraps beneath it), the
        # words of the first failing check, the numbers with their units.
        short = [[r[0], r[1], f"{r[4]} {_failing_name(r[5])}"] + r[6:-2] for r in rows]
        titles = ["#", "Part", "Result, first failing check"] + header[6:-2]
        out.append('<div class="shortlist">' + _table(titles, cells,
                   numeric={0} | set(range(3, len(titles))), raw=True,
                   widths=shortlist_widths(titles, short)) + "</div>")
    else:
        out.append("<p>No candidates.</p>")
    if any(c.get("deltas") for c in candidates):
        out.append("<h3>Substitutes: changes against the reference part</h3>")
        keys = sorted({k for c in candidates for k in (c.get("deltas") or {})})
        drows = [[c.get("part_number")] + [delta_text((c.get("deltas") or {}).get(k), k) for k in keys]
                 for c in candidates if c.get("deltas")]
        out.append(_table(["Part"] + keys, drows))

    if subject is not None:
        verdict = "passes every check" if subject.get("passed") else \
            "fails: " + ", ".join(CHECK_LABELS.get(n, n) for n in subject.get("failed_checks") or [])
        out.append(f"<h2>Check sheet: {e(subject['part_number'])}</h2>")
        out.append(f"<p>Rank {e(subject.get('rank'))}, {e(subject.get('kind'))}, package "
                   f"{e(subject.get('package'))}: <b>{e(verdict)}</b>.</p>")
        out.append(_check_sheet(subject, record, req.get("role")))
        out.append("<h3>Worst-case values</h3>")
        out.append(_metrics_table(subject))
        chart = next((image_src(n, png) for n, _c, png in images if n == SENSITIVITY_IMAGE), None)
        out.append(_limits_section(subject, chart))
        if record:
            out.append("<h3>Part data used</h3>")
            out.append(_part_table(record))

        out.append('<h2 style="page-break-before: always">Curves</h2>')
        for note in image_notes:
            out.append(f'<p class="small">{e(note)}</p>')
        for name, caption, png in images:
            if name == SENSITIVITY_IMAGE:
                continue  # shown in the check sheet beside its table
            out.append(f'<p><img src="{e(image_src(name, png))}" width="620" alt="{e(caption)}"/><br/>'
                       f'<span class="small">{e(caption)}</span></p>')

    if result.get("method"):
        out.append("<h2>Method and assumptions</h2>" + "".join(f"<p>{e(m)}</p>" for m in result["method"]))
    out.append('<h2 style="page-break-before: always">Formulas and sources</h2>')
    out.append(_table(["What", "Formula", "Source"], [list(f) for f in FORMULAS], widths=[20, 40, 40]))
    out.append("<h2>Cautions</h2><ul>" + "".join(f"<li>{e(c)}</li>" for c in cautions_of(result)) + "</ul>")
    out.append(f'<p class="small">Made by partpick {e(result.get("partpick_version", __version__))}.</p>')
    out.append("</body></html>")
    return "\n".join(out)
