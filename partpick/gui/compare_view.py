"""Compare (what changes if B replaces A) and Substitutes dialogs."""

from __future__ import annotations

from PySide6.QtGui import QBrush, QFont
from PySide6.QtWidgets import (
    QAbstractItemView,
    QDialog,
    QDialogButtonBox,
    QHeaderView,
    QLabel,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
)

from partpick.errors import InputError, LibraryError
from partpick.gui.compare import compare_rows, unit_of_key, _label_of_key
from partpick.gui.widgets import CHANGED_COLOR, FAIL_COLOR, PASS_COLOR, format_value

__all__ = ["CompareDialog", "SubstitutesDialog"]


def _item(text: str) -> QTableWidgetItem:
    item = QTableWidgetItem(text)
    item.setFlags(item.flags() & ~item.flags().ItemIsEditable)
    return item


class CompareDialog(QDialog):
    """Two to four shortlist parts side by side under the current requirement."""

    def __init__(self, bench, part_numbers: list[str], parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Compare: " + " · ".join(part_numbers))
        self.setObjectName("compare_dialog")
        self.part_numbers = list(part_numbers)
        parts = {p: bench.library.get_part(p) for p in part_numbers}
        self.rows = compare_rows(bench.result.result, parts, self.part_numbers)
        layout = QVBoxLayout(self)
        layout.addWidget(QLabel(
            f"Against requirement “{bench.result.result['requirement'].get('name', '')}”. "
            f"Δ columns: each part minus {part_numbers[0]}. Highlighted rows differ; red cells fail.", self))
        headers = ["", part_numbers[0]]
        for number in part_numbers[1:]:
            headers += [number, f"Δ {number}"]
        self.table = QTableWidget(len(self.rows), len(headers), self)
        self.table.setObjectName("compare_table")
        self.table.setHorizontalHeaderLabels(headers)
        self.table.verticalHeader().hide()
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        bold = QFont(self.font())
        bold.setBold(True)
        section = None
        for r, row in enumerate(self.rows):
            label = _item(row.label)
            if row.section != section:
                label.setToolTip(row.section)
                section = row.section
            self.table.setItem(r, 0, label)
            for i, cell in enumerate(row.cells):
                column = 1 if i == 0 else 2 * i
                item = _item(cell)
                if row.failing and row.failing[i]:
                    item.setBackground(QBrush(FAIL_COLOR))
                elif row.differs:
                    item.setBackground(QBrush(CHANGED_COLOR))
                self.table.setItem(r, column, item)
                if i > 0:
                    delta = _item(row.deltas[i] if i < len(row.deltas) else "")
                    self.table.setItem(r, column + 1, delta)
            if row.differs:
                label.setFont(bold)
        self.table.resizeColumnsToContents()
        self.table.horizontalHeader().setSectionResizeMode(0, QHeaderView.ResizeMode.ResizeToContents)
        layout.addWidget(self.table, 1)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close, self)
        buttons.rejected.connect(self.close)
        layout.addWidget(buttons)
        self.resize(260 + 260 * len(part_numbers), 680)


class SubstitutesDialog(QDialog):
    """The parts that pass the same requirement in place of one part, with the checker's deltas."""

    def __init__(self, bench, part_number: str, parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle(f"Substitutes for {part_number}")
        self.setObjectName("substitutes_dialog")
        layout = QVBoxLayout(self)
        self.result = None
        try:
            self.result, _ = bench.check_job(substitutes_for=part_number).run()
        except (InputError, LibraryError) as exc:
            layout.addWidget(QLabel(f"No substitutes computed: {exc}", self))
            self.candidates = []
        else:
            self.candidates = [c for c in self.result["candidates"] if c["part_number"] != part_number]
        delta_keys: list[str] = []
        for candidate in self.candidates:
            for key in candidate.get("deltas") or {}:
                if key not in delta_keys:
                    delta_keys.append(key)
        layout.addWidget(QLabel(
            f"{len(self.candidates)} part{'s' if len(self.candidates) != 1 else ''} pass the requirement in place "
            f"of {part_number}; Δ = substitute minus {part_number}.", self))
        headers = ["Rank", "Part", "Package", "Same package"] + [f"Δ {_label_of_key(k)}" for k in delta_keys
                                                                   if k not in ("same_package",)]
        self.table = QTableWidget(len(self.candidates), len(headers), self)
        self.table.setObjectName("substitutes_table")
        self.table.setHorizontalHeaderLabels(headers)
        self.table.verticalHeader().hide()
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        for r, candidate in enumerate(self.candidates):
            deltas = candidate.get("deltas") or {}
            same = deltas.get("same_package", candidate.get("same_package"))
            cells = [str(candidate["rank"]), candidate["part_number"], candidate.get("package") or "",
                     "yes" if same else ("no" if same is not None else "")]
            for key in delta_keys:
                if key == "same_package":
                    continue
                value = deltas[key] if key in deltas else None
                if isinstance(value, (int, float)) and not isinstance(value, bool):
                    text = ("+" if value >= 0 else "") + format_value(value, unit_of_key(key), 3)
                elif value is None:
                    text = "—"
                else:
                    text = str(value)
                cells.append(text)
            for c, text in enumerate(cells):
                item = _item(text)
                if c == 3 and same:
                    item.setBackground(QBrush(PASS_COLOR))
                self.table.setItem(r, c, item)
        self.table.resizeColumnsToContents()
        layout.addWidget(self.table, 1)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close, self)
        buttons.rejected.connect(self.close)
        layout.addWidget(buttons)
        self.resize(900, 480)
