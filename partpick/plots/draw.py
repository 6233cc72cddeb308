"""Draw `partpick.checks.curves` sections into a pyqtgraph PlotItem.

One code path for the window and the reports: every function takes a
``PlotItem`` (the window's, or the one of an off-screen widget used for a
report image), adds items to it and returns them, so the caller can remove
exactly those with `clear_items` before the next redraw.
"""

from __future__ import annotations

import html

import numpy as np
import pyqtgraph as pg
from PySide6 import QtCore

from partpick.plots.axes import install_axes, set_axis

__all__ = ["DrawnItems", "draw_section", "redraw_section", "redraw", "draw_forward", "draw_breakdown", "draw_iv", "draw_zener_output",
           "draw_junction_temperature", "draw_power", "clear_items", "SECTION_NAMES", "legend_entries"]

SECTION_NAMES = ("forward", "breakdown", "zener_output", "junction_temperature", "power")

# Colours readable on light and dark backgrounds (mid lightness, distinct hues).
_COLD = (33, 113, 181)
_HOT = (215, 48, 39)
_GREY = (120, 120, 120)
_GREEN = (35, 139, 69)
_PURPLE = (128, 77, 173)
_ORANGE = (230, 126, 0)
_DASH = QtCore.Qt.PenStyle.DashLine
_DOT = QtCore.Qt.PenStyle.DotLine
_DASHDOT = QtCore.Qt.PenStyle.DashDotLine
_SOLID = QtCore.Qt.PenStyle.SolidLine


def _pen(colour, style=_SOLID, width=2.0):
    pen = pg.mkPen(color=colour, width=width)
    pen.setStyle(style)
    pen.setCosmetic(True)
    return pen


def _curve_pen(role: str):
    if role.startswith(("typical_", "maximum_")):
        colour = _COLD if role.endswith("_cold") else _HOT
        return _pen(colour, _SOLID if role.startswith("typical") else _DASH)
    if role.startswith("output_"):
        colour = _COLD if "_low_" in role else _HOT
        return _pen(colour, _SOLID if role.endswith("load_min") else _DASH)
    return {
        "tangent": _pen(_GREY, _DASHDOT),
        "load_line": _pen(_GREEN, _DOT, 2.5),
        "tj_forward": _pen(_HOT),
        "tj_reverse": _pen(_COLD),
        "derating": _pen(_PURPLE, _DASH),
        "rating": _pen(_ORANGE, _DASH),
        "power": _pen(_HOT),
    }.get(role, _pen(_GREY))


def _line_pen(role: str):
    return {"limit": _pen(_HOT, _DASH, 1.5), "rating": _pen(_ORANGE, _DASH, 1.5)}.get(role, _pen(_GREY, _DOT, 1.0))


# Where each plot's curves leave room for the legend: I–V curves rise to the
# right (top left is free), output and temperature curves rise and flatten
# (bottom right is free). Offsets as pyqtgraph reads them: negative = from the right/bottom.
_LEGEND_OFFSETS = {"top_left": (10, 10), "bottom_right": (-10, -10), "top_right": (-10, 10), "bottom_left": (10, -10)}


def _legend(plot_item: pg.PlotItem, corner: str) -> pg.LegendItem:
    offset = _LEGEND_OFFSETS[corner]
    if plot_item.legend is None:
        plot_item.addLegend(offset=offset, brush=pg.mkBrush(255, 255, 255, 210), labelTextColor=(20, 20, 20),
                            pen=pg.mkPen(150, 150, 150))
    else:
        plot_item.legend.setOffset(offset)
    return plot_item.legend


def _finite_for_log(x, y, log_x, log_y):
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    keep = np.ones(x.shape, dtype=bool)
    if log_x:
        keep &= ~(x <= 0)
    if log_y:
        keep &= ~(y <= 0)
    return x[keep], y[keep]


class DrawnItems(list):
    """The items a draw function added, in order, with what each shows.

    A plain list for `clear_items`; `redraw_section` also reads ``signature`` (what
    was drawn: kinds, roles, log modes) to update the items in place when only the
    numbers changed, which is much faster than removing and re-creating them.
    """

    def __init__(self, items=(), plan=(), signature=None, groups=()):
        super().__init__(items)
        self.plan = list(plan)
        self.signature = signature
        self.groups = list(groups)  # how many items each plan entry made


def _plan(section: dict, log_x: bool, log_y: bool) -> list[dict]:
    """What to draw, in drawing order, in view coordinates (log axes take log10 of line positions)."""
    plan: list[dict] = []
    band = section.get("band")
    if band is not None:
        xs = np.concatenate([c["x"] for c in section["curves"]]) if section["curves"] else np.array([0.0, 1.0])
        x_edges, _ = _finite_for_log(np.array([np.nanmin(xs), np.nanmax(xs)]), np.ones(2), log_x, False)
        if x_edges.size == 2 and (not log_y or band["low"] > 0):
            plan.append({"kind": "band", "role": "band", "label": band["label"], "x": x_edges,
                         "low": np.full(2, band["low"]), "high": np.full(2, band["high"])})
    for curve in section["curves"]:
        x, y = _finite_for_log(curve["x"], curve["y"], log_x, log_y)
        if x.size:
            plan.append({"kind": "curve", "role": curve.get("role", ""), "label": curve["label"], "x": x, "y": y})
    for points in section.get("points", []):
        x, y = _finite_for_log(points["x"], points["y"], log_x, log_y)
        if x.size:
            plan.append({"kind": "points", "role": points.get("role", ""), "label": points["label"], "x": x, "y": y})
    for kind, lines, log in (("hline", section.get("hlines", []), log_y), ("vline", section.get("vlines", []), log_x)):
        for line in lines:
            value = line["value"]
            if log and not value > 0:
                continue
            plan.append({"kind": kind, "role": line.get("role", ""), "label": line["label"],
                         "value": float(np.log10(value) if log else value)})
    return plan


def _line_label(text: str) -> str:
    return text.replace("{", "{{").replace("}", "}}")  # InfLineLabel formats its text with str.format


def _create(plot_item: pg.PlotItem, entry: dict) -> list:
    kind = entry["kind"]
    if kind == "band":
        pen = _pen(_GREEN, _DASH, 1.0)
        low = pg.PlotDataItem(entry["x"], entry["low"], pen=pen, name=html.escape(entry["label"]))
        high = pg.PlotDataItem(entry["x"], entry["high"], pen=pen)
        fill = pg.FillBetweenItem(low.curve, high.curve, brush=pg.mkBrush(*_GREEN, 45))
        return [fill, low, high]
    if kind == "curve":
        return [pg.PlotDataItem(entry["x"], entry["y"], pen=_curve_pen(entry["role"]),
                                name=html.escape(entry["label"]), connect="finite")]
    if kind == "points":
        datasheet = entry["role"] == "datasheet"
        return [pg.PlotDataItem(
            entry["x"], entry["y"], pen=None, name=html.escape(entry["label"]),
            symbol="s" if datasheet else "o", symbolSize=7 if datasheet else 8,
            symbolPen=pg.mkPen(_GREEN if datasheet else (20, 20, 20), width=1.5),
            symbolBrush=None if datasheet else pg.mkBrush(255, 210, 0, 230))]
    angle = 0 if kind == "hline" else 90
    return [pg.InfiniteLine(pos=entry["value"], angle=angle, pen=_line_pen(entry["role"]), movable=False,
                            label=_line_label(entry["label"]),
                            labelOpts={"position": 0.5 if angle == 90 else 0.08, "color": (60, 60, 60),
                                       "fill": pg.mkBrush(255, 255, 255, 170),
                                       "anchors": [(0, 1), (0, 1)] if angle == 0 else [(0.5, 0.5), (0.5, 0.5)]})]


def _update(plot_item: pg.PlotItem, entry: dict, old: dict, items: list) -> None:
    kind = entry["kind"]
    if kind == "band":
        _, low, high = items
        low.setData(entry["x"], entry["low"])
        high.setData(entry["x"], entry["high"])
        named = low
    elif kind in ("curve", "points"):
        items[0].setData(entry["x"], entry["y"])
        named = items[0]
    else:
        items[0].setValue(entry["value"])
        if entry["label"] != old["label"]:
            items[0].label.setFormat(_line_label(entry["label"]))
        return
    # A hidden legend (the window shows its own, outside the plots) is not kept up to date: every
    # label is rich text, rebuilt at each edit for nothing.
    if entry["label"] != old["label"] and plot_item.legend is not None and plot_item.legend.isVisible():
        label = plot_item.legend.getLabel(named)
        if label is not None:
            label.setText(html.escape(entry["label"]))


def _setup(plot_item, section, log_x, log_y, title, legend):
    install_axes(plot_item)
    plot_item.setLogMode(x=log_x, y=log_y)
    set_axis(plot_item, "bottom", section["x"]["name"], section["x"]["unit"], log=log_x)
    set_axis(plot_item, "left", section["y"]["name"], section["y"]["unit"], log=log_y)
    plot_item.showGrid(x=True, y=True, alpha=0.25)
    if title:
        # Titles and legend entries are rich text in pyqtgraph: user text (part numbers) is escaped.
        text = html.escape(section.get("title", ""))
        if text != plot_item.titleLabel.text or not plot_item.titleLabel.isVisible():
            plot_item.setTitle(text)
    _legend(plot_item, legend)


def _fit_view(plot_item: pg.PlotItem, section: dict, log_y: bool) -> None:
    """Fit the view to the data; a section with an allowed band is ranged to the band instead.

    The Zener output rises from 0 V before it regulates, so auto-ranging on the whole curve squashes
    the band (a few % of the target) into a line; the band with some room around it is what is read.
    """
    band = section.get("band")
    if band is None or log_y or not (band["high"] > band["low"]):
        plot_item.enableAutoRange()
        return
    pad = max(1.5 * (band["high"] - band["low"]), 0.02 * abs(band["high"]))
    plot_item.enableAutoRange(axis="x")
    plot_item.disableAutoRange(axis="y")
    plot_item.setYRange(max(band["low"] - pad, 0.0) if band["low"] >= 0 else band["low"] - pad,
                        band["high"] + pad, padding=0)


def draw_section(plot_item: pg.PlotItem, section: dict | None, *, log_x: bool = False, log_y: bool = False,
                 title: bool = True, legend: str = "top_left", auto_range: bool = True) -> DrawnItems:
    """Draw one curve section (see `partpick.checks.curves`) and return the items added.

    Parameters
    ----------
    plot_item : pyqtgraph.PlotItem
        Where to draw. Its axes are replaced once by `EngineeringAxis` so that
        log-axis ticks read right; a legend is added if it has none.
    section : dict or None
        A section of `curves_for`'s result; None draws nothing and returns [].
    log_x, log_y : bool
        Logarithmic axes. Non-positive values are left out on a log axis.
    title : bool
        Set the plot title from the section.
    legend : str
        The legend's corner: ``"top_left"``, ``"top_right"`` or ``"bottom_right"``.
    auto_range : bool
        Fit the view to the data (False for a plot whose axes follow another plot's, which
        would only be fitted and then moved to the other plot's range).

    Returns
    -------
    DrawnItems
        The graphics items added (curves, points, lines, band), for `clear_items`
        or `redraw_section`.
    """
    if section is None:
        return DrawnItems()
    _setup(plot_item, section, log_x, log_y, title, legend)
    plan = _plan(section, log_x, log_y)
    items: list = []
    groups = []
    for entry in plan:
        created = _create(plot_item, entry)
        for item in created:
            plot_item.addItem(item)
        items.extend(created)
        groups.append(len(created))
    if auto_range:
        _fit_view(plot_item, section, log_y)
    signature = (log_x, log_y, title, legend, tuple((e["kind"], e["role"]) for e in plan))
    return DrawnItems(items, plan, signature, groups)


def redraw_section(plot_item: pg.PlotItem, section: dict | None, previous: list | None, *, log_x: bool = False,
                   log_y: bool = False, title: bool = True, legend: str = "top_left",
                   auto_range: bool = True) -> DrawnItems:
    """Show ``section`` in place of ``previous`` (what an earlier draw returned), as fast as possible.

    When the same kinds of curves, points and lines are drawn again (an edited
    requirement: new numbers, same plot), the existing items get the new data;
    otherwise the previous items are removed and the section is drawn anew.
    """
    if section is not None and isinstance(previous, DrawnItems) and previous.signature is not None \
            and all(item.scene() is plot_item.scene() for item in previous):
        plan = _plan(section, log_x, log_y)
        signature = (log_x, log_y, title, legend, tuple((e["kind"], e["role"]) for e in plan))
        if signature == previous.signature:
            _setup(plot_item, section, log_x, log_y, title, legend)
            start = 0
            for entry, old, count in zip(plan, previous.plan, previous.groups):
                _update(plot_item, entry, old, previous[start:start + count])
                start += count
            previous.plan = plan
            if auto_range:
                _fit_view(plot_item, section, log_y)
            return previous
    if previous:
        clear_items(plot_item, previous)
    return draw_section(plot_item, section, log_x=log_x, log_y=log_y, title=title, legend=legend,
                        auto_range=auto_range)


_STYLE_GLYPHS = {_SOLID: "━━━", _DASH: "╺╸╺╸", _DOT: "┅┅┅", _DASHDOT: "━·━"}


def legend_entries(items: list) -> list[tuple[str, str, str]]:
    """What a legend shows for drawn items: ``(glyph, colour "#rrggbb", label)`` per named entry.

    The window lays these out beside the plots (outside the plot area, so a legend never hides a
    curve); the glyph imitates the line style or the marker.
    """
    if not isinstance(items, DrawnItems):
        return []
    out = []
    start = 0
    for entry, count in zip(items.plan, items.groups):
        group = items[start:start + count]
        start += count
        if entry["kind"] in ("hline", "vline"):
            continue  # lines carry their own label on the plot
        if entry["kind"] == "band":
            out.append(("▮", "#%02x%02x%02x" % _GREEN, entry["label"]))
            continue
        item = group[0]
        if entry["kind"] == "points":
            pen = pg.mkPen(item.opts.get("symbolPen"))
            glyph = "■" if item.opts.get("symbol") == "s" else "●"
            brush = item.opts.get("symbolBrush")
            colour = pg.mkBrush(brush).color() if brush is not None else pen.color()
            out.append((glyph, colour.name(), entry["label"]))
            continue
        pen = pg.mkPen(item.opts.get("pen"))
        out.append((_STYLE_GLYPHS.get(pen.style(), "━━━"), pen.color().name(), entry["label"]))
    return out


def clear_items(plot_item: pg.PlotItem, items: list) -> None:
    """Remove exactly the items a draw function added (their legend entries go with them)."""
    for item in items:
        if plot_item.legend is not None:
            plot_item.legend.removeItem(item)
        plot_item.removeItem(item)
    items.clear()
    if isinstance(items, DrawnItems):
        items.plan, items.signature, items.groups = [], None, []


def draw_forward(plot_item, curves: dict, *, log_current: bool = False) -> list:
    """Forward I–V (series role) on a linear or logarithmic current axis."""
    return draw_section(plot_item, curves.get("forward"), log_y=log_current)


def draw_breakdown(plot_item, curves: dict, *, log_current: bool = False) -> list:
    """Zener I–V (Iz against Vz) with corner points and the resistor's load lines."""
    return draw_section(plot_item, curves.get("breakdown"), log_y=log_current, legend="bottom_right")


def draw_iv(plot_item, curves: dict, *, log_current: bool = False) -> list:
    """The role's I–V plot: forward for a series diode, breakdown for a Zener shunt."""
    if curves.get("role") == "zener_shunt":
        return draw_breakdown(plot_item, curves, log_current=log_current)
    return draw_forward(plot_item, curves, log_current=log_current)


def draw_zener_output(plot_item, curves: dict) -> list:
    """Output against supply with the allowed band shaded (Zener shunt)."""
    return draw_section(plot_item, curves.get("zener_output"), legend="bottom_right")


def draw_junction_temperature(plot_item, curves: dict) -> list:
    """Tj against ambient with the Tj limit and the derating line."""
    return draw_section(plot_item, curves.get("junction_temperature"), legend="bottom_right")


def draw_power(plot_item, curves: dict) -> list:
    """Dissipation against ambient with the allowed power."""
    return draw_section(plot_item, curves.get("power"), legend="top_right")


# The section and the drawing options of each plot, for `redraw`.
_PLOTS = {
    "forward": ("forward", {}),
    "breakdown": ("breakdown", {"legend": "bottom_right"}),
    "zener_output": ("zener_output", {"legend": "bottom_right"}),
    "junction_temperature": ("junction_temperature", {"legend": "bottom_right"}),
    "power": ("power", {"legend": "top_right"}),
}


def redraw(plot_item, plot: str, curves: dict, previous: list | None = None, *, log_current: bool = False,
           auto_range: bool = True, **section_options) -> DrawnItems:
    """Redraw one of the plots (``"forward"``, ``"breakdown"``, ``"iv"`` — the role's I–V —,
    ``"zener_output"``, ``"junction_temperature"``, ``"power"``) from new curve data, updating
    ``previous`` in place where it can (see `redraw_section`; ``auto_range=False`` for a plot
    whose axes are linked to another's); a role's own section (`Role.curve_plots`) is drawn with
    its ``section_options`` (``legend``, ``log_y``)."""
    if plot == "iv":
        plot = "breakdown" if curves.get("role") == "zener_shunt" else "forward"
    key, options = _PLOTS.get(plot, (plot, {}))
    # The drawing options a role gives with its plot (`Role.curve_plots`: legend, log_x, log_y).
    options = dict(options, **section_options)
    if key in ("forward", "breakdown"):
        options = dict(options, log_y=log_current)
    options = dict(options, **section_options)  # a role's own plot options (`Role.curve_plots`)
    return redraw_section(plot_item, curves.get(key), previous, auto_range=auto_range, **options)
