"""Drawing the curve data with pyqtgraph: items, axes, log ticks, read-out, PNG and SVG export."""

import xml.etree.ElementTree as ET

import numpy as np
import pyqtgraph as pg
import pytest
from PySide6 import QtGui

from partpick import plots
from partpick.plots.axes import EngineeringAxis, log_tick_text


@pytest.fixture
def plot_widget(qtbot):
    widget = pg.PlotWidget(background="w")
    widget.resize(800, 500)
    qtbot.addWidget(widget)
    return widget


def test_log_tick_text():
    # Each decade tick carries its SI prefix of the base unit.
    assert [log_tick_text(v) for v in (1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 1e-1, 1.0, 10.0, 1e3)] == \
        ["1µ", "10µ", "100µ", "1m", "10m", "100m", "1", "10", "1k"]
    assert log_tick_text(2e-3) == "2m"
    assert log_tick_text(0.02) == "20m"
    assert log_tick_text(1500.0) == "1.5k"
    assert log_tick_text(999.99999e-6) == "1m"  # float noise just below a decade
    assert log_tick_text(0.0) == "" and log_tick_text(-1.0) == ""


def test_log_axis_ticks_and_label(plot_widget, series_curves):
    plot_item = plot_widget.getPlotItem()
    plots.draw_forward(plot_item, series_curves, log_current=True)
    axis = plot_item.getAxis("left")
    assert isinstance(axis, EngineeringAxis)
    # Log-mode tick values are decimal exponents: −6 → 1 µA, −3 → 1 mA, 0 → 1 A.
    assert axis.tickStrings([-6.0, -5.0, -3.0, -1.0, 0.0], 1.0, 1.0) == ["1µ", "10µ", "1m", "100m", "1"]
    label = axis.labelString()
    assert "(A)" in label and "kA" not in label and "mA" not in label  # no auto prefix on the log axis
    assert not axis.autoSIPrefix


def test_linear_axis_keeps_the_automatic_prefix(plot_widget, zener_curves):
    plot_item = plot_widget.getPlotItem()
    plots.draw_breakdown(plot_item, zener_curves, log_current=False)
    plot_widget.show()
    plot_item.vb.autoRange()
    pg.QtWidgets.QApplication.processEvents()
    axis = plot_item.getAxis("left")
    assert axis.autoSIPrefix
    assert "(mA)" in axis.labelString()  # Zener currents of a few mA: the widget adds the prefix


def test_draw_and_clear(plot_widget, series_curves):
    plot_item = plot_widget.getPlotItem()
    items = plots.draw_iv(plot_item, series_curves)
    section = series_curves["forward"]
    curve_items = [i for i in items if isinstance(i, pg.PlotDataItem)]
    # Every curve and point set drawn, with its label in the legend.
    assert len(curve_items) == len(section["curves"]) + len(section["points"])
    assert all(i in plot_item.items for i in items)
    legend_names = [label.text for _, label in plot_item.legend.items]
    assert any("hand model" in name for name in legend_names)
    assert any("load line" in name for name in legend_names)
    hot = [i for i in curve_items if "hottest" in i.name()][0]
    x, y = hot.getData()
    assert np.all(np.isfinite(x)) and x.size > 100
    plots.clear_items(plot_item, items)
    assert items == []
    assert not [i for i in plot_item.items if isinstance(i, pg.PlotDataItem)]
    assert plot_item.legend.items == []


def test_zener_band_and_lines(plot_widget, zener_curves):
    plot_item = plot_widget.getPlotItem()
    items = plots.draw_zener_output(plot_item, zener_curves)
    fills = [i for i in items if isinstance(i, pg.FillBetweenItem)]
    assert len(fills) == 1
    lines = [i for i in items if isinstance(i, pg.InfiniteLine)]
    assert sorted(line.value() for line in lines) == [10.0, 14.0]  # supply min and max
    tj_items = plots.draw_junction_temperature(plot_item, zener_curves)
    limits = [i.value() for i in tj_items if isinstance(i, pg.InfiniteLine) and i.angle == 0]
    assert limits == [125.0, 150.0]


def test_hostile_title_is_escaped(plot_widget, series_curves):
    section = dict(series_curves["forward"], title='<b>X</b> & "y"')
    plots.draw_section(plot_widget.getPlotItem(), section)
    assert plot_widget.getPlotItem().titleLabel.text == "&lt;b&gt;X&lt;/b&gt; &amp; &quot;y&quot;"


def _non_blank(png: bytes, width: int, height: int) -> None:
    assert png.startswith(b"\x89PNG\r\n\x1a\n")
    image = QtGui.QImage.fromData(png, "PNG")
    assert (image.width(), image.height()) == (width, height)
    colours = {image.pixel(x, y) for x in range(0, width, 7) for y in range(0, height, 7)}
    assert len(colours) > 5  # axes, curves, text: not an empty plot


def test_png_export(plot_widget, series_curves, tmp_path):
    plots.draw_forward(plot_widget.getPlotItem(), series_curves)
    path = tmp_path / "forward.png"
    png = plots.export_png(plot_widget, path)
    assert path.read_bytes() == png
    _non_blank(png, 800, 500)
    report_png = plots.section_png(plots.draw_zener_output, {"zener_output": None, "role": "zener_shunt"})
    _non_blank(report_png, 820, 520)  # no section: still an image of an empty, framed plot


def test_svg_export(plot_widget, zener_curves, tmp_path):
    plots.draw_zener_output(plot_widget.getPlotItem(), zener_curves)
    path = tmp_path / "zener.svg"
    svg = plots.export_svg(plot_widget, path)
    assert path.read_bytes() == svg
    root = ET.fromstring(svg)  # well-formed XML
    assert root.tag.endswith("svg")
    drawn = [el for el in root.iter() if el.tag.endswith(("path", "polyline"))]
    assert len(drawn) > 10
    assert b"Supply voltage" in svg  # the axis label is in the drawing


def test_readout_text():
    x_axis = {"name": "Forward voltage VF", "unit": "V"}
    y_axis = {"name": "Forward current IF", "unit": "A"}
    text = plots.readout_text(0.5123, -3.0, x_axis=x_axis, y_axis=y_axis, log_y=True)
    assert text == "Forward voltage VF 512.3 mV · Forward current IF 1.000 mA"
    assert "—" in plots.readout_text(float("nan"), 1.0, x_axis=x_axis, y_axis=y_axis)


def test_cursor_readout_follows_the_view(plot_widget, series_curves):
    plot_item = plot_widget.getPlotItem()
    plots.draw_forward(plot_item, series_curves, log_current=True)
    seen = []
    readout = plots.CursorReadout(plot_item, series_curves["forward"]["x"], series_curves["forward"]["y"],
                                  callback=seen.append)
    text = readout.show_at(0.45, np.log10(0.02))
    assert text == "Forward voltage VF 450.0 mV · Forward current IF 20.00 mA"
    assert seen == [text]
    readout.detach()


def test_cursor_readout_on_mouse_move_and_detach(plot_widget, zener_curves):
    plot_item = plot_widget.getPlotItem()
    plots.draw_zener_output(plot_item, zener_curves)
    plot_widget.show()
    plot_item.vb.setRange(xRange=(0.0, 18.0), yRange=(0.0, 6.0), padding=0)
    pg.QtWidgets.QApplication.processEvents()
    seen = []
    section = zener_curves["zener_output"]
    readout = plots.CursorReadout(plot_item, section["x"], section["y"], callback=seen.append)
    scene_point = plot_item.vb.mapViewToScene(pg.QtCore.QPointF(12.0, 5.0))
    plot_item.scene().sigMouseMoved.emit(scene_point)
    assert len(seen) == 1
    assert seen[0].startswith("Supply voltage 12.00 V · Output voltage 5.000 V")
    readout.detach()
    plot_item.scene().sigMouseMoved.emit(scene_point)
    assert len(seen) == 1  # detached: no more read-outs


def _grey(image: QtGui.QImage) -> np.ndarray:
    image = image.convertToFormat(QtGui.QImage.Format.Format_Grayscale8)
    width, height, stride = image.width(), image.height(), image.bytesPerLine()
    return np.frombuffer(image.constBits(), dtype=np.uint8, count=stride * height).reshape(height, stride)[:, :width]


def test_svg_matches_the_screen_image(zener_curves):
    # Regression: an SVG of a never-shown widget drew its axes squeezed into a corner, and the
    # generator's 90 dpi put text and symbols off the curves. The SVG, rendered back, must match the
    # widget's own image.
    from PySide6 import QtCore, QtSvg

    plots.ensure_qapp()
    widget = pg.PlotWidget(background="w")
    widget.resize(800, 500)
    plots.draw_zener_output(widget.getPlotItem(), zener_curves)
    svg = plots.export_svg(widget)
    screen = QtGui.QImage.fromData(plots.export_png(widget), "PNG")
    renderer = QtSvg.QSvgRenderer(QtCore.QByteArray(svg))
    assert renderer.isValid()
    drawn = QtGui.QImage(screen.width(), screen.height(), QtGui.QImage.Format.Format_ARGB32)
    drawn.fill(0xFFFFFFFF)
    painter = QtGui.QPainter(drawn)
    renderer.render(painter)
    painter.end()
    a, b = _grey(screen).astype(int), _grey(drawn).astype(int)
    differ = np.mean(np.abs(a - b) > 96)
    assert differ < 0.02, f"{100 * differ:.1f} % of the pixels differ"
    widget.deleteLater()


def test_redraw_updates_in_place(plot_widget):
    from plot_data import SCHOTTKY, SERIES_REQ

    from partpick.checks.curves import curves_for

    plot_item = plot_widget.getPlotItem()
    first = curves_for(SERIES_REQ, SCHOTTKY, {})
    second = curves_for(dict(SERIES_REQ, load_max_A=1.5), SCHOTTKY, {})
    items = plots.redraw(plot_item, "iv", first)
    kept = list(items)
    items = plots.redraw(plot_item, "iv", second, items)
    assert list(items) == kept  # same curves and lines: the items were updated, not re-created
    tangent = [i for i in items if isinstance(i, pg.PlotDataItem) and "hand model" in i.name()][0]
    x, y = tangent.getData()
    expected = [c for c in second["forward"]["curves"] if c["role"] == "tangent"][0]
    assert np.allclose(x, expected["x"]) and np.allclose(y, expected["y"])
    legend = [label.text for _, label in plot_item.legend.items]
    assert any(f"{second['forward']['tangent']['vth0_V']:.3f} V" in text for text in legend)  # label follows
    assert len(plot_item.legend.items) == len(first["forward"]["curves"]) + len(first["forward"]["points"])
    # Switching to a log current axis changes what is drawn: new items replace the old ones.
    logged = plots.redraw(plot_item, "iv", second, items, log_current=True)
    assert not set(map(id, logged)) & set(map(id, kept))
    assert all(item not in plot_item.items for item in kept)
    assert plot_item.getAxis("left").logMode
