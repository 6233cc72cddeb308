"""The parts library panel: filter row, parts table, add/edit/duplicate/delete buttons."""

from __future__ import annotations

from PySide6.QtCore import QAbstractTableModel, QModelIndex, Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QComboBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QTableView,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from partpick.gui.models import KIND_WORDS, LibraryModel
from partpick.library.fields import FIELDS_BY_NAME, KINDS
from partpick.units import format_quantity

_ROOT = QModelIndex()  # the invalid index: "the table itself"

__all__ = ["LibraryView", "PartsTableModel", "LIBRARY_COLUMNS"]

# What a designer scans a library by: identity, then the ratings that decide a part.
LIBRARY_COLUMNS = ("part_number", "kind", "package", "manufacturer", "vrrm_V", "if_avg_A", "vz_V", "pd_W",
                   "tj_max_C", "price", "lifecycle")
_KIND_WORDS = KIND_WORDS


def _cell(part: dict, name: str) -> str:
    value = part.get(name)
    if value is None:
        return ""
    spec = FIELDS_BY_NAME[name]
    if name == "kind":
        return _KIND_WORDS.get(value, value)
    if spec.type != "float":
        return str(value)
    if spec.unit in ("°C", ""):
        return f"{value:g} {spec.unit}".strip()
    return format_quantity(value, spec.unit)


class PartsTableModel(QAbstractTableModel):
    """The library model's visible parts as table rows."""

    def __init__(self, model: LibraryModel, parent=None) -> None:
        super().__init__(parent)
        self._model = model
        self._rows: list[dict] = model.visible_parts()
        self._sort: tuple[int, Qt.SortOrder] | None = None  # (column, order); None: library order
        model.parts_changed.connect(self.refresh)
        model.filter_changed.connect(self.refresh)

    def refresh(self) -> None:
        self.beginResetModel()
        self._rows = self._model.visible_parts()
        self._apply_sort()
        self.endResetModel()

    def sort(self, column: int, order=Qt.SortOrder.AscendingOrder) -> None:  # Qt's name
        """Sort by any column: numbers by value (unknown last), text case-blind."""
        if not 0 <= column < len(LIBRARY_COLUMNS):
            return
        self._sort = (column, order)
        self.beginResetModel()
        self._apply_sort()
        self.endResetModel()

    def _apply_sort(self) -> None:
        if self._sort is None:
            return
        column, order = self._sort
        name = LIBRARY_COLUMNS[column]
        numeric = FIELDS_BY_NAME[name].type == "float"
        descending = order == Qt.SortOrder.DescendingOrder
        known = [p for p in self._rows if p.get(name) not in (None, "")]
        unknown = [p for p in self._rows if p.get(name) in (None, "")]
        known.sort(key=(lambda p: p[name]) if numeric else (lambda p: str(p[name]).casefold()), reverse=descending)
        self._rows = known + unknown  # unknown values last, whichever the direction

    def part_at(self, row: int) -> dict:
        return self._rows[row]

    def row_of(self, part_number: str) -> int:
        for row, part in enumerate(self._rows):
            if part["part_number"] == part_number:
                return row
        return -1

    def rowCount(self, parent=_ROOT) -> int:  # noqa: N802
        return 0 if parent.isValid() else len(self._rows)

    def columnCount(self, parent=_ROOT) -> int:  # noqa: N802
        return 0 if parent.isValid() else len(LIBRARY_COLUMNS)

    def headerData(self, section, orientation, role=Qt.ItemDataRole.DisplayRole):  # noqa: N802
        if orientation == Qt.Orientation.Horizontal:
            spec = FIELDS_BY_NAME[LIBRARY_COLUMNS[section]]
            if role == Qt.ItemDataRole.DisplayRole:
                return spec.label
            if role == Qt.ItemDataRole.ToolTipRole:
                return spec.help
        return None

    def data(self, index, role=Qt.ItemDataRole.DisplayRole):
        if not index.isValid():
            return None
        part = self._rows[index.row()]
        name = LIBRARY_COLUMNS[index.column()]
        if role == Qt.ItemDataRole.DisplayRole:
            return _cell(part, name)
        if role == Qt.ItemDataRole.TextAlignmentRole and FIELDS_BY_NAME[name].type == "float":
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        if role == Qt.ItemDataRole.ToolTipRole and name == "part_number":
            bits = [part.get("manufacturer") or "", part.get("datasheet") or "", part.get("notes") or ""]
            return "\n".join(b for b in bits if b) or None
        return None


class LibraryView(QWidget):
    """Filter by kind, package and text; a table of the parts; buttons bound to the part commands."""

    selection_changed = Signal(list)
    activated = Signal(str)

    def __init__(self, model: LibraryModel, parent=None) -> None:
        super().__init__(parent)
        self.model = model
        self.setObjectName("library_view")
        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        filters = QHBoxLayout()
        self.kind_filter = QComboBox(self)
        self.kind_filter.addItem("All kinds", "")
        for kind in KINDS:
            self.kind_filter.addItem(_KIND_WORDS[kind], kind)
        self.package_filter = QComboBox(self)
        self.text_filter = QLineEdit(self)
        self.text_filter.setPlaceholderText("Search part number, maker, notes…")
        self.text_filter.setClearButtonEnabled(True)
        self.vrrm_filter = QLineEdit(self)
        self.vrrm_filter.setPlaceholderText("VRRM ≥")
        self.vrrm_filter.setToolTip("Only parts with VRRM at least this (e.g. 40 V); empty: any")
        self.if_filter = QLineEdit(self)
        self.if_filter.setPlaceholderText("IF(AV) ≥")
        self.if_filter.setToolTip("Only parts with IF(AV) at least this (e.g. 1 A); empty: any")
        for edit in (self.vrrm_filter, self.if_filter):
            edit.setMaximumWidth(90)
        filters.addWidget(self.kind_filter)
        filters.addWidget(self.package_filter)
        filters.addWidget(self.text_filter, 1)
        layout.addLayout(filters)
        ratings = QHBoxLayout()
        ratings.addWidget(QLabel("Ratings at least:", self))
        ratings.addWidget(self.vrrm_filter)
        ratings.addWidget(self.if_filter)
        ratings.addStretch(1)
        layout.addLayout(ratings)

        self.table_model = PartsTableModel(model, self)
        self.table = QTableView(self)
        self.table.setObjectName("library_table")
        self.table.setModel(self.table_model)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection)
        self.table.setAlternatingRowColors(True)
        self.table.verticalHeader().hide()
        self.table.verticalHeader().setDefaultSectionSize(self.fontMetrics().height() + 6)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        self.table.horizontalHeader().setStretchLastSection(True)
        self.table.horizontalHeader().setSortIndicatorShown(True)
        self.table.horizontalHeader().setSortIndicator(-1, Qt.SortOrder.AscendingOrder)
        self.table.setSortingEnabled(True)
        self.table.setContextMenuPolicy(Qt.ContextMenuPolicy.CustomContextMenu)
        self.table.customContextMenuRequested.connect(self._context_menu)
        self.context_menu = None
        self._actions: dict = {}
        self._kept_selection: list[str] = []
        layout.addWidget(self.table, 1)

        buttons = QHBoxLayout()
        self.buttons: dict[str, QToolButton] = {}
        for command_id in ("part.add", "part.edit", "part.duplicate", "part.delete"):
            button = QToolButton(self)
            button.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextOnly)
            self.buttons[command_id] = button
            buttons.addWidget(button)
        buttons.addStretch(1)
        self.count_label = QLabel(self)
        buttons.addWidget(self.count_label)
        layout.addLayout(buttons)

        self.kind_filter.activated.connect(lambda _i: model.set_filter(kind=self.kind_filter.currentData()))
        self.package_filter.activated.connect(
            lambda _i: model.set_filter(package=self.package_filter.currentData() or ""))
        self.text_filter.textChanged.connect(lambda text: model.set_filter(text=text))
        self.vrrm_filter.textChanged.connect(lambda text: self._rating_filter(self.vrrm_filter, text, "V", "min_vrrm"))
        self.if_filter.textChanged.connect(lambda text: self._rating_filter(self.if_filter, text, "A", "min_if"))
        self.table.selectionModel().selectionChanged.connect(self._selection_changed)
        self.table.doubleClicked.connect(lambda index: self.activated.emit(
            self.table_model.part_at(index.row())["part_number"]))
        self.table_model.modelReset.connect(self._update_count)
        # A sort (or a refresh) resets the rows: the same parts stay selected.
        self.table_model.modelAboutToBeReset.connect(self._keep_selection)
        self.table_model.modelReset.connect(lambda: self.show_selection(self._kept_selection))
        model.parts_changed.connect(self._update_packages)
        model.filter_changed.connect(self._update_filters)
        self._update_packages()
        self._update_count()
        self._resize_columns()

    def _rating_filter(self, edit: QLineEdit, text: str, unit: str, key: str) -> None:
        """A rating floor typed in engineering notation; a bad entry is marked and filters nothing."""
        from partpick.errors import InputError
        from partpick.gui.widgets import ERROR_COLOR
        from partpick.units import parse_quantity

        try:
            value = parse_quantity(text, unit, name=edit.placeholderText()) if text.strip() else None
        except InputError as exc:
            edit.setStyleSheet(f"QLineEdit {{ border: 2px solid {ERROR_COLOR.name()}; }}")
            edit.setToolTip(str(exc))
            return
        edit.setStyleSheet("")
        edit.setToolTip(f"Only parts with {edit.placeholderText()} this; empty: any")
        self.model.set_filter(**{key: value})

    def bind_actions(self, actions: dict) -> None:
        """Put the part commands' actions on the buttons and the row context menu (one action, one behaviour)."""
        for command_id, button in self.buttons.items():
            button.setDefaultAction(actions[command_id])
        self._actions = {k: actions[k] for k in ("part.edit", "part.duplicate", "part.delete", "part.add")
                         if k in actions}

    def _keep_selection(self) -> None:
        self._kept_selection = self.selected_part_numbers()

    def _context_menu(self, position) -> None:
        from PySide6.QtGui import QGuiApplication
        from PySide6.QtWidgets import QMenu

        index = self.table.indexAt(position)
        if index.isValid() and not self.table.selectionModel().isRowSelected(index.row(), QModelIndex()):
            self.table.selectRow(index.row())
        menu = self.context_menu = QMenu(self)
        for command_id in ("part.edit", "part.duplicate", "part.delete"):
            if command_id in self._actions:
                menu.addAction(self._actions[command_id])
        menu.addSeparator()
        if "part.add" in self._actions:
            menu.addAction(self._actions["part.add"])
        copy = menu.addAction("Copy part number")
        copy.setObjectName("copy_part_number")
        copy.setEnabled(bool(self.selected_part_numbers()))
        copy.triggered.connect(lambda: QGuiApplication.clipboard().setText("\n".join(self.selected_part_numbers())))
        menu.popup(self.table.viewport().mapToGlobal(position))

    def _resize_columns(self) -> None:
        self.table.resizeColumnsToContents()
        header = self.table.horizontalHeader()
        for column in range(self.table_model.columnCount()):
            header.resizeSection(column, min(max(header.sectionSize(column), 60), 180))

    # -- model → widgets ----------------------------------------------------
    def _update_packages(self) -> None:
        current = self.model.filter_package
        self.package_filter.blockSignals(True)
        self.package_filter.clear()
        self.package_filter.addItem("All packages", "")
        for package in self.model.packages():
            self.package_filter.addItem(package, package)
        self.package_filter.setCurrentIndex(max(self.package_filter.findData(current), 0))
        self.package_filter.blockSignals(False)

    def _update_filters(self) -> None:
        self.kind_filter.setCurrentIndex(max(self.kind_filter.findData(self.model.filter_kind), 0))
        self.package_filter.setCurrentIndex(max(self.package_filter.findData(self.model.filter_package), 0))
        if self.text_filter.text() != self.model.filter_text:
            self.text_filter.setText(self.model.filter_text)

    def _update_count(self) -> None:
        shown, total = self.table_model.rowCount(), len(self.model.parts)
        self.count_label.setText(f"{shown} of {total} parts" if shown != total else f"{total} parts")

    # -- widgets → listeners ------------------------------------------------
    def selected_part_numbers(self) -> list[str]:
        rows = sorted({index.row() for index in self.table.selectionModel().selectedRows()})
        return [self.table_model.part_at(row)["part_number"] for row in rows]

    def _selection_changed(self, *_args) -> None:
        self.selection_changed.emit(self.selected_part_numbers())

    def show_selection(self, part_numbers) -> None:
        """Select these parts' rows without reporting it back (the selection came from the workbench)."""
        selection_model = self.table.selectionModel()
        selection_model.blockSignals(True)
        self.table.clearSelection()
        for part_number in part_numbers:
            row = self.table_model.row_of(part_number)
            if row >= 0:
                self.table.selectRow(row) if len(part_numbers) == 1 else selection_model.select(
                    self.table_model.index(row, 0),
                    selection_model.SelectionFlag.Select | selection_model.SelectionFlag.Rows)
        selection_model.blockSignals(False)
        self.table.viewport().update()

    def select_part(self, part_number: str) -> None:
        row = self.table_model.row_of(part_number)
        if row >= 0:
            self.table.selectRow(row)
            self.table.scrollTo(self.table_model.index(row, 0))
