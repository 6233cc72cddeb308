"""The curves of the selected shortlist parts, drawn by `partpick.plots` from `partpick.checks.curves`.

One plot per selected part (up to four side by side, axes linked so they
compare at a glance), one tab per kind of curve. Only the visible tab is
redrawn after a recheck; the others redraw when shown. The plot items are
kept and only their contents replaced, so a redraw costs the drawing alone.
"""

from __future__ import annotations

import pyqtgraph as pg
from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QPalette
from PySide6.QtWidgets import QGridLayout, QHBoxLayout, QLabel, QTabWidget, QToolButton, QVBoxLayout, QWidget

from partpick.gui.models import LibraryModel, ResultModel

__all__ = ["CurvesView", "CURVE_TABS", "MAX_PARTS"]

MAX_PARTS = 4
# tab key, title, rows of (partpick.plots plot name, options) — each row one plot per part.
CURVE_TABS = (
    ("iv", "I–V", (("iv", {"log_current": False}), ("iv", {"log_current": True}))),
    ("zener_output", "Output vs supply", (("zener_output", {}),)),
    ("junction_temperature", "Junction temperature", (("junction_temperature", {}),)),
    ("power", "Power", (("power", {}),)),
)


def _role_sections() -> dict[str, set[str]]:
    """Role → the sections its curves give (`Role.curve_plots`)."""
    from partpick.checks.roles import ROLES

    return {name: {section for section, _t, _o in role.curve_plots} for name, role in ROLES.items()}


def _role_tabs() -> tuple:
    """One more tab per section a role draws that the common tabs do not show (e.g. an AC cycle)."""
    from partpick.checks.roles import ROLES

    common = {"forward", "breakdown"} | {key for key, _t, _r in CURVE_TABS}
    tabs: dict[str, list] = {}  # title → rows; sections with one title share a tab, one plot row each
    seen = set()
    for role in ROLES.values():
        for section, title, options in role.curve_plots:
            if section not in common and section not in seen:
                seen.add(section)
                tabs.setdefault(title, []).append((section, dict(options)))
    return tuple((rows[0][0], title, tuple(rows)) for title, rows in tabs.items())


def _plots():
    """`partpick.plots`, imported at the first drawing (it loads the physics core, scipy included,
    which the window need not wait for before it is shown)."""
    from partpick import plots

    return plots
_SECTION_OF = {"zener_output": "zener_output", "junction_temperature": "junction_temperature", "power": "power"}


def _install_axes(plot_item) -> None:
    from partpick.plots.axes import install_axes

    install_axes(plot_item)


class _CurvePage(QWidget):
    """One tab: a grid of PlotWidgets, rows × parts, created once and only hidden when unused.

    (PlotItems are never removed from a scene: removing them hands ownership
    back to Python, and PySide6 6.12 then crashes at interpreter exit.)
    """

    def __init__(self, key: str, rows, readout, parent=None) -> None:
        super().__init__(parent)
        self.key = key
        self.rows = rows
        self._readout = readout
        self._grid = QGridLayout(self)
        self._grid.setContentsMargins(0, 0, 0, 0)
        self._grid.setSpacing(2)
        self.widgets: list[list[pg.PlotWidget]] = []  # [part][row]
        self.items: list[list[list]] = []
        self.readouts: list[list] = []
        self.shown = 0
        self.dirty = True
        # In the plots' place when nothing is drawn (SPEC §6: the curves say "no part selected").
        self.empty_label = QLabel("No part selected", self)
        self.empty_label.setObjectName(f"curves_empty_{key}")
        self.empty_label.setAlignment(Qt.AlignmentFlag.AlignCenter)
        self.empty_label.setWordWrap(True)
        self._grid.addWidget(self.empty_label, 0, 0, 1, 1)
        self.empty_label.hide()

    @property
    def cells(self) -> list[list[pg.PlotItem]]:
        """The PlotItems in use, [part][row]."""
        return [[w.getPlotItem() for w in column] for column in self.widgets[: self.shown]]

    def _ensure_columns(self, count: int) -> None:
        while len(self.widgets) < count:
            col = len(self.widgets)
            column = []
            for row in range(len(self.rows)):
                widget = pg.PlotWidget(self)
                widget.setBackground(self.palette().color(QPalette.ColorRole.Base))
                _install_axes(widget.getPlotItem())
                widget.setMinimumSize(200, 150)
                self._grid.addWidget(widget, row, col)
                column.append(widget)
            self.widgets.append(column)
            self.items.append([[] for _ in self.rows])
            self.readouts.append([None for _ in self.rows])
        for col, column in enumerate(self.widgets):
            for widget in column:
                widget.setVisible(col < count)
        self.shown = count

    def draw(self, curve_sets: list[dict], empty_text: str = "No part selected") -> int:
        """Draw each part's curves into its column; returns the number of plots with something on them."""
        self._ensure_columns(len(curve_sets))
        self.empty_label.setText(empty_text)
        self.empty_label.setVisible(not curve_sets)
        if not curve_sets and not self.widgets:
            self.dirty = False
            return 0
        plots = _plots()
        drawn = 0
        for col in range(len(self.widgets)):
            for row, (plot_name, options) in enumerate(self.rows):
                plot_item = self.widgets[col][row].getPlotItem()
                # No auto-range while items come and go: pyqtgraph would re-fit the view (and notify
                # every item) once per item; the draw function re-enables it once at the end.
                plot_item.vb.disableAutoRange()
                if col >= len(curve_sets):
                    plots.clear_items(plot_item, self.items[col][row])  # an unused (hidden) column
                    continue
                curves = curve_sets[col]
                # Same kinds of curves as last time (an edit): the plots layer updates them in place.
                # Only the first column fits its view to the data: the others follow its axes
                # (`_link_axes`), and fitting them first would only be undone by the link.
                items = plots.redraw(plot_item, plot_name, curves, self.items[col][row], auto_range=col == 0,
                                     **options)
                self.items[col][row] = items
                section = self._section(curves, plot_name)
                if items:
                    drawn += 1
                    readout = self.readouts[col][row]
                    if readout is None:
                        self.readouts[col][row] = plots.CursorReadout(
                            plot_item, section["x"], section["y"], callback=self._readout)
                    else:
                        readout.set_axes(section["x"], section["y"])
                else:
                    plot_item.setTitle(f"{curves.get('part_number', '')}: nothing to draw for this part")
        self._link_axes()
        self.dirty = False
        return drawn

    def _section(self, curves: dict, plot_name: str | None = None):
        plot_name = plot_name or self.key
        if plot_name == "iv":
            return curves.get("breakdown" if curves.get("role") == "zener_shunt" else "forward")
        return curves.get(_SECTION_OF.get(plot_name, plot_name))

    def _link_axes(self) -> None:
        """Same scales across parts, so the eye compares curves, not axes."""
        cells = self.cells
        if not cells:
            return
        for row in range(len(self.rows)):
            lead = cells[0][row].getViewBox()
            for column in cells[1:]:
                view = column[row].getViewBox()
                # Linking again would re-connect and re-range every item for nothing.
                if view.linkedView(view.XAxis) is not lead:
                    column[row].setXLink(cells[0][row])
                if view.linkedView(view.YAxis) is not lead:
                    column[row].setYLink(cells[0][row])

    def shutdown(self) -> None:
        if not self.widgets:
            return
        plots = _plots()
        for col in range(len(self.widgets)):
            for row in range(len(self.rows)):
                plots.clear_items(self.widgets[col][row].getPlotItem(), self.items[col][row])


def _composite_svg(widget: QWidget, path, title: str) -> None:
    """A page of several plots as SVG (QSvgGenerator; `plots.export_svg` takes one plot widget).

    A plain QWidget needs QWidget.render's full argument list under PySide6.
    """
    from pathlib import Path

    from PySide6.QtCore import QBuffer, QIODevice, QPoint, QRect
    from PySide6.QtGui import QPainter, QRegion
    from PySide6.QtSvg import QSvgGenerator

    buffer = QBuffer()
    buffer.open(QIODevice.OpenModeFlag.WriteOnly)
    generator = QSvgGenerator()
    generator.setOutputDevice(buffer)
    generator.setSize(widget.size())
    generator.setViewBox(QRect(0, 0, widget.width(), widget.height()))
    generator.setTitle(title)
    painter = QPainter()
    if not painter.begin(generator):
        raise RuntimeError("could not start painting on the SVG generator")
    try:
        widget.render(painter, QPoint(), QRegion(), QWidget.RenderFlag.DrawChildren)
    finally:
        painter.end()
    from partpick.outputs import write_output

    write_output(path, bytes(buffer.data()))


class CurvesView(QWidget):
    """Tabs of curves following the result model's selection."""

    readout = Signal(str)  # the cursor read-out text (the window shows it in the status bar)

    def __init__(self, result: ResultModel, library: LibraryModel, parent=None) -> None:
        super().__init__(parent)
        self.result = result
        self.library = library
        self.setObjectName("curves_view")
        self.curve_sets: list[dict] = []
        self.redraws = 0
        self._text_colour = self.palette().color(QPalette.ColorRole.Text)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        top = QHBoxLayout()
        self.notes = QLabel(self)
        self.notes.setWordWrap(True)
        top.addWidget(self.notes, 1)
        self.legend_button = QToolButton(self)
        self.legend_button.setText("Legend")
        self.legend_button.setCheckable(True)
        self.legend_button.setChecked(True)
        self.legend_button.setToolTip("Show or hide the legend (beside the plots, never over the curves)")
        self.legend_button.toggled.connect(self._update_legends)
        top.addWidget(self.legend_button)
        self.export_button = QToolButton(self)
        top.addWidget(self.export_button)
        layout.addLayout(top)
        self.tabs = QTabWidget(self)
        self.tabs.setObjectName("curve_tabs")
        self.pages: dict[str, _CurvePage] = {}
        self._role_sections = _role_sections()
        for key, title, rows in CURVE_TABS + _role_tabs():
            page = _CurvePage(key, rows, self.readout.emit, self)
            self.pages[key] = page
            self.tabs.addTab(page, title)
        layout.addWidget(self.tabs, 1)
        # The legend sits under the plots, outside every plot area, so it never hides a curve.
        self.legend = QLabel(self)
        self.legend.setObjectName("curves_legend")
        self.legend.setWordWrap(True)
        self.legend.setTextFormat(Qt.TextFormat.RichText)
        layout.addWidget(self.legend)
        self.empty_text = "No part selected"
        self.tabs.currentChanged.connect(self._tab_shown)
        result.changed.connect(self.refresh)
        result.selection_changed.connect(self.refresh)

    def current_page(self) -> _CurvePage:
        return self.tabs.currentWidget()

    # -- model → plots -------------------------------------------------------
    def refresh(self) -> None:
        """Recompute the curve data of the selected parts and redraw the visible tab."""
        from partpick.checks.curves import curves_for_many

        result = self.result.result
        sets = []
        if result is not None:
            requirement = result["requirement"]
            chosen = []
            for part_number in self.result.selected[:MAX_PARTS]:
                part = self.library.get_part(part_number)
                candidate = self.result.candidate(part_number)
                if part is not None and candidate is not None:
                    chosen.append((part, candidate))
            if chosen:  # one call: a role may solve every plotted part at once
                sets = curves_for_many(requirement, [p for p, _ in chosen], [c for _, c in chosen])
        self.curve_sets = sets
        role = result["requirement"]["role"] if result else "series"
        sections = self._role_sections.get(role, set())
        for key, page in self.pages.items():
            shown = (bool(sections & {"forward", "breakdown"}) if key == "iv"
                     else bool(sections & {name for name, _o in page.rows} | ({key} & sections)))
            self.tabs.setTabVisible(self.tabs.indexOf(page), shown)
        notes = [f"{c['part_number']}: {note}" for c in sets for note in c.get("notes", [])]
        if not sets:
            notes = []
            if result is not None and not result.get("candidates"):
                self.empty_text = "No part selected: the shortlist has no candidates"
            elif result is not None:
                self.empty_text = "No part selected: select parts in the shortlist (Ctrl+click for up to four)"
            else:
                self.empty_text = "No part selected"
        self.notes.setText("\n".join(notes))  # kept visible when empty: it holds the buttons to the right
        for page in self.pages.values():
            page.dirty = True
        self._draw(self.current_page())

    def _draw(self, page: _CurvePage) -> None:
        page.draw(self.curve_sets, self.empty_text)
        for column in page.cells:
            for plot_item in column:
                # Each only where it is not so already: every one rebuilds rich text or an axis picture.
                for name in ("left", "bottom"):
                    axis = plot_item.getAxis(name)
                    if axis.textPen().color() != self._text_colour:
                        axis.setTextPen(self._text_colour)
                    if axis.pen().color() != self._text_colour:
                        axis.setPen(self._text_colour)
                # Titles a size smaller than the plots layer's: up to four plots share the width.
                label = plot_item.titleLabel
                styled = (label.text, self._text_colour.name())
                if getattr(label, "_partpick_styled", None) != styled:
                    plot_item.setTitle(label.text, size="9pt", color=self._text_colour)
                    label._partpick_styled = styled
        self._update_legends()
        self.redraws += 1

    def _update_legends(self, *_args) -> None:
        """One legend for the visible tab (every plot of a tab uses the same lines and colours), under
        the plots: pyqtgraph's in-plot legends stay hidden, as they would cover curves on small plots."""
        import html

        for page in self.pages.values():
            for column in page.cells:
                for plot_item in column:
                    if plot_item.legend is not None and plot_item.legend.isVisible():
                        plot_item.legend.setVisible(False)
        page = self.current_page()
        entries: list = []
        if page is not None and page.shown:
            plots = _plots()
            for row in range(len(page.rows)):
                for entry in plots.legend_entries(page.items[0][row]):
                    if entry not in entries:
                        entries.append(entry)
        text = " &nbsp; ".join(
            f'<span style="white-space: nowrap"><span style="color: {colour}">{glyph}</span>&nbsp;'
            f"{html.escape(label)}</span>" for glyph, colour, label in entries)
        if text != self.legend.text():
            self.legend.setText(text)
        self.legend.setVisible(self.legend_button.isChecked() and bool(entries))

    def _tab_shown(self, _index: int) -> None:
        page = self.current_page()
        if page is not None and page.dirty:
            self._draw(page)
        else:
            self._update_legends()  # the legend names the visible tab's curves

    # -- export ---------------------------------------------------------------
    def export_image(self, path: str) -> None:
        """The visible tab as PNG or SVG (by the file's extension)."""
        page = self.current_page()
        if page is None or page.shown == 0:
            raise RuntimeError("no part selected: there are no curves to save (select a shortlist part)")
        title = self.tabs.tabText(self.tabs.currentIndex())
        single = page.widgets[0][0] if page.shown == 1 and len(page.rows) == 1 else None
        plots = _plots()
        if str(path).lower().endswith(".svg"):
            if single is not None:
                plots.export_svg(single, path, title=title)
            else:
                _composite_svg(page, path, title)
        else:
            plots.export_png(single or page, path)

    def shutdown(self) -> None:
        for page in self.pages.values():
            page.shutdown()
