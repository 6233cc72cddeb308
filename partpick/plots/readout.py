"""A read-out of the values under the mouse, in engineering notation with units."""

from __future__ import annotations

import math
from collections.abc import Callable

import pyqtgraph as pg

from partpick.units import format_engineering

__all__ = ["CursorReadout", "readout_text"]


def readout_text(x_view: float, y_view: float, *, x_axis: dict, y_axis: dict,
                 log_x: bool = False, log_y: bool = False) -> str:
    """The text for a point in view coordinates: 'Forward voltage VF 512 mV · Forward current IF 1.00 A'.

    On a log axis the view coordinate is the decimal exponent and is turned back into the value.
    """
    def value(v, log):
        if log:
            return 10.0 ** v if math.isfinite(v) and abs(v) < 300 else math.nan
        return v

    parts = []
    for axis, v, log in ((x_axis, x_view, log_x), (y_axis, y_view, log_y)):
        val = value(v, log)
        shown = format_engineering(val, axis["unit"], 4) if math.isfinite(val) else "—"
        parts.append(f"{axis['name']} {shown}")
    return " · ".join(parts)


class CursorReadout:
    """Follows the mouse over a PlotItem and shows the values under it.

    Parameters
    ----------
    plot_item : pyqtgraph.PlotItem
        The plot (already in a scene, i.e. inside a PlotWidget or layout).
    x_axis, y_axis : dict
        ``{"name", "unit"}`` of the section drawn (see `partpick.checks.curves`).
    callback : callable, optional
        Also called with the text (e.g. to show it in the status bar).

    Call `set_axes` when the plot switches section or log mode, `detach` to stop.
    """

    def __init__(self, plot_item: pg.PlotItem, x_axis: dict, y_axis: dict, *,
                 callback: Callable[[str], None] | None = None) -> None:
        self._plot = plot_item
        self._callback = callback
        self._label = pg.TextItem(anchor=(0, 0), color=(30, 30, 30), fill=pg.mkBrush(255, 255, 255, 200))
        self._label.setZValue(100)
        self._label.setVisible(False)
        plot_item.addItem(self._label, ignoreBounds=True)
        self.text = ""
        self.set_axes(x_axis, y_axis)
        # A direct connection: the text is cheap to make, and a parentless SignalProxy both kept
        # only a weak reference to this slot and crashed PySide6 6.12 at interpreter exit.
        self._scene = plot_item.scene()
        self._scene.sigMouseMoved.connect(self._moved)

    def set_axes(self, x_axis: dict, y_axis: dict) -> None:
        self._x_axis, self._y_axis = dict(x_axis), dict(y_axis)

    def show_at(self, x_view: float, y_view: float) -> str:
        """Show the read-out for a point in view coordinates and return its text."""
        log_x = bool(self._plot.ctrl.logXCheck.isChecked())
        log_y = bool(self._plot.ctrl.logYCheck.isChecked())
        self.text = readout_text(x_view, y_view, x_axis=self._x_axis, y_axis=self._y_axis, log_x=log_x, log_y=log_y)
        (x0, x1), (y0, y1) = self._plot.viewRange()
        self._label.setText(self.text)
        self._label.setPos(x0, y1)
        self._label.setVisible(True)
        if self._callback is not None:
            self._callback(self.text)
        return self.text

    def _moved(self, position) -> None:
        if not self._plot.sceneBoundingRect().contains(position):
            self._label.setVisible(False)
            return
        point = self._plot.vb.mapSceneToView(position)
        self.show_at(point.x(), point.y())

    def detach(self) -> None:
        """Stop following the mouse and remove the read-out label."""
        try:
            self._scene.sigMouseMoved.disconnect(self._moved)
        except (RuntimeError, TypeError):  # already disconnected, or the scene is gone
            pass
        self._plot.removeItem(self._label)
