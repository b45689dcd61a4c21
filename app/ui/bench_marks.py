"""Cautions and meter readings drawn in place on the canvas.

Each flagged part gets a badge on the side of its body away from its label:
a shape and a word (never colour alone, WCAG 2.1 1.4.1) such as a triangle
with "OVER +1.20 A", "HOT 70 %", "BLOWN", "> 60 V" or "DROP 4.2 %", and a
lamp a ray mark with how hard it runs against its rating.  A meter gets a
small display showing its reading as the instrument would ("476.2 mV").
Points beyond 60 V to ground get a triangle of their own.
"""
from __future__ import annotations

from collections.abc import Iterable

import numpy as np
from PySide6.QtCore import QLineF, QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QFont, QFontMetricsF, QPainter, QPainterPath, QPen, QPolygonF
from PySide6.QtWidgets import QGraphicsItem, QGraphicsScene, QStyleOptionGraphicsItem, QWidget

from ..assess import Caution, display_reading
from ..units import format_value
from .items import CACHE, COVER_TEXT, Z_MARK, Box, PartItem, WireItem, box_of, to_scene, too_small
from .theme import GRID, current_theme, label_font, small_font

__all__ = ["Badge", "MeterFace", "PointBadge", "BenchMarks", "badge_for"]

TRIANGLE, RAYS, RING, CROSS = "triangle", "rays", "ring", "cross"
_RANK = {"danger": 0, "warning": 1, "info": 2}


def _pct(x: float) -> str:
    return f"{x:.0f} %" if abs(x) >= 10 else f"{x:.1f} %"


def badge_for(c: Caution) -> tuple[str, str] | None:
    """The (shape, word) drawn on the canvas for caution ``c``, or None when it has no badge."""
    f = c.figures
    k = c.kind
    if k == "hazardous_voltage":
        return TRIANGLE, f"> {f.get('limit', 60.0):g} V"
    if k == "resistor_overload":
        return TRIANGLE, f"OVER {_pct(100 * f['fraction'])} of rating"
    if k == "resistor_hot":
        return TRIANGLE, f"HOT {_pct(100 * f['fraction'])} of rating"
    if k == "fuse_over":
        return TRIANGLE, f"OVER +{format_value(-f['margin'], 'A')} ({_pct(100 * (f['load_fraction'] - 1))})"
    if k == "fuse_blown":
        return CROSS, "BLOWN"
    if k == "cable_drop" and "percent" in f:
        word = f"DROP {f['percent']:.1f} %"
        return (TRIANGLE, f"{word} > {f['drop_limit']:g} %") if c.severity == "warning" else (RING, word)
    if k == "lamp_power":
        word = f"{_pct(100 * f['fraction'])} power"
        return (TRIANGLE, "OVER " + word) if c.severity == "warning" else (RAYS, word)
    if k == "cell_shorted":
        return TRIANGLE, "SHORTED"
    if k == "cell_overcurrent":
        return TRIANGLE, f"OVER {f['ratio']:.1f}× max current"
    if k == "ammeter_across_source":
        return TRIANGLE, "SHORTS " + ", ".join(c.others)
    if k == "ammeter_across_part":
        return TRIANGLE, "ACROSS " + ", ".join(c.others)
    if k == "ammeter_bypassed":
        return TRIANGLE, "BYPASSED"
    if k == "voltmeter_in_series":
        return TRIANGLE, "IN SERIES"
    return None


def _colour(severity: str) -> QColor:
    th = current_theme()
    return {"danger": th.fault, "warning": th.loose}.get(severity, th.label)


def _paint_shape(p: QPainter, shape: str, at: QPointF, colour: QColor, filled: bool) -> None:
    """A 12-unit glyph centred on ``at``: a triangle with !, rays, a ring or a broken link."""
    p.save()
    p.setPen(QPen(colour, 1.3))
    x, y = at.x(), at.y()
    if shape == TRIANGLE:
        tri = QPolygonF([QPointF(x, y - 6), QPointF(x - 6.5, y + 5.5), QPointF(x + 6.5, y + 5.5)])
        p.setBrush(colour if filled else Qt.BrushStyle.NoBrush)
        p.drawPolygon(tri)
        p.setPen(QPen(current_theme().paper if filled else colour, 1.6))
        p.drawLine(QLineF(x, y - 2.5, x, y + 1.5))
        p.drawPoint(QPointF(x, y + 3.6))
    elif shape == RAYS:
        p.setBrush(Qt.BrushStyle.NoBrush)
        p.drawEllipse(at, 2.6, 2.6)
        for dx, dy in ((1, 0), (0, 1), (0.7, 0.7), (0.7, -0.7)):
            for s in (1, -1):
                p.drawLine(QLineF(x + s * dx * 4.2, y + s * dy * 4.2, x + s * dx * 6.2, y + s * dy * 6.2))
    elif shape == CROSS:  # a link broken in two
        p.drawLine(QLineF(x - 6, y, x - 2, y))
        p.drawLine(QLineF(x + 2, y, x + 6, y))
        p.drawLine(QLineF(x - 2, y, x, y - 4))
        p.drawLine(QLineF(x + 2, y, x, y + 4))
    else:
        p.setBrush(Qt.BrushStyle.NoBrush)
        p.drawEllipse(at, 4.5, 4.5)
    p.restore()


class _OwnedMark(QGraphicsItem):
    """A mark hung on a part, laid out on the side of the body away from the part's label."""

    GAP = 3.0

    def __init__(self, parent: PartItem) -> None:
        super().__init__(parent)
        self.setZValue(Z_MARK)
        self.setCacheMode(CACHE)
        self.text = ""
        self.offset = 0.0  # further from the body, past another mark of the same part
        self._rect = QRectF()
        self.setVisible(False)

    @property
    def owner(self) -> PartItem:
        return self.parentItem()  # type: ignore[return-value]

    def cover_boxes(self) -> list[Box]:
        """Loop marks and potential tags are placed so as not to cover it."""
        return [box_of(self.sceneBoundingRect(), COVER_TEXT)]

    def size(self) -> tuple[float, float]:
        raise NotImplementedError

    def relayout(self) -> None:
        """Place the mark beside the owner (called when the part moves or turns).

        A level part has its text above or below, so the mark goes on the other
        side of the body; an upright part has its text in a column beside it,
        so the mark goes at the foot of that column.
        """
        self.prepareGeometryChange()
        self._rect = self.rect_for(self.offset)
        self.update()

    def rect_for(self, offset: float) -> QRectF:
        """The mark's box (in the owner's coordinates) ``offset`` further out from the body."""
        o = self.owner
        w, h = self.size()
        out, c = o.outline, o.centre
        if o.horizontal:
            away = -o.side
            y = out.bottom() + self.GAP + offset if away > 0 else out.top() - self.GAP - h - offset
            return QRectF(c.x() - w / 2, y, w, h)
        foot = o.line_rect(4, w)  # under the designator, value, current and drop lines
        return QRectF(foot.left(), foot.top() + offset, w, h)

    def boundingRect(self) -> QRectF:
        return self._rect.adjusted(-2, -2, 2, 2)

    def shape(self) -> QPainterPath:
        path = QPainterPath()
        path.addRect(self._rect)
        return path

    @property
    def rect(self) -> QRectF:
        return QRectF(self._rect)


class Badge(_OwnedMark):
    """A caution on a part: a shape and a word, in the caution's colour."""

    def __init__(self, parent: PartItem) -> None:
        super().__init__(parent)
        self.shape_name = TRIANGLE
        self.severity = "info"
        self._size: tuple | None = None  # ((text, severity), (width, height))

    def set_badge(self, shape: str, text: str, severity: str, tip: str) -> None:
        if (shape, text, severity) != (self.shape_name, self.text, self.severity):
            self.shape_name, self.text, self.severity = shape, text, severity
            self.relayout()
        self.setToolTip(tip)
        self.setVisible(True)

    def _font(self) -> QFont:
        font = QFont(small_font())  # a copy: the shared font serves every other mark
        font.setWeight(QFont.Weight.DemiBold if self.severity != "info" else QFont.Weight.Normal)
        return font

    def size(self) -> tuple[float, float]:
        """Width and height of the badge for its text (measured once per text and severity)."""
        key = (self.text, self.severity)
        if self._size is None or self._size[0] != key:
            fm = QFontMetricsF(self._font())
            self._size = (key, (fm.horizontalAdvance(self.text) + 21, max(fm.height(), 13.0) + 2))
        return self._size[1]

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        if not self.text or too_small(painter):
            return
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        colour = _colour(self.severity)
        r = self._rect
        if self.severity != "info":
            th = current_theme()
            painter.setPen(QPen(colour, 1.0))
            painter.setBrush(th.note if self.severity == "danger" else th.paper)
            painter.drawRoundedRect(r, 3, 3)
        _paint_shape(painter, self.shape_name, QPointF(r.left() + 9, r.center().y()), colour,
                     filled=self.severity == "danger")
        painter.setFont(self._font())
        painter.setPen(colour)
        painter.drawText(r.adjusted(17, 0, -2, 0), int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter),
                         self.text)


class MeterFace(_OwnedMark):
    """A meter's reading as its display shows it, in a small framed window."""

    def set_reading(self, text: str, tip: str) -> None:
        if text != self.text:
            self.text = text
            self.relayout()
        self.setToolTip(tip)
        self.setVisible(True)

    @staticmethod
    def _font() -> QFont:
        f = label_font(12)
        f.setFamilies(["DejaVu Sans Mono", "Consolas", "Menlo", "Monospace"])
        return f

    def size(self) -> tuple[float, float]:
        fm = QFontMetricsF(self._font())
        return fm.horizontalAdvance(self.text) + 12, fm.height() + 6

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        if not self.text or too_small(painter):
            return
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(QPen(th.ink, 1.2))
        painter.setBrush(th.tag)
        painter.drawRoundedRect(self._rect, 4, 4)
        painter.setFont(self._font())
        painter.drawText(self._rect, int(Qt.AlignmentFlag.AlignCenter), self.text)


class PointBadge(QGraphicsItem):
    """A point of the circuit beyond 60 V from ground: a filled triangle and the voltage."""

    def __init__(self) -> None:
        super().__init__()
        self.setZValue(Z_MARK + 0.5)
        self.text = ""
        self._rect = QRectF()

    def set_text(self, text: str, tip: str) -> None:
        """Show ``text``, hung up and to the left of the point (clear of a part's body and its tag)."""
        self.prepareGeometryChange()
        self.text = text
        fm = QFontMetricsF(small_font())
        w, h = fm.horizontalAdvance(text) + 22, max(fm.height(), 13.0) + 2
        self._rect = QRectF(-w - 6, -2 * h - 12, w, h)
        self.setToolTip(tip)
        self.update()

    def boundingRect(self) -> QRectF:
        return self._rect.adjusted(-2, -2, 2, 2)

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        if too_small(painter):
            return
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(QPen(th.fault, 1.0))
        painter.setBrush(th.note)
        painter.drawRoundedRect(self._rect, 3, 3)
        _paint_shape(painter, TRIANGLE, QPointF(self._rect.left() + 9, self._rect.center().y()), th.fault, True)
        painter.setFont(small_font())
        painter.setPen(th.fault)
        painter.drawText(self._rect.adjusted(17, 0, -2, 0),
                         int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter), self.text)


def _grid_of(point: str) -> tuple[int, int] | None:
    try:
        x, y = point.split(",")
        return int(x), int(y)
    except ValueError:
        return None


class BenchMarks:
    """Keeps the badges and meter displays of one scene in line with the newest cautions."""

    def __init__(self, scene: QGraphicsScene, part_items: dict[str, PartItem]) -> None:
        self.scene = scene
        self.part_items = part_items
        self._badges: dict[str, Badge] = {}
        self._faces: dict[str, MeterFace] = {}
        self._points: list[PointBadge] = []

    def _mark(self, pool: dict, cls, name: str):
        item = self.part_items.get(name)
        if item is None:
            return None
        mark = pool.get(name)
        try:
            if mark is not None and mark.parentItem() is item:
                return mark
        except RuntimeError:  # its part item was replaced and deleted
            pass
        mark = cls(item)
        pool[name] = mark
        return mark

    def clear(self) -> None:
        """Hide every mark (no solution, or a fault)."""
        self.show([])

    def show(self, cautions: Iterable[Caution]) -> None:
        """Draw ``cautions`` (from ``app.assess.assess``) on the parts and points they concern."""
        best: dict[str, Caution] = {}
        readings: dict[str, Caution] = {}
        hazards: list[Caution] = []
        for c in cautions:
            if c.kind == "meter_reading" and c.part and "reading" in c.figures:
                readings[c.part] = c
            elif c.kind == "hazardous_potential":
                hazards.append(c)
            elif c.part and badge_for(c) is not None:
                old = best.get(c.part)
                if old is None or _RANK[c.severity] < _RANK[old.severity]:
                    best[c.part] = c
        for name, c in readings.items():
            face = self._mark(self._faces, MeterFace, name)
            if face is None:
                continue
            kind = face.owner.part.kind
            unit = "A" if kind == "ammeter" else "V"
            face.set_reading(display_reading(c.figures["reading"], unit), c.message)
        for name in [n for n in self._faces if n not in readings]:
            self._hide(self._faces, name)
        bases: dict[Badge, float] = {}  # each badge's own place: past its part's meter display, if any
        for name, c in best.items():
            badge = self._mark(self._badges, Badge, name)
            if badge is None:
                continue
            shape, word = badge_for(c)  # type: ignore[misc]
            face = self._faces.get(name)
            bases[badge] = face.size()[1] + 2 if name in readings and face is not None else 0.0
            badge.set_badge(shape, word, c.severity, c.message)
        for name in [n for n in self._badges if n not in best]:
            self._hide(self._badges, name)
        self._spread(bases)
        self._show_points(hazards)

    STEPS_OUT = 3  # how many badge heights a badge may move out to clear what is in its way
    SPREAD_UP_TO = 40  # more badges keep their own places (the Cautions list has them all): 1 ms at most

    def _spread(self, bases: dict["Badge", float]) -> None:
        """Hang each badge where, from its own place (``bases``) out to ``STEPS_OUT`` badge
        heights further from its part, it covers least of what is drawn there: the badges
        hung before it, and what ``_in_the_way`` finds (the nearest of equal places). Parts
        side by side in trouble otherwise hang their badges over each other's, and over a
        neighbour's terminal or the rail they share. The places are worked out as boxes; a
        badge is laid out again only when it moves."""
        if len(bases) > self.SPREAD_UP_TO:
            for badge, base in bases.items():
                self._hang(badge, base)
            return
        hung: list[tuple[float, float, float, float]] = []

        def at(badge: Badge, offset: float) -> QRectF:
            return badge.rect_for(offset).translated(badge.owner.pos())

        for badge in sorted(bases, key=lambda b: at(b, bases[b]).getCoords()[1::-1]):
            base, step = bases[badge], badge.size()[1] + 2
            boxes = [at(badge, base + k * step) for k in range(self.STEPS_OUT + 1)]
            drawn = np.array(hung + self._in_the_way(boxes[0].united(boxes[-1]), badge.owner)).reshape(-1, 4)
            graze = np.array([0.0] * len(hung) + [self.GRAZE] * (len(drawn) - len(hung)))
            places = []
            for k, box in enumerate(boxes):
                left, top, right, bottom = box.getCoords()
                w = np.clip(np.minimum(right, drawn[:, 2]) - np.maximum(left, drawn[:, 0]) - graze, 0, None)
                h = np.clip(np.minimum(bottom, drawn[:, 3]) - np.maximum(top, drawn[:, 1]) - graze, 0, None)
                places.append((float((w * h).sum()), k))
                if places[-1][0] == 0:
                    break
            _, k = min(places)
            self._hang(badge, base + k * step)
            hung.append(boxes[k].getCoords())

    WIRE_REACH = 3.0  # scene units either side of a wire's line that a badge should keep off
    GRAZE = 2.0  # scene units of overlap with a symbol, a text or a wire's reach that count for nothing

    def _in_the_way(self, area: QRectF, owner: PartItem) -> list[tuple[float, float, float, float]]:
        """The boxes (left, top, right, bottom) in ``area`` that a badge of ``owner`` should not
        cover: the other parts' symbols, text blocks and meter displays, and the wires (with
        ``WIRE_REACH`` either side). Asked of the scene's index: a few badges, each in a
        corner of a drawing of any size."""
        out, seen = [], {id(owner)}
        r = self.WIRE_REACH
        for item in self.scene.items(area):
            if isinstance(item, WireItem):
                w = item.wire
                out.append((min(w.x1, w.x2) * GRID - r, min(w.y1, w.y2) * GRID - r,
                            max(w.x1, w.x2) * GRID + r, max(w.y1, w.y2) * GRID + r))
                continue
            # a part is met by its symbol and text, or by one of its marks alone (a mark is its child)
            part = item if isinstance(item, PartItem) else item.parentItem()
            if not isinstance(part, PartItem) or part is owner or part.ghost:
                continue
            if isinstance(item, MeterFace) and item.isVisible():
                out.append(item.sceneBoundingRect().getCoords())
            if id(part) not in seen:
                seen.add(id(part))
                out += [b.getCoords() for b in (part.body_box(), part.text_block()) if not b.isEmpty()]
        return out

    @staticmethod
    def _hang(badge: "Badge", offset: float) -> None:
        if badge.offset != offset:
            badge.offset = offset
            badge.relayout()

    @staticmethod
    def _hide(pool: dict, name: str) -> None:
        mark = pool.pop(name)
        try:
            mark.setVisible(False)
            mark.text = ""
        except RuntimeError:
            pass

    def _show_points(self, hazards: list[Caution]) -> None:
        spots = []
        for c in hazards:
            for pt in c.points[:1]:
                g = _grid_of(pt)
                if g is not None:
                    spots.append((g, c))
        while len(self._points) < len(spots):
            item = PointBadge()
            self.scene.addItem(item)
            self._points.append(item)
        for item, (g, c) in zip(self._points, spots):
            item.setPos(to_scene(g))
            item.set_text(f"{format_value(abs(c.figures['voltage']), 'V')} > {c.figures.get('limit', 60.0):g} V",
                          c.message)
            item.setVisible(True)
        for item in self._points[len(spots):]:
            item.setVisible(False)

    # -- what is shown (for tests and the status line) ---------------------------------
    def badge_text(self, name: str) -> str:
        """The word on part ``name``'s badge, or '' when it has none."""
        b = self._badges.get(name)
        return b.text if b is not None and b.isVisible() else ""

    def reading_text(self, name: str) -> str:
        """The reading drawn on meter ``name``, or ''."""
        f = self._faces.get(name)
        return f.text if f is not None and f.isVisible() else ""

    def badge(self, name: str) -> Badge | None:
        b = self._badges.get(name)
        return b if b is not None and b.isVisible() else None
