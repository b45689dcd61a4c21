"""Edits of a sketch as data: which parts change and what the wire list becomes.

An ``Edit`` says how to go from one document to the next and back, using
only the model's own methods, so an undo step is exact (the part order and
the wire order are restored too). The functions here work out the edit for
each drawing operation; they do not touch Qt.

Wires that follow moved terminals are stretched wire by wire, which can make
a wire's route run back over itself (a fold: two wires from one end point
overlapping, with a dead-end stub at the turn).  Such folds are straightened
when the edit is first applied, because only then are all terminals of the
document known (see ``straighten``).
"""
from __future__ import annotations

from collections import defaultdict
from collections.abc import Iterable
from dataclasses import dataclass, field, replace
from itertools import chain

from ..sketch.model import PlacedPart, Sketch, Wire, transform
from ..sketch.netlist import wire_groups

__all__ = [
    "Edit", "apply_edit", "revert_edit", "compose", "set_wires",
    "add_parts_edit", "delete_edit", "move_target", "change_edit", "wires_edit",
    "route", "route_clear", "rotate_edit", "rotate_target", "follow_points", "connected_points",
    "FollowedWires", "straighten",
]

GridPoint = tuple[int, int]


@dataclass
class Edit:
    """Part changes ``(old, new, index)`` plus the wire list before and after.

    ``old`` is None for an added part, ``new`` None for a removed one; ``index``
    is the removed part's position (restored on undo).
    """

    parts: list[tuple[PlacedPart | None, PlacedPart | None, int | None]] = field(default_factory=list)
    wires_before: tuple[Wire, ...] = ()
    wires_after: tuple[Wire, ...] = ()

    def is_empty(self) -> bool:
        same_wires = len(self.wires_before) == len(self.wires_after) and all(
            a is b or a == b for a, b in zip(self.wires_before, self.wires_after))
        return same_wires and all(o == n for o, n, _ in self.parts)


def set_wires(sketch: Sketch, target: tuple[Wire, ...]) -> None:
    """Make the sketch's wire list equal ``target`` with few model calls.

    The common head and tail are left alone; the middle is replaced pair by
    pair where it differs, and the remainder removed or inserted.
    """
    cur = sketch.wires
    n_cur, n_new, m = len(cur), len(target), min(len(cur), len(target))
    p = 0
    while p < m and (cur[p] is target[p] or cur[p] == target[p]):
        p += 1
    s = 0
    while s < m - p and (cur[n_cur - 1 - s] is target[n_new - 1 - s]
                         or cur[n_cur - 1 - s] == target[n_new - 1 - s]):
        s += 1
    mid_cur = n_cur - s - p
    mid_new = n_new - s - p
    k = min(mid_cur, mid_new)
    for j in range(k):
        a, b = cur[p + j], target[p + j]
        if a is not b and a != b:
            sketch.replace_wire(p + j, b)
    for j in range(mid_cur - 1, k - 1, -1):
        sketch.remove_wire(p + j)
    for j in range(k, mid_new):
        sketch.add_wire(target[p + j], p + j)


def apply_edit(sketch: Sketch, edit: Edit) -> None:
    """Carry out ``edit`` on ``sketch``.

    Wires that followed moved points (``FollowedWires``) have their folds
    straightened here, against the terminals of the document as it now is, and
    the edit keeps the result.
    """
    for old, new, index in edit.parts:
        if old is None and new is not None:
            sketch.add_part(new)
        elif new is None and old is not None:
            sketch.remove_part(old.name)
        elif old is not None and new is not None and old is not new:
            sketch.replace_part(old.name, new)
    if isinstance(edit.wires_after, FollowedWires):  # settled once, so redo repeats it exactly
        edit.wires_after = edit.wires_after.settle(t for p in sketch.parts for t in p.terminals())
    set_wires(sketch, edit.wires_after)


def revert_edit(sketch: Sketch, edit: Edit) -> None:
    """Undo ``edit`` on ``sketch`` (the exact inverse of ``apply_edit``)."""
    set_wires(sketch, edit.wires_before)
    for old, new, index in reversed(edit.parts):
        if old is None and new is not None:
            sketch.remove_part(new.name)
        elif new is None and old is not None:
            sketch.add_part(old, index)
        elif old is not None and new is not None and old is not new:
            sketch.replace_part(new.name, old)


def compose(first: Edit, second: Edit) -> Edit:
    """One edit doing ``first`` then ``second`` (used to merge the steps of a drag).

    Only part replacements are merged by name; additions and removals are
    kept in order.
    """
    parts = list(first.parts)
    for old, new, index in second.parts:
        for k, (o1, n1, i1) in enumerate(parts):
            if old is not None and n1 is not None and n1.name == old.name and o1 is not None and new is not None:
                parts[k] = (o1, new, i1)
                break
        else:
            parts.append((old, new, index))
    return Edit(parts, first.wires_before, second.wires_after)


def _shift(w: Wire, dx: int, dy: int) -> Wire:
    return Wire(w.x1 + dx, w.y1 + dy, w.x2 + dx, w.y2 + dy)


def move_target(parts: dict[str, PlacedPart], wires: tuple[Wire, ...], wire_indices: Iterable[int],
                dx: int, dy: int, staying: Iterable[GridPoint] | None = None
                ) -> tuple[dict[str, PlacedPart], tuple[Wire, ...]]:
    """Where ``parts`` and the selected wires go when moved by (dx, dy).

    Unselected wires with one end on a moved point are stretched: kept in
    their direction from the fixed end, with a right-angle bend added where
    needed; wires with both ends on moved points move whole.

    ``staying`` (the terminals of the parts that do not move) keeps the moved
    things joined to what they touch directly (``_contacts``): each such point
    gets a wire from where it was to where it goes (``_links``), so a move
    never changes which terminals are joined. None lets the moved things come
    away from what they touch (only wires follow).
    """
    selected = set(wire_indices)
    ends: set[GridPoint] = set()  # where the moved things connect: terminals and wire ends
    for p in parts.values():
        ends.update(p.terminals())
    for i in selected:
        ends.update(wires[i].ends)
    moved = set(ends)
    for i in selected:
        moved.update(wires[i].points())
    new_parts = {n: replace(p, x=p.x + dx, y=p.y + dy) for n, p in parts.items()}
    shifted = [_shift(w, dx, dy) if i in selected else w for i, w in enumerate(wires)]
    goes_to = {pt: (pt[0] + dx, pt[1] + dy) for pt in moved}
    bodies = [p.terminal_points for p in new_parts.values()]
    followed = follow_points(tuple(shifted), goes_to, skip=selected, bodies=bodies)
    joins = [] if staying is None else _contacts(ends, moved, set(staying), wires, selected)
    if not joins:
        return new_parts, followed
    return new_parts, _with_links(followed, _links([(p, goes_to[p]) for p in joins], bodies, followed, staying))


def _contacts(ends: set[GridPoint], moved: set[GridPoint], staying: set[GridPoint], wires: tuple[Wire, ...],
             selected: set[int]) -> list[GridPoint]:
    """The points where what moves touches what stays other than at a wire's end (wire ends
    follow): a point of a moved thing (``moved``: terminals and every point of the selected
    wires) on a ``staying`` terminal, and a moved terminal or wire end (``ends``) on the
    middle of a wire not ``selected`` (where two wires merely cross, nothing is joined).
    """
    out = moved & staying
    rows: dict[int, list[GridPoint]] = defaultdict(list)
    cols: dict[int, list[GridPoint]] = defaultdict(list)
    for p in ends:
        rows[p[1]].append(p)
        cols[p[0]].append(p)
    for i, w in enumerate(wires):
        run = _span(*w.ends)
        if i in selected or run is None:
            continue
        across, line, lo, hi = run
        out.update(p for p in (rows if across else cols).get(line, ()) if lo < p[0 if across else 1] < hi)
    return sorted(out)


def _links(pairs: list[tuple[GridPoint, GridPoint]], bodies: list[tuple[GridPoint, ...]],
           wires: tuple[Wire, ...], staying: Iterable[GridPoint]) -> list[Wire]:
    """Wires joining each pair of points (a point where a moved thing was and where it went,
    say), where ``wires`` (as they are after the move) and the other links do not join the two
    already; with the bend that runs over fewer of ``bodies`` (the moved parts' terminals: a
    link laid along a moved part's body hides it, and shorts it if it reaches the other
    terminal). ``staying``: the terminals that do not move."""
    groups = wire_groups(list(wires), chain(staying, chain.from_iterable(bodies), chain.from_iterable(pairs)))
    out = []
    for p, q in pairs:
        if groups.find(p) == groups.find(q):
            continue
        groups.join(p, q)
        out += _link_route(bodies, p, q)
    return out


def _link_route(bodies: list[tuple[GridPoint, ...]], p: GridPoint, q: GridPoint) -> list[Wire]:
    """The wires of a link from ``p`` to ``q``: the bend over fewer of ``bodies``, or where both
    bends run over one (two parts turned together can leave a body on each), a route with two
    bends through the middle line between them, if that runs over fewer."""
    legs = route(p, q)
    if len(legs) < 2:
        return legs
    legs = _fewer_over(bodies, legs, route(p, q, False), p, q)
    if not _run_over(bodies, legs, p, q):
        return legs
    (px, py), (qx, qy) = p, q
    mx, my = (px + qx) // 2, (py + qy) // 2
    detours = [[Wire(px, py, mx, py), Wire(mx, py, mx, qy), Wire(mx, qy, qx, qy)]] if mx not in (px, qx) else []
    if my not in (py, qy):
        detours.append([Wire(px, py, px, my), Wire(px, my, qx, my), Wire(qx, my, qx, qy)])
    return min([legs, *detours], key=lambda legs: _run_over(bodies, legs, p, q))  # the first of the fewest


def _with_links(followed: "FollowedWires", extra: list[Wire]) -> "FollowedWires":
    """``followed`` with ``extra`` wires added after it, as changed wires (their folds straightened)."""
    n = len(followed)
    return FollowedWires(tuple(followed) + tuple(extra), followed.changed | set(range(n, n + len(extra))),
                         followed.carried)


class FollowedWires(tuple):
    """Wires just after their ends followed moved points, folds not yet straightened.

    ``changed`` holds the positions of the stretched and added wires,
    ``carried`` those moved whole (by the caller, or with both ends).
    Straightening needs every terminal of the document, which the move
    functions are not given, so it is done by ``settle`` when the edit is
    applied (see ``apply_edit``).
    """

    changed: frozenset[int]
    carried: frozenset[int]

    def __new__(cls, wires: Iterable[Wire], changed: Iterable[int] = (),
                carried: Iterable[int] = ()) -> "FollowedWires":
        self = super().__new__(cls, wires)
        self.changed = frozenset(changed)
        self.carried = frozenset(carried)
        return self

    def settle(self, terminals: Iterable[GridPoint]) -> tuple[Wire, ...]:
        """The wires with their folds straightened (``terminals``: all terminals of the document)."""
        return straighten(tuple(self), terminals, self.changed, self.carried)


def follow_points(wires: tuple[Wire, ...], goes_to: dict[GridPoint, GridPoint],
                  skip: Iterable[int] = (), bodies: list[tuple[GridPoint, ...]] = ()) -> FollowedWires:
    """The wires after the points in ``goes_to`` moved (terminals of moved or turned parts).

    A wire with both ends moving goes with them when it stays straight; a wire
    with one end moving is stretched from its fixed end, keeping its direction,
    with a right-angle bend where needed (bends come after all other wires, so
    wire indices before them keep their meaning).  A changed wire keeps the
    order of its ends.  Wires in ``skip`` are left as they are (already placed
    by the caller).  Folds this makes are straightened when the edit is
    applied (see ``FollowedWires``).  A stretched wire turns at its fixed
    end instead where keeping its direction would lay the bend along one of
    ``bodies`` (the moved parts' terminals; a turned part's body lies across
    its old terminals' line) and turning first would not.
    """
    skip = set(skip)
    out: list[Wire] = []
    extra: list[Wire] = []
    changed: list[int] = []
    carried: list[int] = []
    for i, w in enumerate(wires):
        a, b = w.ends
        if i in skip or (a not in goes_to and b not in goes_to):
            if i in skip:
                carried.append(len(out))
            out.append(w)
            continue
        if a in goes_to and b in goes_to:
            na, nb = goes_to[a], goes_to[b]
            if na != nb and (na[0] == nb[0] or na[1] == nb[1]):
                # carried whole, like a selected wire: straightening leaves it as it is, so that
                # the move back brings it back
                carried.append(len(out))
                out.append(Wire(na[0], na[1], nb[0], nb[1]))
            elif na != nb:
                corner = (nb[0], na[1])
                changed.append(len(out))
                out.append(Wire(na[0], na[1], corner[0], corner[1]))
                extra.append(Wire(corner[0], corner[1], nb[0], nb[1]))
            continue
        moving_first = a in goes_to
        fixed, end = (b, a) if moving_first else (a, b)
        goal = goes_to[end]
        if goal == fixed:
            continue
        if goal[0] != fixed[0] and goal[1] != fixed[1]:
            along = w.y1 == w.y2
            if bodies:
                kept = route(fixed, goal, along)
                along ^= _fewer_over(bodies, kept, route(fixed, goal, not along), fixed, goal) is not kept
            corner = (goal[0], fixed[1]) if along else (fixed[0], goal[1])
            extra.append(Wire(corner[0], corner[1], goal[0], goal[1]))
            goal = corner
        changed.append(len(out))
        out.append(Wire(goal[0], goal[1], fixed[0], fixed[1]) if moving_first
                   else Wire(fixed[0], fixed[1], goal[0], goal[1]))
    changed.extend(range(len(out), len(out) + len(extra)))
    return FollowedWires(out + extra, changed, carried)


def straighten(wires: tuple[Wire, ...], terminals: Iterable[GridPoint],
               changed: Iterable[int] | None = None, carried: Iterable[int] = ()) -> tuple[Wire, ...]:
    """``wires`` with every fold at an end of a ``changed`` wire taken out.

    A fold is two wires sharing an end point P and running from it along the
    same line to the same side, so that they lie over each other (the route
    turns back on itself).  The overlap is made single: the longer wire is cut
    back to the shorter one's far end, and the shorter one is kept only from
    there up to the last point towards P that something else touches (a
    terminal, another wire's end, or at P itself any other wire through P);
    where nothing does, the stub is removed.  A changed wire left with a loose
    end where this took away what touched it is cut back the same way.  No
    point that anything else touches is removed and no wire end is made where
    there was none, so which terminals are joined never changes.  Repeated
    until nothing is left to do, as taking one fold out can bring the next
    into line.  ``changed`` None means every wire; ``carried`` wires (moved
    whole by the person) are never altered.  ``terminals`` (every terminal of
    the document) is read only if a fold is found, so it may be a lazy
    iterable.
    """
    work: list[Wire | None] = list(wires)
    carried = set(carried)
    changed = set(range(len(work)) if changed is None else changed) - carried
    todo = set(changed)
    ends: dict[GridPoint, set[int]] = defaultdict(set)
    for k, w in enumerate(work):
        for e in w.ends:
            ends[e].add(k)
    stops: set[GridPoint] | None = None

    def put(k: int, new: Wire | None) -> list[GridPoint]:
        """Set wire ``k`` to ``new``; the points that lost an end of it."""
        old = work[k]
        for e in old.ends:
            ends[e].discard(k)
        work[k] = new
        if new is None:
            return list(old.ends)
        for e in new.ends:
            ends[e].add(k)
        changed.add(k)
        todo.add(k)
        return [e for e in old.ends if e not in new.ends]

    while todo:
        i = todo.pop()
        fold = _fold_at(work, ends, i, carried) if work[i] is not None else None
        if fold is None:
            continue
        if stops is None:
            stops = set(terminals)
        j, p = fold
        loose = []
        for k, new in zip((i, j), _unfold(work, ends, stops, i, j, p)):
            loose += put(k, new)
        while loose:
            q = loose.pop()
            left = [k for k in ends.get(q, ()) if k in changed]
            if len(left) == 1 and len(ends[q]) == 1 and q not in stops and not any(
                    w is not None and k != left[0] and _on(w, q) for k, w in enumerate(work)):
                loose += put(left[0], _cut_back(work[left[0]], q, ends, stops))
    return tuple(w for w in work if w is not None)


def _on(w: Wire, q: GridPoint) -> bool:
    """Whether grid point ``q`` lies on wire ``w`` (ends included)."""
    return (min(w.x1, w.x2) <= q[0] <= max(w.x1, w.x2)) and (min(w.y1, w.y2) <= q[1] <= max(w.y1, w.y2))


def _cut_back(w: Wire, q: GridPoint, ends: dict[GridPoint, set[int]], stops: set[GridPoint]) -> Wire | None:
    """Wire ``w`` with its loose end ``q`` drawn back to the first point that something touches."""
    other = _far_end(w, q)
    axis = 0 if w.y1 == w.y2 else 1
    step = 1 if other[axis] > q[axis] else -1
    for c in range(q[axis] + step, other[axis], step):
        r = (c, q[1]) if axis == 0 else (q[0], c)
        if r in stops or ends.get(r):
            if w.ends[0] == q:
                return Wire(r[0], r[1], other[0], other[1])
            return Wire(other[0], other[1], r[0], r[1])
    return None


def _far_end(w: Wire, p: GridPoint) -> GridPoint:
    a, b = w.ends
    return b if a == p else a


def _fold_at(work: list[Wire | None], ends: dict[GridPoint, set[int]], i: int,
             carried: set[int]) -> tuple[int, GridPoint] | None:
    """A wire folding back over wire ``i`` at one of its ends: ``(its index, the shared end)``."""
    w = work[i]
    horizontal = w.y1 == w.y2
    for p in w.ends:
        q = _far_end(w, p)
        for j in ends[p]:
            v = work[j]
            if j == i or j in carried or (v.y1 == v.y2) != horizontal:
                continue
            r = _far_end(v, p)
            axis = 0 if horizontal else 1
            if (q[axis] > p[axis]) == (r[axis] > p[axis]):
                return j, p
    return None


def _unfold(work: list[Wire | None], ends: dict[GridPoint, set[int]], stops: set[GridPoint],
            i: int, j: int, p: GridPoint) -> tuple[Wire | None, Wire | None]:
    """What wires ``i`` and ``j``, folded at ``p``, become (None: removed); see ``straighten``."""
    axis = 0 if work[i].y1 == work[i].y2 else 1
    far_i, far_j = _far_end(work[i], p), _far_end(work[j], p)
    i_longer = abs(far_i[axis] - p[axis]) >= abs(far_j[axis] - p[axis])
    far, near = (far_i, far_j) if i_longer else (far_j, far_i)

    def touched(q: GridPoint) -> bool:
        return q in stops or any(k not in (i, j) for k in ends.get(q, ()))

    keep_to: GridPoint | None = None
    if touched(p) or any(w is not None and k not in (i, j) and p in w.points()
                         for k, w in enumerate(work)):
        keep_to = p
    else:
        step = 1 if p[axis] > near[axis] else -1
        for c in range(p[axis] - step, near[axis], -step):
            q = (c, p[1]) if axis == 0 else (p[0], c)
            if touched(q):
                keep_to = q
                break

    def remade(k: int, a: GridPoint, b: GridPoint) -> Wire | None:
        """Wire ``k`` now running from ``a`` (instead of ``p``) to ``b``, in its own end order."""
        if a == b:
            return None
        if work[k].ends[0] == p:
            return Wire(a[0], a[1], b[0], b[1])
        return Wire(b[0], b[1], a[0], a[1])

    longer, shorter = (i, j) if i_longer else (j, i)
    new = {longer: remade(longer, near, far),
           shorter: remade(shorter, keep_to, near) if keep_to is not None else None}
    return new[i], new[j]


def add_parts_edit(sketch: Sketch, parts: list[PlacedPart], wires: Iterable[Wire] = ()) -> Edit:
    """Add ``parts`` (already named) and ``wires`` at the end of the document."""
    before = tuple(sketch.wires)
    return Edit([(None, p, None) for p in parts], before, before + tuple(wires))


def delete_edit(sketch: Sketch, names: Iterable[str], wire_indices: Iterable[int]) -> Edit:
    """Remove the named parts and the wires at ``wire_indices``."""
    order = list(sketch.parts)
    names = set(names)
    changes = []
    # remove from the back so each recorded index is valid when re-inserted in reverse
    remaining = [p.name for p in order]
    for p in reversed(order):
        if p.name in names:
            idx = remaining.index(p.name)
            remaining.pop(idx)
            changes.append((p, None, idx))
    before = tuple(sketch.wires)
    drop = set(wire_indices)
    after = tuple(w for i, w in enumerate(before) if i not in drop)
    return Edit(changes, before, after)


def change_edit(sketch: Sketch, news: Iterable[tuple[str, PlacedPart]]) -> Edit:
    """Replace named parts by new versions (value, rotation, rename...)."""
    changes = [(sketch.part(n), p, None) for n, p in news if sketch.part(n) != p]
    w = tuple(sketch.wires)
    return Edit(changes, w, w)


def route(a: GridPoint, b: GridPoint, horizontal_first: bool = True) -> list[Wire]:
    """The one or two straight wires joining ``a`` to ``b`` with a right-angle bend."""
    if a == b:
        return []
    if a[0] == b[0] or a[1] == b[1]:
        return [Wire(a[0], a[1], b[0], b[1])]
    corner = (b[0], a[1]) if horizontal_first else (a[0], b[1])
    return [Wire(a[0], a[1], corner[0], corner[1]), Wire(corner[0], corner[1], b[0], b[1])]


def route_clear(sketch: Sketch, a: GridPoint, b: GridPoint, horizontal_first: bool = True) -> list[Wire]:
    """``route(a, b, horizontal_first)``, or the other bend when it runs over fewer parts.

    A leg laid along a part's body joins that part's two terminals (it shorts the part),
    and a leg through a terminal other than ``a`` or ``b`` joins that terminal: neither is
    what a person drawing from ``a`` to ``b`` means. The bend asked for is kept when both
    bends run over as many parts (a straight route has no other bend).
    """
    asked = route(a, b, horizontal_first)
    if len(asked) < 2:
        return asked
    return _fewer_over([p.terminal_points for p in sketch.parts], asked, route(a, b, not horizontal_first), a, b)


def _fewer_over(parts: list[tuple[GridPoint, ...]], asked: list[Wire], other: list[Wire],
                a: GridPoint, b: GridPoint) -> list[Wire]:
    """``other`` if it runs over fewer of ``parts`` (their terminal points) than ``asked``
    (two bends from ``a`` to ``b``, see ``_run_over``), else ``asked``."""
    # both bends lie in the box of a and b: only parts reaching into it can be in the way
    x0, x1 = sorted((a[0], b[0]))
    y0, y1 = sorted((a[1], b[1]))
    near = []
    for terms in parts:
        (ax, ay), (bx, by) = terms[0], terms[-1]
        if min(ax, bx) <= x1 and max(ax, bx) >= x0 and min(ay, by) <= y1 and max(ay, by) >= y0:
            near.append(terms)
    if not near:
        return asked
    return other if _run_over(near, other, a, b) < _run_over(near, asked, a, b) else asked


def _run_over(parts: list[tuple[GridPoint, ...]], legs: list[Wire], a: GridPoint, b: GridPoint) -> int:
    """How many bodies of ``parts`` (their terminal points) ``legs`` run along, plus how many
    terminals (not ``a`` or ``b``) they pass."""
    runs = [_span(*w.ends) for w in legs]
    points = {(lo + k, line) if across else (line, lo + k) for across, line, lo, hi in runs
              for k in range(hi - lo + 1)} - {a, b}
    count = 0
    for terms in parts:
        count += sum(1 for t in terms if t in points)
        body = _span(terms[0], terms[-1]) if len(terms) == 2 else None
        if body is not None and any(r[:2] == body[:2] and max(r[2], body[2]) < min(r[3], body[3]) for r in runs):
            count += 1
    return count


def _span(p: GridPoint, q: GridPoint) -> tuple[bool, int, int, int] | None:
    """The straight run from ``p`` to ``q`` as (across, the line's other coordinate, low end,
    high end); None when the two lie on no common grid line."""
    if p[1] == q[1]:
        return True, p[1], min(p[0], q[0]), max(p[0], q[0])
    if p[0] == q[0]:
        return False, p[0], min(p[1], q[1]), max(p[1], q[1])
    return None


def wires_edit(sketch: Sketch, wires: Iterable[Wire]) -> Edit:
    """Add ``wires``, leaving out any that duplicate a wire already drawn."""
    before = tuple(sketch.wires)
    have = {w.normalized() for w in before}
    new = []
    for w in wires:
        if w.normalized() not in have:
            have.add(w.normalized())
            new.append(w)
    return Edit([], before, before + tuple(new))


def rotate_edit(sketch: Sketch, names: Iterable[str], *, mirror: bool = False) -> Edit:
    """Turn (or mirror) the named parts about their middles; wires on their terminals follow,
    and what a turned terminal touched directly (a part that stays, the middle of a wire, or
    another turned part) stays joined to it by a new wire (``_links``)."""
    names = list(names)
    news = []
    went: dict[GridPoint, list[GridPoint]] = defaultdict(list)  # a point: where each turned terminal on it went
    for n in names:
        old = sketch.part(n)
        new = rotate_target(old, mirror=mirror)
        news.append((n, new))
        for a, b in zip(old.terminals(), new.terminals()):
            went[a].append(b)
    # wires on a point follow its first terminal that moved, unless a turned terminal stays there
    goes_to = {a: next(b for b in bs if b != a) for a, bs in went.items() if a not in bs}
    edit = change_edit(sketch, news)
    before = tuple(sketch.wires)
    turned = [new.terminal_points for _, new in news]
    followed = follow_points(before, goes_to, bodies=turned)
    turning = set(names)
    staying = {t for p in sketch.parts if p.name not in turning for t in p.terminal_points}
    pairs = [(a, goes_to[a]) for a in _contacts(set(goes_to), set(goes_to), staying, before, set())]
    for a, bs in went.items():  # turned terminals that met at a point stay joined to where its wires went
        anchor = goes_to.get(a, a)
        pairs += [(anchor, b) for b in dict.fromkeys(bs) if b != anchor]
    if pairs:
        followed = _with_links(followed, _links(pairs, turned, followed, staying))
    return Edit(edit.parts, before, followed)


def rotate_target(part: PlacedPart, *, mirror: bool = False) -> PlacedPart:
    """``part`` turned 90° clockwise (or mirrored) about the middle of its body."""
    from ..sketch.kinds import kind_spec
    terms = kind_spec(part.kind).terminals
    if len(terms) < 2:  # one-terminal parts turn about their terminal
        if mirror:
            return replace(part, mirror=not part.mirror)
        return replace(part, rotation=(part.rotation + 90) % 360)
    half = ((terms[0][0] + terms[1][0]) // 2, (terms[0][1] + terms[1][1]) // 2)
    mx, my = transform(half, part.rotation, part.mirror)
    centre = (part.x + mx, part.y + my)
    rot, mir = part.rotation, part.mirror
    if mirror:
        mir = not mir
    else:
        rot = (rot + 90) % 360
    nx, ny = transform(half, rot, mir)
    return replace(part, x=centre[0] - nx, y=centre[1] - ny, rotation=rot, mirror=mir)


def connected_points(sketch: Sketch) -> set[GridPoint]:
    """Grid points where something already connects (terminals and wire points)."""
    pts: set[GridPoint] = set()
    for p in sketch.parts:
        pts.update(p.terminals())
    for w in sketch.wires:
        pts.update(w.points())
    return pts
