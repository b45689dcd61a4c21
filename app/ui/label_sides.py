"""Which side of its symbol each part's text goes.

A part's text (designator, value, description, then its current and drop marks) goes on
the side facing away from the middle of the drawing, as a person writes it, unless that
side is crowded more than the other by the neighbours' symbols and texts. The parts are
settled one by one in the order of their designators (``order_key``: R2 before R10), each
against the neighbours settled before it as they now stand and the others on their sides
away from the middle: a greedy pass, in the manner of the sequential placement heuristics
of map labelling (Christensen, Marks and Shieber, "An empirical study of algorithms for
point-feature label placement", ACM Trans. Graphics 14(3), 1995).

The result rests on the drawing alone, never on the order of the edits that made it (a
scene patched edit by edit reads as one drawn afresh), yet an edit settles only the parts
whose surroundings changed: those are taken in the pass's order, and a part that turns to
its other side passes the question on to its neighbours later in the order (``orient``).

Boxes are kept in numpy arrays, one row per part, so asking what meets a box is one
comparison over all parts (the scene's own index measures every item just added or moved,
which on opening a document is every item, for every question).
"""
from __future__ import annotations

import heapq
import re

import numpy as np
from PySide6.QtCore import QRectF

__all__ = ["LabelSides", "order_key"]

_NUMBER = re.compile(r"(\d+)")


def order_key(name: str) -> tuple:
    """The order parts are settled in: by designator, numbers by value (R2 before R10)."""
    return tuple(int(t) if t.isdigit() else t for t in _NUMBER.split(name))


def _row(r: QRectF) -> tuple[float, float, float, float]:
    return (r.left(), r.top(), r.right(), r.bottom()) if not r.isEmpty() else (np.nan,) * 4


def _box(row: np.ndarray) -> QRectF | None:
    return None if np.isnan(row[0]) else QRectF(row[0], row[1], row[2] - row[0], row[3] - row[1])


def _overlap(a: QRectF, b: QRectF) -> float:
    common = a.intersected(b)
    return 0.0 if common.isEmpty() else common.width() * common.height()


class LabelSides:
    """The text sides of a scene's parts (``orient``), and what it keeps to settle them."""

    SETTLE_ALL_FROM = 50  # parts whose surroundings changed; from this many every part is settled

    def __init__(self) -> None:
        self.middle: tuple[float, float] | None = None
        self._away: dict[str, int] = {}  # per part: its side away from the middle
        self._shapes: dict[str, tuple] = {}  # per part: its symbol's box and text blocks when last settled
        self._key: dict[str, tuple] = {}
        self._slot: dict[str, int] = {}
        self._names: list[str | None] = []
        self._free: list[int] = []
        self._reach = np.full((0, 4), np.nan)  # per slot: the part's symbol and both text blocks

    # -- the array ------------------------------------------------------------------------
    def _slot_of(self, name: str) -> int:
        k = self._slot.get(name)
        if k is None:
            if not self._free:
                n = len(self._names)
                grow = max(16, n)
                self._reach = np.vstack((self._reach, np.full((grow, 4), np.nan)))
                self._names += [None] * grow
                self._free = list(range(n + grow - 1, n - 1, -1))
            k = self._slot[name] = self._free.pop()
            self._names[k] = name
            self._key[name] = order_key(name)
        return k

    def forget(self, name: str) -> list[QRectF]:
        """Part ``name`` has left the drawing; where it reached (its neighbours to settle again)."""
        self._away.pop(name, None)
        self._shapes.pop(name, None)
        self._key.pop(name, None)
        k = self._slot.pop(name, None)
        if k is None:
            return []
        was = _box(self._reach[k])
        self._reach[k] = np.nan
        self._names[k] = None
        self._free.append(k)
        return [] if was is None else [was]

    def _reaching(self, box: QRectF) -> list[str]:
        """The parts whose symbol or text block on either side meets ``box``."""
        if box.isEmpty():
            return []
        r = self._reach
        with np.errstate(invalid="ignore"):
            hit = (r[:, 0] < box.right()) & (r[:, 2] > box.left()) & (r[:, 1] < box.bottom()) & (r[:, 3] > box.top())
        names = self._names
        return [names[k] for k in np.flatnonzero(hit).tolist()]

    # -- the sides --------------------------------------------------------------------------
    @staticmethod
    def away_side(horizontal: bool, at: float, cx: float, cy: float) -> int:
        """The side facing away from the middle (cx, cy) of a part lying ``horizontal`` with its
        body at scene ``at`` (y across, x upright): -1 above or left, +1 below or right."""
        return (-1 if at <= cy else 1) if horizontal else (1 if at >= cx else -1)

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
        for name in names:
            side = self.away_side(*axis[name], cx, cy)
            if away.get(name) != side:
                away[name] = side
                unsettled.add(name)
                touched.append(items[name].reach_box())  # those settled before it see this side
        for name in changed:
            item = items[name]
            shapes = (item.body_box(), item.text_block(-1), item.text_block(1))
            if self._shapes.get(name) != shapes:
                k = self._slot_of(name)
                was = _box(self._reach[k])
                if was is not None:
                    touched.append(was)
                touched.append(item.reach_box())
                self._reach[k] = _row(item.reach_box())
                self._shapes[name] = shapes
        if len(unsettled) >= self.SETTLE_ALL_FROM:
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
            if not self._settle(items, item, name, k):
                continue
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
