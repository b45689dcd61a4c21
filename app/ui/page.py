"""A sketch on a sheet of paper, for printing and PDF files.

The page holds a title line (the sketch's name and the date), the annotated drawing fitted
to the room left, and under it the cautions of the solution with the usual disclaimer: a
printout taken to the job carries the warnings the window showed. It is drawn in the light
scheme whatever the window shows (ink on white paper), every item painted afresh, as for a
picture file (``SketchScene.drawn_afresh``).
"""
from __future__ import annotations

import datetime
import os
from pathlib import Path

from PySide6.QtCore import QMarginsF, QRectF, Qt
from PySide6.QtGui import QFont, QFontMetricsF, QPageLayout, QPageSize, QPainter, QPdfWriter

from ..assess import DISCLAIMER, Caution
from .cautions_panel import caution_line, most_severe_first
from .scene import SketchScene
from .theme import PRINT, scheme_for

__all__ = ["paint_page", "write_pdf", "page_notes", "page_turn", "MOST_NOTES"]

MOST_NOTES = 12  # cautions listed on the page; the rest are counted


def page_notes(cautions: list[Caution]) -> list[str]:
    """The lines under the drawing: the cautions, most severe first (notes left out), then
    the disclaimer."""
    shown = most_severe_first(c for c in cautions if c.severity != "info")
    lines = [caution_line(c) for c in shown[:MOST_NOTES]]
    if len(shown) > MOST_NOTES:
        lines.append(f"… and {len(shown) - MOST_NOTES} more cautions.")
    return lines + [DISCLAIMER]


def _font(points: float, dpi: float, bold: bool = False) -> QFont:
    f = QFont()
    f.setPixelSize(max(1, round(points / 72.0 * dpi)))
    f.setBold(bold)
    return f


def paint_page(scene: SketchScene, painter: QPainter, page: QRectF, title: str, notes: list[str]) -> None:
    """Paint ``scene``'s drawing into ``page`` (the painter's device units) under ``title``,
    with ``notes`` (``page_notes``) below it, in the light scheme on white (``theme.PRINT``)."""
    dpi = painter.device().logicalDpiY()
    ink = PRINT.ink
    head, body = _font(11, dpi, bold=True), _font(8, dpi)
    hm, bm = QFontMetricsF(head, painter.device()), QFontMetricsF(body, painter.device())
    gap = bm.height()
    painter.save()
    painter.setPen(ink)
    painter.setFont(head)
    top = QRectF(page.left(), page.top(), page.width(), hm.height())
    painter.drawText(top, Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter, title)
    painter.setFont(body)
    painter.drawText(top, Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter,
                     f"Loopwright · {datetime.date.today().isoformat()}")
    flags = Qt.TextFlag.TextWordWrap | Qt.AlignmentFlag.AlignLeft
    heights = [bm.boundingRect(QRectF(0, 0, page.width(), 1e6), int(flags), line).height() for line in notes]
    below = sum(heights) + gap * (len(notes) + 1)
    y = page.bottom() - below + gap
    for line, h in zip(notes, heights):
        painter.drawText(QRectF(page.left(), y, page.width(), h), int(flags), line)
        y += h + gap
    painter.restore()
    drawing = QRectF(page.left(), top.bottom() + gap, page.width(), page.height() - top.height() - below - 2 * gap)
    if drawing.height() <= 0:
        return
    scene.settle_marks()  # no mark left waiting for its place on paper
    source = scene.content_rect()
    if source.isNull() or source.width() < 1:
        return
    source = source.adjusted(-12, -12, 12, 12)
    k = min(drawing.width() / source.width(), drawing.height() / source.height())
    target = QRectF(0, 0, source.width() * k, source.height() * k)
    target.moveCenter(drawing.center())  # in the middle of the room left for it
    with scheme_for(PRINT), scene.drawn_afresh():
        painter.save()
        painter.setRenderHints(QPainter.RenderHint.Antialiasing | QPainter.RenderHint.TextAntialiasing)
        scene.render(painter, target, source, Qt.AspectRatioMode.KeepAspectRatio)
        painter.restore()


def page_turn(scene: SketchScene) -> QPageLayout.Orientation:
    """Which way to turn the sheet for the drawing: across (landscape) unless it is taller than wide."""
    rect = scene.content_rect()
    return QPageLayout.Orientation.Landscape if rect.width() >= rect.height() else QPageLayout.Orientation.Portrait


def write_pdf(scene: SketchScene, path: str | os.PathLike[str], title: str, notes: list[str]) -> None:
    """Write the page (``paint_page``) as a one-page PDF: A4, turned to suit the drawing (``page_turn``)."""
    turned = page_turn(scene)
    writer = QPdfWriter(str(path))
    writer.setResolution(300)
    writer.setTitle(title)
    writer.setCreator("Loopwright")
    writer.setPageLayout(QPageLayout(QPageSize(QPageSize.PageSizeId.A4), turned, QMarginsF(12, 12, 12, 12),
                                     QPageLayout.Unit.Millimeter))
    painter = QPainter()
    if not painter.begin(writer):
        raise OSError(f"Could not write the PDF file {Path(path)}.")
    try:
        area = writer.pageLayout().paintRectPixels(writer.resolution())
        painter.fillRect(QRectF(0, 0, area.width(), area.height()), PRINT.paper)
        paint_page(scene, painter, QRectF(0, 0, area.width(), area.height()), title, notes)
    finally:
        painter.end()
