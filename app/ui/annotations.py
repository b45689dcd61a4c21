"""What the solution writes onto the drawing.

Per part: an arrow in the direction of conventional current with its value,
and the drop with + and − marks at the terminals. Per node: a potential tag.
Per loop: a circulating arrow inside its window with the loop current. When
the circuit cannot be solved, a note beside the parts named by the error.
"""
from __future__ import annotations

import math
from collections.abc import Iterator
from contextlib import contextmanager
from functools import lru_cache

import numpy as np
from PySide6.QtCore import QLineF, QPointF, QRectF, Qt
from PySide6.QtGui import (QFontMetricsF, QImage, QPainter, QPainterPath, QPen, QPolygonF, QStaticText, QTextOption,
                           QTransform)
from PySide6.QtWidgets import QGraphicsItem, QStyleOptionGraphicsItem, QWidget

from ..units import format_value
from .items import COVER_TEXT, Z_MARK, Box, box_of, Z_NOTE, PartItem, _paint_warning_sign, too_small
from .stamps import Stamp, Stamper, zooms_only
from .theme import Theme, current_theme, small_font

__all__ = ["CurrentMark", "DropMark", "ReadingLayer", "PotentialTag", "LoopMark", "FaultNote", "LAYERS",
           "MarkTable", "marks_meeting"]

LAYERS = {
    "currents": "Current arrows",
    "drops": "Voltage drops",
    "potentials": "Node potentials",
    "loops": "Loop currents",
    "descriptions": "Part descriptions",
}

_FM: QFontMetricsF | None = None


def _fm() -> QFontMetricsF:
    global _FM
    if _FM is None:
        _FM = QFontMetricsF(small_font())
    return _FM


def _unit_xy(dx: float, dy: float) -> tuple[float, float]:
    """(dx, dy) scaled to length 1 (a zero vector stays zero)."""
    length = math.hypot(dx, dy) or 1.0
    return dx / length, dy / length


def _outlined(points: list[tuple[float, float]], width: float) -> QPolygonF:
    """The area a convex polygon covers when filled and outlined by a pen of ``width``
    (Qt's default bevel join): each corner becomes two, its sides pushed out by half the width.

    Filling this with no pen looks as the filled and stroked polygon does, at a fraction of
    the cost: stroking makes the raster engine build and fill an outline path on every draw.
    """
    n, h = len(points), width / 2
    cx, cy = sum(p[0] for p in points) / n, sum(p[1] for p in points) / n
    normals = []
    for (x0, y0), (x1, y1) in zip(points, points[1:] + points[:1]):
        nx, ny = _unit_xy(y1 - y0, x0 - x1)
        if nx * ((x0 + x1) / 2 - cx) + ny * ((y0 + y1) / 2 - cy) < 0:  # point it away from the inside
            nx, ny = -nx, -ny
        normals.append((nx * h, ny * h))
    out = []
    for (x, y), (ax, ay), (bx, by) in zip(points, normals[-1:] + normals[:-1], normals):
        out += [QPointF(x + ax, y + ay), QPointF(x + bx, y + by)]
    return QPolygonF(out)


def _head_points(x: float, y: float, dx: float, dy: float, size: float) -> list[tuple[float, float]]:
    """An arrow head's corners: its tip at (x, y) pointing along the unit vector (dx, dy)."""
    bx, by = x - dx * size, y - dy * size
    nx, ny = -dy * size * 0.6, dx * size * 0.6
    return [(x, y), (bx + nx, by + ny), (bx - nx, by - ny)]


@lru_cache(maxsize=256)
def _head_shape(dx: float, dy: float, size: float, pen: float) -> tuple[tuple, tuple[QPolygonF]]:
    """The stamp key and shape of an arrow head about its tip (see ``_head_stamp``)."""
    return ("head", dx, dy, size, pen), (_outlined(_head_points(0.0, 0.0, dx, dy, size), pen),)


def _head_stamp(x: float, y: float, dx: float, dy: float, size: float = 5.0, pen: float = 1.4) -> Stamp:
    """A filled arrow head with its tip at (x, y) pointing along the unit vector (dx, dy),
    taking in the outline of a ``pen`` wide pen (drawn with no pen: see ``_outlined``), as
    a stamp (see ``stamps``). One shape per direction is worked out, and put in place."""
    return (*_head_shape(dx, dy, size, pen), x, y)


def _arrow_head(x: float, y: float, dx: float, dy: float, size: float = 5.0, pen: float = 1.4) -> QPolygonF:
    """The head of ``_head_stamp`` as a polygon in place."""
    return _head_stamp(0.0, 0.0, dx, dy, size, pen)[1][0].translated(x, y)


def _arc_band(r: float, start: float, span: float, width: float, step: float = 5.0) -> QPolygonF:
    """The area a ``width`` wide pen with round caps covers along an arc of radius ``r``
    about the origin (``start`` and ``span`` in degrees, counter-clockwise positive as in
    ``QPainter.drawArc``, y down), as a polygon with a corner every ``step`` degrees at most."""
    h = width / 2
    k = max(2, math.ceil(abs(span) / step) + 1)
    angles = [math.radians(start + span * i / (k - 1)) for i in range(k)]

    def cap(a: float, turn: float) -> list[QPointF]:
        # half a circle round the arc's end at angle a, from its outer edge to its inner one
        cx, cy = r * math.cos(a), -r * math.sin(a)
        out = math.atan2(-math.sin(a), math.cos(a))
        return [QPointF(cx + h * math.cos(out + turn * math.pi * j / 6), cy + h * math.sin(out + turn * math.pi * j / 6))
                for j in range(1, 6)]

    # y runs down, so an arc run counter-clockwise turns its screen angle the other way
    turn = -1.0 if span > 0 else 1.0
    return QPolygonF([QPointF((r + h) * math.cos(a), -(r + h) * math.sin(a)) for a in angles]
                     + cap(angles[-1], turn)  # round ahead of the end
                     + [QPointF((r - h) * math.cos(a), -(r - h) * math.sin(a)) for a in reversed(angles)]
                     + cap(angles[0], -turn)[::-1])  # and behind the start, inner edge to outer


def _rounded_box(rect: QRectF, radius: float, steps: int = 4) -> QPolygonF:
    """``rect`` with corners rounded to ``radius``, as a polygon (``steps`` sides per corner)."""
    corners = ((rect.right() - radius, rect.top() + radius, -90), (rect.right() - radius, rect.bottom() - radius, 0),
               (rect.left() + radius, rect.bottom() - radius, 90), (rect.left() + radius, rect.top() + radius, 180))
    return QPolygonF([QPointF(cx + radius * math.cos(math.radians(a0 + 90 * j / steps)),
                              cy + radius * math.sin(math.radians(a0 + 90 * j / steps)))
                      for cx, cy, a0 in corners for j in range(steps + 1)])


_TEXTS: dict[str, tuple[QStaticText, float]] = {}
_TEXTS_KEPT = 4096


def _text(text: str) -> tuple[QStaticText, float]:
    """``text`` laid out for drawing (plain text, no markup) and its width in the marks' font.

    Kept by text: the same values recur all over a drawing and from one solve to the next,
    and measuring a text costs more than the rest of laying out its mark. A static text
    is only read when drawn, so marks showing the same text share one.
    """
    hit = _TEXTS.get(text)
    if hit is None:
        if len(_TEXTS) >= _TEXTS_KEPT:
            _TEXTS.clear()
        st = QStaticText(text)
        st.setTextFormat(Qt.TextFormat.PlainText)
        hit = _TEXTS[text] = (st, _fm().horizontalAdvance(text))
    return hit


def _advance(text: str) -> float:
    """The width of ``text`` in the marks' font."""
    return _text(text)[1]


def _centred(rect: QRectF, text: str) -> tuple[QPointF, QStaticText]:
    """Where ``text`` goes centred in ``rect`` (as ``drawText`` with AlignCenter), ready to draw."""
    st, advance = _text(text)
    return (QPointF(rect.left() + (rect.width() - advance) / 2,
                    rect.top() + (rect.height() - _fm().height()) / 2), st)


_CENTRE = int(Qt.AlignmentFlag.AlignCenter)
_LEFT = int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter)
_RIGHT = int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)


def _align(o: PartItem) -> int:
    """Text beside a part: centred under or over a horizontal one, away from an upright one."""
    return _CENTRE if o.horizontal else _LEFT if o.side > 0 else _RIGHT


_PENS: dict[tuple[int, float], QPen] = {}


def _pen(colour, width: float) -> QPen:
    """A pen of ``colour`` (a QColor) and ``width``, made once."""
    key = (colour.rgba(), width)
    pen = _PENS.get(key)
    if pen is None:
        pen = _PENS[key] = QPen(colour, width)
    return pen


_SLOTS: dict[str, float] = {}


def _slot_width(unit: str) -> float:
    """The widest text ``format_value`` writes for a value in ``unit`` within the prefixes p…T."""
    w = _SLOTS.get(unit)
    if w is None:
        fm = _fm()
        w = max(fm.horizontalAdvance(f"{n} {p}{unit}") for n in ("888", "88.8", "8.88")
                for p in ("", "p", "n", "µ", "m", "k", "M", "G", "T"))
        _SLOTS[unit] = w
    return w


def _fits_slot(value: float) -> bool:
    """True when the text of ``value`` is a mantissa and an SI prefix (no written-out exponent)."""
    v = abs(value)
    return v == 0 or 1e-12 <= v < 1e15


def _rounded(value: float) -> str:
    """What decides a mark's text and arrow: sign and three significant figures (as ``format_value``)."""
    return f"{value:.2e}"


_WRITTEN: dict[tuple[str, str], str] = {}


def _written(key: str, value: float, unit: str) -> str:
    """``format_value(value, unit)`` for a value whose ``_rounded`` is ``key``: the text
    follows from the key alone, so it is written once per key (values recur from one
    solution to the next, and writing one costs more than laying out its mark)."""
    hit = _WRITTEN.get((key, unit))
    if hit is None:
        if len(_WRITTEN) >= _TEXTS_KEPT:
            _WRITTEN.clear()
        hit = _WRITTEN[(key, unit)] = format_value(value, unit)
    return hit


class _LayerPainted(QGraphicsItem):
    """An item with no contents of its own whose ``layer`` paints it, in its scene box
    (``_scene_box``: left, top, right, bottom); ``_visible`` mirrors ``isVisible`` (asking
    Qt costs a call)."""

    GROUP: int  # which of the layer's pens and brushes draws it (``ReadingLayer.GROUPS``)
    layer: "ReadingLayer"
    _scene_box: tuple[float, float, float, float]
    _visible: bool
    _fig: tuple | None  # what ``_lay_out`` worked out for the present text and place

    def figure(self) -> tuple:
        """What the layer draws (``_lay_out``), in scene coordinates, laid out once per text and place."""
        fig = self._fig
        if fig is None:
            fig = self._fig = self._lay_out()
        return fig

    def _lay_out(self) -> tuple:
        raise NotImplementedError

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        """Nothing: the layer paints the mark (see ``figure``)."""

    def _show(self, on: bool) -> None:
        if on != self._visible:
            self._visible = on
            self.layer.tables[self.GROUP].show(self, on)
            self.setVisible(on)
            self.repaint()

    def repaint(self) -> None:
        """Ask the layer to paint the mark's box again."""
        self.layer.repaint_mark(self, self._scene_box)


class _PartMark(_LayerPainted):
    """A mark that belongs to a part and lays itself out beside it.

    Its box is the room the widest ordinary text needs, so a new value only
    asks for a repaint: the text is written when the mark is painted (or read),
    and a mark scrolled out of sight or too small to read costs no formatting.

    The mark is an item for hit tests and layout, but it has no contents: its
    ``ReadingLayer`` paints it together with every other part's marks.
    """

    LINE = 0
    ROOM = 0  # space kept beside the text for an arrow on upright parts
    ABOVE_BELOW = 0.0  # how far that arrow reaches above and below the text's line
    UNIT = ""

    def __init__(self, parent: PartItem, layer: ReadingLayer) -> None:
        super().__init__(parent)
        self.setZValue(Z_MARK)
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemHasNoContents, True)
        self.layer = layer
        self._scene_box = (0.0, 0.0, 0.0, 0.0)  # the box in scene coordinates: left, top, right, bottom
        self._text_box = (0.0, 0.0, 0.0, 0.0)  # the part of it any text (and its arrow) can take
        self.value: float | None = None
        self._key = ""  # ``_rounded(value)``: what the text and arrow follow
        self._text = ""
        self._text_of: float | None = None  # the value ``_text`` was written for
        self._text_rect: QRectF | None = None
        self._bounds = QRectF()
        self._owner = parent  # the parent item: asking Qt for it costs a call each time
        self._advance = 0.0  # the width of the text ``_text_rect`` was laid out for
        self._fig: tuple | None = None  # what ``_lay_out`` worked out for the present text and layout
        self._drawing: tuple | None = None  # what ``_draw`` worked out, and for what (``_lay_out``)
        self._cover_of: QRectF | None = None  # the text box ``_cover`` was worked out from
        self._cover_drawn = False  # whether ``_cover`` takes in what a value other than zero draws beside the text
        self._cover: list[Box] = []
        self._visible = False  # what was last asked of setVisible (asking Qt again costs a call)
        self.setVisible(False)

    @property
    def owner(self) -> PartItem:
        return self._owner

    @property
    def text(self) -> str:
        """The value as shown ('' when there is none)."""
        if self.value is None:
            return ""
        if self._text_of != self.value:
            self._text = _written(self._key.lstrip("-"), abs(self.value), self.UNIT)
            self._text_of = self.value
            self._text_rect = None
        return self._text

    @property
    def text_rect(self) -> QRectF:
        """Where the text is drawn, in the owner's coordinates."""
        text = self.text
        if self._text_rect is None:
            o = self.owner
            self._advance = _advance(text)
            w = self._advance + 2 + (0 if o.horizontal else self.ROOM)
            self._text_rect = o.line_rect(self.LINE, w)
        return self._text_rect

    def set_value(self, value: float | None, readable: bool = True) -> None:
        """Show ``value`` (None hides the mark: no valid result).

        ``readable`` False says no view shows marks large enough to draw (they paint nothing
        then), so a new text in the same box asks for no repaint: a change of zoom redraws
        the item's picture anyway.
        """
        if value is None:
            self.value = None
            self._show(False)
            return
        if value != self.value:
            old = self.value
            was_shown = old is not None
            key = _rounded(value)
            same_text = was_shown and key == self._key
            self.value, self._key = value, key
            if same_text:
                if self._text_of == old:
                    self._text_of = value  # the text and the arrow stay as they are
            elif was_shown and _fits_slot(value):
                self._text_rect = None
                self._fig = None
                if not readable:
                    self.layer.touch(self)
                elif old * value > 0:  # the same direction: only the text line (and its arrow) change
                    self.layer.repaint_mark(self, self._text_box)
                else:
                    self.repaint()
            else:
                self.relayout()
        self._show(self._layer_on)

    _layer_on = True

    def set_layer(self, on: bool) -> None:
        self._layer_on = on
        self._show(on and self.value is not None)

    def _text_at(self, box: QRectF, align: int) -> QPointF:
        """Where the text goes in ``box`` with ``align`` (as ``drawText`` would put it)."""
        if align == _CENTRE:
            x = box.left() + (box.width() - self._advance) / 2
        elif align == _LEFT:
            x = box.left()
        else:
            x = box.right() - self._advance
        return QPointF(x, box.top() + (box.height() - _fm().height()) / 2)

    def relayout(self) -> None:
        """Lay the box out again (the owner moved or turned, or an unusual value came)."""
        self.prepareGeometryChange()
        self.repaint()  # where it was
        o = self.owner
        self._text_rect = None
        self._fig = None
        self._drawing = None
        if self.value is None:
            self._bounds = QRectF()
        else:
            w = _slot_width(self.UNIT) + 2 + (0 if o.horizontal else self.ROOM)
            slot = o.line_rect(self.LINE, w).united(self.text_rect)
            if o.horizontal:
                slot.adjust(-20, 0, 0, 0)  # the arrow drawn left of the text
            else:
                slot.adjust(0, -self.ABOVE_BELOW, 0, self.ABOVE_BELOW)  # an upright arrow beside it
            self._bounds = slot.united(self._beside_body()).adjusted(-1, -1, 1, 1)
            t = slot.adjusted(-1, -1, 1, 1).translated(o.pos())
            self._text_box = (t.left(), t.top(), t.right(), t.bottom())
        self.layer.place(self, self._bounds.translated(o.pos()))
        self.repaint()

    def _beside_body(self) -> QRectF:
        """What the mark draws at the part's body, apart from its text (none here)."""
        return QRectF()

    def _lay_out(self) -> tuple:
        """(text's top left, static text, lines, arrow head (a stamp) or None) in scene coordinates.

        Where the text goes and the lines beside it follow from the text's width and the
        value's sign alone (``_draw``), and digits are all one width: a new value mostly
        takes the place worked out for the last one.
        """
        text = self.text
        st, advance = _text(text)
        v = self.value
        follows = (advance, v < 0, v == 0)
        kept = self._drawing
        if kept is None or kept[0] != follows:
            kept = self._drawing = (follows, self._draw(text))
        at, lines, head = kept[1]
        return at, st, lines, head

    def _draw(self, text: str) -> tuple:
        """(text's top left, lines, arrow head (a stamp) or None) in scene coordinates for ``text``."""
        raise NotImplementedError

    def boundingRect(self) -> QRectF:
        return self._bounds

    def cover_boxes(self) -> list[Box]:
        """What marks placed nearby should not hide: the text (kept while it stays)."""
        rect, drawn = self.text_rect, bool(self.value)
        if self._cover_of is not rect or self._cover_drawn != drawn:
            self._cover_of, self._cover_drawn = rect, drawn
            self._cover = [box_of(rect.translated(self._owner.pos()), COVER_TEXT)]
            if drawn:
                self._cover += self._beside_covers()
        return self._cover

    def _beside_covers(self) -> list[Box]:
        """What else the mark draws for a value other than zero that marks placed nearby
        should not hide (nothing here)."""
        return []

    def drawn_rect(self) -> QRectF:
        """What the mark covers with its present text (its box also holds room for longer ones)."""
        if self.value is None:
            return QRectF()
        return self.text_rect.united(self.owner.outline.adjusted(-16, -16, 16, 16))

    def shape(self) -> QPainterPath:
        path = QPainterPath()
        path.addRect(self.text_rect)
        return path


class CurrentMark(_PartMark):
    """Arrow in the direction of conventional current, with the current's size."""

    LINE = 2
    ROOM = 14
    ABOVE_BELOW = 5.0  # the arrow runs 8 px either side of the line's middle, its head and pen beyond
    UNIT = "A"
    GROUP = 0

    def _draw(self, text: str) -> tuple:
        o = self.owner
        r = self.text_rect.translated(o.pos())
        box = r
        if not o.horizontal:
            box = r.adjusted(self.ROOM, 0, 0, 0) if o.side > 0 else r.adjusted(0, 0, -self.ROOM, 0)
        at = self._text_at(box, _align(o))
        if self.value == 0:
            return at, [], None
        x0, y0, x1, y1 = o.ends
        ux, uy = _unit_xy(x1 - x0, y1 - y0)
        if self.value < 0:
            ux, uy = -ux, -uy
        cy = r.top() + r.height() / 2
        if o.horizontal:
            mx, my = r.left() - 10, cy
        elif o.side > 0:
            mx, my = r.left() + 6, cy + 1
        else:
            mx, my = r.right() - 6, cy + 1
        tip_x, tip_y = mx + 8 * ux, my + 8 * uy
        shaft = QLineF(mx - 8 * ux, my - 8 * uy, tip_x - 3 * ux, tip_y - 3 * uy)
        return at, [shaft], _head_stamp(tip_x, tip_y, ux, uy)


class DropMark(_PartMark):
    """The drop across the part, with + at its higher terminal and − at its lower."""

    LINE = 3
    UNIT = "V"
    GROUP = 1

    def _beside_body(self) -> QRectF:
        """The + and − marks: 9 px in from the terminals and 9 px out to the side, 3.2 px arms."""
        o = self.owner
        t0, t1 = o.terminal_points()[:2]
        ends = QRectF(t0, t1).normalized()
        side = 9 * o.side
        ends.translate(0, side) if o.horizontal else ends.translate(side, 0)
        return ends.adjusted(-5, -5, 5, 5)

    def _sign_centres(self) -> tuple[tuple[float, float], tuple[float, float]]:
        """Where the signs beside the first and the second terminal go, in scene coordinates:
        9 px in from each terminal and 9 px out to the side."""
        o = self.owner
        x0, y0, x1, y1 = o.ends
        ux, uy = _unit_xy(x1 - x0, y1 - y0)
        pos = o.pos()
        sx, sy = (pos.x(), pos.y() + 9.0 * o.side) if o.horizontal else (pos.x() + 9.0 * o.side, pos.y())
        return (x0 + 9 * ux + sx, y0 + 9 * uy + sy), (x1 - 9 * ux + sx, y1 - 9 * uy + sy)

    def _beside_covers(self) -> list[Box]:
        """The + and −: a tag over a sign hides which end is higher. A sign weighs less than a
        text: half hidden it still reads, and a tag moved off it must not land on another
        tag's number instead."""
        return [(x - 4.5, y - 4.5, x + 4.5, y + 4.5, COVER_TEXT / 4) for x, y in self._sign_centres()]

    def _draw(self, text: str) -> tuple:
        """(text's top left, the + and − lines, None) in scene coordinates."""
        o = self.owner
        pos = o.pos()
        at = self._text_at(self.text_rect.translated(pos), _align(o))
        if self.value == 0:
            return at, [], None
        (px, py), (mx, my) = self._sign_centres()  # + beside the higher terminal, − beside the lower
        if self.value < 0:
            (px, py), (mx, my) = (mx, my), (px, py)
        r = 3.2
        lines = [QLineF(px - r, py, px + r, py), QLineF(px, py - r, px, py + r), QLineF(mx - r, my, mx + r, my)]
        return at, lines, None


def marks_meeting(marks: list, areas: np.ndarray) -> list:
    """Those of ``marks`` whose scene boxes (``_scene_box``) meet any of ``areas`` (rows of left,
    top, right, bottom), tested against every area at once."""
    if not marks:
        return marks
    hit = _meets(np.array([m._scene_box for m in marks]), areas)
    return [m for m, h in zip(marks, hit.tolist()) if h]


def _meets(boxes: np.ndarray, areas: np.ndarray) -> np.ndarray:
    """Per row of ``boxes``, whether it meets any of ``areas`` (both rows of left, top, right,
    bottom; edges touching count), every pair tested at once."""
    b, a = boxes[:, :, None], areas.T[None]
    return ((b[:, 2] >= a[:, 0]) & (b[:, 0] <= a[:, 2]) & (b[:, 3] >= a[:, 1]) & (b[:, 1] <= a[:, 3])).any(axis=1)


class MarkTable:
    """The scene boxes of one group's marks, a row each, and whether each is shown.

    A repaint picks the shown marks whose boxes meet its areas in a few array operations
    over every row: a value tried in a 200-part sketch seen whole repaints about 50
    rectangles spread over the drawing, and a test per mark in Python cost more than
    drawing the marks it found. Rows of marks gone are packed away once they outnumber
    the rest.
    """

    def __init__(self) -> None:
        self.marks: list = []  # per row: the mark, or None once it is gone
        self._row: dict[int, int] = {}
        self._boxes = np.zeros((64, 4))
        self._shown = np.zeros(64, dtype=bool)
        self._over = np.zeros(64, dtype=bool)  # drawn over the rest (``ReadingLayer._split``)

    def __len__(self) -> int:
        return len(self._row)

    def put(self, mark, box: tuple[float, float, float, float]) -> None:
        """File ``mark`` with scene box ``box`` (left, top, right, bottom)."""
        row = self._row.get(id(mark))
        if row is None:
            row = self._row[id(mark)] = len(self.marks)
            self.marks.append(mark)
            if row == len(self._shown):
                self._boxes = np.concatenate((self._boxes, np.zeros_like(self._boxes)))
                self._shown = np.concatenate((self._shown, np.zeros_like(self._shown)))
                self._over = np.concatenate((self._over, np.zeros_like(self._over)))
            self._shown[row], self._over[row] = mark._visible, False
        self._boxes[row] = box

    def show(self, mark, on: bool) -> None:
        """``mark`` is shown (``on``) or hidden from now on."""
        row = self._row.get(id(mark))
        if row is not None:
            self._shown[row] = on

    def drop(self, mark) -> None:
        """``mark`` is gone from the drawing."""
        row = self._row.pop(id(mark), None)
        if row is None:
            return
        self.marks[row] = None
        self._shown[row] = self._over[row] = False
        if len(self.marks) > 2 * len(self._row) + 64:
            live = [k for k, m in enumerate(self.marks) if m is not None]
            self.marks = [self.marks[k] for k in live]
            for a in (self._boxes, self._shown, self._over):
                a[:len(live)] = a[live]
            self._row = {id(m): k for k, m in enumerate(self.marks)}

    def draw_over(self, marks) -> None:
        """From now on ``marks`` (those of the table among them) are drawn over the rest."""
        self._over[:] = False
        row = self._row
        self._over[[row[id(m)] for m in marks if id(m) in row]] = True

    def meeting(self, areas: np.ndarray, over: bool | None = None) -> list:
        """The shown marks whose boxes meet any of ``areas`` (rows of left, top, right, bottom),
        in the order they were filed: those meeting the box around the areas, then those of
        them meeting an area (every one at once). ``over``: only those drawn over the rest
        (True) or only the others (False)."""
        n = len(self.marks)
        b = self._boxes[:n]
        (left, top), (right, bottom) = areas[:, :2].min(axis=0), areas[:, 2:].max(axis=0)
        shown = self._shown[:n]
        if over is not None:
            shown = shown & (self._over[:n] == over)
        rows = np.flatnonzero(shown & (b[:, 2] >= left) & (b[:, 0] <= right)
                              & (b[:, 3] >= top) & (b[:, 1] <= bottom))
        if len(areas) > 1 and len(rows):
            rows = rows[_meets(b[rows], areas)]
        marks = self.marks
        return [marks[k] for k in rows.tolist()]


class ReadingLayer(QGraphicsItem):
    """Paints every mark of the solution in one pass: part currents and drops, node
    potential tags and loop currents.

    Each mark stays an item of its own (hit tests, layout, visibility) with no contents:
    hundreds of tiny items each cost a call into Python, a cached picture and a painter of
    their own on every change, where one item drawing them all costs little more than the
    texts and lines themselves. Marks ask for their box to be repainted (``repaint_mark``);
    the layer files their boxes (``MarkTable``) and draws those meeting the rectangles being
    repainted (``_areas``), group by group (``GROUPS``), each group with one pen and brush.

    Marks that change together are drawn over the rest (see ``_split``): while a part is
    dragged or a value tried, the same marks change on every edit, and the others come
    from pictures each view keeps, one per group (``_kept_pictures``).
    """

    GROUPS = ("currents", "drops", "potentials", "loops")
    KEEP = True  # keep pictures of the marks not changing, per view (False: draw all each time)

    def __init__(self) -> None:
        super().__init__()
        self.setZValue(Z_MARK)
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemUsesExtendedStyleOption, True)
        self.setAcceptedMouseButtons(Qt.MouseButton.NoButton)
        self.tables = tuple(MarkTable() for _ in self.GROUPS)  # per group: its marks' boxes
        self._bounds = QRectF()
        self._held: list[tuple[float, float, float, float]] | None = None
        self._held_marks: dict[int, QGraphicsItem] | None = None
        self._stamper = Stamper()  # heads, tag boxes and loop arrows: copied, not filled afresh
        self._hot: dict[int, QGraphicsItem] = {}  # the marks drawn over the rest: those changing of late
        self._hot_in: tuple[dict[int, QGraphicsItem], ...] = tuple({} for _ in self.GROUPS)  # per group
        self._split_count = 0  # how often the marks were split into kept and changing ones
        self._changes = 0  # how often a kept mark changed: a picture of them made before is stale
        self._kept: dict[int, tuple[tuple, list]] = {}  # per view: (made for, (corner, picture) per group)
        self._pictured: list[tuple[float, float, float, float]] = []  # the scene areas the kept pictures show
        self._wanted: set[int] = set()  # views repainted whole for many changed marks since their last pictures

    FEW = 150  # up to this many boxes in one hold are repainted each on its own, more as one box

    def touch(self, mark: QGraphicsItem) -> None:
        """Take note that ``mark`` now draws differently (its repaint is asked for apart)."""
        key = id(mark)
        if self._held_marks is not None:
            self._held_marks[key] = mark
        if key not in self._hot and self._pictured:
            left, top, right, bottom = mark._scene_box
            # a mark out of every kept picture's area leaves them as they are (a large sketch's
            # marks out of sight, say)
            if any(left <= r and right >= x and top <= b and bottom >= y for x, y, r, b in self._pictured):
                self._changes += 1

    def repaint_mark(self, mark: QGraphicsItem, box: tuple[float, float, float, float]) -> None:
        """``mark`` changed (``touch``): paint its scene box (left, top, right, bottom) again,
        at the end of a ``hold``."""
        self.touch(mark)
        if box[2] <= box[0]:
            return
        if self._held is not None:
            self._held.append(box)
        else:
            self._repaint([box])

    @contextmanager
    def hold(self) -> Iterator[None]:
        """Gather the marks' repaints over a block (a whole solution laid on the drawing)."""
        if self._held is not None:
            yield
            return
        self._held, self._held_marks = [], {}
        try:
            yield
        finally:
            boxes, marks = self._held, self._held_marks
            self._held = self._held_marks = None
            self._repaint(boxes, marks)

    def _split(self, changing: dict[int, QGraphicsItem]) -> None:
        """From now on draw ``changing`` over the other marks, and every view again.

        The marks that changed with the last few edits are likely to change with the next
        too (a part dragged on, a value tried again): they alone are then drawn, and the
        rest come from the pictures each view keeps of them. A mark drawn over the others
        of its group stays so until the next split, in every view and every repaint, so the
        drawing never depends on which part of it was repainted last. When most marks
        change each time, all are drawn and the pictures hold none.
        """
        self._hot = changing
        self._hot_in = tuple({} for _ in self.GROUPS)
        for key, mark in changing.items():
            self._hot_in[mark.GROUP][key] = mark
        for table, marks in zip(self.tables, self._hot_in):
            table.draw_over(marks.values())
        self._split_count += 1
        scene = self.scene()
        for view in scene.views() if scene is not None else ():
            self._wanted.add(id(view))
            view.viewport().update()

    def drop_pictures(self) -> None:
        """Forget the views' kept pictures (the next repaint draws every mark afresh)."""
        self._kept.clear()
        self._pictured = []

    def _repaint(self, boxes: list[tuple[float, float, float, float]],
                 marks: dict[int, QGraphicsItem] | None = None) -> None:
        """Have the views repaint ``boxes`` (those of ``marks``, when known).

        Up to ``FEW`` boxes go to the scene one by one, so a view repaints just their
        region and ``paint`` draws only the marks meeting it: a new value that changes a
        few texts spread over the drawing then redraws those, not all in the box around
        them (an item's own repaint requests are united into one box). Past ``FEW``,
        clipping every item to that many rectangles costs more than it saves: a view that
        shows any of them repaints all it shows. Not the box around them: with another
        item's repaint beside it (a ring at an open end, say) the view's region would be
        two rectangles, and Qt's raster engine draws every line, text and picture through
        a clip of more than one rectangle at several times the cost (a 200-part move
        seen whole: 0.4-2 ms less per edit, in same-process A/B runs).

        With kept pictures (``KEEP``) a view repainted whole copies them and draws the
        changing marks alone; marks among those past ``FEW`` not yet drawn over the rest
        are split off first (``_split``).
        """
        scene = self.scene()
        if not boxes or scene is None:
            return
        if len(boxes) <= self.FEW:
            for left, top, right, bottom in dict.fromkeys(boxes):
                scene.update(QRectF(left, top, right - left, bottom - top))
            return
        if self.KEEP and marks is not None:
            hot = self._hot
            if not marks.keys() <= hot.keys():
                hot = {**hot, **marks}
            if len(hot) > 2 * len(marks) + self.FEW:  # most of those drawn over the rest no longer change
                hot = marks
            if hot is not self._hot:
                self._split(hot)
                return
        lefts, tops, rights, bottoms = zip(*boxes)
        box = QRectF(min(lefts), min(tops), max(rights) - min(lefts), max(bottoms) - min(tops))
        for view in scene.views():
            viewport = view.viewport()
            if view.mapFromScene(box).boundingRect().intersects(viewport.rect()):
                self._wanted.add(id(view))
                viewport.update()

    def place(self, mark, box: QRectF) -> None:
        """Paint ``mark`` (a part mark, a potential tag or a loop mark) in scene box ``box``
        from now on (its group's ``MarkTable`` files it)."""
        mark._scene_box = scene_box = (box.left(), box.top(), box.right(), box.bottom())
        # the layer's box only grows: a larger one costs nothing (an empty box, a mark with
        # nothing to show, is never contained: it would repaint the whole layer each time)
        if not box.isEmpty() and not self._bounds.contains(box):
            self.prepareGeometryChange()
            self._bounds = self._bounds.united(box)
        self.tables[mark.GROUP].put(mark, scene_box)

    def forget(self, owner: PartItem) -> None:
        """Stop painting the marks of ``owner`` (it leaves the drawing)."""
        for mark in (owner.current_mark, owner.drop_mark):
            if mark is not None:
                mark.repaint()
                self._hot.pop(id(mark), None)
                self._hot_in[mark.GROUP].pop(id(mark), None)
                self.tables[mark.GROUP].drop(mark)

    def boundingRect(self) -> QRectF:
        return self._bounds

    def drawn_rect(self) -> QRectF:
        """Nothing of its own: the marks say what they cover."""
        return QRectF()

    MOST_AREAS = 256  # a repainted region of more rectangles is drawn as the box around it

    @classmethod
    def _areas(cls, painter: QPainter, option: QStyleOptionGraphicsItem,
               widget: QWidget | None) -> np.ndarray:
        """The scene areas being repainted, one row (left, top, right, bottom) each: the
        rectangles of the region the view repaints (``CanvasView.exposed_region``), or the
        exposed box."""
        ex = option.exposedRect
        view = widget.parentWidget() if widget is not None else None
        region = getattr(view, "exposed_region", None)
        t = painter.worldTransform()
        if region is None or not 1 < region.rectCount() <= cls.MOST_AREAS or not zooms_only(t):
            return np.array([[ex.left(), ex.top(), ex.right(), ex.bottom()]])
        # pixel (x1, y1)..(x2, y2) covers x1 to x2 + 1: back to the scene through scale and shift
        d = np.array([r.getCoords() for r in region], dtype=float) + (0.0, 0.0, 1.0, 1.0)
        d -= (t.dx(), t.dy(), t.dx(), t.dy())
        d /= (t.m11(), t.m22(), t.m11(), t.m22())
        return np.hstack((np.minimum(d[:, :2], d[:, 2:]), np.maximum(d[:, :2], d[:, 2:])))

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        if too_small(painter):
            return
        areas = self._areas(painter, option, widget)
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setFont(small_font())
        # (pen of the lines and texts, fill of the shapes) per group; shapes take in their
        # outlines and are filled with no pen (see ``_outlined``)
        looks = ((_pen(th.current, 1.4), th.current), (_pen(th.drop, 1.4), th.drop),
                 (_pen(th.potential, 0.9), th.tag), (_pen(th.loop, LoopMark.PEN), th.loop))
        if getattr(self.scene(), "drawn_exactly", False):  # a picture file: every mark, shapes filled afresh
            for group in range(len(self.GROUPS)):
                self._draw(painter, areas, looks, group, True, self._ALL)
            return
        kept = self._kept_pictures(painter, widget, th, looks)
        for group in range(len(self.GROUPS)):
            if kept is None:
                self._draw(painter, areas, looks, group, False, self._KEPT)
            elif kept[group] is not None:
                at, image = kept[group]
                painter.save()
                painter.resetTransform()
                painter.drawImage(at, image)
                painter.restore()
            self._draw(painter, areas, looks, group, False, self._HOT)

    _ALL, _KEPT, _HOT = range(3)  # which marks of a group ``_draw`` draws

    def _kept_pictures(self, painter: QPainter, widget: QWidget | None, th: Theme,
                       looks: tuple) -> list[tuple[QPointF, QImage] | None] | None:
        """Per group, the picture of its kept marks (those not drawn over the rest, see
        ``_split``) that the view being painted keeps, and where its corner goes in the view
        (None: no kept mark of the group in sight). Made anew when the whole view is
        repainted and the pictures are stale: kept marks changed, or the view zoomed,
        scrolled or was resized; only for a repaint asked for by many changed marks (``_wanted``):
        a zoom step or a resize repaints the whole view too, but the next one soon leaves
        the pictures. None when there are none to use (the marks are then drawn).

        A picture covers the marks' boxes (every mark draws inside its box), not the whole
        view: copying it costs by the pixel. Its corner lies on a device pixel, so the marks
        land on the pixels a direct drawing puts them on; it takes in the whole boxes of marks
        the view's edge cuts, so no text starts left of or above it.

        One picture per group, not one for all, keeps the groups' order: a tag drawn over
        the part marks it hangs among stays over them whether they change or not.
        """
        view = widget.parentWidget() if widget is not None else None
        region = getattr(view, "exposed_region", None)
        t = painter.worldTransform()
        if region is None or not self.KEEP or not self._hot or not zooms_only(t):
            return None  # no marks drawn over the rest: none split off, a picture would save little
        w, h, dpr = widget.width(), widget.height(), widget.devicePixelRatioF()
        made_for = (t.m11(), t.m22(), t.dx(), t.dy(), w, h, dpr, th, self._split_count, self._changes)
        kept = self._kept.get(id(view))
        if kept is not None and kept[0] == made_for:
            return kept[1]
        if region.rectCount() != 1 or not region.boundingRect().contains(widget.rect()):
            return None  # a part of the view: drawing the marks in it costs less than new pictures
        if id(view) not in self._wanted:
            return None  # not repainted for many changed marks (a zoom step, say): no use for pictures yet
        self._wanted.discard(id(view))
        r = t.inverted()[0].mapRect(QRectF(0, 0, w, h))
        areas = np.array([[r.left(), r.top(), r.right(), r.bottom()]])
        pictures: list[tuple[QPointF, QImage] | None] = []
        for group in range(len(self.GROUPS)):
            marks = self._marks(group, areas, self._KEPT)
            if not marks:
                pictures.append(None)
                continue
            boxes = np.array([m._scene_box for m in marks])
            (left, top), (right, bottom) = boxes[:, :2].min(axis=0).tolist(), boxes[:, 2:].max(axis=0).tolist()
            # whole boxes, also of marks the view's edge cuts: a text drawn from left of a
            # picture's edge lands a pixel off (glyph positions below zero are cut toward it)
            d = t.mapRect(QRectF(left, top, right - left, bottom - top))
            x0, y0 = math.floor(d.left() * dpr) - 1, math.floor(d.top() * dpr) - 1
            x1, y1 = math.ceil(d.right() * dpr) + 1, math.ceil(d.bottom() * dpr) + 1
            if x1 <= x0 + 2 or y1 <= y0 + 2:
                pictures.append(None)
                continue
            image = QImage(x1 - x0, y1 - y0, QImage.Format.Format_ARGB32_Premultiplied)
            image.setDevicePixelRatio(dpr)
            image.fill(0)
            at = QPointF(x0 / dpr, y0 / dpr)
            p = QPainter(image)
            p.setRenderHints(painter.renderHints())
            p.setFont(small_font())
            p.setWorldTransform(t * QTransform.fromTranslate(-at.x(), -at.y()))
            self._paint_marks(p, group, marks, looks, False)
            p.end()
            pictures.append((at, image))
        views = {id(v) for v in self.scene().views()}
        self._kept = {k: v for k, v in self._kept.items() if k in views}
        self._kept[id(view)] = (made_for, pictures, (r.left(), r.top(), r.right(), r.bottom()))
        self._pictured = [v[2] for v in self._kept.values()]
        return pictures

    def _draw(self, painter: QPainter, areas: np.ndarray, looks: tuple, group: int, exact: bool,
              which: int) -> None:
        """Draw the marks of ``group`` meeting ``areas`` (``_marks``); ``exact``: shapes filled afresh."""
        marks = self._marks(group, areas, which)
        if marks:
            self._paint_marks(painter, group, marks, looks, exact)

    def _marks(self, group: int, areas: np.ndarray, which: int) -> list:
        """The visible marks of ``group`` meeting ``areas`` (rows of left, top, right, bottom):
        all (``_ALL``), those kept (``_KEPT``) or those drawn over them (``_HOT``)."""
        hot = self._hot_in[group]
        if which == self._HOT and len(hot) * 2 < len(self.tables[group]):
            marks = marks_meeting([m for m in hot.values() if m._visible], areas)  # fewer to look at
        else:
            marks = self.tables[group].meeting(areas, None if which == self._ALL else which == self._HOT)
        return marks

    def _paint_marks(self, painter: QPainter, group: int, marks: list, looks: tuple, exact: bool) -> None:
        """Draw ``marks`` of ``group`` (their ``figure``) with its look (pen, fill); one loop
        per kind of stroke, with no call per mark but the drawing itself (hundreds of marks
        are drawn on each repaint)."""
        figs = [m._fig or m.figure() for m in marks]
        text, stamp = painter.drawStaticText, self._stamper.draw
        pen, fill = looks[group]
        if group < 2:  # part marks: arrow heads, then texts and lines
            stamp(painter, [f[3] for f in figs if f[3] is not None], (fill,), exact)
            painter.setPen(pen)
            lines: list[QLineF] = []
            for at, st, mark_lines, _ in figs:
                text(at, st)
                if mark_lines:
                    lines += mark_lines
            if lines:
                painter.drawLines(lines)
        elif group == 2:  # potential tags: leader lines under the boxes, then box and text
            painter.setPen(pen)
            painter.drawLines([f[0] for f in figs])
            stamp(painter, [f[1] for f in figs], (pen.color(), fill), exact)  # rim, then inside
            painter.setPen(pen)
            for f in figs:
                text(f[2], f[3])
        else:  # loop marks: arc and arrow head, then text
            stamp(painter, [f[0] for f in figs], (fill,), exact)
            painter.setPen(pen)
            for _, at, st in figs:
                text(at, st)


class _HungMark(_LayerPainted):
    """A mark of a node or a loop, placed in the scene, painted by a ``ReadingLayer``.

    Like the part marks it has no contents of its own; ``move_to``, ``set_shown`` and
    ``_reshape`` keep its scene box (what the layer repaints) in step with it.
    """

    def __init__(self, layer: ReadingLayer) -> None:
        super().__init__()
        self.setZValue(Z_MARK)
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemHasNoContents, True)
        self.layer = layer
        self.active = False
        self.key: object = None  # what the mark shows (a grid point, a window): see SketchScene._match
        self._visible = True
        self._scene_box = (0.0, 0.0, 0.0, 0.0)
        self._fig: tuple | None = None  # what ``_lay_out`` worked out for the present text and place

    def move_to(self, at: QPointF) -> None:
        """Put the mark at scene point ``at``."""
        if at != self.pos():
            self.setPos(at)
            self._reshape()

    def set_shown(self, on: bool) -> None:
        self._show(on)

    def _reshape(self, repaint: bool = True) -> None:
        """The mark's text, place or box changed: repaint where it was and where it is
        (``repaint`` False: only take note, no view shows it large enough to draw)."""
        if repaint:
            self.repaint()
        else:
            self.layer.touch(self)
        self._fig = None
        self.layer.place(self, self.boundingRect().translated(self.pos()))
        if repaint:
            self.repaint()

    def cover_boxes(self) -> list[Box]:
        """What marks placed nearby should not hide: the whole mark."""
        return [(*self._scene_box, COVER_TEXT)]



class PotentialTag(_HungMark):
    """A small tag with a node's potential, hung from one of its grid points."""

    NEAR, FAR = 6.0, 24.0  # how far the box's corner hangs from its point, across and down
    # (across, down, reach) in order of preference: close by first, farther out when every
    # close place hides something (a junction of three parts with their labels all round)
    HANGS = tuple((sx, sy, reach) for reach in (NEAR, FAR) for sx, sy in ((-1, -1), (1, -1), (-1, 1), (1, 1)))
    GROUP = 2
    BORDER = 0.9  # the box's rim

    def __init__(self, layer: ReadingLayer) -> None:
        super().__init__(layer)
        self.text = ""
        self.at: tuple[int, int] | None = None  # the grid point it hangs from
        self._key: str | None = None  # ``_rounded`` of the value shown: all its text depends on
        self._rect = QRectF()
        self._corner = self.HANGS[0]
        self.hides = 0.0  # the weighted area it covered when last hung (``SketchScene._place_tag``)

    def set_value(self, value: float) -> None:
        key = _rounded(value)
        if key == self._key:
            return
        self._key = key
        text = _written(key, value, "V")
        if text == self.text:
            return
        fig, same_width = self._fig, _advance(text) == _advance(self.text)
        self.text = text
        if fig is not None and same_width:  # the same box: only the text is new (digits are one width)
            self._fig = (*fig[:3], _text(text)[0])
            self.repaint()
        else:
            self.set_corner(self._corner)

    def rect_at(self, corner: tuple[int, int, float]) -> QRectF:
        """The tag's box when hung towards ``corner`` (across, down, reach: (-1, -1, NEAR) = up
        and left, close by)."""
        fm = _fm()
        w = _advance(self.text) + 8
        h = fm.height() + 2
        reach = corner[2]
        x = -w - reach if corner[0] < 0 else reach
        y = -h - reach if corner[1] < 0 else reach
        return QRectF(x, y, w, h)

    def set_corner(self, corner: tuple[int, int, float]) -> None:
        rect = self.rect_at(corner)
        if rect != self._rect:
            self.prepareGeometryChange()
            self._rect = rect
        self._corner = corner
        self._reshape()

    def boundingRect(self) -> QRectF:
        return self._rect.united(QRectF(-1, -1, 2, 2)).adjusted(-1, -1, 1, 1)

    def shape(self) -> QPainterPath:
        path = QPainterPath()
        path.addRect(self._rect)
        return path

    def _lay_out(self) -> tuple:
        """(leader line, box, text's top left, static text) in scene coordinates: the box is a
        stamp of two filled shapes, its edge a ``BORDER`` wide rim and its inside (see ``_outlined``
        for why a rim is filled, ``stamps`` for how it is drawn)."""
        pos = self.pos()
        r = self._rect.translated(pos)
        corner = QPointF(r.right() if self._corner[0] < 0 else r.left(),
                         r.bottom() if self._corner[1] < 0 else r.top())
        return (QLineF(pos, corner), (*_tag_box(self._rect), pos.x(), pos.y()), *_centred(r, self.text))


def _tag_box(rect: QRectF) -> tuple[tuple, tuple[QPolygonF, QPolygonF]]:
    """A tag's box (3 px corners, a rim of ``PotentialTag.BORDER``) about its point: a stamp's
    key and shapes (see ``stamps``), the rim's outer shape and the inside. Worked out once
    per box (tags of like values share one)."""
    return _tag_box_at(rect.x(), rect.y(), rect.width(), rect.height())


@lru_cache(maxsize=1024)
def _tag_box_at(x: float, y: float, w: float, h: float) -> tuple[tuple, tuple[QPolygonF, QPolygonF]]:
    rect, b = QRectF(x, y, w, h), PotentialTag.BORDER / 2
    return ("tag", x, y, w, h), (_rounded_box(rect.adjusted(-b, -b, b, b), 3 + b),
                                 _rounded_box(rect.adjusted(b, b, -b, -b), 3 - b))


class LoopMark(_HungMark):
    """A circulating arrow inside a loop's window, with the loop's name and current.

    The text goes below, above, right or left of the arrow (``side``); where
    the window has no room for it, ``compact`` shows the name alone and the
    current in the tooltip, so the mark never covers a part's own text.
    """

    R = 9.0
    R_COMPACT = 6.0
    SIDES = ("below", "above", "right", "left")
    GROUP = 3
    PEN = 1.5  # the arrow's width

    def __init__(self, layer: ReadingLayer) -> None:
        super().__init__(layer)
        self.clockwise = True
        self.name = ""
        self.full_text = ""
        self.text = ""
        self.home = QPointF()      # the window's centre, where the mark goes when there is room
        self.outline = QPolygonF()  # the window, in scene coordinates
        self._key: str | None = None  # ``_rounded`` of the current shown: all its text depends on
        self.side = "below"
        self.compact = False
        self._text_rect = QRectF()

    def set_loop(self, name: str, current: float, clockwise: bool, readable: bool = True) -> None:
        """Show the loop's name and current (``readable``: as for ``_PartMark.set_value``)."""
        key = _rounded(current)
        if key == self._key and name == self.name and clockwise == self.clockwise:
            return
        self._key = key
        text = f"{name} {_written(key, current, 'A')}"
        if text == self.full_text and clockwise == self.clockwise:
            return
        fig, old = self._fig, self.full_text
        same_shape = fig is not None and name == self.name and clockwise == self.clockwise
        self.clockwise = clockwise
        self.name = name
        self.full_text = text
        self.setToolTip(f"Loop current {text}")
        if same_shape and self.compact:
            return  # the name alone is shown: nothing drawn changes
        if same_shape and _advance(text) == _advance(old):  # the same box: only the text is new
            self.text = text
            self._fig = (*fig[:2], _text(text)[0])
            if readable:
                self.repaint()
            else:
                self.layer.touch(self)
            return
        self.set_layout(self.side, self.compact, readable)

    def text_rect_at(self, side: str, compact: bool) -> QRectF:
        """The text's box for a layout, around the arrow at the origin."""
        fm = _fm()
        text = self.name if compact else self.full_text
        w, h, r = _advance(text) + 4, fm.height(), self._radius(compact) + 4
        if side == "below":
            return QRectF(-w / 2, r, w, h)
        if side == "above":
            return QRectF(-w / 2, -r - h, w, h)
        if side == "right":
            return QRectF(r, -h / 2, w, h)
        return QRectF(-r - w, -h / 2, w, h)

    def _radius(self, compact: bool) -> float:
        return self.R_COMPACT if compact else self.R

    def rect_at(self, side: str, compact: bool) -> QRectF:
        """Everything the mark covers in a layout."""
        r = self._radius(compact) + 4
        return QRectF(-r, -r, 2 * r, 2 * r).united(self.text_rect_at(side, compact))

    def set_layout(self, side: str, compact: bool, readable: bool = True) -> None:
        """Lay the text out on ``side`` (``compact``: the name alone); the box changes only if it must.

        ``readable`` False (no view shows marks large enough to draw) asks for no repaint.
        """
        rect = self.text_rect_at(side, compact)
        if rect != self._text_rect:
            self.prepareGeometryChange()
            self._text_rect = rect
        self.side, self.compact = side, compact
        self.text = self.name if compact else self.full_text
        self._reshape(readable)

    def boundingRect(self) -> QRectF:
        r = self._radius(self.compact) + 4
        return QRectF(-r, -r, 2 * r, 2 * r).united(self._text_rect)

    def _lay_out(self) -> tuple:
        """(arrow, text's top left, static text) in scene coordinates; the arrow (arc and
        head) is a stamp of one shape to fill (see ``_outlined`` and ``stamps``)."""
        x, y = self.pos().x(), self.pos().y()
        r = self._radius(self.compact)
        arrow = ("loop", r, self.clockwise), (_circling(r, self.clockwise)[2],), x, y
        return (arrow, *_centred(self._text_rect.translated(x, y), self.text))


@lru_cache(maxsize=64)
def _circling(r: float, clockwise: bool) -> tuple[QPolygonF, QPolygonF, QPolygonF]:
    """A loop mark's arrow about the origin: the arc (its gap at the top, drawn by a
    ``LoopMark.PEN`` wide pen with round caps), the head at its end, and both as one
    shape (one fill per mark), as shapes to fill."""
    # Qt angles: counter-clockwise positive (y up); the gap sits at the top
    start, span = (60.0, 300.0) if not clockwise else (120.0, -300.0)
    end = math.radians(start + span)
    sgn = 1 if span > 0 else -1  # the tangent along the direction of travel
    tx, ty = -math.sin(end) * sgn, -math.cos(end) * sgn
    head = _arrow_head(r * math.cos(end) + tx * 2, -r * math.sin(end) + ty * 2, tx, ty, 6, LoopMark.PEN)
    band = _arc_band(r, start, span, LoopMark.PEN)
    return band, head, band.united(head)


class FaultNote(QGraphicsItem):
    """The error message, in a box beside the parts it names."""

    WIDTH = 250.0

    def __init__(self) -> None:
        super().__init__()
        self.setZValue(Z_NOTE)
        self.text = ""
        self._rect = QRectF()

    def set_message(self, message: str) -> None:
        self.prepareGeometryChange()
        self.text = "Not solved: " + message
        fm = _fm()
        r = fm.boundingRect(QRectF(0, 0, self.WIDTH, 1000), int(Qt.TextFlag.TextWordWrap), self.text)
        self._rect = QRectF(0, 0, self.WIDTH + 30, r.height() + 10)
        self.update()

    def boundingRect(self) -> QRectF:
        return self._rect.adjusted(-2, -2, 2, 2)

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(QPen(th.fault, 1.3))
        painter.setBrush(th.note)
        painter.drawRoundedRect(self._rect, 4, 4)
        _paint_warning_sign(painter, QPointF(13, 17), th.fault)
        painter.setPen(th.ink)
        painter.setFont(small_font())
        opt = QTextOption()
        opt.setWrapMode(QTextOption.WrapMode.WordWrap)
        painter.drawText(self._rect.adjusted(26, 5, -4, -5), self.text, opt)
