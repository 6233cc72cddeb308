"""The PDF's shortlist table as laid out on an A4 page: no heading or number broken inside a word."""

from __future__ import annotations

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def _laid_out(html: str):
    """The report HTML laid out as `partpick.report.pdf` lays it out (same font, page and margins)."""
    from partpick.plots.export import ensure_qapp

    ensure_qapp()
    from PySide6 import QtCore, QtGui

    from partpick.report.pdf import _A4_MARGIN_MM

    document = QtGui.QTextDocument()
    document.setDocumentMargin(0)
    font = QtGui.QFont("DejaVu Sans")
    font.setPointSizeF(8.5)
    document.setDefaultFont(font)
    document.setHtml(html)
    layout = QtGui.QPageLayout(QtGui.QPageSize(QtGui.QPageSize.PageSizeId.A4), QtGui.QPageLayout.Orientation.Portrait,
                               QtCore.QMarginsF(*(4 * [_A4_MARGIN_MM])), QtGui.QPageLayout.Unit.Millimeter)
    rect = layout.paintRectPixels(96)
    # QTextDocument.print_ lays out an unpaginated document inside a further 2 cm margin on each side
    # (Qt's qtextdocument.cpp), so the text is that much narrower than the page's paint rectangle.
    inner = 2 * 2.0 / 2.54 * 96
    document.setPageSize(QtCore.QSizeF(rect.width() - inner, rect.height() - inner))
    assert document.pageCount() > 0  # lays the whole document out now (the layout is lazy)
    return document


def _shortlist_table(document):
    from PySide6 import QtGui

    frame = document.rootFrame()
    for child in frame.childFrames():
        if isinstance(child, QtGui.QTextTable):
            header = [child.cellAt(0, c).firstCursorPosition().block().text() for c in range(child.columns())]
            if "Smallest margin" in header:
                return child
    raise AssertionError("no shortlist table in the report")


def _breaks_inside_words(cell) -> list[str]:
    broken = []
    cursor = cell.firstCursorPosition()
    block = cursor.block()
    end = cell.lastCursorPosition().block()
    while block.isValid():
        text, lines = block.text(), block.layout()
        for i in range(lines.lineCount() - 1):
            line = lines.lineAt(i)
            at = line.textStart() + line.textLength()
            if 0 < at < len(text) and text[at - 1].isalnum() and text[at].isalnum():
                broken.append(f"{text[:at]}|{text[at:]}")
        if block == end:
            break
        block = block.next()
    return broken


@pytest.mark.parametrize("toml", ["reverse_polarity_24V.toml", "zener_5V1_reference.toml"])
def test_shortlist_headings_and_numbers_never_break_inside_a_word(toml):
    from partpick.checks.requirement import load_requirement
    from partpick.checks.service import run_check
    from partpick.library.store import open_library
    from partpick.report.review import review_html

    requirement = load_requirement(ROOT / "resources" / "requirements" / toml)
    with open_library(ROOT / "library.sqlite.example") as library:
        parts = library.list_parts()
    result = run_check(requirement, parts, top=30)
    html = review_html(result, parts_by_number={p["part_number"]: p for p in parts}, requirement=requirement,
                       images=[], image_notes=[])
    document = _laid_out(html)  # kept: the table lives in it
    table = _shortlist_table(document)
    problems = []
    for row in range(table.rows()):
        for column in range(table.columns()):
            if row == 0 or column != 2:  # every heading; every cell but the wrapping result text
                problems += _breaks_inside_words(table.cellAt(row, column))
    assert problems == []
