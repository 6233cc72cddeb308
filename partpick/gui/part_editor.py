"""The part editor dialog: a thin view of `PartEditModel` with the live forward-model fit."""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtGui import QPalette
from PySide6.QtWidgets import (
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QFormLayout,
    QGridLayout,
    QGroupBox,
    QLabel,
    QPlainTextEdit,
    QPushButton,
    QScrollArea,
    QSplitter,
    QVBoxLayout,
    QWidget,
)

from partpick.gui.models import KIND_WORDS
from partpick.gui.part_edit_model import PartEditModel
from partpick.gui.widgets import ERROR_COLOR, FieldEdit
from partpick.library.fields import PART_FIELDS
from partpick.plots.axes import install_axes, set_axis

__all__ = ["PartEditor", "EDITOR_GROUPS"]

# Where each field sits in the form: (title, first field of the group); groups run in PART_FIELDS order.
EDITOR_GROUPS = (
    ("Identity", "part_number"),
    ("Ratings", "vrrm_V"),
    ("Forward model", "is_A"),
    ("Thermal path, pulses, recovery", "pd_ref_point"),
    ("TVS", "vwm_V"),
    ("Forward voltage", "vf_max_V"),
    ("Reverse leakage", "ir_A"),
    ("Zener", "vz_V"),
    ("Purchasing", "price"),
)
_CHOICE_WORDS = {"": "(not known)"}


class PartEditor(QDialog):
    """Every part field with its unit; bad entries marked at the field; OK only when the part is valid."""

    def __init__(self, part: dict | None, *, title: str = "Part", existing=(), parent=None) -> None:
        super().__init__(parent)
        self.setWindowTitle(title)
        self.setObjectName("part_editor")
        self.model = PartEditModel(part, existing=existing)
        self.editors: dict[str, object] = {}

        form_body = QWidget(self)
        grid = QGridLayout(form_body)
        starts = {first: name for name, first in EDITOR_GROUPS}
        boxes = []
        form = None
        for spec in PART_FIELDS:
            if spec.name in starts:
                box = QGroupBox(starts[spec.name], form_body)
                form = QFormLayout(box)
                boxes.append(box)
            if spec.type == "points":
                continue  # the VF points have their own pane, beside the fit
            widget = self._make_editor(spec, form_body)
            label = spec.label + (f" [{spec.unit}]" if spec.unit else "")
            form.addRow(label, widget)
        for index, box in enumerate(boxes):
            grid.addWidget(box, index // 2 if index < 6 else 3, index % 2 if index < 6 else 0,
                           1, 1 if index < 6 else 2)
        scroll = QScrollArea(self)
        scroll.setWidgetResizable(True)
        scroll.setWidget(form_body)

        fit_pane = QWidget(self)
        fit_layout = QVBoxLayout(fit_pane)
        fit_layout.addWidget(QLabel("VF points at 25 °C — paste IF, VF pairs, one a line (e.g. 10 mA, 0.62):"))
        self.points_edit = QPlainTextEdit(fit_pane)
        self.points_edit.setObjectName("field_vf_points")
        self.points_edit.setPlaceholderText("10 mA, 0.62\n100 mA, 0.72\n1 A, 0.93")
        self.points_edit.setPlainText(self.model.texts["vf_points"])
        self.points_edit.setMaximumHeight(140)
        self.points_edit.textChanged.connect(lambda: self.model.set_text("vf_points", self.points_edit.toPlainText()))
        fit_layout.addWidget(self.points_edit)
        self.points_error = QLabel(fit_pane)
        self.points_error.setWordWrap(True)
        self.points_error.setStyleSheet(f"color: {ERROR_COLOR.name()};")
        fit_layout.addWidget(self.points_error)
        self.plot = pg.PlotWidget(fit_pane)
        self.plot.setBackground(self.palette().color(QPalette.ColorRole.Base))
        self.plot.setMinimumSize(380, 280)
        item = self.plot.getPlotItem()
        install_axes(item)
        item.setLogMode(x=False, y=True)
        set_axis(item, "bottom", "Forward voltage VF", "V", log=False)
        set_axis(item, "left", "Forward current IF", "A", log=True)
        item.showGrid(x=True, y=True, alpha=0.25)
        item.addLegend(offset=(10, 10))
        text = self.palette().color(QPalette.ColorRole.Text)
        for name in ("left", "bottom"):
            item.getAxis(name).setTextPen(text)
            item.getAxis(name).setPen(text)
        fit_layout.addWidget(self.plot, 1)
        self.fit_label = QLabel(fit_pane)
        self.fit_label.setObjectName("fit_label")
        self.fit_label.setWordWrap(True)
        self.fit_label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        fit_layout.addWidget(self.fit_label)
        self.use_fit_button = QPushButton("Use the fitted Is, n, Rs", fit_pane)
        self.use_fit_button.clicked.connect(self._use_fit)
        fit_layout.addWidget(self.use_fit_button)

        splitter = QSplitter(Qt.Orientation.Horizontal, self)
        splitter.addWidget(scroll)
        splitter.addWidget(fit_pane)
        splitter.setStretchFactor(0, 3)
        splitter.setStretchFactor(1, 2)

        self.problems_label = QLabel(self)
        self.problems_label.setWordWrap(True)
        self.problems_label.setStyleSheet(f"color: {ERROR_COLOR.name()};")
        self.buttons = QDialogButtonBox(
            QDialogButtonBox.StandardButton.Ok | QDialogButtonBox.StandardButton.Cancel, self)
        self.buttons.accepted.connect(self.accept)
        self.buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addWidget(splitter, 1)
        layout.addWidget(self.problems_label)
        layout.addWidget(self.buttons)
        from partpick.gui.widgets import resize_within_screen

        resize_within_screen(self, 1180, 760)

        self._preview = None
        self.model.field_changed.connect(self._update_field)
        self.model.validity_changed.connect(self._update_validity)
        self.model.fit_changed.connect(self._update_fit)
        for name in self.editors:
            self._update_field(name)
        self._update_field("vf_points")
        self._update_validity()
        self._update_fit()

    @property
    def ok_button(self) -> QPushButton:
        return self.buttons.button(QDialogButtonBox.StandardButton.Ok)

    def _make_editor(self, spec, parent):
        if spec.type == "choice":
            combo = QComboBox(parent)
            combo.setObjectName(f"field_{spec.name}")
            combo.setToolTip(spec.help)
            if spec.name != "kind":
                combo.addItem("(not known)", "")
            for choice in spec.choices:
                combo.addItem(KIND_WORDS.get(choice, choice.replace("_", " ")), choice)
            combo.activated.connect(lambda _i, n=spec.name, c=combo: self.model.set_text(n, c.currentData() or ""))
            self.editors[spec.name] = combo
            return combo
        tip = f"{spec.help}\nAllowed: {spec.range_text()}."
        if spec.type == "float":
            tip += " Engineering notation: 4.7k, 10 mA, 1e-14."
        edit = FieldEdit("", tip, parent)
        edit.setObjectName(f"field_{spec.name}")
        edit.set_text(self.model.texts[spec.name])
        edit.edited.connect(lambda text, n=spec.name: self.model.set_text(n, text))
        self.editors[spec.name] = edit
        return edit

    # -- model → widgets ----------------------------------------------------
    def _update_field(self, name: str) -> None:
        if name == "vf_points":
            error = self.model.error("vf_points")
            self.points_error.setText(error)
            self.points_error.setVisible(bool(error))
            return
        widget = self.editors.get(name)
        if widget is None:
            return
        error = self.model.error(name)
        if isinstance(widget, QComboBox):
            index = widget.findData(self.model.texts[name])
            widget.setCurrentIndex(max(index, 0))
            widget.setStyleSheet(f"QComboBox {{ border: 2px solid {ERROR_COLOR.name()}; }}" if error else "")
            widget.setToolTip(error or "")
            return
        widget.set_text(self.model.texts[name])
        widget.set_error(error)

    def _update_validity(self) -> None:
        valid = self.model.is_valid()
        self.ok_button.setEnabled(valid)
        general = self.model.general_problems
        self.problems_label.setText("\n".join(general))
        self.problems_label.setVisible(bool(general))

    def _update_fit(self) -> None:
        preview = self.model.fit_preview()
        self._preview = preview
        item = self.plot.getPlotItem()
        item.clear()
        if preview.points:
            current = np.array([p[0] for p in preview.points])
            voltage = np.array([p[1] for p in preview.points])
            item.plot(voltage, current, pen=None, symbol="s", symbolSize=8, symbolBrush=None,
                      symbolPen=pg.mkPen((35, 139, 69), width=2), name="datasheet points")
        if preview.fit is not None:
            grid_i, grid_v = preview.curve
            item.plot(grid_v, grid_i, pen=pg.mkPen((33, 113, 181), width=2), name="fitted model, 25 °C")
            fit = preview.fit
            residuals = ", ".join(f"{r:+.2f}" for r in preview.residuals_mV).replace("-", "−")
            self.fit_label.setText(
                f"Is = {fit.saturation_current:.4g} A · n = {fit.ideality:.4g} · Rs = {fit.series_resistance:.4g} Ω"
                f"\nResiduals [mV]: {residuals} (worst {1e3 * fit.residual_max_V:.2f} mV)"
                + (f"\n{fit.note}" if fit.note else ""))
        elif preview.refused is not None:  # refused: the best the model could do, dashed, and why
            grid_i, grid_v = preview.curve
            item.plot(grid_v, grid_i, pen=pg.mkPen((203, 24, 29), width=2, style=Qt.PenStyle.DashLine),
                      name="best model found (refused)")
            best = preview.refused
            residuals = ", ".join(f"{r:+.2f}" for r in preview.residuals_mV).replace("-", "−")
            self.fit_label.setText(
                f"{preview.error}\nBest found: Is = {best.saturation_current:.4g} A · n = {best.ideality:.4g} · "
                f"Rs = {best.series_resistance:.4g} Ω\nResiduals [mV]: {residuals}")
        else:
            self.fit_label.setText(preview.error)
        self.use_fit_button.setEnabled(preview.fit is not None)

    def _use_fit(self) -> None:
        if self._preview is not None and self._preview.fit is not None:
            self.model.use_fit(self._preview)

    # -- result -------------------------------------------------------------
    def part(self) -> dict:
        return self.model.part()

    def accept(self) -> None:
        if self.model.is_valid():
            super().accept()
