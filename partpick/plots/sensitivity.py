"""The "What sets the worst case" bar chart: one horizontal bar per input, signed.

Draws a candidate's JSON ``sensitivity`` list (`partpick.checks.sensitivity`)
into a PlotItem — the window's panel and the report image use this same
function. A bar to the right means the input's step raises the smallest
margin; to the left, it eats into it.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg

__all__ = ["draw_sensitivity", "bar_labels"]

_RAISES = (35, 139, 69)
_LOWERS = (215, 48, 39)


def _plain_bottom_axis(axis) -> None:
    """No SI scaling on the margin axis: "% points" takes no prefix, and pyqtgraph would otherwise
    scale a unitless range below 1 by 1000 (its default enable ranges) and keep that scale."""
    axis.setSIPrefixEnableRanges(((np.inf, np.inf),))
    axis.enableAutoSIPrefix(False)
    axis.autoSIPrefixScale = 1.0
    axis.labelUnitPrefix = ""
    axis.picture = None
    axis.update()


def bar_labels(entries: list[dict]) -> list[str]:
    """The axis words of each bar: the input and its step (``ambient_max_C +1 K``)."""
    return [f"{e['input']} {e['step']}" for e in entries]


def draw_sensitivity(plot_item: pg.PlotItem, entries: list[dict] | None, *, title: str | None = None) -> list:
    """Draw the signed margin changes of ``entries`` (largest first, at the top); return the items added.

    ``entries`` None or empty draws a note instead ("not computed" / "no input moves the margin").
    """
    plot_item.clear()
    plot_item.setTitle(title or "What sets the worst case")
    _plain_bottom_axis(plot_item.getAxis("bottom"))
    items: list = []
    left = plot_item.getAxis("left")
    if not entries:
        text = pg.TextItem("no sensitivity: not computed, or the smallest margin is not known"
                           if entries is None else "no input moves the smallest margin", anchor=(0.5, 0.5),
                           color=(120, 120, 120))
        plot_item.addItem(text)
        text.setPos(0.0, 0.0)
        left.setTicks([[]])
        return [text]
    count = len(entries)
    values = [float(e["margin_change_pct"]) for e in entries]
    ys = [count - 1 - k for k in range(count)]  # the largest on top
    brushes = [pg.mkBrush(*(_RAISES if v >= 0 else _LOWERS)) for v in values]
    bars = pg.BarGraphItem(x0=[min(v, 0.0) for v in values], y=ys, height=0.6, width=[abs(v) for v in values],
                           brushes=brushes, pens=[pg.mkPen(None)] * count)
    plot_item.addItem(bars)
    items.append(bars)
    zero = pg.InfiniteLine(pos=0.0, angle=90, pen=pg.mkPen((120, 120, 120), width=1))
    plot_item.addItem(zero)
    items.append(zero)
    labels = bar_labels(entries)
    left.setTicks([[(y, label) for y, label in zip(ys, labels)]])
    left.setStyle(tickTextWidth=max(len(t) for t in labels) * 7, autoExpandTextSpace=True)
    left.setWidth(max(len(t) for t in labels) * 7 + 16)  # room for the input names
    plot_item.getAxis("bottom").setLabel("margin change [% points]")
    span = max(abs(v) for v in values) or 1.0
    plot_item.setXRange(-1.1 * span if min(values) < 0 else -0.05 * span,
                        1.1 * span if max(values) > 0 else 0.05 * span, padding=0)
    plot_item.setYRange(-0.6, count - 0.4, padding=0)
    plot_item.setMouseEnabled(x=False, y=False)
    return items
