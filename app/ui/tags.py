"""Current tags on the canvas: a named arrow beside a part, as currents are labelled on paper.

A tag is kept in the sketch (``Sketch.set_tag``), changed only through
:class:`TagCommand` so that it is undoable, and drawn by :class:`TagLayer`
as an arrow along the part, on the side away from its label, with the
current's name at the arrow's tail. Every part in series with the tagged one
carries the same current, so tagging another part of the same branch moves
the tag rather than adding a second one.
"""
from __future__ import annotations

import keyword
from collections.abc import Callable, Sequence
from contextlib import AbstractContextManager, nullcontext

from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QFontMetricsF, QPainter, QPolygonF, QUndoCommand
from PySide6.QtWidgets import QGraphicsItem, QStyleOptionGraphicsItem, QWidget

from ..analysis.branches import is_reserved_name
from ..sketch.model import BranchTag, Sketch
from .items import Z_MARK, PartItem
from .theme import current_theme, label_font

__all__ = ["TagCommand", "TagMark", "TagLayer", "tag_name_problem", "suggest_tag_name", "TAG_NAME_MAX"]

TAG_NAME_MAX = 32
Change = tuple[str, BranchTag | None, BranchTag | None]  # part, tag before, tag after


class TagCommand(QUndoCommand):
    """Put, move, flip or remove current tags as one undo step."""

    def __init__(self, sketch: Sketch, changes: Sequence[Change], text: str,
                 batch: Callable[[], AbstractContextManager] | None = None) -> None:
        super().__init__(text)
        self.sketch = sketch
        self.changes = list(changes)
        self._batch = batch or nullcontext

    def redo(self) -> None:
        with self._batch():
            for part, _, new in self.changes:
                self.sketch.set_tag(part, new)

    def undo(self) -> None:
        with self._batch():
            for part, old, _ in reversed(self.changes):
                self.sketch.set_tag(part, old)


def tag_name_problem(name: str, sketch: Sketch, part: str, same_branch: Sequence[str] = ()) -> str:
    """Why ``name`` cannot name the current through ``part`` ('' when it can).

    ``same_branch`` lists the parts in series with ``part``: a tag there with
    the same name is the one being moved, not a clash.
    """
    if not name:
        return "Give the current a name, such as Ia or I_load."
    if len(name) > TAG_NAME_MAX or not name.isascii() or not name.isidentifier() or not name[0].isalpha() \
            or keyword.iskeyword(name):
        return (f"'{name}' cannot be a current name: use up to {TAG_NAME_MAX} letters, digits and _, "
                "starting with a letter, for example Ia or I_load.")
    if sketch.has_part(name):
        return f"'{name}' is the name of a part; give the current another name, such as I{name}."
    if is_reserved_name(name):
        return f"'{name}' is kept for the equations (V_… source voltages, r_… internal resistances, IL1… loop currents)."
    for t in sketch.tags:
        if t.name == name and t.part != part and t.part not in same_branch:
            return f"{name} already names the current through {t.part}; each branch has its own name."
    return ""


def suggest_tag_name(sketch: Sketch) -> str:
    """The first of Ia, Ib, … that is free."""
    used = {t.name for t in sketch.tags} | {p.name for p in sketch.parts}
    for c in "abcdefghjkmnpqrstuvwxyz":
        if f"I{c}" not in used:
            return f"I{c}"
    n = 1
    while f"I_{n}" in used:
        n += 1
    return f"I_{n}"


class TagMark(QGraphicsItem):
    """The arrow and name of one tag, beside its part (scene coordinates)."""

    LENGTH = 26.0
    OFFSET = 13.0

    def __init__(self) -> None:
        super().__init__()
        self.setZValue(Z_MARK)
        self.tag: BranchTag | None = None
        self._tail = self._tip = QPointF()
        self._text_rect = QRectF()
        self._bounds = QRectF()
        self._fm = QFontMetricsF(label_font())

    def place(self, tag: BranchTag, item: PartItem) -> None:
        """Lay the mark beside ``item``, pointing the way ``tag`` counts its current."""
        self.prepareGeometryChange()
        self.tag = tag
        t0, t1 = (item.mapToScene(p) for p in item.terminal_points()[:2])
        mid = (t0 + t1) / 2
        d = t1 - t0
        length = max((d.x() ** 2 + d.y() ** 2) ** 0.5, 1e-9)
        ux, uy = d.x() / length, d.y() / length
        side = -item.side  # away from the designator and the readings
        nx, ny = (0.0, side * 1.0) if abs(ux) > abs(uy) else (side * 1.0, 0.0)
        centre = mid + QPointF(nx * self.OFFSET, ny * self.OFFSET)
        half = QPointF(ux, uy) * (self.LENGTH / 2)
        self._tail, self._tip = (centre - half, centre + half) if tag.forward else (centre + half, centre - half)
        w, h = self._fm.horizontalAdvance(tag.name) + 4, self._fm.height()
        if abs(ux) > abs(uy):  # horizontal part: name beyond the arrow, outside
            y = centre.y() + (4 if side > 0 else -h - 4)
            self._text_rect = QRectF(centre.x() - w / 2, y, w, h)
        else:
            x = centre.x() + (5 if side > 0 else -w - 5)
            self._text_rect = QRectF(x, centre.y() - h / 2, w, h)
        pts = QRectF(self._tail, self._tip).normalized().adjusted(-6, -6, 6, 6)
        self._bounds = pts.united(self._text_rect).adjusted(-2, -2, 2, 2)
        self.setToolTip(f"Current tag {tag.name} on {tag.part}: counted "
                        f"{'from its first terminal to its second' if tag.forward else 'from its second terminal to its first'}")
        self.update()

    @property
    def text_rect(self) -> QRectF:
        return self._text_rect

    def boundingRect(self) -> QRectF:
        return self._bounds

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        if self.tag is None:
            return
        th = current_theme()
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        pen = painter.pen()
        pen.setColor(th.loop)
        pen.setWidthF(1.6)
        painter.setPen(pen)
        painter.drawLine(self._tail, self._tip)
        d = self._tip - self._tail
        n = max((d.x() ** 2 + d.y() ** 2) ** 0.5, 1e-9)
        ux, uy = d.x() / n, d.y() / n
        back = self._tip - QPointF(ux, uy) * 7
        head = QPolygonF([self._tip, back + QPointF(-uy, ux) * 4, back - QPointF(-uy, ux) * 4])
        painter.setBrush(th.loop)
        painter.drawPolygon(head)
        painter.setFont(label_font())
        font = painter.font()
        font.setItalic(True)
        font.setBold(True)
        painter.setFont(font)
        painter.drawText(self._text_rect, int(Qt.AlignmentFlag.AlignCenter), self.tag.name)


class TagLayer:
    """Keeps one :class:`TagMark` per tag in the scene, following the scene's ``documentChanged``."""

    def __init__(self, scene) -> None:
        self.scene = scene
        self.marks: dict[str, TagMark] = {}
        scene.documentChanged.connect(self.sync)
        self.sync()

    def sync(self) -> None:
        tags = {t.part: t for t in self.scene.sketch.tags}
        for part in [p for p in self.marks if p not in tags or p not in self.scene.part_items]:
            self.scene.removeItem(self.marks.pop(part))
        for part, tag in tags.items():
            item = self.scene.part_items.get(part)
            if item is None:
                continue
            mark = self.marks.get(part)
            if mark is None:
                mark = self.marks[part] = TagMark()
                self.scene.addItem(mark)
            mark.place(tag, item)
