"""The canvas: a zoomable view of the scene with the drawing tools.

Tools: *select* (click, rubber band, drag to move, arrows to nudge, Tab to
step through parts), *place* (a part follows the pointer or the keyboard
cursor, snapped to the grid; Enter or a click puts it down) and *wire*
(clicks or Enter at grid points; each leg is routed with a right angle).
Everything the mouse does can be done from the keyboard.
"""
from __future__ import annotations

import math

from PySide6.QtCore import QMimeData, QPoint, QPointF, QRectF, Qt, Signal
from PySide6.QtGui import (QDragEnterEvent, QDragMoveEvent, QDropEvent, QKeyEvent, QMouseEvent, QPainter,
                           QPaintEvent, QPen, QPixmapCache, QPolygonF, QRegion, QWheelEvent)
from PySide6.QtWidgets import QGraphicsView

from ..sketch.kinds import kind_spec
from ..sketch.model import PlacedPart, transform
from .editor import Editor
from .edits import connected_points, route_clear
from .items import GridCursor, PartItem, RubberWire, WireItem, to_scene
from .scene import SketchScene
from .theme import GRID, current_theme

__all__ = ["CanvasView", "SELECT", "WIRE", "dropped_sketch"]

SELECT = "select"
WIRE = "wire"
GridPoint = tuple[int, int]


def dropped_sketch(mime: QMimeData) -> str | None:
    """The path of the one local ``.lwsk`` file a drag carries, or None (anything else is not ours)."""
    urls = mime.urls() if mime.hasUrls() else []
    if len(urls) == 1 and urls[0].isLocalFile() and urls[0].toLocalFile().lower().endswith(".lwsk"):
        return urls[0].toLocalFile()
    return None

# Room for the pictures parts and wires keep of themselves (items.OnPaper, in QPixmapCache):
# at Qt's default of 10 MB a few hundred parts on screen push each other out, and a repaint
# of the paper under a move paints its neighbours afresh.
PICTURES_KB = 64 * 1024


class CanvasView(QGraphicsView):
    """The drawing area. ``mode`` is SELECT, WIRE or the kind of part being placed."""

    modeChanged = Signal(str)
    editRequested = Signal(str)  # a part's designator: open its value for editing
    pointerMoved = Signal(int, int)
    pressed = Signal()
    fileDropped = Signal(str)  # a sketch file dropped on the canvas: the window opens it
    notice = Signal(str)  # a passing remark for the status line

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setRenderHints(QPainter.RenderHint.Antialiasing | QPainter.RenderHint.TextAntialiasing)
        self.setViewportUpdateMode(QGraphicsView.ViewportUpdateMode.SmartViewportUpdate)
        self.setTransformationAnchor(QGraphicsView.ViewportAnchor.AnchorUnderMouse)
        self.setResizeAnchor(QGraphicsView.ViewportAnchor.AnchorViewCenter)
        self.setDragMode(QGraphicsView.DragMode.RubberBandDrag)
        self.setRubberBandSelectionMode(Qt.ItemSelectionMode.IntersectsItemShape)
        self.setMouseTracking(True)
        self.setCacheMode(QGraphicsView.CacheModeFlag.CacheBackground)
        QPixmapCache.setCacheLimit(max(QPixmapCache.cacheLimit(), PICTURES_KB))
        self.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
        self.editor: Editor | None = None
        self.mode = SELECT
        self.rotation = 0
        self.mirror = False
        self.horizontal_first = True
        self.cursor_point: GridPoint = (0, 0)
        self._wire_start: GridPoint | None = None
        self._bent_other_way = False  # the band shown takes the other bend than the one asked for
        self._pan_from: QPointF | None = None  # where a middle-button drag (a pan) last was
        self._ghost: PartItem | None = None
        self._rubber: RubberWire | None = None
        self._cursor: GridCursor | None = None
        self._press: GridPoint | None = None
        self._dragging = False
        self._press_pos = QPoint()
        self._last_kind = ""

    # -- wiring up -----------------------------------------------------------------
    def set_editor(self, editor: Editor) -> None:
        """Show ``editor``'s scene and draw into its document."""
        self._drop_tool_items()
        self.editor = editor
        self.setScene(editor.scene)
        self._wire_start = None
        self.set_mode(SELECT)

    @property
    def sketch_scene(self) -> SketchScene:
        return self.editor.scene  # type: ignore[union-attr]

    def _drop_tool_items(self) -> None:
        for attr in ("_ghost", "_rubber", "_cursor"):
            item = getattr(self, attr)
            if item is not None and self.editor is not None:
                self.editor.scene.removeItem(item)
            setattr(self, attr, None)

    # -- grid ------------------------------------------------------------------------
    @staticmethod
    def snap(p: QPointF) -> GridPoint:
        """The grid point nearest to scene point ``p``."""
        return round(p.x() / GRID), round(p.y() / GRID)

    def grid_at(self, pos: QPoint) -> GridPoint:
        return self.snap(self.mapToScene(pos))

    # -- modes -------------------------------------------------------------------------
    def set_mode(self, mode: str) -> None:
        """Switch tool: SELECT, WIRE or a part kind to place."""
        if self.editor is None:
            return
        scene = self.sketch_scene
        self._drop_tool_items()
        self._wire_start = None
        self.mode = mode
        if mode != SELECT:
            if mode != self._last_kind:
                self.rotation, self.mirror = 0, False
            if mode != WIRE:
                self._last_kind = mode
            self._cursor = GridCursor()
            scene.addItem(self._cursor)
            self._cursor.setPos(to_scene(self.cursor_point))
            self.setDragMode(QGraphicsView.DragMode.NoDrag)
            self.viewport().setCursor(Qt.CursorShape.CrossCursor)
            if mode == WIRE:
                self._rubber = RubberWire()
                scene.addItem(self._rubber)
            else:
                self._ghost = PartItem(PlacedPart(mode, "", 0, 0), scene.style, ghost=True)
                self._ghost.setOpacity(0.7)
                scene.addItem(self._ghost)
                self._update_ghost()
        else:
            self.setDragMode(QGraphicsView.DragMode.RubberBandDrag)
            self.viewport().unsetCursor()
        self.modeChanged.emit(mode)

    def _origin_for(self, point: GridPoint) -> GridPoint:
        """Where the placed part's first terminal goes so its body is centred on ``point``."""
        terms = kind_spec(self.mode).terminals
        if len(terms) < 2:
            return point
        half = (terms[1][0] // 2, terms[1][1] // 2)
        dx, dy = transform(half, self.rotation, self.mirror)
        return point[0] - dx, point[1] - dy

    def _update_ghost(self) -> None:
        if self._ghost is None:
            return
        x, y = self._origin_for(self.cursor_point)
        self._ghost.set_part(PlacedPart(self.mode, "", x, y, self.rotation, self.mirror))

    def _update_rubber(self) -> None:
        if self._rubber is None:
            return
        if self._wire_start is None:
            self._rubber.set_points([])
            return
        legs = route_clear(self.editor.sketch, self._wire_start, self.cursor_point, self.horizontal_first)
        pts = [to_scene(self._wire_start)] + [to_scene(w.ends[1]) for w in legs]
        self._rubber.set_points(pts)
        # say so when the bend asked for (Space swaps it) gave way, once as it happens
        bent_other_way = len(legs) == 2 and (legs[0].y1 == legs[0].y2) != self.horizontal_first
        if bent_other_way and not self._bent_other_way:
            self.notice.emit("The wire bends the other way: the bend asked for would run over a part.")
        self._bent_other_way = bent_other_way

    def move_cursor_to(self, point: GridPoint) -> None:
        """Put the keyboard cursor (and the part or wire being drawn) on ``point``."""
        self.cursor_point = point
        if self.editor is not None:
            self.sketch_scene.extend_paper([point])  # keys can walk the cursor off the paper's edge
        if self._cursor is not None:
            self._cursor.setPos(to_scene(point))
        self._update_ghost()
        self._update_rubber()
        if self._cursor is not None:
            self.ensureVisible(QRectF(to_scene(point) - QPointF(30, 30), to_scene(point) + QPointF(30, 30)))
        self.pointerMoved.emit(*point)

    def turn(self, mirror: bool = False) -> None:
        """Rotate (or mirror) the part being placed, else the selected parts; in the wire tool swap the bend."""
        if self.mode == WIRE:
            self.horizontal_first = not self.horizontal_first
            self._update_rubber()
        elif self.mode != SELECT:
            if mirror:
                self.mirror = not self.mirror
            else:
                self.rotation = (self.rotation + 90) % 360
            self._update_ghost()
        elif self.editor is not None:
            self.editor.rotate_selection(mirror)

    # -- actions at a point ------------------------------------------------------------
    def act_at(self, point: GridPoint) -> None:
        """What a click (or Enter) does at ``point`` in the current tool."""
        if self.editor is None:
            return
        self.move_cursor_to(point)
        if self.mode == WIRE:
            if self._wire_start is None:
                self._wire_start = point
            elif point != self._wire_start:
                joined = point in connected_points(self.editor.sketch)
                self.editor.add_wire(self._wire_start, point, self.horizontal_first)
                self._wire_start = None if joined else point
            self._update_rubber()
        elif self.mode != SELECT:
            x, y = self._origin_for(point)
            self.editor.place(self.mode, x, y, self.rotation, self.mirror)

    def finish(self) -> None:
        """Esc: end the wire being drawn, else leave the tool, else clear the selection."""
        if self.mode == WIRE and self._wire_start is not None:
            self._wire_start = None
            self._update_rubber()
        elif self.mode != SELECT:
            self.set_mode(SELECT)
        elif self.editor is not None:
            self.sketch_scene.clearSelection()

    def step_selection(self, backwards: bool = False) -> None:
        """Select the next (or previous) part in document order."""
        if self.editor is None:
            return
        names = [p.name for p in self.editor.sketch.parts]
        if not names:
            return
        sel = self.sketch_scene.selected_parts()
        if sel:
            i = names.index(sel[-1 if not backwards else 0]) + (-1 if backwards else 1)
        else:
            i = 0 if not backwards else -1
        name = names[i % len(names)]
        self.sketch_scene.select([name])
        self.ensureVisible(self.sketch_scene.part_items[name].sceneBoundingRect())

    # -- mouse ---------------------------------------------------------------------------
    def _item_at(self, pos: QPoint):
        for item in self.items(pos):
            if isinstance(item, (PartItem, WireItem)) and not (isinstance(item, PartItem) and item.ghost):
                return item
            owner = getattr(item, "owner", None)
            if isinstance(owner, PartItem):
                return owner
        return None

    def mousePressEvent(self, event: QMouseEvent) -> None:
        if event.button() == Qt.MouseButton.MiddleButton:  # pan, in any tool
            self._pan_from = event.position()
            self.viewport().setCursor(Qt.CursorShape.ClosedHandCursor)
            event.accept()
            return
        if self.editor is None:
            return super().mousePressEvent(event)
        self.pressed.emit()
        self.setFocus()
        point = self.grid_at(event.position().toPoint())
        if self.mode != SELECT:
            if event.button() == Qt.MouseButton.LeftButton:
                self.act_at(point)
            elif event.button() == Qt.MouseButton.RightButton:
                self.finish()
            event.accept()
            return
        item = self._item_at(event.position().toPoint())
        if event.button() == Qt.MouseButton.LeftButton and item is not None:
            ctrl = bool(event.modifiers() & (Qt.KeyboardModifier.ControlModifier | Qt.KeyboardModifier.ShiftModifier))
            if ctrl:
                item.setSelected(not item.isSelected())
            elif not item.isSelected():
                self.sketch_scene.clearSelection()
                item.setSelected(True)
            self._press = self.snap(self.mapToScene(event.position().toPoint()))
            self._press_pos = event.position().toPoint()
            self._dragging = False
            event.accept()
            return
        super().mousePressEvent(event)

    def mouseMoveEvent(self, event: QMouseEvent) -> None:
        if self._pan_from is not None:
            d = event.position() - self._pan_from
            self._pan_from = event.position()
            self.horizontalScrollBar().setValue(self.horizontalScrollBar().value() - round(d.x()))
            self.verticalScrollBar().setValue(self.verticalScrollBar().value() - round(d.y()))
            event.accept()
            return
        if self.editor is None:
            return super().mouseMoveEvent(event)
        point = self.grid_at(event.position().toPoint())
        if self.mode != SELECT:
            if point != self.cursor_point:
                self.cursor_point = point
                if self._cursor is not None:
                    self._cursor.setPos(to_scene(point))
                self._update_ghost()
                self._update_rubber()
                self.pointerMoved.emit(*point)
            event.accept()
            return
        if self._press is not None and event.buttons() & Qt.MouseButton.LeftButton:
            if not self._dragging:
                if (event.position().toPoint() - self._press_pos).manhattanLength() < 4:
                    return
                self._dragging = True
                self.editor.begin_drag()
            self.editor.drag_to(point[0] - self._press[0], point[1] - self._press[1],
                                apart=bool(event.modifiers() & Qt.KeyboardModifier.AltModifier))
            event.accept()
            return
        self.pointerMoved.emit(*point)
        super().mouseMoveEvent(event)

    def mouseReleaseEvent(self, event: QMouseEvent) -> None:
        if event.button() == Qt.MouseButton.MiddleButton and self._pan_from is not None:
            self._pan_from = None
            if self.mode == SELECT:
                self.viewport().unsetCursor()
            else:
                self.viewport().setCursor(Qt.CursorShape.CrossCursor)
            event.accept()
            return
        if self._press is not None:
            if self._dragging and self.editor is not None:
                self.editor.end_drag()
            self._press = None
            self._dragging = False
            event.accept()
            return
        super().mouseReleaseEvent(event)

    def mouseDoubleClickEvent(self, event: QMouseEvent) -> None:
        if self.mode == WIRE:
            self._wire_start = None
            self._update_rubber()
            event.accept()
            return
        if self.mode == SELECT:
            item = self._item_at(event.position().toPoint())
            if isinstance(item, PartItem):
                self.editRequested.emit(item.part.name)
                event.accept()
                return
        super().mouseDoubleClickEvent(event)

    # -- a sketch file dropped from the desktop ----------------------------------------------
    # (no item on the canvas takes drops, so anything else dropped is refused here)
    def dragEnterEvent(self, event: QDragEnterEvent) -> None:  # noqa: N802 (Qt's name)
        self._take_sketch(event)

    def dragMoveEvent(self, event: QDragMoveEvent) -> None:  # noqa: N802 (Qt's name)
        self._take_sketch(event)

    def dropEvent(self, event: QDropEvent) -> None:  # noqa: N802 (Qt's name)
        if self._take_sketch(event):
            self.fileDropped.emit(dropped_sketch(event.mimeData()))

    @staticmethod
    def _take_sketch(event: QDropEvent) -> bool:
        """Accept the drag or drop if it carries one sketch file, else refuse it."""
        if dropped_sketch(event.mimeData()) is None:
            event.ignore()
            return False
        event.acceptProposedAction()
        return True

    def wheelEvent(self, event: QWheelEvent) -> None:
        if event.modifiers() & Qt.KeyboardModifier.ControlModifier:
            steps = event.angleDelta().y() / 120.0
            self.zoom_by(1.2 ** steps)
            event.accept()
        else:
            super().wheelEvent(event)

    # -- keys ------------------------------------------------------------------------------
    def focusNextPrevChild(self, next: bool) -> bool:  # Tab steps through parts instead
        return False

    def keyPressEvent(self, event: QKeyEvent) -> None:
        key = event.key()
        mods = event.modifiers()
        big = 4 if mods & Qt.KeyboardModifier.ShiftModifier else 1
        arrows = {Qt.Key.Key_Left: (-1, 0), Qt.Key.Key_Right: (1, 0),
                  Qt.Key.Key_Up: (0, -1), Qt.Key.Key_Down: (0, 1)}
        if key in arrows and self.editor is not None:
            dx, dy = arrows[key]
            if self.mode == SELECT:
                self.editor.nudge(dx * big, dy * big, apart=bool(mods & Qt.KeyboardModifier.AltModifier))
            else:
                self.move_cursor_to((self.cursor_point[0] + dx * big, self.cursor_point[1] + dy * big))
            event.accept()
        elif key in (Qt.Key.Key_Return, Qt.Key.Key_Enter):
            if self.mode != SELECT:
                self.act_at(self.cursor_point)
            else:
                sel = self.sketch_scene.selected_parts() if self.editor else []
                if len(sel) == 1:
                    self.editRequested.emit(sel[0])
            event.accept()
        elif key == Qt.Key.Key_Escape:
            self.finish()
            event.accept()
        elif key in (Qt.Key.Key_Tab, Qt.Key.Key_Backtab) and self.mode == SELECT:
            self.step_selection(backwards=key == Qt.Key.Key_Backtab or bool(mods & Qt.KeyboardModifier.ShiftModifier))
            event.accept()
        else:
            super().keyPressEvent(event)

    # -- zoom --------------------------------------------------------------------------------
    def zoom_by(self, factor: float) -> None:
        scale = self.transform().m11() * factor
        if 0.05 <= scale <= 12:
            self.scale(factor, factor)

    def zoom_fit(self) -> None:
        if self.editor is None:
            return
        self.sketch_scene.trim_paper()
        rect = self.sketch_scene.content_rect()
        if rect.isNull() or rect.width() < 1:
            rect = QRectF(-200, -150, 400, 300)
        rect = rect.adjusted(-40, -40, 40, 40)
        self.fitInView(rect, Qt.AspectRatioMode.KeepAspectRatio)
        if self.transform().m11() > 2.5:
            self.resetTransform()
            self.scale(2.5, 2.5)
            self.centerOn(rect.center())

    def resetCachedContent(self) -> None:  # noqa: N802 (Qt's name)
        """Forget the kept picture of the paper and those the scene keeps for this view (the
        reading marks'): the next repaint draws everything afresh."""
        super().resetCachedContent()
        drop = getattr(self.scene(), "drop_pictures", None)
        if drop is not None:
            drop()

    # -- background -------------------------------------------------------------------------
    exposed_region: QRegion | None = None  # while painting: the region being repainted (ReadingLayer reads it)

    def paintEvent(self, event: QPaintEvent) -> None:
        scene = self.scene()
        if scene is not None:
            scene.lay_owed(self)  # readings of a large sketch's parts coming into sight
        self.exposed_region = event.region()
        try:
            super().paintEvent(event)
        finally:
            self.exposed_region = None

    def drawBackground(self, painter: QPainter, rect: QRectF) -> None:
        th = current_theme()
        painter.fillRect(rect, th.paper)
        scale = self.transform().m11()
        step = GRID
        while step * scale < 9:
            step *= 4
        left = math.floor(rect.left() / step) * step
        top = math.floor(rect.top() / step) * step
        pen = QPen(th.grid, max(1.5 / scale, 1.0))
        pen.setCapStyle(Qt.PenCapStyle.RoundCap)
        painter.setPen(pen)
        nx = int(rect.width() / step) + 2
        ny = int(rect.height() / step) + 2
        if nx * ny <= 60000:
            pts = [QPointF(left + i * step, top + j * step) for j in range(ny) for i in range(nx)]
            painter.drawPoints(QPolygonF(pts))
        scene = self.scene()
        if scene is not None:  # the wires and parts lie on the paper (items.OnPaper)
            scene.drawBackground(painter, rect)
