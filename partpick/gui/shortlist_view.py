"""The ranked shortlist: one row per candidate, one column per check, straight from run_check's result."""

from __future__ import annotations

from PySide6.QtCore import QAbstractTableModel, QItemSelection, QItemSelectionModel, QModelIndex, Qt
from PySide6.QtGui import QBrush
from PySide6.QtWidgets import QAbstractItemView, QHeaderView, QLabel, QTableView, QVBoxLayout, QWidget

from partpick.gui.models import KIND_WORDS, ResultModel, describe_corner
from partpick.gui.widgets import FAIL_COLOR, PASS_COLOR, format_value, humanise

_ROOT = QModelIndex()  # the invalid index: "the table itself"

__all__ = ["ShortlistView", "ShortlistTableModel", "check_cell_text", "check_tooltip"]

_ROLES = frozenset((Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.ToolTipRole, Qt.ItemDataRole.BackgroundRole,
                    Qt.ItemDataRole.TextAlignmentRole))
_PASS_BRUSH = QBrush(PASS_COLOR)
_FAIL_BRUSH = QBrush(FAIL_COLOR)
_RIGHT = int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
_FIXED = ("Rank", "Part", "Kind", "Package", "Result", "First failing check")
# Optional columns: metric key → (header, unit, tooltip).
_EXTRA_COLUMNS = {"max_ambient_C": ("Max ambient", "°C", "The highest ambient max at which every check passes "
                                                          "(operating limit; the first 20 candidates)")}


def check_cell_text(check: dict) -> str:
    """``"812 mV · +18.8 %"``: the worst-corner value and its margin (``"—"`` with no value)."""
    if check.get("value") is None:
        return "— (not computed)"
    text = format_value(check["value"], check.get("unit") or "")
    margin = check.get("margin_pct")
    if margin is not None:
        text += f" · {margin:+.1f} %".replace("-", "−")
    return text


def check_tooltip(check: dict) -> str:
    lines = [f"{humanise(check['name'])}: {'pass' if check['passed'] else 'FAIL'}"]
    unit = check.get("unit") or ""
    if check.get("value") is not None:
        lines.append(f"Worst-corner value: {format_value(check['value'], unit, 4)}")
    if check.get("limit") is not None:
        source = f" (from {check['limit_source']})" if check.get("limit_source") else ""
        lines.append(f"Limit: {format_value(check['limit'], unit, 4)}{source}")
    if check.get("margin_pct") is not None:
        lines.append(f"Margin: {check['margin_pct']:+.2f} % of the limit".replace("-", "−"))
    corner = describe_corner(check.get("corner"))
    if corner:
        lines.append(f"Corner: {corner}")
    if check.get("reason"):
        lines.append(f"Why not computed: {check['reason']}")
    return "\n".join(lines)


class ShortlistTableModel(QAbstractTableModel):
    def __init__(self, model: ResultModel, parent=None) -> None:
        super().__init__(parent)
        self._model = model
        self._candidates: list[dict] = []
        self._checks: list[str] = []
        self._by_name: list[dict] = []
        self._texts: dict = {}
        self._extra: tuple[str, ...] = ()  # optional metric columns after the fixed ones (`set_extra_columns`)
        model.changed.connect(self.refresh)
        self.refresh()

    def refresh(self) -> None:
        self.beginResetModel()
        self._candidates = self._model.candidates
        names: list[str] = []
        for candidate in self._candidates:
            for check in candidate["checks"]:
                if check["name"] not in names:
                    names.append(check["name"])
        self._checks = names
        self._by_name = [{c["name"]: c for c in candidate["checks"]} for candidate in self._candidates]
        self._texts: dict = {}
        self.endResetModel()

    @property
    def _first_check(self) -> int:
        return len(_FIXED) + len(self._extra)

    def set_extra_columns(self, keys) -> None:
        """Show optional metric columns (`_EXTRA_COLUMNS`, e.g. ``max_ambient_C``) after the fixed ones."""
        self.beginResetModel()
        self._extra = tuple(k for k in keys if k in _EXTRA_COLUMNS)
        self._texts = {}
        self.endResetModel()

    def refresh_extra(self) -> None:
        """The optional columns' values arrived later than the result (operating limits)."""
        if self._extra and self._candidates:
            self.dataChanged.emit(self.index(0, len(_FIXED)), self.index(len(self._candidates) - 1,
                                                                         self._first_check - 1))

    def _extra_data(self, candidate: dict, key: str, role):
        if role == Qt.ItemDataRole.DisplayRole:
            value = (candidate.get("metrics") or {}).get(key)
            if value is None:
                return "…" if (candidate.get("operating_limits") or {}).get("summary") is None else "—"
            return format_value(value, _EXTRA_COLUMNS[key][1])
        if role == Qt.ItemDataRole.TextAlignmentRole:
            return _RIGHT
        if role == Qt.ItemDataRole.ToolTipRole:
            block = candidate.get("operating_limits") or {}
            return block.get("summary") or block.get("reason") or "not computed yet"
        return None

    @property
    def check_names(self) -> list[str]:
        return list(self._checks)

    def candidate_at(self, row: int) -> dict:
        return self._candidates[row]

    def row_of(self, part_number: str) -> int:
        for row, candidate in enumerate(self._candidates):
            if candidate["part_number"] == part_number:
                return row
        return -1

    def rowCount(self, parent=_ROOT) -> int:  # noqa: N802
        return 0 if parent.isValid() else len(self._candidates)

    def columnCount(self, parent=_ROOT) -> int:  # noqa: N802
        return 0 if parent.isValid() else self._first_check + len(self._checks)

    def headerData(self, section, orientation, role=Qt.ItemDataRole.DisplayRole):  # noqa: N802
        if orientation != Qt.Orientation.Horizontal:
            return None
        if role == Qt.ItemDataRole.DisplayRole:
            if len(_FIXED) <= section < self._first_check:
                return _EXTRA_COLUMNS[self._extra[section - len(_FIXED)]][0]
            return _FIXED[section] if section < len(_FIXED) else humanise(self._checks[section - self._first_check])
        if role == Qt.ItemDataRole.ToolTipRole and len(_FIXED) <= section < self._first_check:
            return _EXTRA_COLUMNS[self._extra[section - len(_FIXED)]][2]
        if role == Qt.ItemDataRole.ToolTipRole and section >= self._first_check:
            return f"Check {self._checks[section - self._first_check]}: worst-corner value · margin (% of the limit)"
        return None

    def data(self, index, role=Qt.ItemDataRole.DisplayRole):
        if role not in _ROLES or not index.isValid():
            return None  # the view asks for a dozen roles per cell and repaint; answer the rest at once
        candidate = self._candidates[index.row()]
        column = index.column()
        if column < len(_FIXED):
            return self._fixed_data(candidate, column, role)
        if column < self._first_check:
            return self._extra_data(candidate, self._extra[column - len(_FIXED)], role)
        check = self._by_name[index.row()].get(self._checks[column - self._first_check])
        if check is None:
            return "n/a" if role == Qt.ItemDataRole.DisplayRole else None
        if role == Qt.ItemDataRole.DisplayRole:
            key = (index.row(), column)
            text = self._texts.get(key)
            if text is None:  # formatted once per result, not on every repaint
                text = self._texts[key] = check_cell_text(check)
            return text
        if role == Qt.ItemDataRole.ToolTipRole:
            return check_tooltip(check)
        if role == Qt.ItemDataRole.BackgroundRole and not check["passed"]:
            return _FAIL_BRUSH
        if role == Qt.ItemDataRole.TextAlignmentRole:
            return _RIGHT
        return None

    def _fixed_data(self, candidate: dict, column: int, role):
        name = _FIXED[column]
        if role == Qt.ItemDataRole.DisplayRole:
            if name == "Rank":
                return str(candidate["rank"])
            if name == "Part":
                return candidate["part_number"]
            if name == "Kind":
                return KIND_WORDS.get(candidate.get("kind"), candidate.get("kind") or "")
            if name == "Package":
                return candidate.get("package") or ""
            if name == "Result":
                return "Pass" if candidate["passed"] else f"Fail ({len(candidate['failed_checks'])})"
            if name == "First failing check":
                failed = candidate["failed_checks"]
                return humanise(failed[0]) if failed else ""
        if role == Qt.ItemDataRole.BackgroundRole and name == "Result":
            return _PASS_BRUSH if candidate["passed"] else _FAIL_BRUSH
        if role == Qt.ItemDataRole.ToolTipRole and name in ("Result", "First failing check"):
            failed = candidate["failed_checks"]
            if not failed:
                return "Every check passes at every corner."
            checks = {c["name"]: c for c in candidate["checks"]}
            return "\n\n".join(check_tooltip(checks[n]) for n in failed if n in checks)
        return None


class ShortlistView(QWidget):
    """The shortlist table; its row selection is the result model's selection (the curves follow it)."""

    def __init__(self, model: ResultModel, parent=None) -> None:
        super().__init__(parent)
        self.model = model
        self.setObjectName("shortlist_view")
        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        self.banner = QLabel(self)
        self.banner.setWordWrap(True)
        self.banner.hide()
        layout.addWidget(self.banner)
        self.table_model = ShortlistTableModel(model, self)
        self.table = QTableView(self)
        self.table.setObjectName("shortlist_table")
        self.table.setModel(self.table_model)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection)
        self.table.verticalHeader().hide()
        self.table.verticalHeader().setDefaultSectionSize(self.fontMetrics().height() + 6)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        self.table.setWordWrap(False)
        self.table.horizontalHeader().setResizeContentsPrecision(200)  # size columns on a sample of rows
        layout.addWidget(self.table, 1)
        self._sized_for: tuple = ()
        self.table.selectionModel().selectionChanged.connect(self._selection_changed)
        model.changed.connect(self._update_rows)
        model.selection_changed.connect(self._update_selection)
        model.state_changed.connect(self._update_banner)

    # -- model → widgets ----------------------------------------------------
    def _update_rows(self) -> None:
        columns = tuple(self.table_model.check_names)
        if columns != self._sized_for and self.table_model.rowCount():
            # Size once per set of checks (a 10,000-row resize on every edit would cost more than the check).
            self.table.resizeColumnsToContents()
            self._sized_for = columns
        self._update_selection()
        self._update_banner()

    def _update_selection(self) -> None:
        selection = QItemSelection()
        last = self.table_model.columnCount() - 1
        for part_number in self.model.selected:
            row = self.table_model.row_of(part_number)
            if row >= 0:
                selection.select(self.table_model.index(row, 0), self.table_model.index(row, last))
        selection_model = self.table.selectionModel()
        selection_model.blockSignals(True)
        selection_model.select(selection, QItemSelectionModel.SelectionFlag.ClearAndSelect)
        selection_model.blockSignals(False)
        self.table.viewport().update()

    def _update_banner(self) -> None:
        text = self.model.message if self.model.stale else ""
        self.banner.setText(text)
        self.banner.setVisible(bool(text))
        self.banner.setStyleSheet("color: palette(highlighted-text); background: rgba(214,48,49,150); padding: 3px;")

    # -- widgets → model ----------------------------------------------------
    def _selection_changed(self, *_args) -> None:
        rows = sorted({index.row() for index in self.table.selectionModel().selectedRows()})
        self.model.set_selected([self.table_model.candidate_at(row)["part_number"] for row in rows])

    def select_rows(self, rows) -> None:
        """Select shortlist rows as a user's Ctrl+click would (tests and the compare command)."""
        selection = QItemSelection()
        last = self.table_model.columnCount() - 1
        for row in rows:
            selection.select(self.table_model.index(row, 0), self.table_model.index(row, last))
        self.table.selectionModel().select(selection, QItemSelectionModel.SelectionFlag.ClearAndSelect)
