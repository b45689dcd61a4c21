"""The sketch document: parts and wires on an integer grid, free of Qt.

The document is the single source of truth; the canvas is a view of it.
Every change goes through a method here and is announced to listeners, so
the window (and its undo stack) can follow without the model knowing Qt.
Grid coordinates: x to the right, y downwards, as on screen.
"""
from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field, replace
from functools import cache, cached_property

from .kinds import KINDS, kind_spec

__all__ = ["PlacedPart", "Wire", "BranchTag", "SavedCheck", "Sketch", "transform", "ROTATIONS", "CHECK_KINDS"]

ROTATIONS = (0, 90, 180, 270)
GridPoint = tuple[int, int]


def transform(local: GridPoint, rotation: int, mirror: bool) -> GridPoint:
    """Map a local terminal offset to a grid offset: mirror (flip y), then rotate clockwise on screen."""
    x, y = local
    if mirror:
        y = -y
    for _ in range((rotation // 90) % 4):
        x, y = -y, x  # 90° clockwise with y pointing down
    return x, y


@cache
def _value_defaults(kind: str) -> dict[str, float]:
    """The default of each value of ``kind`` by key (the kinds are fixed when the program starts)."""
    out: dict[str, float] = {}
    for f in kind_spec(kind).value_fields:
        out.setdefault(f.key, f.default)
    return out


@dataclass(frozen=True)
class PlacedPart:
    """A part on the grid.

    ``values`` holds the kind's number fields (SI base units, see
    ``ValueField``), ``flags`` its on/off properties and ``choices`` its
    picked-from-a-list properties (a cable's material, a cell's preset), each
    falling back to the kind's default when left out.
    """

    kind: str
    name: str
    x: int
    y: int
    rotation: int = 0
    mirror: bool = False
    values: dict[str, float] = field(default_factory=dict)
    flags: dict[str, bool] = field(default_factory=dict)
    label: str = ""
    choices: dict[str, str] = field(default_factory=dict)

    @cached_property
    def terminal_points(self) -> tuple[GridPoint, ...]:
        """Grid points of the terminals, in the kind's terminal order.

        Worked out once per part: the fields they follow from are frozen, and
        the netlist reads them for every part after every edit.
        """
        out = []
        for t in kind_spec(self.kind).terminals:
            dx, dy = transform(t, self.rotation, self.mirror)
            out.append((self.x + dx, self.y + dy))
        return tuple(out)

    def terminals(self) -> list[GridPoint]:
        """Grid points of the terminals, in the kind's terminal order (a new list)."""
        return list(self.terminal_points)

    def value(self, key: str) -> float:
        """The value ``key``, falling back to the kind's default."""
        if key in self.values:
            return self.values[key]
        defaults = _value_defaults(self.kind)
        if key in defaults:
            return defaults[key]
        raise KeyError(key)

    def flag(self, key: str) -> bool:
        """A boolean property (e.g. a switch's ``closed``), falling back to the kind's default."""
        if key in self.flags:
            return self.flags[key]
        spec = KINDS.get(self.kind)
        return spec.flag_default(key) if spec else True

    def choice(self, key: str) -> str:
        """The picked option ``key`` (e.g. a cable's ``material``), falling back to the kind's default."""
        if key in self.choices:
            return self.choices[key]
        return kind_spec(self.kind).choice_field(key).default


@dataclass(frozen=True)
class Wire:
    """A straight wire between two grid points (horizontal or vertical)."""

    x1: int
    y1: int
    x2: int
    y2: int

    @property
    def ends(self) -> tuple[GridPoint, GridPoint]:
        return (self.x1, self.y1), (self.x2, self.y2)

    def points(self) -> list[GridPoint]:
        """Every grid point the wire passes through, ends included."""
        dx = (self.x2 > self.x1) - (self.x2 < self.x1)
        dy = (self.y2 > self.y1) - (self.y2 < self.y1)
        n = max(abs(self.x2 - self.x1), abs(self.y2 - self.y1))
        return [(self.x1 + k * dx, self.y1 + k * dy) for k in range(n + 1)]

    def normalized(self) -> "Wire":
        """The same wire with its ends in a canonical order."""
        a, b = sorted(self.ends)
        return Wire(a[0], a[1], b[0], b[1])


@dataclass(frozen=True)
class BranchTag:
    """A person's named, directed current on the branch through ``part``.

    ``forward`` counts the current from the part's first terminal to its
    second. Every part in series with ``part`` carries the same current, so a
    branch holds one tag; which part anchors it is the person's choice.
    """

    name: str
    part: str
    forward: bool = True


CHECK_KINDS = ("equation", "values")


@dataclass(frozen=True)
class SavedCheck:
    """A check a person typed, kept so a reviewer sees what was checked.

    ``kind`` is ``"equation"`` (a KVL or KCL equation) or ``"values"``
    (numeric answers such as ``Ia = 12.3m``, compared within ``tolerance``,
    a fraction). Only the text is kept; the verdict is worked out afresh
    against the circuit as it is now.
    """

    text: str
    kind: str = "equation"
    tolerance: float = 0.01


Listener = Callable[[], None]


class Sketch:
    """An ordered collection of parts (by name) and wires, with change listeners."""

    def __init__(self) -> None:
        self._parts: dict[str, PlacedPart] = {}
        self._wires: list[Wire] = []
        self._tags: dict[str, BranchTag] = {}     # by anchoring part
        self._set_aside: list[tuple[PlacedPart, BranchTag]] = []  # tags of deleted parts, for undo
        self._checks: list[SavedCheck] = []
        self._listeners: list[Listener] = []

    # -- listening ----------------------------------------------------------
    def subscribe(self, listener: Listener) -> None:
        """Call ``listener()`` after every change."""
        self._listeners.append(listener)

    def _changed(self) -> None:
        for fn in list(self._listeners):
            fn()

    # -- reading ------------------------------------------------------------
    @property
    def parts(self) -> list[PlacedPart]:
        return list(self._parts.values())

    @property
    def wires(self) -> list[Wire]:
        return list(self._wires)

    @property
    def tags(self) -> list[BranchTag]:
        """The current tags on parts that exist, in order of their names.

        A deleted part's tag is put aside with that very part object, so that
        undoing the deletion (which adds the same object back) brings it back;
        a new or renamed part of the same name never takes it over.
        """
        return sorted(self._tags.values(), key=lambda t: (t.name, t.part))

    def tag_on(self, part: str) -> BranchTag | None:
        """The tag anchored on ``part``, if any."""
        return self._tags.get(part)

    @property
    def checks(self) -> list[SavedCheck]:
        return list(self._checks)

    def part(self, name: str) -> PlacedPart:
        return self._parts[name]

    def has_part(self, name: str) -> bool:
        return name in self._parts

    def next_name(self, kind: str) -> str:
        """The next free reference designator for ``kind`` (R1, R2, …)."""
        prefix = kind_spec(kind).prefix or "GND"
        used = set(self._parts)
        n = 1
        while f"{prefix}{n}" in used:
            n += 1
        return f"{prefix}{n}"

    def drawing(self) -> "Sketch":
        """A new sketch with this one's parts and wires, shared (they are immutable), in order;
        no tags, checks or listeners. What a worker thread reads while edits go on here: it
        takes two container copies, not a check and a change per part."""
        out = Sketch()
        out._parts = dict(self._parts)
        out._wires = list(self._wires)
        return out

    # -- editing (each call is one change) ------------------------------------
    def add_part(self, part: PlacedPart, index: int | None = None) -> None:
        """Add ``part``; ``index`` puts it back at a position (used by undo)."""
        if part.name in self._parts:
            raise ValueError(f"a part named {part.name} already exists")
        if part.kind not in KINDS:
            raise ValueError(f"unknown part kind {part.kind!r}")
        if index is None or index >= len(self._parts):
            self._parts[part.name] = part  # appending keeps loading a large sketch linear
        else:
            items = list(self._parts.items())
            items.insert(index, (part.name, part))
            self._parts = dict(items)
        for k, (kept, tag) in enumerate(self._set_aside):
            if kept is part:  # the very part deleted before: its tag comes back with it
                self._tags[part.name] = tag
                del self._set_aside[k]
                break
        self._changed()

    def remove_part(self, name: str) -> tuple[PlacedPart, int]:
        """Remove the part called ``name``; returns it and its former index."""
        index = list(self._parts).index(name)
        part = self._parts.pop(name)
        tag = self._tags.pop(name, None)
        if tag is not None:
            self._set_aside.append((part, tag))
        self._changed()
        return part, index

    def replace_part(self, name: str, new: PlacedPart) -> PlacedPart:
        """Replace a part in place (move, rotate, new value, rename); returns the old one."""
        if new.name != name and new.name in self._parts:
            raise ValueError(f"a part named {new.name} already exists")
        old = self._parts[name]
        if new.name != name and name in self._tags:  # a renamed part keeps its tag
            self._tags = {(new.name if k == name else k): (replace(t, part=new.name) if k == name else t)
                          for k, t in self._tags.items() if k != new.name}
        self._parts = {(new.name if k == name else k): (new if k == name else v)
                       for k, v in self._parts.items()}
        self._changed()
        return old

    def update_part(self, name: str, **changes) -> PlacedPart:
        """Replace fields of a part (see ``dataclasses.replace``); returns the old one."""
        return self.replace_part(name, replace(self._parts[name], **changes))

    def add_wire(self, wire: Wire, index: int | None = None) -> None:
        """Add a wire (horizontal or vertical, two distinct points)."""
        if wire.x1 != wire.x2 and wire.y1 != wire.y2:
            raise ValueError("a wire runs horizontally or vertically")
        if wire.ends[0] == wire.ends[1]:
            raise ValueError("a wire needs two different points")
        if index is None:
            self._wires.append(wire)
        else:
            self._wires.insert(index, wire)
        self._changed()

    def remove_wire(self, index: int) -> Wire:
        """Remove the wire at ``index`` and return it."""
        wire = self._wires.pop(index)
        self._changed()
        return wire

    def replace_wire(self, index: int, wire: Wire) -> Wire:
        """Replace the wire at ``index``; returns the old one."""
        old = self._wires[index]
        self._wires[index] = wire
        self._changed()
        return old

    def set_tag(self, part: str, tag: BranchTag | None) -> BranchTag | None:
        """Put ``tag`` on ``part`` (None takes the tag off); returns the tag that was there."""
        if tag is not None and tag.part != part:
            raise ValueError(f"the tag {tag.name} names the part {tag.part}, not {part}")
        if tag is not None and part not in self._parts:
            raise ValueError(f"there is no part named {part}")
        old = self._tags.pop(part, None)
        if tag is not None:
            self._tags[part] = tag
        self._changed()
        return old

    def add_check(self, check: SavedCheck, index: int | None = None) -> None:
        """Keep a typed check; ``index`` puts it back at a position (used by undo)."""
        if check.kind not in CHECK_KINDS:
            raise ValueError(f"a check is an equation or values, not {check.kind!r}")
        if index is None:
            self._checks.append(check)
        else:
            self._checks.insert(index, check)
        self._changed()

    def remove_check(self, index: int) -> SavedCheck:
        """Drop the check at ``index`` and return it."""
        check = self._checks.pop(index)
        self._changed()
        return check

    def clear(self) -> None:
        self._parts.clear()
        self._wires.clear()
        self._tags.clear()
        self._set_aside.clear()
        self._checks.clear()
        self._changed()

    # -- comparing ------------------------------------------------------------
    def snapshot(self) -> tuple:
        """A hashable value equal for equal documents (order included)."""
        return (
            tuple((p.kind, p.name, p.x, p.y, p.rotation, p.mirror,
                   tuple(sorted(p.values.items())), tuple(sorted(p.flags.items())), p.label,
                   tuple(sorted(p.choices.items())))
                  for p in self._parts.values()),
            tuple(self._wires),
            tuple(self.tags),
            tuple(self._checks),
        )

    def __eq__(self, other: object) -> bool:
        return isinstance(other, Sketch) and self.snapshot() == other.snapshot()

    __hash__ = None  # mutable
