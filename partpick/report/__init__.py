"""Renderings of a check result: ``table``, ``json``, ``csv``, ``html`` and ``pdf``.

`render` is the one entry point the CLI and the desktop app use. ``table``,
``json`` and ``csv`` need no Qt; ``html`` and ``pdf`` draw the curves with
`partpick.plots` off-screen (the offscreen platform is chosen when there is
no display and no QApplication yet).
"""

from __future__ import annotations

import datetime as _dt

from partpick.errors import InputError

__all__ = ["render", "FORMATS"]

FORMATS = ("table", "json", "csv", "html", "pdf")


def render(result: dict, fmt: str, *, parts_by_number: dict, requirement, reviewer: str | None = None,
           part: str | None = None, now: _dt.datetime | None = None) -> bytes:
    """Render a check result (SPEC §5's JSON result) in one format.

    Parameters
    ----------
    result : dict
        From `partpick.checks.service.run_check`.
    fmt : str
        One of `FORMATS`.
    parts_by_number : dict
        Part records by part number (ratings, price and lifecycle; the curves).
    requirement : Requirement or dict
        The requirement that was checked (the curves are computed from it).
    reviewer : str, optional
        Shown in the html/pdf report.
    part : str, optional
        The part whose check sheet the html/pdf report shows (``--part``); default the top one.
    now : datetime, optional
        The report date (default: now, UTC).

    Returns
    -------
    bytes
        UTF-8 text for table/json/csv/html, PDF bytes for pdf.

    Raises
    ------
    InputError
        Unknown format, or ``part`` is not among the candidates.
    ValueError
        The result holds NaN or Infinity (a result never may).
    """
    from partpick.report import plain

    if fmt == "table":
        return plain.render_table(result, parts_by_number, part=part)
    if fmt == "json":
        return plain.render_json(result)
    if fmt == "csv":
        return plain.render_csv(result, parts_by_number)
    if fmt not in ("html", "pdf"):
        raise InputError(f"--format: {fmt!r} is not a report format (formats: {', '.join(FORMATS)})")

    from partpick.report import review

    bad = plain.find_non_finite(result)
    if bad:
        raise ValueError(f"{bad} is not a finite number; a result must carry null instead of NaN or Infinity")
    try:
        subject = review.subject_candidate(result, part)
    except ValueError as exc:
        raise InputError(f"--part: {exc}") from None
    record = parts_by_number.get(subject["part_number"]) if subject else None
    images, notes = review.curve_images(requirement, record, subject)
    options = dict(parts_by_number=parts_by_number, requirement=requirement,
                   reviewer=reviewer if reviewer is not None else result.get("reviewer"),
                   part=subject["part_number"] if subject else None, now=now, images=images, image_notes=notes)
    if fmt == "html":
        return review.review_html(result, **options).encode("utf-8")
    from partpick.report.pdf import html_to_pdf

    text = review.review_html(result, image_src=lambda name, png: name, **options)
    title = f"partpick review: {(result.get('requirement') or {}).get('name', '')}"
    return html_to_pdf(text, images, title=title)
