"""Plot images: PNG through the widget's own rendering, SVG through QSvgGenerator.

pyqtgraph's SVGExporter fails on plain plots in the pyqtgraph/PySide6 versions
used here, so SVG is drawn by rendering the widget onto a QSvgGenerator.
"""

from __future__ import annotations

import os

__all__ = ["ensure_qapp", "export_png", "export_svg", "section_widget", "section_png"]


def ensure_qapp():
    """The QApplication, created off-screen when there is no display and none exists yet."""
    from PySide6 import QtWidgets

    app = QtWidgets.QApplication.instance()
    if app is None:
        if not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY"):
            os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
        app = QtWidgets.QApplication([])
    return app


def _write(data: bytes, path) -> bytes:
    if path is not None:
        from partpick.outputs import write_output  # every output file goes through partpick.outputs

        write_output(path, data)
    return data


def export_png(widget, path=None) -> bytes:
    """The widget (a PlotWidget, or any QWidget) as PNG bytes; also written to ``path`` if given."""
    from PySide6 import QtCore

    pixmap = widget.grab()
    if pixmap.isNull():
        raise RuntimeError("export_png: the widget rendered an empty image")
    buffer = QtCore.QBuffer()
    buffer.open(QtCore.QIODevice.OpenModeFlag.WriteOnly)
    if not pixmap.save(buffer, "PNG"):
        raise RuntimeError("export_png: Qt could not encode the image as PNG")
    return _write(bytes(buffer.data()), path)


def export_svg(widget, path=None, *, title: str = "partpick plot") -> bytes:
    """The widget as SVG bytes (QSvgGenerator + QPainter); also written to ``path`` if given."""
    from PySide6 import QtCore, QtGui, QtSvg

    # Lay the plot out at the widget's size first (a widget never shown has not done so yet; its
    # axes would be drawn squeezed into a corner).
    widget.grab()
    buffer = QtCore.QBuffer()
    buffer.open(QtCore.QIODevice.OpenModeFlag.WriteOnly)
    generator = QtSvg.QSvgGenerator()
    generator.setOutputDevice(buffer)
    size = widget.size()
    generator.setSize(size)
    generator.setViewBox(QtCore.QRect(0, 0, size.width(), size.height()))
    generator.setTitle(title)
    # The generator's default 90 dpi differs from the widget's; text and items that ignore the
    # view's transform would then land off the curves.
    generator.setResolution(widget.logicalDpiX())
    painter = QtGui.QPainter()
    if not painter.begin(generator):
        raise RuntimeError("export_svg: could not start painting on the SVG generator")
    try:
        widget.render(painter)
    finally:
        painter.end()
    return _write(bytes(buffer.data()), path)


def section_widget(draw, curves: dict, *, width: int = 820, height: int = 520, **options):
    """An off-screen white PlotWidget with ``draw(plot_item, curves, **options)`` applied (for reports)."""
    import pyqtgraph as pg
    from PySide6 import QtGui, QtWidgets

    ensure_qapp()
    widget = pg.PlotWidget(background="w")
    widget.resize(width, height)
    plot_item = widget.getPlotItem()
    for name in ("left", "bottom"):
        plot_item.getAxis(name).setPen(pg.mkPen(40, 40, 40))
        plot_item.getAxis(name).setTextPen(pg.mkPen(20, 20, 20))
    items = draw(plot_item, curves, **options)
    plot_item.setTitle(plot_item.titleLabel.text, color=(20, 20, 20), size="12pt")
    font = QtGui.QFont("DejaVu Sans")
    font.setPointSizeF(9.5)
    for name in ("left", "bottom"):
        axis = plot_item.getAxis(name)
        axis.setPen(pg.mkPen(40, 40, 40))
        axis.setTextPen(pg.mkPen(20, 20, 20))
        axis.setTickFont(font)
        axis.label.setFont(font)
    QtWidgets.QApplication.processEvents()
    return widget, items


def section_png(draw, curves: dict, *, width: int = 820, height: int = 520, **options) -> bytes:
    """PNG bytes of one plot drawn off-screen with ``draw`` (e.g. `draw_zener_output`)."""
    widget, _ = section_widget(draw, curves, width=width, height=height, **options)
    try:
        return export_png(widget)
    finally:
        # Delete the off-screen widget now, not at the next event loop (a report run from the CLI has
        # none), so that no plot items outlive their Python wrappers until interpreter shutdown.
        import shiboken6

        widget.getPlotItem().clear()
        widget.close()
        shiboken6.delete(widget)
