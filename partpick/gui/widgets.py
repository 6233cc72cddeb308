"""Small widgets shared by the views: a field with its error shown beneath it, number formatting."""

from __future__ import annotations

import math

from PySide6.QtCore import Signal
from PySide6.QtGui import QColor, QPalette
from PySide6.QtWidgets import QLabel, QLineEdit, QVBoxLayout, QWidget

__all__ = ["FieldEdit", "format_value", "ERROR_COLOR", "PASS_COLOR", "FAIL_COLOR", "humanise"]

# Colours chosen to read on light and dark palettes alike (mid-saturation, used
# as text on the window background or as translucent cell backgrounds).
ERROR_COLOR = QColor(214, 48, 49)
PASS_COLOR = QColor(46, 160, 67, 70)
FAIL_COLOR = QColor(214, 48, 49, 70)
CHANGED_COLOR = QColor(230, 160, 30, 80)


def format_value(value, unit: str = "", digits: int = 3) -> str:
    """A result number as the report shows it (engineering notation, the report layer's formatter)."""
    from partpick.units import format_engineering

    if value is None:
        return "—"
    if isinstance(value, float) and not math.isfinite(value):
        raise ValueError(f"{value!r} is not a finite number")  # never shown as a result
    if unit in ("°C", "%", "K", "K/W", "%/K", "mV/V", "mV/mA", ""):
        text = f"{value:.{digits}g}"
        return f"{text} {unit}".strip().replace("-", "−")
    return format_engineering(value, unit, digits)


def humanise(name: str) -> str:
    """A check's snake_case name as a column heading: ``forward_drop`` → ``Forward drop``."""
    text = name.replace("_", " ")
    return text[:1].upper() + text[1:]


class FieldEdit(QWidget):
    """A line edit with its error message directly beneath it.

    ``edited(text)`` is emitted on every user edit (the model parses at once and
    marks the field; the recheck waits for the debounce).
    """

    edited = Signal(str)

    def __init__(self, placeholder: str = "", tooltip: str = "", parent=None) -> None:
        super().__init__(parent)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(1)
        self.edit = QLineEdit(self)
        self.edit.setPlaceholderText(placeholder)
        self.edit.setToolTip(tooltip)
        self.edit.setClearButtonEnabled(False)
        self.edit.setMinimumWidth(80)
        self.error_label = QLabel(self)
        self.error_label.setWordWrap(True)
        palette = self.error_label.palette()
        palette.setColor(QPalette.ColorRole.WindowText, ERROR_COLOR)
        self.error_label.setPalette(palette)
        font = self.error_label.font()
        font.setPointSizeF(max(7.0, font.pointSizeF() * 0.9))
        self.error_label.setFont(font)
        self.error_label.hide()
        layout.addWidget(self.edit)
        layout.addWidget(self.error_label)
        self._tooltip = tooltip
        self._error = ""
        self.edit.textEdited.connect(self.edited)

    def text(self) -> str:
        return self.edit.text()

    def set_text(self, text: str) -> None:
        if self.edit.text() != text:
            self.edit.setText(text)

    def set_error(self, error: str) -> None:
        """Mark the field (red frame, message beneath, reason in the tooltip) or clear the mark."""
        if error == self._error:
            return
        self._error = error
        self.edit.setProperty("invalid", bool(error))
        self.edit.setStyleSheet(f"QLineEdit {{ border: 2px solid {ERROR_COLOR.name()}; }}" if error else "")
        self.error_label.setText(error)
        self.error_label.setVisible(bool(error))
        self.edit.setToolTip(f"{error}\n\n{self._tooltip}" if error else self._tooltip)

    @property
    def error(self) -> str:
        return self._error


class ChoiceList(QWidget):
    """A list filter picked from the values the library holds: a button with a checkable menu.

    The text it edits is the requirement's list as comma-separated words (``"schottky, rectifier"``);
    nothing is typed, so nothing can be misspelt. ``edited(text)`` on every tick.
    """

    edited = Signal(str)

    def __init__(self, tooltip: str = "", parent=None) -> None:
        from PySide6.QtWidgets import QHBoxLayout, QMenu, QSizePolicy, QToolButton

        super().__init__(parent)
        layout = QHBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        self.button = QToolButton(self)
        self.button.setPopupMode(QToolButton.ToolButtonPopupMode.InstantPopup)
        self.button.setSizePolicy(QSizePolicy.Policy.Expanding, QSizePolicy.Policy.Fixed)
        self.button.setToolTip(tooltip)
        self.menu = QMenu(self.button)
        self.button.setMenu(self.menu)
        layout.addWidget(self.button)
        self._tooltip = tooltip
        self._choices: tuple = ()
        self._chosen: list[str] = []
        self._error = ""
        self._rebuild()

    def set_choices(self, choices) -> None:
        choices = tuple(choices)
        if choices != self._choices:
            self._choices = choices
            self._rebuild()

    def choices(self) -> tuple:
        return self._choices

    def _rebuild(self) -> None:
        self.menu.clear()
        if not self._choices:
            none = self.menu.addAction("(the library holds no values for this)")
            none.setEnabled(False)
        for value in self._choices:
            action = self.menu.addAction(value.replace("_", " "))
            action.setCheckable(True)
            action.setChecked(value in self._chosen)
            action.setData(value)
            action.toggled.connect(lambda checked, v=value: self._toggled(v, checked))
        self.menu.addSeparator()
        clear = self.menu.addAction("Any (no filter)")
        clear.triggered.connect(lambda: self._set_chosen([], emit=True))
        self._show()

    def _toggled(self, value: str, checked: bool) -> None:
        chosen = [v for v in self._chosen if v != value] + ([value] if checked else [])
        self._set_chosen(chosen, emit=True)

    def _set_chosen(self, chosen: list[str], *, emit: bool) -> None:
        if chosen == self._chosen:
            return
        self._chosen = list(chosen)
        for action in self.menu.actions():
            if action.isCheckable():
                action.blockSignals(True)
                action.setChecked(action.data() in self._chosen)
                action.blockSignals(False)
        self._show()
        if emit:
            self.edited.emit(self.text())

    def choose(self, values) -> None:
        """Tick exactly these values, as a user's clicks would (tests, and the model's text)."""
        self._set_chosen([v for v in values], emit=True)

    def _show(self) -> None:
        self.button.setText(", ".join(v.replace("_", " ") for v in self._chosen) if self._chosen else "Any")

    def text(self) -> str:
        return ", ".join(self._chosen)

    def set_text(self, text: str) -> None:
        words = [w.strip() for w in text.split(",") if w.strip()]
        self._set_chosen(words, emit=False)

    def set_error(self, error: str) -> None:
        if error == self._error:
            return
        self._error = error
        self.button.setStyleSheet(f"QToolButton {{ border: 2px solid {ERROR_COLOR.name()}; }}" if error else "")
        self.button.setToolTip(f"{error}\n\n{self._tooltip}" if error else self._tooltip)

    @property
    def error(self) -> str:
        return self._error


def resize_within_screen(widget: QWidget, width: int, height: int) -> None:
    """Resize to ``width`` × ``height``, but never beyond the screen's available area (a 1366 × 768
    laptop keeps its task bar; the dialog's own layout scrolls)."""
    from PySide6.QtGui import QGuiApplication

    screen = widget.screen() or QGuiApplication.primaryScreen()
    if screen is not None:
        area = screen.availableGeometry()
        width, height = min(width, area.width() - 24), min(height, area.height() - 56)
    widget.resize(width, height)
