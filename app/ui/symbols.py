"""Part symbols, drawn in a part's own coordinates before rotation and mirroring.

A two-terminal symbol runs along +x from its first terminal at (0, 0) to its
second at four grid steps; the ground symbol hangs from its terminal towards
+y. IEC 60617 shapes are the default (rectangular resistor); the IEEE 315
zigzag resistor is a preference.
"""
from __future__ import annotations

from PySide6.QtCore import QLineF, QPointF, QRectF
from PySide6.QtGui import QPainter, QPainterPath, QPolygonF

from ..sketch.model import PlacedPart
from .theme import GRID

__all__ = ["IEC", "IEEE", "STYLES", "paint_symbol", "paint_part", "symbol_outline", "body_centre",
           "STYLED_KINDS"]

IEC = "iec"
IEEE = "ieee"
STYLES = {IEC: "IEC 60617 (rectangular resistor and fuse, crossed lamp)",
          IEEE: "IEEE 315 (zigzag resistor, wavy fuse, looped lamp)"}
STYLED_KINDS = ("resistor", "fuse", "lamp")  # the kinds drawn differently in the two styles

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


def _leads(p: QPainter, a: float, b: float) -> None:
    """The two straight leads from the terminals to a body spanning ``a``..``b``."""
    p.drawLine(QLineF(0, 0, a, 0))
    p.drawLine(QLineF(b, 0, L, 0))


def _meter(p: QPainter, letter: str, rotation: int = 0, mirror: bool = False) -> None:
    """A measuring instrument: a circle with its quantity's letter, + beside the input terminal.

    The letter is drawn in strokes and kept upright (undoing the part's
    ``rotation`` and ``mirror``), as text on the drawing always is.
    """
    _leads(p, MID - 14, MID + 14)
    p.drawEllipse(QPointF(MID, 0), 14, 14)
    _plus(p, 8, 8)  # on the side away from where the label usually goes
    p.save()
    p.translate(MID, 0)
    if mirror:
        p.scale(1, -1)
    p.rotate(-rotation)
    if letter == "A":
        p.drawPolyline(QPolygonF([QPointF(-6, 7), QPointF(0, -7), QPointF(6, 7)]))
        p.drawLine(QLineF(-3.4, 1.5, 3.4, 1.5))
    else:
        p.drawPolyline(QPolygonF([QPointF(-6, -7), QPointF(0, 7), QPointF(6, -7)]))
    p.restore()


def _fuse(p: QPainter, style: str, blown: bool) -> None:
    _leads(p, 22, 58)
    if style == IEEE:  # one wave of wire; blown, the wave parts in the middle
        if blown:
            left, right = QPainterPath(QPointF(22, 0)), QPainterPath(QPointF(58, 0))
            left.cubicTo(QPointF(26, -10), QPointF(31, -11), QPointF(35, -5))
            right.cubicTo(QPointF(54, 10), QPointF(49, 11), QPointF(45, 5))
            p.drawPath(left)
            p.drawPath(right)
        else:
            path = QPainterPath(QPointF(22, 0))
            path.cubicTo(QPointF(28, -12), QPointF(34, -12), QPointF(MID, 0))
            path.cubicTo(QPointF(46, 12), QPointF(52, 12), QPointF(58, 0))
            p.drawPath(path)
        return
    p.drawRect(QRectF(22, -6, 36, 12))
    if blown:  # the element broken in the middle, its ends curled apart
        p.drawLine(QLineF(22, 0, 34, 0))
        p.drawLine(QLineF(34, 0, 36, -3))
        p.drawLine(QLineF(46, 0, 58, 0))
        p.drawLine(QLineF(46, 0, 44, 3))
    else:
        p.drawLine(QLineF(22, 0, 58, 0))


def _lamp(p: QPainter, style: str) -> None:
    _leads(p, MID - 14, MID + 14)
    p.drawEllipse(QPointF(MID, 0), 14, 14)
    if style == IEEE:  # the filament: a loop between two supports
        p.drawLine(QLineF(MID - 14, 0, MID - 7, 5))
        p.drawLine(QLineF(MID + 14, 0, MID + 7, 5))
        p.drawArc(QRectF(MID - 7, -5, 14, 20), 0, 180 * 16)
    else:
        d = 14 * 0.7071
        p.drawLine(QLineF(MID - d, -d, MID + d, d))
        p.drawLine(QLineF(MID - d, d, MID + d, -d))


def _cable(p: QPainter, both: bool) -> None:
    """A run of cable: its conductors between the terminals, gathered by the ring of a cable."""
    if both:
        p.drawLine(QLineF(0, 0, 10, 0))
        p.drawLine(QLineF(70, 0, L, 0))
        for y in (-3.5, 3.5):
            p.drawLine(QLineF(10, 0, 14, y))
            p.drawLine(QLineF(14, y, 66, y))
            p.drawLine(QLineF(66, y, 70, 0))
    else:
        p.drawLine(QLineF(0, 0, L, 0))
    p.drawEllipse(QPointF(MID, 0), 5, 9)


def paint_part(p: QPainter, part: PlacedPart, style: str = IEC) -> None:
    """Draw ``part``'s symbol in the state its flags give it (open switch, blown fuse, one conductor)."""
    kind = part.kind
    if kind == "switch":
        _switch(p, part.flag("closed"))
    elif kind == "fuse":
        _fuse(p, style, part.flag("blown"))
    elif kind == "cable":
        _cable(p, part.flag("both_conductors"))
    elif kind in ("ammeter", "voltmeter"):
        _meter(p, "A" if kind == "ammeter" else "V", part.rotation, part.mirror)
    else:
        paint_symbol(p, kind, style)


def paint_symbol(p: QPainter, kind: str, style: str = IEC, closed: bool = True) -> None:
    """Draw the symbol of ``kind`` (in its usual state) with the painter's current pen."""
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
    elif kind == "ammeter":
        _meter(p, "A")
    elif kind == "voltmeter":
        _meter(p, "V")
    elif kind == "fuse":
        _fuse(p, style, False)
    elif kind == "lamp":
        _lamp(p, style)
    elif kind == "cable":
        _cable(p, True)
    else:
        path = QPainterPath()
        path.addRect(symbol_outline(kind))
        p.drawPath(path)
