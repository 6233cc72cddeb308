"""The requirement form: a thin view of `RequirementModel`."""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QComboBox,
    QFormLayout,
    QGroupBox,
    QLabel,
    QScrollArea,
    QVBoxLayout,
    QWidget,
)

from partpick.gui.thermal_fields import THERMAL_GROUP
from partpick.gui.models import OBJECTIVES, REQUIREMENT_FIELDS, ROLE_GROUPS, ROLES, RequirementModel
from partpick.gui.widgets import ERROR_COLOR, FieldEdit

__all__ = ["RequirementView"]

_GROUPS = (
    ("Circuit", "Circuit"),
    ("Margins", "Derating policy and margins"),
    ("Limits", "Limits"),
    THERMAL_GROUP,
    ("Zener", "Zener shunt regulator"),
    *ROLE_GROUPS.items(),  # each role's own table (group = the role's name)
    ("Filters", "Candidate filters"),
)
_PLACEHOLDER = {"V": "e.g. 12 V", "A": "e.g. 500 mA", "°C": "e.g. −20", "%": "e.g. 20", "K": "e.g. 25",
                "K/W": "e.g. 80", "F": "e.g. 100 µF", "Ω": "e.g. 4.7k"}


class RequirementView(QScrollArea):
    """Every requirement field, grouped; widgets send text to the model, the model redraws them."""

    def __init__(self, model: RequirementModel, parent=None) -> None:
        super().__init__(parent)
        self.model = model
        self.setWidgetResizable(True)
        self.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.setObjectName("requirement_view")
        body = QWidget(self)
        outer = QVBoxLayout(body)
        outer.setContentsMargins(6, 6, 6, 6)
        self.form_error = QLabel(body)
        self.form_error.setWordWrap(True)
        self.form_error.setStyleSheet(f"color: {ERROR_COLOR.name()};")
        self.form_error.hide()
        outer.addWidget(self.form_error)
        self.editors: dict[str, object] = {}
        self.rows: dict[str, tuple[QFormLayout, QWidget]] = {}
        self.groups: dict[str, QGroupBox] = {}
        for group, title in _GROUPS:
            box = QGroupBox(title, body)
            form = QFormLayout(box)
            form.setFieldGrowthPolicy(QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
            self.groups[group] = box
            for spec in (f for f in REQUIREMENT_FIELDS if f.group == group):
                widget = self._make_editor(spec, box)
                self.editors[spec.key] = widget
                label = spec.label + (f" [{spec.unit}]" if spec.unit else "")
                form.addRow(label, widget)
                self.rows[spec.key] = (form, widget)
            outer.addWidget(box)
        outer.addStretch(1)
        self.setWidget(body)
        # No horizontal scrolling: the panel is never narrower than its widest row.
        self.setMinimumWidth(body.minimumSizeHint().width() + self.verticalScrollBar().sizeHint().width() + 4)
        model.field_changed.connect(self._update_field)
        model.loaded.connect(self._update_all)
        model.role_changed.connect(self._update_role)
        # The mount shows its own keys (board: copper area; heatsink: interface and heatsink).
        model.field_changed.connect(lambda key: self._update_role(model.role) if key == "thermal.mount" else None)
        model.errors_changed.connect(self._update_form_error)
        self._update_all()

    # -- building -----------------------------------------------------------
    def _make_editor(self, spec, parent):
        tip = spec.help + (" Engineering notation: 4.7k, 10 mA, 1e-3." if spec.kind == "float" else "")
        if spec.kind == "choice":
            combo = QComboBox(parent)
            combo.setSizeAdjustPolicy(QComboBox.SizeAdjustPolicy.AdjustToMinimumContentsLengthWithIcon)
            combo.setMinimumContentsLength(10)
            combo.setToolTip(spec.help)
            combo.setObjectName(f"field_{spec.key}")
            if spec.key == "role":
                for key, text in ROLES.items():
                    combo.addItem(text, key)
            elif spec.key == "objective":
                for key, text in OBJECTIVES.items():
                    combo.addItem(text, key)
            elif spec.key != "policy":
                combo.addItem("(default)", "")
                for choice in spec.choices:
                    combo.addItem(choice, choice)
            combo.activated.connect(lambda _i, k=spec.key, c=combo: self.model.set_text(k, c.currentData() or ""))
            return combo
        edit = FieldEdit(_PLACEHOLDER.get(spec.unit, ""), tip, parent)
        edit.setObjectName(f"field_{spec.key}")
        edit.edited.connect(lambda text, k=spec.key: self.model.set_text(k, text))
        return edit

    def editor(self, key: str):
        """The widget of a field (tests type into ``editor(key).edit``)."""
        return self.editors[key]

    # -- model → widgets ----------------------------------------------------
    def _update_all(self) -> None:
        self._update_policies()
        for key in self.editors:
            self._update_field(key)
        self._update_role(self.model.role)
        self._update_form_error()

    def _update_policies(self) -> None:
        combo = self.editors["policy"]
        names = self.model.policy_names
        if [combo.itemData(i) for i in range(combo.count())] != list(names):
            combo.blockSignals(True)
            combo.clear()
            for name in names:
                combo.addItem(name.replace("_", " "), name)
            combo.blockSignals(False)

    def _update_field(self, key: str) -> None:
        widget = self.editors[key]
        state = self.model.fields[key]
        if isinstance(widget, QComboBox):
            if key == "policy":
                self._update_policies()
            index = widget.findData(state.text.strip())
            if index < 0 and state.text.strip():
                widget.addItem(state.text.strip(), state.text.strip())  # shown, and marked invalid
                index = widget.count() - 1
            widget.blockSignals(True)
            widget.setCurrentIndex(max(index, 0))
            widget.blockSignals(False)
            error = self.model.field_error(key)
            widget.setStyleSheet(f"QComboBox {{ border: 2px solid {ERROR_COLOR.name()}; }}" if error else "")
            widget.setToolTip(error or self.model.spec(key).help)
            return
        widget.set_text(state.text)
        widget.set_error(self.model.field_error(key))

    def _update_role(self, role: str) -> None:
        for key, (form, widget) in self.rows.items():
            form.setRowVisible(widget, self.model.applies(key))
        self.groups["Zener"].setVisible(role == "zener_shunt")
        for name in ROLE_GROUPS:
            self.groups[name].setVisible(role == name)

    def _update_form_error(self) -> None:
        text = self.model.form_error if self.model.form_error and not self.model.form_error_key else ""
        self.form_error.setText(text)
        self.form_error.setVisible(bool(text))
