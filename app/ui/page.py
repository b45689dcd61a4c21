"""A sketch on sheets of paper, for printing and PDF files.

A sheet holds a title line (the sketch's name and the date), the annotated drawing in the
room left, and under it the cautions of the solution with the usual disclaimer: a printout
taken to the job carries the warnings the window showed. It is drawn in the light scheme
whatever the window shows (ink on white paper), every item painted afresh, as for a
picture file (``SketchScene.drawn_afresh``).

A drawing that fits one sheet with its values still readable is fitted to it. A larger one
is printed at the smallest readable scale over as many sheets as it takes (``sheet_areas``),
each sheet repeating a strip of its neighbours' so a wire can be followed across, and each
carrying the cautions: a sheet taken away alone still warns.
"""
from __future__ import annotations

import datetime
import math
import os
from collections.abc import Callable
from pathlib import Path

from PySide6.QtCore import QLocale, QMarginsF, QRectF, QSizeF, Qt
from PySide6.QtGui import QFont, QFontMetricsF, QPageLayout, QPageSize, QPainter, QPdfWriter

from ..assess import DISCLAIMER, Caution
from .cautions_panel import caution_line, most_severe_first
from .scene import SketchScene
from .theme import PRINT, SMALL_PX, scheme_for

__all__ = ["paint_page", "paint_pages", "sheet_areas", "write_pdf", "page_notes", "page_turn", "MOST_NOTES",
           "SMALLEST_TEXT_MM", "PAPERS", "PAPER_NAMES", "local_paper"]

PAPERS = {"a4": QPageSize.PageSizeId.A4, "a3": QPageSize.PageSizeId.A3,  # ISO 216
          "letter": QPageSize.PageSizeId.Letter}  # ANSI A, 8.5 × 11 in
PAPER_NAMES = {"a4": "A4, 210 × 297 mm", "a3": "A3, 297 × 420 mm", "letter": "Letter, 8.5 × 11 in"}

MOST_NOTES = 12  # cautions listed on the page; the rest are counted
# The annotations' letters are printed no smaller than this (em height, mm): ISO 3098-1 gives
# 2.5 mm as the smallest lettering height on technical drawings (from memory).
SMALLEST_TEXT_MM = 2.5
OVERLAP = 0.06  # the share of a sheet's drawing repeated on the next sheet


def local_paper() -> str:
    """The sheet people print on where this program runs (``QLocale``): Letter where US
    customary units are used, A4 elsewhere."""
    us = QLocale().measurementSystem() == QLocale.MeasurementSystem.ImperialUSSystem
    return "letter" if us else "a4"


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


def _room(painter: QPainter, page: QRectF, notes: list[str]) -> tuple[QRectF, QRectF, list[float], float]:
    """(title line, room for the drawing, height of each note, gap between lines) on ``page``."""
    dpi = painter.device().logicalDpiY()
    hm = QFontMetricsF(_font(11, dpi, bold=True), painter.device())
    bm = QFontMetricsF(_font(8, dpi), painter.device())
    gap = bm.height()
    flags = Qt.TextFlag.TextWordWrap | Qt.AlignmentFlag.AlignLeft
    heights = [bm.boundingRect(QRectF(0, 0, page.width(), 1e6), int(flags), line).height() for line in notes]
    below = sum(heights) + gap * (len(notes) + 1)
    top = QRectF(page.left(), page.top(), page.width(), hm.height())
    drawing = QRectF(page.left(), top.bottom() + gap, page.width(), page.height() - top.height() - below - 2 * gap)
    return top, drawing, heights, gap


def sheet_areas(drawing: QRectF, room: QSizeF, dpi: float) -> list[QRectF]:
    """The scene areas of ``drawing`` to print, one per sheet, in reading order: the whole
    drawing when, fitted to ``room`` (device pixels at ``dpi``), its annotations are no
    smaller than ``SMALLEST_TEXT_MM``; otherwise tiles of ``room`` at that scale, the fewest
    that cover it with neighbours sharing ``OVERLAP`` of a sheet.

    >>> len(sheet_areas(QRectF(0, 0, 400, 300), QSizeF(3200, 2200), 300))
    1
    """
    least = SMALLEST_TEXT_MM / 25.4 * dpi / SMALL_PX  # device pixels per scene unit
    if min(room.width() / drawing.width(), room.height() / drawing.height()) >= least:
        return [drawing]

    def spans(start: float, length: float, size: float) -> list[tuple[float, float]]:
        if length <= size:
            return [(start, length)]
        n = math.ceil((length - size) / (size * (1 - OVERLAP))) + 1
        stride = (length - size) / (n - 1)
        return [(start + k * stride, size) for k in range(n)]

    w, h = room.width() / least, room.height() / least
    return [QRectF(x, y, dx, dy) for y, dy in spans(drawing.top(), drawing.height(), h)
            for x, dx in spans(drawing.left(), drawing.width(), w)]


def paint_page(scene: SketchScene, painter: QPainter, page: QRectF, title: str, notes: list[str],
               area: QRectF | None = None) -> None:
    """Paint ``area`` of ``scene``'s drawing (None: all of it) into ``page`` (the painter's
    device units) under ``title``, with ``notes`` (``page_notes``) below it, in the light
    scheme on white (``theme.PRINT``), fitted to the room left and centred in it."""
    dpi = painter.device().logicalDpiY()
    top, drawing, heights, gap = _room(painter, page, notes)
    painter.save()
    painter.setPen(PRINT.ink)
    painter.setFont(_font(11, dpi, bold=True))
    painter.drawText(top, Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter, title)
    painter.setFont(_font(8, dpi))
    painter.drawText(top, Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter,
                     f"Loopwright · {datetime.date.today().isoformat()}")
    flags = Qt.TextFlag.TextWordWrap | Qt.AlignmentFlag.AlignLeft
    y = drawing.bottom() + 2 * gap
    for line, h in zip(notes, heights):
        painter.drawText(QRectF(page.left(), y, page.width(), h), int(flags), line)
        y += h + gap
    painter.restore()
    if drawing.height() <= 0:
        return
    source = area if area is not None else _drawing(scene)
    if source is None:
        return
    k = min(drawing.width() / source.width(), drawing.height() / source.height())
    target = QRectF(0, 0, source.width() * k, source.height() * k)
    target.moveCenter(drawing.center())  # in the middle of the room left for it
    with scheme_for(PRINT), scene.drawn_afresh():
        painter.save()
        painter.setClipRect(target)  # a sheet of a larger drawing shows its own area alone
        painter.setRenderHints(QPainter.RenderHint.Antialiasing | QPainter.RenderHint.TextAntialiasing)
        scene.render(painter, target, source, Qt.AspectRatioMode.KeepAspectRatio)
        painter.restore()


def _drawing(scene: SketchScene) -> QRectF | None:
    """The scene area of the drawing and its annotations with a little paper round it (None: empty),
    every mark placed first (none left waiting for its place on paper)."""
    scene.settle_marks()
    source = scene.content_rect()
    if source.isNull() or source.width() < 1:
        return None
    return source.adjusted(-12, -12, 12, 12)


def paint_pages(scene: SketchScene, painter: QPainter, page: QRectF, title: str, notes: list[str],
                new_page: Callable[[], object]) -> int:
    """Paint the drawing on as many sheets as ``sheet_areas`` asks (``new_page()`` starts each
    after the first), each with the title, its number and the notes; returns how many."""
    source = _drawing(scene)
    _, room, _, _ = _room(painter, page, notes)
    areas = [None] if source is None or room.height() <= 0 else \
        sheet_areas(source, room.size(), painter.device().logicalDpiY())
    for k, area in enumerate(areas):
        if k:
            new_page()
        named = title if len(areas) == 1 else f"{title} · sheet {k + 1} of {len(areas)}"
        paint_page(scene, painter, page, named, notes, area)
    return len(areas)


def page_turn(scene: SketchScene) -> QPageLayout.Orientation:
    """Which way to turn the sheet for the drawing: across (landscape) unless it is taller than wide."""
    rect = scene.content_rect()
    return QPageLayout.Orientation.Landscape if rect.width() >= rect.height() else QPageLayout.Orientation.Portrait


def write_pdf(scene: SketchScene, path: str | os.PathLike[str], title: str, notes: list[str],
              paper: str = "a4") -> None:
    """Write the sheets (``paint_pages``) as a PDF on ``paper`` (a key of ``PAPERS``), turned
    to suit the drawing (``page_turn``)."""
    turned = page_turn(scene)
    writer = QPdfWriter(str(path))
    writer.setResolution(300)
    writer.setTitle(title)
    writer.setCreator("Loopwright")
    writer.setPageLayout(QPageLayout(QPageSize(PAPERS[paper]), turned, QMarginsF(12, 12, 12, 12),
                                     QPageLayout.Unit.Millimeter))
    painter = QPainter()
    if not painter.begin(writer):
        raise OSError(f"Could not write the PDF file {Path(path)}.")
    try:
        area = writer.pageLayout().paintRectPixels(writer.resolution())
        sheet = QRectF(0, 0, area.width(), area.height())

        def new_page() -> None:
            writer.newPage()
            painter.fillRect(sheet, PRINT.paper)

        painter.fillRect(sheet, PRINT.paper)
        paint_pages(scene, painter, sheet, title, notes, new_page)
    finally:
        painter.end()
