"""Axes with base-unit labels and tick labels that stay right on logarithmic scales.

pyqtgraph's automatic SI prefix works on linear axes (the label becomes
"Forward current IF (mA)" and the ticks are scaled), but on a log axis it
reads the exponents as values and writes a wrong prefix ("kA" for µA data).
On log axes the prefix is therefore switched off, the label keeps the base
unit and every tick carries its own prefix: 1µ, 10µ, 100µ, 1m, … (A).
"""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg

__all__ = ["EngineeringAxis", "log_tick_text", "install_axes", "set_axis"]

_PREFIXES = {-18: "a", -15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}
# Units that read without SI prefixes (a temperature of "1.2 k°C" is nonsense).
_NO_PREFIX_UNITS = ("°C", "%", "K", "K/W")


def log_tick_text(value: float) -> str:
    """A tick value of a log axis (the value itself, not its exponent) as '1µ', '20m', '1', '1.5k'."""
    if not math.isfinite(value) or value <= 0:
        return ""
    exponent = int(math.floor(math.log10(value) / 3.0 + 1e-9) * 3)
    exponent = max(min(exponent, 12), -18)
    mantissa = value / 10.0**exponent
    text = f"{mantissa:.3g}"
    if float(text) >= 1000 and exponent < 12:
        exponent += 3
        text = f"{value / 10.0**exponent:.3g}"
    return f"{text}{_PREFIXES[exponent]}"


class EngineeringAxis(pg.AxisItem):
    """An AxisItem whose log-mode ticks carry SI prefixes of the base unit (see module notes)."""

    def logTickStrings(self, values, scale, spacing):  # noqa: N802 (pyqtgraph's name)
        return [log_tick_text(float(10.0 ** v) * scale) for v in np.asarray(values, dtype=float)]

    def updateAutoSIPrefix(self):  # noqa: N802 (pyqtgraph's name)
        """No prefix scale at all while the auto prefix is off.

        pyqtgraph's own version computes a scale from the current range even when the prefix is
        switched off (``enableAutoSIPrefix(False)`` calls it), and that scale then multiplies every
        tick: a log axis switched off while it showed mA data kept a ×1000 for good, so the next
        role's currents read 1 … 10k instead of 1m … 10.
        """
        if self.autoSIPrefix:
            super().updateAutoSIPrefix()
            return
        self.autoSIPrefixScale = 1.0
        self.labelUnitPrefix = ""
        self._updateLabel()


# Major and minor ticks only (pyqtgraph draws a third level by default): every tick level is also a
# level of grid lines across the whole plot, and painting the axis pictures was the largest share
# of a redraw — a third fewer lines per axis, the scale as readable.
MAX_TICK_LEVEL = 1


def install_axes(plot_item: pg.PlotItem) -> None:
    """Give ``plot_item`` `EngineeringAxis` axes (once; later calls keep them)."""
    replace = {}
    for name in ("left", "bottom"):
        axis = plot_item.getAxis(name)
        if not isinstance(axis, EngineeringAxis):
            replace[name] = EngineeringAxis(name, pen=axis.pen(), textPen=axis.textPen())
            replace[name].setStyle(maxTickLevel=MAX_TICK_LEVEL)
    if replace:
        plot_item.setAxisItems(replace)


def set_axis(plot_item: pg.PlotItem, name: str, title: str, unit: str, *, log: bool) -> None:
    """Label an axis with its base unit; on a log axis (or a unit without prefixes) no auto SI prefix."""
    axis = plot_item.getAxis(name)
    prefixable = not log and unit not in _NO_PREFIX_UNITS
    if axis.labelText == (title or "") and axis.labelUnits == (unit or "") and axis.autoSIPrefix == prefixable \
            and (prefixable or axis.autoSIPrefixScale == 1.0):
        return  # already so (a redraw): re-setting it would only rebuild the label's rich text
    axis.enableAutoSIPrefix(prefixable)
    axis.setLabel(title, units=unit or None)
