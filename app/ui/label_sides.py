"""Which side of its symbol each part's text goes.

A part's text (designator, value, description, then its current and drop marks) goes on
the side facing away from the middle of the drawing, as a person writes it, unless that
side is crowded more than the other by the neighbours' symbols and texts. The parts are
settled one by one in the order of where they stand (``order_key``: column by column from
the left, each from the top; the designator only between parts on one grid point), so
renaming a part turns no neighbour's text, each against the neighbours settled before it as they now stand and the others on their sides
away from the middle: a greedy pass, in the manner of the sequential placement heuristics
of map labelling (Christensen, Marks and Shieber, "An empirical study of algorithms for
point-feature label placement", ACM Trans. Graphics 14(3), 1995).

The result rests on the drawing alone, never on the order of the edits that made it (a
scene patched edit by edit reads as one drawn afresh), yet an edit settles only the parts
whose surroundings changed: those are taken in the pass's order, and a part that turns to
its other side passes the question on to its neighbours later in the order (``orient``).

Parts are filed by the grid cells their text blocks and symbol reach, so asking what meets
a box looks at the parts near it (the scene's own index measures every item just added or
moved, which on opening a document is every item, for every question).
"""
from __future__ import annotations

import heapq
import math
import re

from PySide6.QtCore import QRectF

__all__ = ["LabelSides", "order_key"]

_NUMBER = re.compile(r"(\d+)")


def order_key(part) -> tuple:
    """The order ``part`` (a ``PlacedPart``) is settled in: by grid column, then row, then
    designator with numbers by value (R2 before R10).

    Column by column, not row by row: in a lattice (rows of parts lying across, joined by
    upright ones) row order settles each upright part among the unsettled ones below it,
    and leaves more text over text; column order does as well as the designators did.
    """
    return (part.x, part.y) + tuple(int(t) if t.isdigit() else t for t in _NUMBER.split(part.name))


def _overlap(a: QRectF, b: QRectF) -> float:
    if not a.intersects(b):
        return 0.0
    common = a.intersected(b)
    return common.width() * common.height()


class LabelSides:
    """The text sides of a scene's parts (``orient``), and what it keeps to settle them."""

    SETTLE_ALL_FROM = 50  # parts whose surroundings changed; from this many every part is settled

    CELL = 128.0  # scene units: each part is filed under the cells its reach covers

    def __init__(self) -> None:
        self.middle: tuple[float, float] | None = None
        self._away: dict[str, int] = {}  # per part: its side away from the middle
        self._shapes: dict[str, tuple] = {}  # per part: its symbol's box and text blocks when last settled
        self._key: dict[str, tuple] = {}
        self._reach: dict[str, QRectF] = {}  # per part: the box around its symbol and both text blocks
        self._cells: dict[tuple[int, int], set[str]] = {}

    # -- where the parts reach ---------------------------------------------------------------
    def _cells_of(self, box: QRectF) -> list[tuple[int, int]]:
        c = self.CELL
        x0, x1 = math.floor(box.left() / c), math.floor(box.right() / c)
        y0, y1 = math.floor(box.top() / c), math.floor(box.bottom() / c)
        return [(x, y) for x in range(x0, x1 + 1) for y in range(y0, y1 + 1)]

    def _file(self, name: str, reach: QRectF | None) -> QRectF | None:
        """File part ``name`` under the cells ``reach`` covers (None: under none); where it reached."""
        was = self._reach.pop(name, None)
        if was is not None:
            for cell in self._cells_of(was):
                self._cells[cell].discard(name)
        if reach is not None and not reach.isEmpty():
            self._reach[name] = reach
            for cell in self._cells_of(reach):
                self._cells.setdefault(cell, set()).add(name)
        return was

    def forget(self, name: str) -> list[QRectF]:
        """Part ``name`` has left the drawing; where it reached (its neighbours to settle again)."""
        self._away.pop(name, None)
        self._shapes.pop(name, None)
        self._key.pop(name, None)
        was = self._file(name, None)
        return [] if was is None else [was]

    def _reaching(self, box: QRectF) -> list[str]:
        """The parts whose symbol or text block on either side meets ``box``, in settling order
        (so that sums over them come out the same to the last bit however they were filed)."""
        if box.isEmpty():
            return []
        cells, reach = self._cells, self._reach
        near = set().union(*(cells.get(cell, ()) for cell in self._cells_of(box)))
        return sorted((n for n in near if reach[n].intersects(box)), key=self._key.__getitem__)

    # -- the sides --------------------------------------------------------------------------
    def orient(self, items: dict, axis: dict[str, tuple[bool, float]], middle: tuple[float, float],
               changed: set[str], gone: list[QRectF] = ()) -> None:
        """Settle the side of every part the edit may have moved to the other side.

        ``items``: the part items by name; ``axis``: per part whether it lies horizontally and
        where its body is (``SketchScene._label_axis``); ``middle``: the middle of the drawing;
        ``changed``: parts new or laid out afresh; ``gone``: where parts that left reached
        (``forget``).
        """
        names = changed if self.middle == middle else axis.keys()
        self.middle = cx, cy = middle
        away = self._away
        unsettled = set(changed)
        touched = list(gone)  # where what neighbours see changed
        for name in names:  # the side away from the middle: above or left of it -1, else +1
            horizontal, at = axis[name]
            side = (-1 if at <= cy else 1) if horizontal else (1 if at >= cx else -1)
            if away.get(name) != side:
                away[name] = side
                unsettled.add(name)
                touched.append(items[name].reach_box())  # those settled before it see this side
        for name in changed:
            item = items[name]
            shapes = (item.body_box(), item.text_block(-1), item.text_block(1))
            if self._shapes.get(name) != shapes:
                self._key[name] = order_key(item.part)
                was = self._file(name, item.reach_box())
                if was is not None:
                    touched.append(was)
                touched.append(item.reach_box())
                self._shapes[name] = shapes
        everyone = len(unsettled) >= self.SETTLE_ALL_FROM
        if everyone:
            unsettled = set(items)
        else:
            for box in touched:
                unsettled.update(self._reaching(box))
        key = self._key
        queue = [(key[n], n) for n in unsettled]
        heapq.heapify(queue)
        queued = set(unsettled)
        while queue:
            k, name = heapq.heappop(queue)
            item = items[name]
            before = item.text_block()
            if not self._settle(items, item, name, k) or everyone:
                continue  # (settling every part, every one is queued already)
            # those settled after it see it where it now stands
            for box in (before, item.text_block()):
                for other in self._reaching(box):
                    if other not in queued and key[other] > k:
                        queued.add(other)
                        heapq.heappush(queue, (key[other], other))

    def _settle(self, items: dict, item, name: str, k: tuple) -> bool:
        """Put ``item`` on the side crowded less (its side away from the middle when that is
        free, or as crowded); True when it turned."""
        side = self._away[name]
        if item.lines:
            crowded = self._crowding(items, item, side, k)
            if crowded > 0 and self._crowding(items, item, -side, k) < crowded:
                side = -side
        if item.side == side:
            return False
        item.set_side(side)
        return True

    def _crowding(self, items: dict, item, side: int, k: tuple) -> float:
        """How much of ``item``'s text block on ``side`` other parts cover with their symbols
        and texts: those settled before it (order ``k``) as they stand, the others on their
        sides away from the middle (square scene units; where both cover it, twice)."""
        block = item.text_block(side)
        key, away = self._key, self._away
        total = 0.0
        for name in self._reaching(block):
            other = items[name]
            if other is item:
                continue
            total += _overlap(block, other.body_box())
            if other.lines:
                total += _overlap(block, other.text_block() if key[name] < k else other.text_block(away[name]))
        return total
