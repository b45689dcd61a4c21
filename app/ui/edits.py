"""Edits of a sketch as data: which parts change and what the wire list becomes.

An ``Edit`` says how to go from one document to the next and back, using
only the model's own methods, so an undo step is exact (the part order and
the wire order are restored too). The functions here work out the edit for
each drawing operation; they do not touch Qt.
"""
from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field, replace

from ..sketch.model import PlacedPart, Sketch, Wire, transform

__all__ = [
    "Edit", "apply_edit", "revert_edit", "compose", "set_wires",
    "add_parts_edit", "delete_edit", "move_target", "change_edit", "wires_edit",
    "route", "rotate_edit", "rotate_target", "follow_points", "connected_points",
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
    """Carry out ``edit`` on ``sketch``."""
    for old, new, index in edit.parts:
        if old is None and new is not None:
            sketch.add_part(new)
        elif new is None and old is not None:
            sketch.remove_part(old.name)
        elif old is not None and new is not None and old is not new:
            sketch.replace_part(old.name, new)
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
                dx: int, dy: int) -> tuple[dict[str, PlacedPart], tuple[Wire, ...]]:
    """Where ``parts`` and the selected wires go when moved by (dx, dy).

    Unselected wires with one end on a moved point are stretched: kept in
    their direction from the fixed end, with a right-angle bend added where
    needed; wires with both ends on moved points move whole.
    """
    selected = set(wire_indices)
    moved: set[GridPoint] = set()
    for p in parts.values():
        moved.update(p.terminals())
    for i in selected:
        moved.update(wires[i].points())
    new_parts = {n: replace(p, x=p.x + dx, y=p.y + dy) for n, p in parts.items()}
    shifted = [_shift(w, dx, dy) if i in selected else w for i, w in enumerate(wires)]
    goes_to = {pt: (pt[0] + dx, pt[1] + dy) for pt in moved}
    return new_parts, follow_points(tuple(shifted), goes_to, skip=selected)


def follow_points(wires: tuple[Wire, ...], goes_to: dict[GridPoint, GridPoint],
                  skip: Iterable[int] = ()) -> tuple[Wire, ...]:
    """The wires after the points in ``goes_to`` moved (terminals of moved or turned parts).

    A wire with both ends moving goes with them when it stays straight; a wire
    with one end moving is stretched from its fixed end, keeping its direction,
    with a right-angle bend where needed (bends come after all other wires, so
    wire indices before them keep their meaning). Wires in ``skip`` are left
    as they are (already placed by the caller).
    """
    skip = set(skip)
    out: list[Wire] = []
    extra: list[Wire] = []
    for i, w in enumerate(wires):
        a, b = w.ends
        if i in skip or (a not in goes_to and b not in goes_to):
            out.append(w)
            continue
        if a in goes_to and b in goes_to:
            na, nb = goes_to[a], goes_to[b]
            if na != nb and (na[0] == nb[0] or na[1] == nb[1]):
                out.append(Wire(na[0], na[1], nb[0], nb[1]))
            elif na != nb:
                corner = (nb[0], na[1])
                out.append(Wire(na[0], na[1], corner[0], corner[1]))
                extra.append(Wire(corner[0], corner[1], nb[0], nb[1]))
            continue
        fixed, end = (b, a) if a in goes_to else (a, b)
        goal = goes_to[end]
        if goal == fixed:
            continue
        if goal[0] == fixed[0] or goal[1] == fixed[1]:
            out.append(Wire(fixed[0], fixed[1], goal[0], goal[1]))
            continue
        corner = (goal[0], fixed[1]) if w.y1 == w.y2 else (fixed[0], goal[1])
        out.append(Wire(fixed[0], fixed[1], corner[0], corner[1]))
        extra.append(Wire(corner[0], corner[1], goal[0], goal[1]))
    return tuple(out + extra)


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
    """Turn (or mirror) the named parts about their middles; wires on their terminals follow."""
    news, goes_to = [], {}
    for n in names:
        old = sketch.part(n)
        new = rotate_target(old, mirror=mirror)
        news.append((n, new))
        for a, b in zip(old.terminals(), new.terminals()):
            if a != b:
                goes_to[a] = b
    edit = change_edit(sketch, news)
    before = tuple(sketch.wires)
    return Edit(edit.parts, before, follow_points(before, goes_to))


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
