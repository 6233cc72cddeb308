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
