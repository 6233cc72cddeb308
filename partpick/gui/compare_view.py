"""Compare (what changes if B replaces A) and Substitutes dialogs."""

from __future__ import annotations

from PySide6.QtCore import Qt
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
        from partpick.gui.widgets import resize_within_screen

        resize_within_screen(self, 260 + 260 * len(part_numbers), 680)


# Which way is better for each delta the checker reports (substitute minus reference): -1 lower is
# better, +1 higher is better. Smaller drop, dissipation, Tj, leakage, error and price are better;
# more margin or headroom is better.
_BETTER = {"forward_drop_V": -1, "dissipation_W": -1, "junction_temp_C": -1, "leakage_A": -1,
           "reverse_power_W": -1, "zener_power_W": -1, "regulation_error_pct": -1, "resistor_power_W": -1,
           "price": -1, "reverse_headroom_V": 1, "smallest_margin_pct": 1, "output_min_V": 1, "yield_pct": 1}
_LIFECYCLE_ORDER = {"active": 0, "nrnd": 1, "obsolete": 2}
BETTER_COLOR = PASS_COLOR
WORSE_COLOR = FAIL_COLOR


def substitute_cell(key: str, value) -> tuple[str, int, object]:
    """A delta as the table shows it: (text, +1 better / −1 worse / 0 same or unknown, sort key)."""
    if isinstance(value, dict) and set(value) >= {"from", "to"}:
        before, after = value.get("from"), value.get("to")
        if before == after:
            return (f"{after or '—'} (same)", 0, 0)
        rank = _LIFECYCLE_ORDER.get(after, 3) - _LIFECYCLE_ORDER.get(before, 3)
        return (f"{before or '—'} → {after or '—'}", -1 if rank > 0 else (1 if rank < 0 else 0), rank)
    if isinstance(value, bool):
        return ("yes" if value else "no", 1 if value else -1, int(value))
    if isinstance(value, (int, float)):
        unit = unit_of_key(key)
        text = ("+" if value > 0 else "") + format_value(value, unit, 3) if value != 0 else "no change"
        direction = _BETTER.get(key, 0)
        scale = 1e-9 * max(1.0, abs(value))
        verdict = 0 if abs(value) <= scale else (direction if value > 0 else -direction)
        return (text, verdict, float(value))
    if value is None:
        return ("—", 0, float("inf"))
    return (str(value), 0, str(value))


class _SortItem(QTableWidgetItem):
    """A cell that sorts by its value, not by its text."""

    def __lt__(self, other):  # noqa: D105
        mine, theirs = self.data(Qt.ItemDataRole.UserRole), other.data(Qt.ItemDataRole.UserRole)
        try:
            return mine < theirs
        except TypeError:
            return str(mine) < str(theirs)


class SubstitutesDialog(QDialog):
    """The parts that pass the same requirement in place of one part, with the checker's deltas.

    Sortable by any column; each delta is coloured better (green) or worse (red) than the reference;
    a double-click (or the button) opens the substitute's check sheet.
    """

    def __init__(self, bench, part_number: str, parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle(f"Substitutes for {part_number}")
        self.setObjectName("substitutes_dialog")
        self.bench = bench
        self.part_number = part_number
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
                if key not in delta_keys and key != "same_package":
                    delta_keys.append(key)
        self.delta_keys = delta_keys
        count = len(self.candidates)
        self.summary = QLabel(
            f"{count} part{'s' if count != 1 else ''} pass{'es' if count == 1 else ''} the requirement in place "
            f"of {part_number}. Δ = substitute minus {part_number}; green is better, red is worse. "
            "Click a heading to sort; double-click a row for its check sheet.", self)
        self.summary.setWordWrap(True)
        layout.addWidget(self.summary)
        headers = ["Rank", "Part", "Package", "Same package"] + [f"Δ {_label_of_key(k)}" for k in delta_keys]
        self.table = QTableWidget(count, len(headers), self)
        self.table.setObjectName("substitutes_table")
        self.table.setHorizontalHeaderLabels(headers)
        self.table.verticalHeader().hide()
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        for r, candidate in enumerate(self.candidates):
            deltas = candidate.get("deltas") or {}
            same = deltas.get("same_package", candidate.get("same_package"))
            cells = [(str(candidate["rank"]), 0, candidate["rank"]),
                     (candidate["part_number"], 0, candidate["part_number"].casefold()),
                     (candidate.get("package") or "", 0, (candidate.get("package") or "").casefold()),
                     substitute_cell("same_package", same) if same is not None else ("", 0, -1)]
            cells += [substitute_cell(key, deltas.get(key)) for key in delta_keys]
            for c, (text, verdict, key) in enumerate(cells):
                item = _SortItem(text)
                item.setFlags(item.flags() & ~Qt.ItemFlag.ItemIsEditable)
                item.setData(Qt.ItemDataRole.UserRole, key)
                item.setData(Qt.ItemDataRole.UserRole + 1, verdict)
                if verdict > 0:
                    item.setBackground(QBrush(BETTER_COLOR))
                    item.setToolTip("better than the reference")
                elif verdict < 0:
                    item.setBackground(QBrush(WORSE_COLOR))
                    item.setToolTip("worse than the reference")
                if c == 0 or c >= 4:
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
                self.table.setItem(r, c, item)
        self.table.setSortingEnabled(True)
        self.table.sortByColumn(0, Qt.SortOrder.AscendingOrder)
        self.table.resizeColumnsToContents()
        self.table.doubleClicked.connect(lambda index: self.open_check_sheet(index.row()))
        layout.addWidget(self.table, 1)
        if not self.candidates and self.result is not None:
            empty = QLabel(f"No other part passes this requirement in place of {part_number}.", self)
            empty.setObjectName("substitutes_empty")
            layout.addWidget(empty)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close, self)
        self.sheet_button = buttons.addButton("Check sheet", QDialogButtonBox.ButtonRole.ActionRole)
        self.sheet_button.clicked.connect(lambda: self.open_check_sheet(self.table.currentRow()))
        self.sheet_button.setEnabled(bool(self.candidates))
        buttons.rejected.connect(self.close)
        layout.addWidget(buttons)
        # As wide as the table needs (within the screen), not a small table in a large empty dialog.
        width = self.table.horizontalHeader().length() + 48
        height = self.table.verticalHeader().length() + self.table.horizontalHeader().height() + 150
        screen = self.screen().availableGeometry() if self.screen() is not None else None
        if screen is not None:
            width, height = min(width, screen.width() - 40), min(height, screen.height() - 80)
        self.resize(max(width, 520), max(min(height, 640), 260))

    def part_at(self, row: int) -> str | None:
        item = self.table.item(row, 1) if row >= 0 else None
        return item.text() if item is not None else None

    def open_check_sheet(self, row: int) -> None:
        part = self.part_at(row)
        if part is not None and self.result is not None:
            self.bench.prompt.show_check_sheet(self.result, part)
