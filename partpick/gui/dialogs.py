"""Small dialogs: the list of every bad row of a refused file, Help, About."""

from __future__ import annotations

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

__all__ = ["ProblemsDialog", "HelpDialog", "about_text"]


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
