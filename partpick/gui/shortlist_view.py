"""The ranked shortlist: one row per candidate, one column per check, straight from run_check's result."""

from __future__ import annotations

from PySide6.QtCore import QAbstractTableModel, QItemSelection, QItemSelectionModel, QModelIndex, Qt
from PySide6.QtGui import QBrush, QGuiApplication
from PySide6.QtWidgets import QAbstractItemView, QHeaderView, QLabel, QMenu, QTableView, QVBoxLayout, QWidget

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
# The Zener shunt's chosen (or given) resistor and its power class, from the result's metrics (SPEC §6).
_ZENER_FIXED = ("Rank", "Part", "Resistor", "Resistor class", "Kind", "Package", "Result", "First failing check")
_ZENER_METRICS = {"Resistor": ("series_resistor_ohm", "Ω"), "Resistor class": ("resistor_power_class_W", "W")}
# The commands of a shortlist row's context menu (the window binds them with `bind_actions`).
CONTEXT_COMMANDS = ("shortlist.check_sheet", "shortlist.compare", "shortlist.substitutes", "report.export")
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


def check_tooltip(check: dict, role: str | None = None) -> str:
    """A check's hover text: result, value, limit and its source, margin in its own unit and in %, corner."""
    lines = [f"{humanise(check['name'])}: {'pass' if check['passed'] else 'FAIL'}"]
    unit = check.get("unit") or ""
    if check.get("value") is not None:
        lines.append(f"Worst-corner value: {format_value(check['value'], unit, 4)}")
    if check.get("limit") is not None:
        source = f" (from {check['limit_source']})" if check.get("limit_source") else ""
        lines.append(f"Limit: {format_value(check['limit'], unit, 4)}{source}")
    if check.get("margin_pct") is not None or check.get("margin") is not None:
        from partpick.report.words import margin_text

        lines.append(f"Margin: {margin_text(check, role)}")
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
        self._fixed: tuple[str, ...] = _FIXED
        self._role = "series"
        self._sort: tuple[str, Qt.SortOrder] = ("Rank", Qt.SortOrder.AscendingOrder)
        self._extra: tuple[str, ...] = ()  # optional metric columns after the fixed ones (`set_extra_columns`)
        model.changed.connect(self.refresh)
        self.refresh()

    def refresh(self) -> None:
        self.beginResetModel()
        self._load()
        self._apply_sort()
        self.endResetModel()

    def _load(self) -> None:
        result = self._model.result or {}
        role = (result.get("requirement") or {}).get("role", "series")
        self._role = role
        self._fixed = _ZENER_FIXED if role == "zener_shunt" else _FIXED
        self._candidates = list(self._model.candidates)
        names: list[str] = []
        for candidate in self._candidates:
            for check in candidate["checks"]:
                if check["name"] not in names:
                    names.append(check["name"])
        self._checks = names
        self._texts = {}

    # -- sorting (any column; check columns sort by margin, the number that decides) ----------------
    def sort(self, column: int, order=Qt.SortOrder.AscendingOrder) -> None:  # noqa: D401 (Qt's name)
        if not 0 <= column < self.columnCount():
            return
        self._sort = (self._column_name(column), order)
        self.beginResetModel()
        self._apply_sort()
        self.endResetModel()

    def _column_name(self, column: int) -> str:
        if column < len(self._fixed):
            return self._fixed[column]
        if column < self._first_check:
            return self._extra[column - len(self._fixed)]
        return self._checks[column - self._first_check]

    def sort_column(self) -> int:
        name = self._sort[0]
        if name in self._fixed:
            return self._fixed.index(name)
        if name in self._extra:
            return len(self._fixed) + self._extra.index(name)
        return self._first_check + self._checks.index(name) if name in self._checks else 0

    def _apply_sort(self) -> None:
        name, order = self._sort
        if name not in self._fixed and name not in self._checks and name not in self._extra:
            name, order = "Rank", Qt.SortOrder.AscendingOrder
        missing = float("inf") if order == Qt.SortOrder.AscendingOrder else float("-inf")

        def key(candidate):
            if name == "Rank":
                return (candidate["rank"],)
            if name == "Part":
                return (candidate["part_number"].casefold(),)
            if name in ("Kind", "Package"):
                return ((candidate.get(name.lower()) or "").casefold(), candidate["rank"])
            if name == "Result":
                return (len(candidate["failed_checks"]), candidate["rank"])
            if name == "First failing check":
                return ((candidate["failed_checks"] or [""])[0], candidate["rank"])
            if name in _ZENER_METRICS or name in self._extra:
                key_ = _ZENER_METRICS[name][0] if name in _ZENER_METRICS else name
                value = (candidate.get("metrics") or {}).get(key_)
                return (missing if value is None else value, candidate["rank"])
            check = next((c for c in candidate["checks"] if c["name"] == name), None)
            margin = None if check is None else check.get("margin_pct")
            return (missing if margin is None else margin, candidate["rank"])

        self._candidates.sort(key=key, reverse=order == Qt.SortOrder.DescendingOrder)
        self._by_name = [{c["name"]: c for c in candidate["checks"]} for candidate in self._candidates]
        self._texts = {}

    @property
    def _first_check(self) -> int:
        return len(self._fixed) + len(self._extra)

    def set_extra_columns(self, keys) -> None:
        """Show optional metric columns (`_EXTRA_COLUMNS`, e.g. ``max_ambient_C``) after the fixed ones."""
        self.beginResetModel()
        self._extra = tuple(k for k in keys if k in _EXTRA_COLUMNS)
        self._texts = {}
        self.endResetModel()

    def refresh_extra(self) -> None:
        """The optional columns' values arrived later than the result (operating limits)."""
        if self._extra and self._candidates:
            self.dataChanged.emit(self.index(0, len(self._fixed)), self.index(len(self._candidates) - 1,
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
            fixed = self._fixed
            if len(fixed) <= section < self._first_check:
                return _EXTRA_COLUMNS[self._extra[section - len(fixed)]][0]
            return fixed[section] if section < len(fixed) else humanise(self._checks[section - self._first_check])
        if role == Qt.ItemDataRole.ToolTipRole and len(self._fixed) <= section < self._first_check:
            return _EXTRA_COLUMNS[self._extra[section - len(self._fixed)]][2]
        if role == Qt.ItemDataRole.ToolTipRole and section >= self._first_check:
            return (f"Check {self._checks[section - self._first_check]}: worst-corner value · margin (% of the "
                    "limit); click to sort by the margin")
        if role == Qt.ItemDataRole.ToolTipRole and section < len(self._fixed) and self._fixed[section] in _ZENER_METRICS:
            return {"Resistor": "The series resistor chosen from the E-series (or the fixed one given)",
                    "Resistor class": "The resistor's standard power class [W]"}[self._fixed[section]]
        return None

    def data(self, index, role=Qt.ItemDataRole.DisplayRole):
        if role not in _ROLES or not index.isValid():
            return None  # the view asks for a dozen roles per cell and repaint; answer the rest at once
        candidate = self._candidates[index.row()]
        column = index.column()
        if column < len(self._fixed):
            return self._fixed_data(candidate, column, role)
        if column < self._first_check:
            return self._extra_data(candidate, self._extra[column - len(self._fixed)], role)
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
            return check_tooltip(check, self._role)
        if role == Qt.ItemDataRole.BackgroundRole and not check["passed"]:
            return _FAIL_BRUSH
        if role == Qt.ItemDataRole.TextAlignmentRole:
            return _RIGHT
        return None

    def _fixed_data(self, candidate: dict, column: int, role):
        name = self._fixed[column]
        if name in _ZENER_METRICS:
            key, unit = _ZENER_METRICS[name]
            value = (candidate.get("metrics") or {}).get(key)
            if role == Qt.ItemDataRole.DisplayRole:
                return format_value(value, unit) if value is not None else "—"
            if role == Qt.ItemDataRole.TextAlignmentRole:
                return _RIGHT
            return None
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
            return "\n\n".join(check_tooltip(checks[n], self._role) for n in failed if n in checks)
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
        # An empty result says why, in the table's place (SPEC §6: never a silent empty view).
        self.empty_label = QLabel(self)
        self.empty_label.setObjectName("shortlist_empty")
        self.empty_label.setWordWrap(True)
        self.empty_label.setAlignment(Qt.AlignmentFlag.AlignCenter)
        self.empty_label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.empty_label.hide()
        layout.addWidget(self.empty_label, 1)
        header = self.table.horizontalHeader()
        header.setSortIndicator(0, Qt.SortOrder.AscendingOrder)
        self.table.setSortingEnabled(True)
        self.table_model.modelReset.connect(self._update_selection)  # a sort resets the rows
        self.table.setContextMenuPolicy(Qt.ContextMenuPolicy.CustomContextMenu)
        self.table.customContextMenuRequested.connect(self._context_menu)
        self._actions: dict = {}
        self.context_menu: QMenu | None = None
        self._sized_for: tuple = ()
        self.table.selectionModel().selectionChanged.connect(self._selection_changed)
        model.changed.connect(self._update_rows)
        model.selection_changed.connect(self._update_selection)
        model.state_changed.connect(self._update_banner)

    # -- model → widgets ----------------------------------------------------
    def _update_rows(self) -> None:
        self._update_empty()
        header = self.table.horizontalHeader()
        if header.sortIndicatorSection() != self.table_model.sort_column():
            header.blockSignals(True)
            header.setSortIndicator(self.table_model.sort_column(), header.sortIndicatorOrder())
            header.blockSignals(False)
        columns = tuple(self.table_model.check_names) + (self.table_model.columnCount(),)
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

    def _update_empty(self) -> None:
        reason = self.model.empty_reason
        self.empty_label.setText(f"No candidates: {reason}." if reason else "")
        self.empty_label.setVisible(bool(reason))
        self.table.setVisible(not reason)

    def _update_banner(self) -> None:
        text = self.model.message if self.model.stale else ""
        self.banner.setText(text)
        self.banner.setVisible(bool(text))
        self.banner.setStyleSheet("color: palette(highlighted-text); background: rgba(214,48,49,150); padding: 3px;")

    # -- widgets → model ----------------------------------------------------
    def _selection_changed(self, *_args) -> None:
        rows = sorted({index.row() for index in self.table.selectionModel().selectedRows()})
        self.model.set_selected([self.table_model.candidate_at(row)["part_number"] for row in rows])

    def bind_actions(self, actions: dict) -> None:
        """The window's actions for the row context menu (one action, one behaviour)."""
        self._actions = {k: actions[k] for k in CONTEXT_COMMANDS if k in actions}

    def _context_menu(self, position) -> None:
        index = self.table.indexAt(position)
        if index.isValid() and not self.table.selectionModel().isRowSelected(index.row(), QModelIndex()):
            self.select_rows([index.row()])
        menu = self.context_menu = QMenu(self)
        for command_id in CONTEXT_COMMANDS:
            if command_id in self._actions:
                menu.addAction(self._actions[command_id])
        menu.addSeparator()
        copy = menu.addAction("Copy part number")
        copy.setObjectName("copy_part_number")
        copy.triggered.connect(self.copy_part_numbers)
        copy.setEnabled(bool(self.model.selected))
        menu.popup(self.table.viewport().mapToGlobal(position))

    def copy_part_numbers(self) -> None:
        QGuiApplication.clipboard().setText("\n".join(self.model.selected))

    def select_rows(self, rows) -> None:
        """Select shortlist rows as a user's Ctrl+click would (tests and the compare command)."""
        selection = QItemSelection()
        last = self.table_model.columnCount() - 1
        for row in rows:
            selection.select(self.table_model.index(row, 0), self.table_model.index(row, last))
        self.table.selectionModel().select(selection, QItemSelectionModel.SelectionFlag.ClearAndSelect)
