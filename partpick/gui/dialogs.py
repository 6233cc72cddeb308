"""Small dialogs: the list of every bad row of a refused file, Help, About."""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QDialog,
    QDialogButtonBox,
    QLabel,
    QListWidget,
    QTextBrowser,
    QVBoxLayout,
)

from partpick import __version__
from partpick.gui.help_text import CAUTIONS, help_html

__all__ = ["ProblemsDialog", "HelpDialog", "CautionsDialog", "CheckSheetDialog", "about_text"]


class ProblemsDialog(QDialog):
    """Every problem of a refused input, one per line (selectable, so it can be copied)."""

    def __init__(self, title: str, summary: str, problems: list[str], parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle(title)
        self.setObjectName("problems_dialog")
        layout = QVBoxLayout(self)
        count = len(problems)
        self.summary = QLabel(f"{summary} {count} problem{'s' if count != 1 else ''}:", self)
        self.summary.setWordWrap(True)
        layout.addWidget(self.summary)
        self.list = QListWidget(self)
        self.list.addItems(problems)
        self.list.setWordWrap(True)
        layout.addWidget(self.list, 1)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close, self)
        buttons.rejected.connect(self.reject)
        buttons.accepted.connect(self.accept)
        layout.addWidget(buttons)
        self.resize(720, 360)

    def problems(self) -> list[str]:
        return [self.list.item(i).text() for i in range(self.list.count())]


class HelpDialog(QDialog):
    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle("partpick — formulas, sources and cautions")
        self.setObjectName("help_dialog")
        layout = QVBoxLayout(self)
        self.browser = QTextBrowser(self)
        self.browser.setHtml(help_html())
        layout.addWidget(self.browser)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close, self)
        buttons.rejected.connect(self.close)
        layout.addWidget(buttons)
        self.resize(900, 640)


def about_text() -> str:
    cautions = "".join(f"<p><i>{c}</i></p>" for c in CAUTIONS)
    return (
        f"<h3>partpick {__version__}</h3>"
        "<p>Choose and size diodes and Zener diodes across every supply, load and ambient corner.</p>"
        f"{cautions}"
    )


class CautionsDialog(QDialog):
    """The cautions of SPEC §7 in full: the general one and the assumptions that bound the numbers."""

    def __init__(self, first_run: bool = False, parent=None) -> None:
        from html import escape

        from partpick.checks.cautions import ASSUMPTION_CAUTIONS, GENERAL_CAUTIONS

        super().__init__(parent)
        self.setWindowTitle("partpick — cautions")
        self.setObjectName("cautions_dialog")
        self.first_run = first_run
        layout = QVBoxLayout(self)
        intro = ("<p><b>Before you rely on partpick's numbers</b> (shown once on first run; always in the "
                 "status bar and under Help ▸ Cautions):</p>" if first_run else "")
        self.text = QLabel(
            intro + "<ul>" + "".join(f"<li>{escape(c)}</li>" for c in GENERAL_CAUTIONS) + "</ul>"
            "<p><b>What bounds the numbers</b></p><ul>"
            + "".join(f"<li>{escape(c)}</li>" for c in ASSUMPTION_CAUTIONS) + "</ul>", self)
        self.text.setWordWrap(True)
        self.text.setTextFormat(Qt.TextFormat.RichText)
        layout.addWidget(self.text)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Ok, self)
        buttons.accepted.connect(self.close)
        layout.addWidget(buttons)
        self.resize(620, 380)


class CheckSheetDialog(QDialog):
    """Every check of one candidate (value, limit, margin, rating, worst corner): the report's check sheet."""

    def __init__(self, result: dict, part_number: str, part_record: dict | None, parent=None) -> None:
        from partpick.report.review import check_sheet_html

        super().__init__(parent)
        self.setWindowTitle(f"Check sheet: {part_number}")
        self.setObjectName("check_sheet_dialog")
        candidate = next((c for c in result.get("candidates", []) if c["part_number"] == part_number), None)
        if candidate is None and (result.get("reference") or {}).get("part_number") == part_number:
            candidate = result["reference"]
        self.candidate = candidate
        layout = QVBoxLayout(self)
        self.browser = QTextBrowser(self)
        role = (result.get("requirement") or {}).get("role")
        self.browser.setHtml(check_sheet_html(candidate, part_record, role) if candidate is not None
                             else f"<p>{part_number} is not in this result.</p>")
        layout.addWidget(self.browser)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close, self)
        buttons.rejected.connect(self.close)
        layout.addWidget(buttons)
        from partpick.gui.widgets import resize_within_screen

        resize_within_screen(self, 980, 600)
