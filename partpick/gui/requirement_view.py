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
from partpick.gui.models import OBJECTIVES, REQUIREMENT_FIELDS, ROLE_CAUTIONS, ROLE_GROUPS, ROLES, RequirementModel
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
# An example per field, of the size that field usually holds (not one per unit: "Max leakage: e.g.
# 500 mA" would mislead).
PLACEHOLDERS = {
    "name": "e.g. 24 V input protection", "supply_min_V": "e.g. 10.8 V", "supply_max_V": "e.g. 13.2 V",
    "load_min_A": "e.g. 10 mA", "load_max_A": "e.g. 1.5 A", "ambient_min_C": "e.g. −40 °C",
    "ambient_max_C": "e.g. 85 °C", "reverse_margin_pct": "policy's (e.g. 25 %)",
    "tj_margin_K": "policy's (e.g. 25 K)",
    "current_limit_pct": "policy's (e.g. 70 %)", "power_limit_pct": "policy's (e.g. 60 %)",
    "resistor_power_limit_pct": "policy's (e.g. 50 %)",
    "reverse_V": "supply max (e.g. 30 V)", "reverse_transient_V": "e.g. 60 V", "max_forward_drop_V": "e.g. 600 mV",
    "min_output_V": "e.g. 11 V", "max_leakage_A": "e.g. 100 µA", "rth_ja_K_per_W": "part's (e.g. 120 K/W)",
    "inrush_capacitance_F": "e.g. 470 µF", "inrush_source_ohm": "e.g. 0.5 Ω", "max_price": "e.g. 0.25",
    "target_V": "e.g. 5.1 V", "max_regulation_error_pct": "e.g. 5 %", "min_zener_current_A": "part's Izk (e.g. 1 mA)",
    "resistor_tolerance_pct": "series' (e.g. 5 %)", "resistor_ohm": "sized (e.g. 470 Ω)",
}


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
            for caution in ROLE_CAUTIONS.get(group, ()):  # a role's own caution heads its group (e.g. mains)
                # the first sentence on the form (a wrapped form row does not grow), the whole on hover
                note = QLabel(caution.split(": ")[0].rstrip(".") + " — hover for the caution.", box)
                note.setToolTip(caution)
                note.setWordWrap(True)
                note.setMinimumHeight(2 * note.fontMetrics().lineSpacing() + 4)
                note.setObjectName(f"caution_{group}")
                note.setStyleSheet(f"color: {ERROR_COLOR.name()};")
                form.addRow(note)
            for spec in (f for f in REQUIREMENT_FIELDS if f.group == group):
                widget = self._make_editor(spec, box)
                self.editors[spec.key] = widget
                form.addRow(spec.form_label, widget)
                self.rows[spec.key] = (form, widget)
            outer.addWidget(box)
        outer.addStretch(1)
        self.setWidget(body)
        model.field_changed.connect(self._update_field)
        model.loaded.connect(self._update_all)
        model.role_changed.connect(self._update_role)
        # The mount shows its own keys (board: copper area; heatsink: interface and heatsink).
        model.field_changed.connect(lambda key: self._update_role(model.role) if key == "thermal.mount" else None)
        model.errors_changed.connect(self._update_form_error)
        model.choices_changed.connect(self._update_choices)
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
            combo.activated.connect(lambda _i, k=spec.key, c=combo: self.model.edit_text(k, c.currentData() or ""))
            return combo
        if spec.kind == "list":
            from partpick.gui.widgets import ChoiceList

            chooser = ChoiceList(spec.help, parent)
            chooser.setObjectName(f"field_{spec.key}")
            chooser.edited.connect(lambda text, k=spec.key: self.model.edit_text(k, text))
            return chooser
        edit = FieldEdit(PLACEHOLDERS.get(spec.key, ""), tip, parent)
        edit.setObjectName(f"field_{spec.key}")
        edit.edited.connect(lambda text, k=spec.key: self.model.edit_text(k, text))
        return edit

    def editor(self, key: str):
        """The widget of a field (tests type into ``editor(key).edit``)."""
        return self.editors[key]

    # -- model → widgets ----------------------------------------------------
    def _update_choices(self) -> None:
        for key, widget in self.editors.items():
            if hasattr(widget, "set_choices"):
                widget.set_choices(self.model.list_choices(key))
                widget.set_text(self.model.text(key))

    def _update_all(self) -> None:
        self._update_choices()
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

        # No horizontal scrolling: the panel is never narrower than its widest row — of the rows this
        # role shows (the hidden groups of other roles must not widen it, as they did at 1366 px).
        body = self.widget()
        if body is not None:
            body.adjustSize()
            self.setMinimumWidth(body.minimumSizeHint().width() + self.verticalScrollBar().sizeHint().width() + 4)

    def _update_form_error(self) -> None:
        text = self.model.form_error if self.model.form_error and not self.model.form_error_key else ""
        self.form_error.setText(text)
        self.form_error.setVisible(bool(text))
