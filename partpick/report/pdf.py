"""The review report as PDF: the same HTML laid out by QTextDocument onto a QPdfWriter (off-screen)."""

from __future__ import annotations

__all__ = ["html_to_pdf"]

_A4_MARGIN_MM = 14.0


def html_to_pdf(document_html: str, images: list[tuple], *, title: str = "partpick review report",
                creator: str = "partpick") -> bytes:
    """Lay out ``document_html`` (whose images are named ``name``) on A4 pages and return the PDF bytes.

    Parameters
    ----------
    document_html : str
        The report (see `partpick.report.review.review_html` with ``image_src`` giving the names).
    images : list of (name, caption, png bytes)
        Registered as the document's image resources under their names.
    """
    from partpick.plots.export import ensure_qapp

    ensure_qapp()
    from PySide6 import QtCore, QtGui

    document = QtGui.QTextDocument()
    document.setDocumentMargin(0)
    font = QtGui.QFont("DejaVu Sans")
    font.setPointSizeF(8.5)
    document.setDefaultFont(font)
    for name, _caption, png in images:
        image = QtGui.QImage()
        if not image.loadFromData(png, "PNG"):
            raise RuntimeError(f"html_to_pdf: image {name!r} is not a readable PNG")
        document.addResource(QtGui.QTextDocument.ResourceType.ImageResource, QtCore.QUrl(name), image)
    document.setHtml(document_html)

    buffer = QtCore.QBuffer()
    buffer.open(QtCore.QIODevice.OpenModeFlag.WriteOnly)
    writer = QtGui.QPdfWriter(buffer)
    writer.setTitle(title)
    writer.setCreator(creator)
    writer.setResolution(96)
    writer.setPageSize(QtGui.QPageSize(QtGui.QPageSize.PageSizeId.A4))
    writer.setPageMargins(QtCore.QMarginsF(_A4_MARGIN_MM, _A4_MARGIN_MM, _A4_MARGIN_MM, _A4_MARGIN_MM),
                          QtGui.QPageLayout.Unit.Millimeter)
    document.print_(writer)
    del writer  # finishes the PDF
    data = bytes(buffer.data())
    if not data.startswith(b"%PDF"):
        raise RuntimeError("html_to_pdf: Qt did not produce a PDF")
    return data
