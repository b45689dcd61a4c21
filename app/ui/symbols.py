"""Part symbols, drawn in a part's own coordinates before rotation and mirroring.

A two-terminal symbol runs along +x from its first terminal at (0, 0) to its
second at four grid steps; the ground symbol hangs from its terminal towards
+y. IEC 60617 shapes are the default (rectangular resistor); the IEEE 315
zigzag resistor is a preference.
"""
from __future__ import annotations

from PySide6.QtCore import QLineF, QPointF, QRectF
from PySide6.QtGui import QPainter, QPainterPath, QPolygonF

from .theme import GRID

__all__ = ["IEC", "IEEE", "STYLES", "paint_symbol", "symbol_outline", "body_centre"]

IEC = "iec"
IEEE = "ieee"
STYLES = {IEC: "IEC 60617 (rectangular resistor)", IEEE: "IEEE 315 (zigzag resistor)"}

L = 4 * GRID  # length of a two-terminal part
MID = L / 2


def body_centre(kind: str) -> QPointF:
    """The middle of the symbol's body in local coordinates."""
    return QPointF(0, 0.6 * GRID) if kind == "ground" else QPointF(MID, 0)


def symbol_outline(kind: str) -> QRectF:
    """The area the symbol covers in local coordinates (used for picking and selection)."""
    if kind == "ground":
        return QRectF(-0.7 * GRID, -0.15 * GRID, 1.4 * GRID, 1.45 * GRID)
    return QRectF(-0.15 * GRID, -0.8 * GRID, L + 0.3 * GRID, 1.6 * GRID)


def _plus(p: QPainter, x: float, y: float, r: float = 3.5) -> None:
    p.drawLine(QLineF(x - r, y, x + r, y))
    p.drawLine(QLineF(x, y - r, x, y + r))


def _resistor(p: QPainter, style: str) -> None:
    if style == IEEE:
        p.drawLine(QLineF(0, 0, 20, 0))
        p.drawLine(QLineF(60, 0, L, 0))
        pts = [QPointF(20, 0)]
        for k in range(6):
            pts.append(QPointF(20 + (k + 0.5) * 40 / 6, -7 if k % 2 == 0 else 7))
        pts.append(QPointF(60, 0))
        p.drawPolyline(QPolygonF(pts))
    else:
        p.drawLine(QLineF(0, 0, 22, 0))
        p.drawLine(QLineF(58, 0, L, 0))
        p.drawRect(QRectF(22, -7, 36, 14))


def _cell(p: QPainter) -> None:
    p.drawLine(QLineF(0, 0, 36, 0))
    p.drawLine(QLineF(44, 0, L, 0))
    p.drawLine(QLineF(36, -14, 36, 14))  # long plate: plus
    pen = p.pen()
    thick = type(pen)(pen)
    thick.setWidthF(pen.widthF() * 2.6)
    p.setPen(thick)
    p.drawLine(QLineF(44, -7, 44, 7))  # short plate: minus
    p.setPen(pen)
    _plus(p, 27, -10)


def _current_source(p: QPainter) -> None:
    p.drawLine(QLineF(0, 0, 26, 0))
    p.drawLine(QLineF(54, 0, L, 0))
    p.drawEllipse(QPointF(MID, 0), 14, 14)
    p.drawLine(QLineF(31, 0, 47, 0))
    p.drawPolyline(QPolygonF([QPointF(43, -4), QPointF(48, 0), QPointF(43, 4)]))


def _switch(p: QPainter, closed: bool) -> None:
    p.drawLine(QLineF(0, 0, 26, 0))
    p.drawLine(QLineF(54, 0, L, 0))
    p.drawEllipse(QPointF(26, 0), 2.2, 2.2)
    p.drawEllipse(QPointF(54, 0), 2.2, 2.2)
    if closed:
        p.drawLine(QLineF(26, 0, 54, -2.5))
    else:
        p.drawLine(QLineF(26, 0, 51, -15))


def _ground(p: QPainter) -> None:
    p.drawLine(QLineF(0, 0, 0, 12))
    p.drawLine(QLineF(-12, 12, 12, 12))
    p.drawLine(QLineF(-8, 17, 8, 17))
    p.drawLine(QLineF(-4, 22, 4, 22))


def paint_symbol(p: QPainter, kind: str, style: str = IEC, closed: bool = True) -> None:
    """Draw the symbol of ``kind`` with the painter's current pen."""
    if kind == "resistor":
        _resistor(p, style)
    elif kind == "cell":
        _cell(p)
    elif kind == "current_source":
        _current_source(p)
    elif kind == "switch":
        _switch(p, closed)
    elif kind == "ground":
        _ground(p)
    else:
        path = QPainterPath()
        path.addRect(symbol_outline(kind))
        p.drawPath(path)
