"""The scene: a view of the sketch document, patched from its change notifications.

The scene never edits the document; it follows it. After each change (or
batch of changes) it brings its items in line with the model by comparing
object identity, so a move touches only the items that moved. Results of a
solve are laid on top by ``show_solution`` / ``show_fault``.
"""
from __future__ import annotations

from collections.abc import Iterable, Iterator
from contextlib import contextmanager

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt, QTimer, Signal
from PySide6.QtGui import QPainter, QPolygonF
from PySide6.QtWidgets import QGraphicsItem, QGraphicsScene, QStyleOptionGraphicsItem

from ..sketch.model import Sketch
from .annotations import CurrentMark, DropMark, FaultNote, LoopMark, PotentialTag, ReadingLayer, marks_meeting
from .label_sides import LabelSides
from .items import COVER_TEXT, TEXT_LOD, Box, JunctionLayer, LooseEnd, OnPaper, PartItem, WireItem, paint_on_paper, to_scene
from .symbols import IEC
from .theme import GRID

__all__ = ["SketchScene"]


class SketchScene(QGraphicsScene):
    """Items for every part and wire of ``sketch``, plus connection marks and results."""

    documentChanged = Signal()

    def __init__(self, sketch: Sketch, style: str = IEC, parent=None) -> None:
        super().__init__(parent)
        self.sketch = sketch
        self.style = style
        self.part_items: dict[str, PartItem] = {}
        self._shown: dict[str, object] = {}  # the part each item shows, by name (compared by identity)
        self._axis: dict[str, tuple[bool, float]] = {}  # per part: horizontal, where its body lies
        self._sides = LabelSides()  # which side of its symbol each part's text goes
        self._marked: dict[str, tuple[PartItem, object]] = {}  # per part: the item and reading its marks show
        self._owed: dict[str, tuple[PartItem, object]] = {}  # per part out of sight: the reading still to show
        self._clear_in: dict[int, QRectF] = {}  # per view: an area no owed reading lies in (``lay_owed``)
        self.wire_items: list[WireItem] = []
        self._dots = JunctionLayer()  # paints every connection dot
        self.addItem(self._dots)
        self._loose: list[LooseEnd] = []
        self._tags: list[PotentialTag] = []
        self._loops: list[LoopMark] = []
        self._readings = ReadingLayer()  # paints every part's current and drop marks
        self.addItem(self._readings)
        self._note = FaultNote()
        self._note.setVisible(False)
        self.addItem(self._note)
        self.layers = {"currents": True, "drops": True, "potentials": True, "loops": True, "descriptions": True}
        self._batch = 0
        self._dirty = False
        self._flagged: set[str] = set()
        self.solved = False
        self.place_now_up_to: int | None = None  # see _place; the window sets it while editing
        self._waiting: list = []  # (place, mark, key) jobs put off by _place
        self._new_parts: set[str] = set()  # parts new or changed since the last solution was laid on
        self._place_timer = QTimer(self)
        self._place_timer.setSingleShot(True)
        self._place_timer.setInterval(self.PLACE_AFTER_MS)
        self._place_timer.timeout.connect(self.settle_marks)
        self.setItemIndexMethod(QGraphicsScene.ItemIndexMethod.BspTreeIndex)
        self._paper = self._paper_around([(0, 0)])
        self.setSceneRect(self._paper)
        sketch.subscribe(self._on_model_changed)
        self.sync()

    # -- following the model --------------------------------------------------
    @contextmanager
    def batch(self) -> Iterator[None]:
        """Hold back syncing until the block ends (one sync per undo step)."""
        self._batch += 1
        try:
            yield
        finally:
            self._batch -= 1
            if self._batch == 0 and self._dirty:
                self.sync()

    def _on_model_changed(self) -> None:
        if self._batch:
            self._dirty = True
        else:
            self.sync()

    def sync(self) -> None:
        """Bring the items in line with the document and announce the change."""
        self._dirty = False
        parts = self._sync_parts()
        wires = self._sync_wires()
        points = [(p.x, p.y) for p in parts]
        points += [end for w in wires for end in w.ends]
        self.extend_paper(points)
        self.documentChanged.emit()

    # -- the paper --------------------------------------------------------------
    PAPER_MARGIN = 1200.0  # scene units of free paper kept beyond the drawing on every side

    def extend_paper(self, points: list[tuple[int, int]]) -> None:
        """Let the paper (the scene rect the views scroll over) reach past grid ``points``.

        The paper reaches ``PAPER_MARGIN`` past the drawing, so a person can scroll into free
        paper to draw there at any zoom. It grows by a whole margin once something comes within
        half a margin of its edge, and never shrinks while the document is open: growing it
        moves or repaints the whole view, so a part dragged out past the drawing's edge does
        that once, not on every step (Qt's own scene rect grows with every such step).
        """
        if not points:
            return
        around = self._paper_around(points)
        half = self.PAPER_MARGIN / 2
        if self._paper.contains(around.adjusted(half, half, -half, -half)):  # nothing within half a margin of the edge
            return
        self._paper = self._paper.united(around)
        self.setSceneRect(self._paper)

    def trim_paper(self) -> None:
        """Take the paper back to ``PAPER_MARGIN`` past the drawing as it now is.

        Zoom to Fit asks for it: after a large part of a drawing is deleted, the scroll range
        no longer reaches over paper the drawing left long ago. Only then, not after each
        edit: the view would jump under a person's pointer as the range changed."""
        points = [(p.x, p.y) for p in self.sketch.parts] + [end for w in self.sketch.wires for end in w.ends]
        paper = self._paper_around(points or [(0, 0)])
        if paper != self._paper:
            self._paper = paper
            self.setSceneRect(paper)

    def _paper_around(self, points: list[tuple[int, int]]) -> QRectF:
        """The box around grid ``points`` with ``PAPER_MARGIN`` of paper on every side."""
        xs, ys = [p[0] for p in points], [p[1] for p in points]
        m = self.PAPER_MARGIN
        return QRectF(QPointF(min(xs) * GRID, min(ys) * GRID),
                      QPointF(max(xs) * GRID, max(ys) * GRID)).adjusted(-m, -m, m, m)

    def _new_part_item(self, part) -> PartItem:
        item = PartItem(part, self.style, described=self.layers["descriptions"])
        if part.kind != "ground":
            item.current_mark = CurrentMark(item, self._readings)
            item.drop_mark = DropMark(item, self._readings)
            item.current_mark.set_layer(self.layers["currents"])
            item.drop_mark.set_layer(self.layers["drops"])
        else:
            item.current_mark = item.drop_mark = None
        self.addItem(item)
        return item

    def _sync_parts(self) -> list:
        """Patch the part items: only parts that are new, gone or replaced are looked at in Qt.
        Returns the parts new or replaced."""
        items = self.part_items
        shown = self._shown
        parts = self.sketch.parts
        changed = [p for p in parts if shown.get(p.name) is not p]
        gone: list[QRectF] = []  # where parts that left reached
        fresh = sum(1 for p in changed if p.name not in shown)
        if len(shown) - (len(parts) - fresh):  # some shown parts are gone
            current = {p.name for p in parts}
            for name in [n for n in shown if n not in current]:
                gone += self._sides.forget(name)
                del shown[name]
                self._axis.pop(name, None)
                self._marked.pop(name, None)
                self._remove_part_item(items.pop(name))
        for part in changed:
            name = part.name
            item = items.get(name)
            if item is None:
                items[name] = item = self._new_part_item(part)
            elif item.part.kind != part.kind:
                self._remove_part_item(item)
                items[name] = item = self._new_part_item(part)
            else:
                item.set_part(part)
            shown[name] = part
            self._new_parts.add(name)
            self._axis[name] = self._label_axis(item)
        self._orient_labels(parts, {p.name for p in changed}, gone)
        return changed

    def _remove_part_item(self, item: PartItem) -> None:
        self._readings.forget(item)
        self.removeItem(item)

    @staticmethod
    def _label_axis(item: PartItem) -> tuple[bool, float]:
        """Whether the part lies horizontally, and its body's scene y (horizontal) or x (upright)."""
        if item.horizontal:
            return True, item.pos().y() + item.centre.y()
        return False, item.pos().x() + item.centre.x()

    def _orient_labels(self, parts, changed: set[str], gone: list[QRectF] = ()) -> None:
        """Put each part's text on the side facing away from the middle of the drawing, or on
        the other where that one is crowded (``label_sides``); ``gone``: where parts that left
        reached."""
        if not parts:
            self._sides.middle = None
            return
        middle = (sum(p.x for p in parts) / len(parts) * GRID, sum(p.y for p in parts) / len(parts) * GRID)
        self._sides.orient(self.part_items, self._axis, middle, changed, gone)

    def _sync_wires(self) -> list:
        """Patch the wire items as ``_sync_parts`` does the parts; returns the wires new or replaced."""
        new = self.sketch.wires
        old = self.wire_items
        n_old, n_new, m = len(old), len(new), min(len(old), len(new))
        p = 0
        while p < m and old[p].wire is new[p]:
            p += 1
        s = 0
        while s < m - p and old[n_old - 1 - s].wire is new[n_new - 1 - s]:
            s += 1
        mid_old = old[p:n_old - s]
        mid_new = new[p:n_new - s]
        k = min(len(mid_old), len(mid_new))
        for j in range(k):
            if mid_old[j].wire is not mid_new[j]:
                mid_old[j].set_wire(mid_new[j])
        for item in mid_old[k:]:
            self.removeItem(item)
        added = []
        for w in mid_new[k:]:
            item = WireItem(w, 0)
            self.addItem(item)
            added.append(item)
        self.wire_items = old[:p] + mid_old[:k] + added + old[n_old - s:]
        if len(mid_old) != len(mid_new):
            for i in range(p, len(self.wire_items)):
                self.wire_items[i].index = i
        else:
            for i in range(p, p + k):
                self.wire_items[i].index = i
        return mid_new

    # -- selection --------------------------------------------------------------
    def selected_parts(self) -> list[str]:
        """Names of the selected parts, in document order."""
        chosen = {i.part.name for i in self.selectedItems() if isinstance(i, PartItem)}
        return [p.name for p in self.sketch.parts if p.name in chosen]

    def selected_wires(self) -> list[int]:
        """Indices of the selected wires."""
        return sorted(i.index for i in self.selectedItems() if isinstance(i, WireItem))

    def select(self, parts: Iterable[str] = (), wires: Iterable[int] = ()) -> None:
        """Select exactly these parts and wires (no signal when that is already the selection)."""
        want = {self.part_items[n] for n in parts if n in self.part_items}
        want.update(self.wire_items[i] for i in wires if 0 <= i < len(self.wire_items))
        if set(self.selectedItems()) == want:
            return
        self.blockSignals(True)
        try:
            self.clearSelection()
            for item in want:
                item.setSelected(True)
        finally:
            self.blockSignals(False)
        self.selectionChanged.emit()

    # -- looks -------------------------------------------------------------------
    def set_style(self, style: str) -> None:
        """Use the IEC 60617 or IEEE 315 symbols."""
        self.style = style
        for item in self.part_items.values():
            item.set_style(style)

    def refresh_looks(self) -> None:
        """Repaint every item afresh (after a change of scheme: items keep pictures of themselves,
        and the views one of the paper with the drawing on it)."""
        for item in self.items():
            if isinstance(item, OnPaper):
                item.repaper()  # its pictures are of the old colours
            else:
                item.update()

    def drop_pictures(self) -> None:
        """Forget the pictures of the reading marks the views keep (``ReadingLayer._kept_pictures``)."""
        self._readings.drop_pictures()

    drawn_exactly = False  # True while a picture file is made: every shape drawn afresh (shot.py)

    @contextmanager
    def drawn_afresh(self) -> Iterator[None]:
        """Items paint themselves inside the block, not their cached screen pixels (nor the
        pictures of parts and shapes a view copies in, ``drawn_exactly``), so an SVG holds lines
        and text, and a PNG or a printed page is drawn at its own resolution, to the last pixel.
        The selection is left out of the picture and given back afterwards, with no
        selection signal: the person's work in the window goes on where it was."""
        items = self.items()
        modes = [i.cacheMode() for i in items]
        for i in items:
            i.setCacheMode(QGraphicsItem.CacheMode.NoCache)
        chosen = self.selectedItems()
        blocked = self.blockSignals(True)
        self.clearSelection()
        self.drawn_exactly = True
        try:
            yield
        finally:
            self.drawn_exactly = False
            for i, mode in zip(items, modes):
                i.setCacheMode(mode)
            for i in chosen:
                i.setSelected(True)
            self.blockSignals(blocked)

    def drawBackground(self, painter: QPainter, rect: QRectF) -> None:  # noqa: N802 (Qt's name)
        """The drawing's wires and parts, which lie on the paper (``items.OnPaper``)."""
        paint_on_paper(self, painter, rect, self.drawn_exactly)

    def set_layer(self, layer: str, on: bool) -> None:
        """Show or hide one layer of annotations."""
        with self._readings.hold():
            self._set_layer(layer, on)

    def _set_layer(self, layer: str, on: bool) -> None:
        self.layers[layer] = on
        if layer in ("currents", "drops"):
            attr = "current_mark" if layer == "currents" else "drop_mark"
            for item in self.part_items.values():
                mark = getattr(item, attr)
                if mark is not None:
                    mark.set_layer(on)
        elif layer == "potentials":
            for t in self._tags:
                t.set_shown(on and t.active)
        elif layer == "loops":
            for t in self._loops:
                t.set_shown(on and t.active)
        elif layer == "descriptions":
            for item in self.part_items.values():
                item.set_described(on)
            self._orient_labels(self.sketch.parts, set(self.part_items))  # every text block changed
        if on and layer in ("currents", "drops", "descriptions") and self.solved:
            self._place_clear_of_new_texts()

    # -- connections and results -----------------------------------------------
    def _pool(self, pool: list, make, n: int) -> list:
        """The first ``n`` items of ``pool`` (made by ``make()`` as needed); the rest hidden."""
        while len(pool) < n:
            item = make()
            self.addItem(item)
            pool.append(item)
        for item in pool[n:]:
            if getattr(item, "active", True):
                item.set_shown(False)
                item.active = False
        return pool[:n]

    def _new_tag(self) -> PotentialTag:
        return PotentialTag(self._readings)

    def _new_loop_mark(self) -> LoopMark:
        return LoopMark(self._readings)

    def show_connections(self, junctions: list[tuple[int, int]], open_ends: list[tuple[int, int]]) -> None:
        """Dots where three or more conductors join; rings at ends that connect to nothing."""
        self._dots.set_points(junctions)
        self._hang(self._pool(self._loose, LooseEnd, len(open_ends)), open_ends)

    @staticmethod
    def _hang(items: list, points: list[tuple[int, int]]) -> None:
        """Put pooled marks on grid points, touching only those that move or come back."""
        for item, p in zip(items, points):
            if not getattr(item, "active", False) or item.at != p:
                item.at = p
                item.setPos(to_scene(p))
                item.active = True
                item.setVisible(True)

    def show_solution(self, readings: dict[str, tuple[float, float]],
                      potentials: list[tuple[tuple[int, int], float]],
                      loops: list[tuple[tuple[float, float], str, float, bool]],
                      outlines: list[list[tuple[float, float]]] | None = None) -> None:
        """Lay a solution on the drawing.

        ``readings`` maps part names to (current, drop); ``potentials`` are
        (grid point, volts) tags; ``loops`` are (grid centre, name, current, clockwise),
        ``outlines`` the corners of each loop's window (grid units), where its mark may go.
        Only marks whose value, place or visibility changed are touched.
        """
        with self._readings.hold():
            self._show_solution(readings, potentials, loops, outlines)

    def _show_solution(self, readings: dict[str, tuple[float, float]],
                       potentials: list[tuple[tuple[int, int], float]],
                       loops: list[tuple[tuple[float, float], str, float, bool]],
                       outlines: list[list[tuple[float, float]]] | None) -> None:
        self._clear_fault()
        self.solved = True
        readable = self.marks_readable()
        marked, owed = self._marked, self._owed  # (read only here: ``_lay`` writes ``_marked``)
        sight = self._names_in_sight() if len(self.part_items) >= self.LAY_IN_SIGHT_FROM else None
        for name, item in self.part_items.items():
            if item.current_mark is None:
                continue
            r = readings.get(name)
            last = marked.get(name)
            if last is not None and last[0] is item and last[1] == r:
                if owed:
                    owed.pop(name, None)
                continue
            if sight is not None and name not in sight:
                owed[name] = (item, r)
                continue
            if owed:
                owed.pop(name, None)
            self._lay(name, item, r, readable)
        loops_on = self.layers["loops"]
        new_homes = []
        keys = [(loop[0], tuple(outlines[k]) if outlines else ()) for k, loop in enumerate(loops)]
        for (item, fresh), (c, name, i, cw), (_, corners) in zip(
                self._match(self._loops, keys, self._new_loop_mark), loops, keys):
            if fresh:
                item.home = QPointF(c[0] * GRID, c[1] * GRID)
                item.outline = QPolygonF([QPointF(x * GRID, y * GRID) for x, y in corners])
                item.move_to(item.home)
                new_homes.append(item)
            item.set_loop(name, i, cw, readable)
            if not item.active:
                item.active = True
                item.set_shown(loops_on)
        tags_on = self.layers["potentials"]
        moved = []
        for (item, fresh), (p, v) in zip(self._match(self._tags, [p for p, _ in potentials], self._new_tag),
                                         potentials):
            if fresh:
                item.at = p
                item.move_to(to_scene(p))
                moved.append(item)
            item.set_value(v)
            if not item.active:
                item.active = True
                item.set_shown(tags_on)
        moved += self._tags_hiding_new_parts(moved)
        jobs = []  # tags that stay put keep their corner, marks of unchanged windows their place
        if len(potentials) <= self.PLACE_TAGS_UP_TO:
            jobs += [(self._place_tag, item, item.key) for item in moved]
        if len(loops) <= self.PLACE_TAGS_UP_TO:
            jobs += [(self._place_loop, item, item.key) for item in new_homes]
        self._place(jobs)

    def _place(self, jobs: list, all_now: bool = False) -> None:
        """Place marks: all at once (``all_now``, or no ``place_now_up_to``), or that many now and the
        rest once the drawing has paused for ``PLACE_AFTER_MS`` (marks left waiting by an
        earlier edit go first). Placing a mark is a search over its surroundings; an edit that
        changes how the loops are chosen moves every loop mark, and the drawing must not wait
        for all of them while a part is being dragged."""
        jobs = self._waiting + jobs
        limit = len(jobs) if all_now or self.place_now_up_to is None else self.place_now_up_to
        self._waiting = jobs[limit:]
        for place, item, key in jobs[:limit]:
            if item.active and item.key == key:  # still showing what it was to be placed for
                place(item)
        if self._waiting:
            self._place_timer.start()
        else:
            self._place_timer.stop()

    def settle_marks(self) -> None:
        """Lay every owed reading and place every mark still waiting for a place (before a
        picture is taken, say)."""
        self.lay_owed()
        with self._readings.hold():
            self._place([], all_now=True)

    def _match(self, pool: list, keys: list, make) -> list[tuple]:
        """An item of ``pool`` for each of ``keys`` (a tag's grid point, a loop's window), as
        (item, fresh): the item that showed that key last time keeps it, and its place
        (fresh False); other keys get a free item (fresh True: to be placed), made by
        ``make()`` if none is left. Items left over are hidden.

        Matching by key rather than by position in the list matters: one window split in
        two renumbers every window after it, and each mark placed anew costs a search.
        """
        by_key = {}
        for item in pool:
            if item.active:
                by_key.setdefault(item.key, item)
        kept = [by_key.pop(k, None) for k in keys]
        taken = {id(item) for item in kept if item is not None}
        free = iter([item for item in pool if id(item) not in taken])
        out = []
        for key, item in zip(keys, kept):
            fresh = item is None
            if fresh:
                item = next(free, None)
                if item is None:
                    item = make()
                    self.addItem(item)
                    pool.append(item)
                item.key = key
            out.append((item, fresh))
        for item in free:
            if item.active:
                item.set_shown(False)
                item.active = False
        return out

    PLACE_TAGS_UP_TO = 400
    PLACE_AFTER_MS = 60

    LAY_IN_SIGHT_FROM = 400  # parts: from this many, a solution's marks out of sight are laid when they come in
    SIGHT_MARGIN = 200.0  # how far out of a view a part's marks can reach into it

    def _sight(self, view) -> QRectF:
        """The scene area whose parts' marks ``view`` can show (empty: it shows them too small to draw)."""
        if QStyleOptionGraphicsItem.levelOfDetailFromTransform(view.transform()) < TEXT_LOD:
            return QRectF()
        m = self.SIGHT_MARGIN
        return view.mapToScene(view.viewport().rect()).boundingRect().adjusted(-m, -m, m, m)

    def _names_in(self, areas: list[QRectF]) -> set[str]:
        """The parts whose grid position lies in any of ``areas`` (the sight margin takes in their marks)."""
        areas = [a for a in areas if not a.isEmpty()]
        if not areas:
            return set()
        parts = self.sketch.parts
        xy = np.array([(p.x, p.y) for p in parts], dtype=float).reshape(-1, 2) * GRID
        inside = np.zeros(len(parts), dtype=bool)
        for a in areas:
            inside |= (xy[:, 0] >= a.left()) & (xy[:, 0] <= a.right()) & (xy[:, 1] >= a.top()) & (xy[:, 1] <= a.bottom())
        return {parts[i].name for i in np.flatnonzero(inside).tolist()}

    def _names_in_sight(self) -> set[str]:
        """The parts whose marks some view can show; each view's area is noted as clear of owed readings.

        On a large sketch most parts lie out of sight, and laying a solution's values on their
        marks is most of the time a new solution costs the drawing: those wait (``_owed``) until
        a view is painted showing them (``lay_owed``).
        """
        self._clear_in = {id(view): self._sight(view) for view in self.views()}
        return self._names_in(list(self._clear_in.values()))

    def lay_owed(self, view=None) -> None:
        """Lay the owed readings of the parts ``view`` can show, before it paints them (None:
        every owed reading, as for a picture or a pause in the drawing)."""
        if not self._owed:
            return
        if view is None:
            names = set(self._owed)
        else:
            area = self._sight(view)
            clear = self._clear_in.get(id(view))
            if area.isEmpty() or (clear is not None and not clear.isEmpty() and clear.contains(area)):
                return
            self._clear_in[id(view)] = area
            names = self._names_in([area])
        readable = self.marks_readable()
        with self._readings.hold():
            for name in names & self._owed.keys():
                item, r = self._owed.pop(name)
                if self.part_items.get(name) is item:
                    self._lay(name, item, r, readable)

    def _lay(self, name: str, item: PartItem, reading: tuple | None, readable: bool) -> None:
        """Show ``reading`` (current, drop; None: no valid result) on the marks of part ``name``."""
        self._marked[name] = (item, reading)
        item.current_mark.set_value(None if reading is None else reading[0], readable)
        item.drop_mark.set_value(None if reading is None else reading[1], readable)

    def marks_readable(self) -> bool:
        """False when every view shows the drawing too small for marks to be drawn (``too_small``)."""
        views = self.views()
        return not views or any(
            QStyleOptionGraphicsItem.levelOfDetailFromTransform(v.transform()) >= TEXT_LOD for v in views)

    def _tags_hiding_new_parts(self, placing: list[PotentialTag]) -> list[PotentialTag]:
        """The tags, other than ``placing``, that a part placed, moved or changed since the last
        solution has put text under (more than the tag covered when it was hung: where every
        place hides something, it is not hung again on each edit): a tag keeps its place from
        one edit to the next, so without this a label laid out after the tag stays hidden under it."""
        names, self._new_parts = self._new_parts, set()
        texts = self._part_texts(names)
        return [] if texts is None else self._tags_over(texts, placing)

    def _tags_over(self, texts: np.ndarray, placing: list[PotentialTag]) -> list[PotentialTag]:
        """The shown tags, other than ``placing``, over ``texts`` (rows of left, top, right,
        bottom) that hide more than they did when they were hung."""
        skip = {id(t) for t in placing}
        tags = [t for t in self._tags if t.active and id(t) not in skip]
        return [t for t in marks_meeting(tags, texts)
                if self._tag_cost(t, t._corner) >= t.hides + COVER_TEXT]

    def _part_texts(self, names) -> np.ndarray | None:
        """(left, top, right, bottom) rows of the texts the parts ``names`` show: labels,
        descriptions and value marks (None: no text)."""
        texts = []
        for item in (self.part_items[n] for n in names if n in self.part_items):
            boxes = list(item.cover_boxes())
            for mark in (item.current_mark, item.drop_mark):
                if mark is not None and mark.isVisible():
                    boxes += mark.cover_boxes()
            texts += [b[:4] for b in boxes if b[4] >= COVER_TEXT]
        return np.array(texts) if texts else None

    def _place_clear_of_new_texts(self) -> None:
        """A layer of the parts' texts came on: hang again the tags and place again the loop
        marks now over them (both keep their places otherwise, and were placed without it).
        The parts changed since the last solution stay noted for it (``_new_parts``)."""
        texts = self._part_texts(self.part_items)
        if texts is None:
            return
        jobs = [(self._place_tag, t, t.key) for t in self._tags_over(texts, [])]
        jobs += [(self._place_loop, m, m.key) for m in marks_meeting([m for m in self._loops if m.active], texts)]
        self._place(jobs)

    FAR_TAG = 4 * COVER_TEXT  # what hanging a tag farther out costs: as much as hiding 4 px² of text

    def _place_tag(self, tag: PotentialTag) -> None:
        """Hang a potential tag where it covers the least text or symbol: towards one of the
        corners of its point, close by, or farther out when each close place hides a text."""
        best, best_cost, hides = PotentialTag.HANGS[0], None, 0.0
        for corner in PotentialTag.HANGS:
            covered = self._tag_cost(tag, corner)
            cost = covered + (0.0 if corner[2] == PotentialTag.NEAR else self.FAR_TAG)
            if best_cost is None or cost < best_cost:
                best, best_cost, hides = corner, cost, covered
                if cost == 0:
                    break
        tag.set_corner(best)
        tag.hides = hides

    def _tag_cost(self, tag: PotentialTag, corner: tuple[int, int, float]) -> float:
        """How much ``tag`` hung towards ``corner`` hides: the weighted area of what it covers."""
        rect = tag.rect_at(corner).translated(tag.pos())
        x0, y0, x1, y1 = rect.left(), rect.top(), rect.right(), rect.bottom()
        cost = 0.0
        for left, top, right, bottom, weight in self._cover_boxes(rect, tag, wires=False):
            w, h = min(right, x1) - max(left, x0), min(bottom, y1) - max(top, y0)
            if w > 0 and h > 0:
                cost += w * h * weight
        return cost

    # a loop mark's offsets from its window's centre, nearest first; a large window's also
    # reach towards its sides, where the parts' texts leave room (``LARGE``: its box's longer side)
    LOOP_STEPS = (0.0, 6.0, -6.0, 12.0, -12.0, 18.0, -18.0, 24.0, -24.0, 30.0, -30.0)
    LOOP_STEPS_FAR = LOOP_STEPS + tuple(float(d) for k in (40, 50, 60, 75, 90) for d in (k, -k))
    LARGE = 120.0
    REACH = 220.0  # farthest step (90) plus a mark's widest layout from its centre, with room
    COMPACT_STEPS = tuple(float(d) for k in range(12) for d in ((0,) if k == 0 else (3 * k, -3 * k)))

    def _cover_boxes(self, area: QRectF, me, wires: bool = True) -> list[Box]:
        """(left, top, right, bottom, weight) of what lies in ``area`` that ``me`` should not
        hide (each item's ``cover_boxes``: texts and marks heavy, symbols and wires light)."""
        out: list[Box] = []
        for i in self.items(area, Qt.ItemSelectionMode.IntersectsItemBoundingRect):
            if i is me or (not wires and isinstance(i, WireItem)):
                continue
            boxes = getattr(i, "cover_boxes", None)
            if boxes is not None and i.isVisible():
                out.extend(boxes())
        return out

    _LAYOUTS = [(side, compact) for compact in (False, True) for side in LoopMark.SIDES]

    @classmethod
    def _candidates(cls, far: bool) -> np.ndarray:
        """Every candidate place as (layout, x step, y step, flat) in order of preference: full
        layout before compact, nearest offset first, sides in order. ``layout`` indexes
        ``_LAYOUTS``; the steps index ``_full_steps(far)`` or ``COMPACT_STEPS``; ``flat`` indexes
        the layouts' [x step, y step] score tables laid end to end. The same for every mark
        of a window size, so worked out once for each."""
        cached = cls._candidates_cache.get(far)
        if cached is None:
            full = cls._full_steps(far)
            sizes = [len(cls.COMPACT_STEPS if compact else full) ** 2 for _, compact in cls._LAYOUTS]
            start = [sum(sizes[:n]) for n in range(len(sizes))]
            rows = []
            for compact in (False, True):
                steps = cls.COMPACT_STEPS if compact else full
                pairs = sorted(((ix, iy) for ix in range(len(steps)) for iy in range(len(steps))),
                               key=lambda d: steps[d[0]] ** 2 + steps[d[1]] ** 2)
                for k, (ix, iy) in enumerate(pairs):
                    for n, side in enumerate(LoopMark.SIDES):
                        layout = cls._LAYOUTS.index((side, compact))
                        rows.append((compact, k, n, layout, ix, iy, start[layout] + ix * len(steps) + iy))
            rows.sort(key=lambda r: r[:3])
            cached = cls._candidates_cache[far] = np.array([r[3:] for r in rows])
        return cached

    _candidates_cache: dict[bool, np.ndarray] = {}

    @classmethod
    def _full_steps(cls, far: bool) -> tuple[float, ...]:
        return cls.LOOP_STEPS_FAR if far else cls.LOOP_STEPS

    @staticmethod
    def _overlap(lo: np.ndarray, hi: np.ndarray, cover_lo: np.ndarray, cover_hi: np.ndarray) -> np.ndarray:
        """Length by which each span [lo, hi] overlaps each cover span (a last axis of covers)."""
        return np.maximum(np.minimum(hi[..., None], cover_hi) - np.maximum(lo[..., None], cover_lo), 0.0)

    def _place_loop(self, mark: LoopMark) -> None:
        """Put a loop mark where it covers nothing inside its window: near the centre, text on
        any side; failing that the name alone (current in its tooltip); failing that, least covered.

        Every candidate place is scored at once: a place is a box of one layout moved by an
        x and a y step, so its overlap area with a cover is (x overlap) × (y overlap), and
        the weighted sum over covers of one layout is one matrix product of the x-overlap
        and y-overlap tables (texts weigh far above symbol margins and wires). Only the
        winners are tested against the window's outline, the one check that needs Qt.
        """
        outlined = not mark.outline.isEmpty()
        area = mark.outline.boundingRect() if outlined else QRectF(mark.home, mark.home)
        # what a candidate can reach: the window's box, and no further than the farthest step
        # plus the mark's own reach from the centre (a large window need not be searched whole)
        reach = QRectF(mark.home.x() - self.REACH, mark.home.y() - self.REACH, 2 * self.REACH, 2 * self.REACH)
        near = area.adjusted(-60, -60, 60, 60).intersected(reach)
        covers = np.array(self._cover_boxes(near, mark), dtype=float).reshape(-1, 5)
        box = area if outlined else None
        far = max(area.width(), area.height()) > self.LARGE
        full = self._full_steps(far)
        hx, hy = mark.home.x(), mark.home.y()
        costs, inside = [], []
        for compact in (False, True):  # the four sides of a layout at once (``_LAYOUTS`` order)
            steps = np.array(self.COMPACT_STEPS if compact else full)
            rects = np.array([mark.rect_at(side, compact).getCoords() for side in LoopMark.SIDES])
            left, top = hx + steps + rects[:, 0:1], hy + steps + rects[:, 1:2]    # [side, step]
            right, bottom = hx + steps + rects[:, 2:3], hy + steps + rects[:, 3:4]
            ox = self._overlap(left, right, covers[:, 0], covers[:, 2])     # [side, x step, cover]
            oy = self._overlap(top, bottom, covers[:, 1], covers[:, 3])
            costs.append(((ox * covers[:, 4]) @ oy.transpose(0, 2, 1)).ravel())   # [side, x step, y step]
            if box is None:
                inside.append(np.ones(len(rects) * len(steps) ** 2, bool))
            else:
                in_x = (left >= box.left()) & (right <= box.right())
                in_y = (top >= box.top()) & (bottom <= box.bottom())
                inside.append((in_x[:, :, None] & in_y[:, None, :]).ravel())
        cand = self._candidates(far)
        flat = cand[:, 3]
        cost = np.concatenate(costs)[flat]
        ok = np.concatenate(inside)[flat]
        allowed = np.flatnonzero(ok)
        # best first: every free place in preference order, then the least covered
        for i in allowed[np.lexsort((allowed, cost[allowed]))]:
            layout, ix, iy, _ = cand[i]
            side, compact = self._LAYOUTS[layout]
            steps = self.COMPACT_STEPS if compact else full
            at = QPointF(hx + steps[ix], hy + steps[iy])
            if outlined and not mark.outline.containsPoint(at, Qt.FillRule.OddEvenFill):
                continue
            mark.move_to(at)
            mark.set_layout(side, compact)
            return
        mark.move_to(mark.home)
        mark.set_layout("below", True)

    def clear_results(self) -> None:
        """Hide every result (they no longer match the drawing)."""
        with self._readings.hold():
            self._clear_results()

    def _clear_results(self) -> None:
        self.solved = False
        self._marked = {}
        self._owed.clear()
        for item in self.part_items.values():
            if item.current_mark is not None:
                item.current_mark.set_value(None)
                item.drop_mark.set_value(None)
        self._pool(self._tags, self._new_tag, 0)
        self._pool(self._loops, self._new_loop_mark, 0)

    def _clear_fault(self) -> None:
        for name in self._flagged:
            item = self.part_items.get(name)
            if item is not None:
                item.set_flagged(False)
        self._flagged = set()
        for w in self.wire_items:
            w.set_flagged(False)
        self._note.setVisible(False)

    def show_fault(self, message: str, parts: Iterable[str], wires: Iterable[int] = ()) -> None:
        """Hide stale results, mark the parts named by an error and put its message below the drawing."""
        self.clear_results()
        self._clear_fault()
        rect = QRectF()
        for name in parts:
            item = self.part_items.get(name)
            if item is None:
                continue
            item.set_flagged(True)
            self._flagged.add(name)
            rect = rect.united(item.sceneBoundingRect())
        for i in wires:
            if 0 <= i < len(self.wire_items):
                self.wire_items[i].set_flagged(True)
        drawing = QRectF()
        for item in [*self.part_items.values(), *self.wire_items]:
            drawing = drawing.united(item.sceneBoundingRect())
        if rect.isNull():
            rect = drawing
        # below the whole drawing, under the parts it names: it never covers wires or symbols
        self._note.set_message(message)
        self._note.setPos(rect.left(), (drawing.bottom() if not drawing.isNull() else rect.bottom()) + 12)
        self._note.setVisible(True)

    def show_result(self, result) -> None:
        """Show a ``solve_worker.Result``: connection marks, then the solution or the fault."""
        self.show_connections(result.junctions, result.open_ends)
        if result.error:
            self.show_fault(result.error, result.error_parts, result.error_wires)
        elif result.readings:
            self.show_solution({n: (r[0], r[1]) for n, r in result.readings.items()},
                               result.potentials, result.loops, result.loop_outlines)
        else:
            self._clear_fault()
            self.clear_results()

    @property
    def fault_text(self) -> str:
        """The message shown on the drawing, or '' when there is none."""
        return self._note.text if self._note.isVisible() else ""

    def content_rect(self) -> QRectF:
        """The area covered by the drawing and its annotations."""
        rect = QRectF()
        for item in self.items():
            if item.isVisible():
                drawn = getattr(item, "drawn_rect", None)
                rect = rect.united(item.mapRectToScene(drawn()) if drawn else item.sceneBoundingRect())
        return rect
