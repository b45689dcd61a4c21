"""Canvas items that draw the document: parts, wires, junction dots, loose ends.

Every item paints in scene units with its origin on a grid point; text is
never rotated with the symbol, so labels stay upright whatever way a part
is turned.
"""
from __future__ import annotations

from dataclasses import replace

import numpy as np

from PySide6.QtCore import QLineF, QPointF, QRectF, Qt
from PySide6.QtGui import (QBrush, QColor, QFontMetricsF, QPainter, QPainterPath,
                           QPainterPathStroker, QPen, QPixmapCache, QPolygonF, QTransform)
from PySide6.QtWidgets import QGraphicsItem, QGraphicsScene, QStyle, QStyleOptionGraphicsItem, QWidget

from ..sketch.model import PlacedPart, Wire
from .stamps import PHASES, anchors, copies, picture
from .symbols import IEC, body_centre, paint_part, symbol_outline
from .theme import GRID, current_theme, description_font, label_font
from .valuetext import value_line

__all__ = ["too_small", "OnPaper", "paint_on_paper", "PartItem", "WireItem", "JunctionLayer", "LooseEnd",
           "RubberWire", "GridCursor", "value_text", "to_scene", "box_of", "COVER_TEXT", "COVER_BODY", "CACHE", "Z_WIRE", "Z_PART", "Z_MARK", "Z_NOTE"]

Z_WIRE, Z_PART, Z_DOT, Z_MARK, Z_NOTE, Z_TOOL = 1.0, 2.0, 3.0, 4.0, 6.0, 8.0
INK_WIDTH = 1.7

# Small items above the drawing (loose-end rings, bench marks) keep a picture of themselves
# at screen resolution, so a repaint of the canvas copies pixels for everything an edit did
# not change (Qt repaints an item only after its update()); parts and wires are painted with
# the paper instead (``OnPaper``). A change of scheme must therefore update every item.
CACHE = QGraphicsItem.CacheMode.DeviceCoordinateCache


TEXT_LOD = 0.45  # below this scale text is under ~5 px tall: not drawn

# What a loop mark or potential tag placed near an item should not hide, as (left, top,
# right, bottom, weight) scene boxes (``cover_boxes``): covering a text weighs far more
# than grazing a symbol's margin or a wire.
COVER_TEXT = 100.0
COVER_BODY = 1.0
Box = tuple[float, float, float, float, float]


def box_of(rect: QRectF, weight: float) -> Box:
    """``rect`` as a weighted cover box."""
    return rect.left(), rect.top(), rect.right(), rect.bottom(), weight


def too_small(painter: QPainter) -> bool:
    """True when the view is zoomed out so far that text and marks would be unreadable specks."""
    return QStyleOptionGraphicsItem.levelOfDetailFromTransform(painter.worldTransform()) < TEXT_LOD


def to_scene(p: tuple[int, int]) -> QPointF:
    """The scene position of a grid point."""
    return QPointF(p[0] * GRID, p[1] * GRID)


def value_text(part: PlacedPart) -> str:
    """The value line printed beside a part (``4.70 kΩ``, ``9.00 V  r 0.50 Ω``, ``0.75 mm²``, ``open``)."""
    return value_line(part)


class OnPaper(QGraphicsItem):
    """An item painted with the paper: the scene paints every such item in its background
    (``paint_on_paper``), of which each view keeps one picture (``CacheBackground``).

    Copying that picture costs the same whatever it holds, where a picture kept per item
    costs a copy of each on every repaint: with a few hundred parts in view, most of a
    repaint that only new readings asked for. The item has no contents of its own (it is
    still there for hit tests and selection); whatever changes its look calls ``repaper``,
    and so do its coming, going, selection and visibility. Draw it in ``paint`` as usual.
    ``on_paper`` False makes an item of the kind that paints itself, as any item does
    (``repaper`` then repaints it).
    """

    KEPT = 4  # pictures kept of the item (zooms, pixel offsets, selected or not)

    def __init__(self, on_paper: bool = True) -> None:
        super().__init__()
        self.on_paper = on_paper
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemHasNoContents, on_paper)
        # the pictures live in QPixmapCache, which drops the longest unused past its limit:
        # a few thousand parts seen at a high zoom stay within it
        self._pictures: dict[tuple, tuple[QPixmapCache.Key, int, int]] = {}

    def _forget_pictures(self) -> None:
        for key, _, _ in self._pictures.values():
            QPixmapCache.remove(key)
        self._pictures.clear()

    def repaper(self, was: QRectF | None = None, moved_only: bool = False) -> None:
        """Paint the paper under the item again, and under scene box ``was`` (where it was);
        ``moved_only`` says the item looks as it did (its pictures still serve).

        A change of box calls ``prepareGeometryChange`` first, then this: Qt then brings its
        box of all items up to date from the changed items alone, where a repaint asked for
        before would have it measure every item of the scene (hundreds of calls into Python).
        """
        if not self.on_paper:
            self.update()
            return
        if not moved_only and self._pictures:
            self._forget_pictures()
        scene = self.scene()
        if scene is not None:
            box = self.sceneBoundingRect()
            scene.invalidate(box if was is None else box.united(was), QGraphicsScene.SceneLayer.BackgroundLayer)

    def paint_on(self, painter: QPainter, option: QStyleOptionGraphicsItem, exact: bool = False) -> None:
        """Paint the item in its place on the paper: a kept picture of it at this zoom (the
        paper under a moved part also repaints its neighbours), or afresh where pictures
        cannot be copied (a vector file) or ``exact`` asks for it (a picture file)."""
        x, y = self.pos().x(), self.pos().y()
        if exact or not copies(painter):
            painter.save()
            painter.translate(x, y)
            self.paint(painter, option, None)
            painter.restore()
            return
        t, dpr = painter.worldTransform(), painter.device().devicePixelRatioF()
        whole, phase = anchors(t, dpr, np.array([(x, y)]))
        (ix, iy), (fx, fy) = whole[0].tolist(), phase[0].tolist()
        key = (t.m11(), t.m22(), dpr, fx, fy, bool(option.state & QStyle.StateFlag.State_Selected))
        hit = self._pictures.get(key)
        pm = QPixmapCache.find(hit[0]) if hit is not None else None
        if pm is None:
            if len(self._pictures) >= self.KEPT:
                self._forget_pictures()
            pm, left, top = picture(lambda q: self.paint(q, option, None), self.boundingRect(),
                                    t.m11(), t.m22(), fx / PHASES, fy / PHASES, dpr)
            self._pictures[key] = (QPixmapCache.insert(pm), left, top)
        else:
            left, top = hit[1], hit[2]
        painter.save()
        painter.resetTransform()
        painter.drawPixmap(QPointF((ix + left) / dpr, (iy + top) / dpr), pm)
        painter.restore()

    _REPAPER = (QGraphicsItem.GraphicsItemChange.ItemSceneChange, QGraphicsItem.GraphicsItemChange.ItemSceneHasChanged,
                QGraphicsItem.GraphicsItemChange.ItemSelectedHasChanged,
                QGraphicsItem.GraphicsItemChange.ItemVisibleHasChanged)

    def itemChange(self, change: QGraphicsItem.GraphicsItemChange, value):  # noqa: N802 (Qt's name)
        if change in self._REPAPER:  # (before leaving a scene, it is still in it: the old place)
            self.repaper()
        return super().itemChange(change, value)


def paint_on_paper(scene: QGraphicsScene, painter: QPainter, rect: QRectF, exact: bool = False) -> None:
    """Paint the scene's ``OnPaper`` items meeting scene rect ``rect``, bottom first (``exact``:
    each afresh, as for a picture file, not from the pictures they keep)."""
    option = QStyleOptionGraphicsItem()
    selected, plain = QStyle.StateFlag.State_Selected, QStyle.StateFlag.State_None
    for item in scene.items(rect, Qt.ItemSelectionMode.IntersectsItemBoundingRect, Qt.SortOrder.AscendingOrder):
        if isinstance(item, OnPaper) and item.on_paper and item.isVisible():
            option.state = selected if item.isSelected() else plain
            item.paint_on(painter, option, exact)


def ink_pen(color: QColor, width: float = INK_WIDTH) -> QPen:
    pen = QPen(color, width)
    pen.setCapStyle(Qt.PenCapStyle.RoundCap)
    pen.setJoinStyle(Qt.PenJoinStyle.RoundJoin)
    pen.setCosmetic(False)
    return pen


class PartItem(OnPaper):
    """One placed part: its symbol, designator and value; flagged when an error names it.

    Painted with the paper (``OnPaper``), but for the ghost that follows the pointer while
    a part is being placed: it paints itself, above everything.
    """

    DESCRIPTION_MAX = 28  # characters of a description shown on the drawing (the rest: "…", all in the tooltip)

    def __init__(self, part: PlacedPart, style: str = IEC, ghost: bool = False, described: bool = True) -> None:
        super().__init__(on_paper=not ghost)
        self.style = style
        self.ghost = ghost
        self.flagged = False
        self.side = -1
        self.part = part
        self.described = described  # the part's description (``label``) is shown under its value
        self._fm = QFontMetricsF(label_font())
        self._fm_description = QFontMetricsF(description_font())
        if not ghost:
            self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemIsSelectable, True)
        self.setZValue(Z_TOOL if ghost else Z_PART)
        self.setAcceptHoverEvents(False)

        self._layout()

    # -- geometry ---------------------------------------------------------------
    def set_part(self, part: PlacedPart) -> None:
        """Show ``part`` (a moved, turned or re-valued version)."""
        was, old = self.sceneBoundingRect(), self.part
        self.prepareGeometryChange()
        self.part = part
        self._layout()
        self.repaper(was, moved_only=replace(old, x=part.x, y=part.y) == part)
        for child in self.childItems():
            relayout = getattr(child, "relayout", None)
            if relayout:
                relayout()

    def set_style(self, style: str) -> None:
        self.style = style
        self.repaper()

    def set_side(self, side: int) -> None:
        """Put the label and marks above/left (-1) or below/right (+1) of the body."""
        if side != self.side:
            self._relayout_with(side=side)

    def set_described(self, on: bool) -> None:
        """Show the part's description on the drawing, or not (the View menu's layer)."""
        if on != self.described:
            self._relayout_with(described=on)

    def _relayout_with(self, **attrs) -> None:
        """Set ``attrs`` that move the part's text, lay it out again with its marks, and repaint."""
        was = self.sceneBoundingRect()
        self.prepareGeometryChange()
        for name, value in attrs.items():
            setattr(self, name, value)
        self._layout()
        self.repaper(was)
        for child in self.childItems():
            relayout = getattr(child, "relayout", None)
            if relayout:
                relayout()

    def line_rect(self, k: int, width: float) -> QRectF:
        """Where text line ``k`` goes (0 = designator, then value, current, drop) for ``width``;
        a description shown takes the row after the value, and the marks' rows move on by one."""
        row = max(k - 1, 0) if self.horizontal else k  # across, designator and value share the first row
        return self._row_rect(row + self._extra if k >= 2 else row, width)

    def _row_rect(self, row: int, width: float, side: int | None = None) -> QRectF:
        """Row ``row`` of the part's text (rows run away from the body across, downward upright),
        on ``side`` (default: the side it is on)."""
        side = self.side if side is None else side
        h = self._fm.height()
        c, out = self.centre, self.outline
        if self.horizontal:
            y = out.bottom() - 2 + row * h if side > 0 else out.top() + 2 - (row + 1) * h
            return QRectF(c.x() - width / 2, y, width, h)
        y = c.y() - (2 + self._extra / 2) * h + row * h  # the rows centred on the body
        x = out.right() + 2 if side > 0 else out.left() - 2 - width
        return QRectF(x, y, width, h)

    MARK_WIDTH = 64.0  # about the widest current or drop mark, its arrow included

    def text_block(self, side: int | None = None) -> QRectF:
        """The scene box of the part's text rows and its current and drop marks on ``side``
        (-1 above or left, +1 below or right; default: the side it is on); empty for a part
        with no text (ground). Worked out with the layout: crowded drawings ask often."""
        return self._blocks[self.side if side is None else side]

    def _text_blocks(self) -> dict[int, QRectF]:
        if not self.lines:
            return {-1: QRectF(), 1: QRectF()}
        width = max(self.label_rect.width(), self.MARK_WIDTH)
        last = len(self.lines) + 1  # the text's rows, then the current's and the drop's (``line_rect``)
        return {side: self._row_rect(0, width, side).united(self._row_rect(last, width, side)).translated(self.pos())
                for side in (-1, 1)}

    def body_box(self) -> QRectF:
        """The scene box of the symbol."""
        return self._body_box

    def reach_box(self) -> QRectF:
        """The scene box of the symbol and its text block on either side."""
        return self._reach_box

    def set_flagged(self, flagged: bool) -> None:
        if flagged != self.flagged:
            was = self.sceneBoundingRect()
            self.prepareGeometryChange()
            self.flagged = flagged
            self._layout()
            self.repaper(was)

    def _layout(self) -> None:
        p = self.part
        self._covers: list[Box] | None = None
        self.setPos(p.x * GRID, p.y * GRID)
        t = QTransform()
        t.rotate(p.rotation)
        if p.mirror:
            t.scale(1, -1)
        self.symbol_transform = t
        self.outline = t.mapRect(symbol_outline(p.kind))
        self.centre = t.map(body_centre(p.kind))
        self.horizontal = p.rotation % 180 == 0
        t0, t1 = self.terminal_points()[:2] if p.kind != "ground" else (QPointF(), QPointF())
        self.ends = (t0.x(), t0.y(), t1.x(), t1.y())  # first and second terminal, for the marks
        if p.kind == "ground":
            self.lines = []
        elif self.horizontal:
            self.lines = [f"{p.name}  {value_text(p)}"]
        else:
            self.lines = [p.name, value_text(p)]
        description = shown_description(p.label) if self.described and self.lines else ""
        self._extra = 1 if description else 0  # rows the description takes
        if description:
            self.lines.append(description)
        self.setToolTip(f"{p.name}: {p.label}" if p.label else p.name)
        self.label_rect = self._label_rect()
        rect = self.outline.united(self.label_rect) if self.lines else QRectF(self.outline)
        pad = 14 if self.flagged else 6  # room for the fault frame's warning sign
        self._bounds = rect.adjusted(-pad, -pad, pad, pad)
        self._blocks = self._text_blocks()
        self._body_box = self.outline.translated(self.pos())
        self._reach_box = self._body_box.united(self._blocks[-1]).united(self._blocks[1])

    def _label_rect(self) -> QRectF:
        if not self.lines:
            return QRectF()
        fms = [self._fm] * (len(self.lines) - self._extra) + [self._fm_description] * self._extra
        w = max(fm.horizontalAdvance(s) for fm, s in zip(fms, self.lines)) + 2
        return self._row_rect(0, w).united(self._row_rect(len(self.lines) - 1, w))

    def cover_boxes(self) -> list[Box]:
        """What marks placed nearby should not hide: the symbol (lightly) and its text."""
        if self._covers is None:
            self._covers = [box_of(self.mapRectToScene(self.outline.adjusted(4, 4, -4, -4)), COVER_BODY)]
            if self.lines:
                self._covers.append(box_of(self.mapRectToScene(self.label_rect), COVER_TEXT))
        return self._covers

    def terminal_points(self) -> list[QPointF]:
        """Terminals in item coordinates."""
        x0, y0 = self.part.x, self.part.y
        return [QPointF((x - x0) * GRID, (y - y0) * GRID) for x, y in self.part.terminals()]

    def boundingRect(self) -> QRectF:
        return self._bounds

    def shape(self) -> QPainterPath:
        path = QPainterPath()
        path.addRect(self.outline)
        if self.lines:
            path.addRect(self.label_rect)
        return path

    # -- painting -----------------------------------------------------------------
    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        selected = bool(option.state & QStyle.StateFlag.State_Selected)
        colour = th.ghost if self.ghost else th.ink
        if selected:
            painter.setPen(Qt.PenStyle.NoPen)
            halo = QColor(th.select)
            halo.setAlpha(40)
            painter.setBrush(halo)
            painter.drawRoundedRect(self.outline.adjusted(-3, -3, 3, 3), 5, 5)
            pen = QPen(th.select, 1.2, Qt.PenStyle.DashLine)
            painter.setPen(pen)
            painter.setBrush(Qt.BrushStyle.NoBrush)
            painter.drawRoundedRect(self.outline.adjusted(-3, -3, 3, 3), 5, 5)
        if self.flagged:  # a frame round the symbol and its label, so it strikes through no text
            frame = (self.outline.united(self.label_rect) if self.lines else self.outline).adjusted(-5, -5, 5, 5)
            pen = QPen(th.fault, 2.2, Qt.PenStyle.DashLine)
            painter.setPen(pen)
            painter.setBrush(Qt.BrushStyle.NoBrush)
            painter.drawRoundedRect(frame, 6, 6)
            _paint_warning_sign(painter, frame.topLeft() + QPointF(0, 6), th.fault)
        painter.save()
        painter.setTransform(self.symbol_transform, True)
        painter.setPen(ink_pen(colour))
        painter.setBrush(Qt.BrushStyle.NoBrush)
        paint_part(painter, self.part, self.style)
        painter.restore()
        if self.lines and not too_small(painter):
            painter.setFont(label_font())
            fm = self._fm
            r = self.label_rect
            align = (Qt.AlignmentFlag.AlignHCenter if self.horizontal else
                     Qt.AlignmentFlag.AlignLeft if self.side > 0 else Qt.AlignmentFlag.AlignRight)
            for k, line in enumerate(self.lines):
                if self._extra and k == len(self.lines) - 1:
                    painter.setFont(description_font())
                painter.setPen(colour if k == 0 else (th.ghost if self.ghost else th.label))
                lr = QRectF(r.left(), r.top() + k * fm.height(), r.width(), fm.height())
                painter.drawText(lr, int(align | Qt.AlignmentFlag.AlignVCenter), line)


def shown_description(label: str) -> str:
    """A part's description as the drawing shows it: on one line, cut to
    ``PartItem.DESCRIPTION_MAX`` characters with an ellipsis (the whole of it is in the tooltip)."""
    text = " ".join(label.split())
    most = PartItem.DESCRIPTION_MAX
    return text if len(text) <= most else text[:most - 1].rstrip() + "…"


def _paint_warning_sign(p: QPainter, at: QPointF, colour: QColor) -> None:
    """A small triangle with an exclamation mark: the shape that marks a fault."""
    s = 11.0
    tri = QPolygonF([at + QPointF(0, -s), at + QPointF(-s * 0.6, 0.2 * s), at + QPointF(s * 0.6, 0.2 * s)])
    p.setPen(QPen(colour, 1.2))
    p.setBrush(QBrush(colour))
    p.drawPolygon(tri)
    p.setPen(QPen(QColor("white"), 1.6))
    p.drawLine(QLineF(at + QPointF(0, -s * 0.65), at + QPointF(0, -s * 0.2)))
    p.drawPoint(at + QPointF(0, -s * 0.02))


class WireItem(OnPaper):
    """One straight wire; ``index`` is its place in the document's wire list. Painted with
    the paper (``OnPaper``)."""

    PICK = 7.0

    def __init__(self, wire: Wire, index: int) -> None:
        super().__init__()
        self.index = index
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemIsSelectable, True)
        self.setZValue(Z_WIRE)
        self.wire = wire
        self.flagged = False
        self._layout()

    def set_flagged(self, flagged: bool) -> None:
        """Mark the wire as named by a circuit error (a dashed halo: shape as well as colour)."""
        if flagged != self.flagged:
            self.flagged = flagged
            self.repaper()

    def set_wire(self, wire: Wire) -> None:
        was = self.sceneBoundingRect()
        self.prepareGeometryChange()
        self.wire = wire
        self._layout()
        self.repaper(was)

    def _layout(self) -> None:
        w = self.wire
        self.setPos(w.x1 * GRID, w.y1 * GRID)
        self.line = QLineF(0, 0, (w.x2 - w.x1) * GRID, (w.y2 - w.y1) * GRID)
        r = QRectF(self.line.p1(), self.line.p2()).normalized()
        self._bounds = r.adjusted(-self.PICK, -self.PICK, self.PICK, self.PICK)
        self._covers = [box_of(self.sceneBoundingRect().adjusted(5, 5, -5, -5), COVER_BODY)]

    def cover_boxes(self) -> list[Box]:
        """What marks placed nearby should not hide: the wire, lightly."""
        return self._covers

    def boundingRect(self) -> QRectF:
        return self._bounds

    def shape(self) -> QPainterPath:
        path = QPainterPath(self.line.p1())
        path.lineTo(self.line.p2())
        stroker = QPainterPathStroker()
        stroker.setWidth(self.PICK * 1.4)
        return stroker.createStroke(path)

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        if option.state & QStyle.StateFlag.State_Selected:
            halo = QColor(th.select)
            halo.setAlpha(90)
            painter.setPen(ink_pen(halo, 7))
            painter.drawLine(self.line)
        if self.flagged:
            pen = ink_pen(th.fault, 6)
            pen.setStyle(Qt.PenStyle.DashLine)
            painter.setPen(pen)
            painter.drawLine(self.line)
        painter.setPen(ink_pen(th.ink))
        painter.drawLine(self.line)


class JunctionLayer(QGraphicsItem):
    """Every connection dot (where three or more conductors join), painted in one pass.

    The dots in the exposed area are filled discs with no pen, one loop: half the cost of
    one ``drawPoints`` call with a round pen as wide as a dot (which strokes every dot of
    the drawing, seen or not); a change repaints only the dots that come or go.
    """

    R = 3.6

    def __init__(self) -> None:
        super().__init__()
        self.setZValue(Z_DOT)
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemUsesExtendedStyleOption, True)
        self.setAcceptedMouseButtons(Qt.MouseButton.NoButton)
        self.points: tuple[tuple[int, int], ...] = ()
        self._centres: list[tuple[float, float]] = []
        self._bounds = QRectF()

    def set_points(self, points: list[tuple[int, int]]) -> None:
        """Show dots at these grid points (and nowhere else)."""
        new = tuple(points)
        if new == self.points:
            return
        r = self.R + 1
        for x, y in set(self.points).symmetric_difference(new):
            self.update(QRectF(x * GRID - r, y * GRID - r, 2 * r, 2 * r))
        self.points = new
        self._centres = [(x * GRID, y * GRID) for x, y in new]
        if new:
            xs, ys = [c[0] for c in self._centres], [c[1] for c in self._centres]
            box = QRectF(min(xs) - r, min(ys) - r, max(xs) - min(xs) + 2 * r, max(ys) - min(ys) + 2 * r)
            if not self._bounds.contains(box):
                self.prepareGeometryChange()
                self._bounds = self._bounds.united(box)

    def boundingRect(self) -> QRectF:
        return self._bounds

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        ex, r = option.exposedRect, self.R
        left, top, right, bottom = ex.left() - r, ex.top() - r, ex.right() + r, ex.bottom() + r
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(current_theme().ink)
        disc = painter.drawEllipse
        for x, y in self._centres:
            if left <= x <= right and top <= y <= bottom:
                disc(QPointF(x, y), r, r)


class LooseEnd(QGraphicsItem):
    """An open ring with a cross-tick at a terminal or wire end that connects to nothing."""

    R = 4.5

    def __init__(self) -> None:
        super().__init__()
        self.setZValue(Z_DOT)
        self.setCacheMode(CACHE)
        self.setToolTip("Not connected")

    def set_shown(self, on: bool) -> None:
        self.setVisible(on)

    def boundingRect(self) -> QRectF:
        r = self.R + 3
        return QRectF(-r, -r, 2 * r, 2 * r)

    def shape(self) -> QPainterPath:
        path = QPainterPath()
        path.addEllipse(QPointF(0, 0), self.R, self.R)
        return path

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(QPen(th.loose, 1.5))
        painter.setBrush(th.paper)
        painter.drawEllipse(QPointF(0, 0), self.R, self.R)
        d = self.R * 0.55
        painter.drawLine(QLineF(-d, -d, d, d))


class RubberWire(QGraphicsItem):
    """The wire being drawn: the right-angle path from the last point to the pointer."""

    def __init__(self) -> None:
        super().__init__()
        self.setZValue(Z_TOOL)
        self.points: list[QPointF] = []

    def set_points(self, points: list[QPointF]) -> None:
        self.prepareGeometryChange()
        self.points = points
        self.update()

    def boundingRect(self) -> QRectF:
        if not self.points:
            return QRectF()
        xs = [p.x() for p in self.points]
        ys = [p.y() for p in self.points]
        return QRectF(min(xs) - 6, min(ys) - 6, max(xs) - min(xs) + 12, max(ys) - min(ys) + 12)

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        if len(self.points) < 2:
            return
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        pen = ink_pen(th.ghost, 1.8)
        pen.setStyle(Qt.PenStyle.DashLine)
        painter.setPen(pen)
        painter.drawPolyline(QPolygonF(self.points))
        painter.setBrush(th.ghost)
        painter.drawEllipse(self.points[0], 3, 3)


class GridCursor(QGraphicsItem):
    """The keyboard cursor: a cross on a grid point, moved with the arrow keys."""

    S = 9.0

    def __init__(self) -> None:
        super().__init__()
        self.setZValue(Z_TOOL + 1)

    def boundingRect(self) -> QRectF:
        s = self.S + 2
        return QRectF(-s, -s, 2 * s, 2 * s)

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setPen(QPen(th.ghost, 1.4))
        s = self.S
        painter.drawLine(QLineF(-s, 0, -3, 0))
        painter.drawLine(QLineF(3, 0, s, 0))
        painter.drawLine(QLineF(0, -s, 0, -3))
        painter.drawLine(QLineF(0, 3, 0, s))
        painter.setBrush(Qt.BrushStyle.NoBrush)
        painter.drawRect(QRectF(-2, -2, 4, 4))
