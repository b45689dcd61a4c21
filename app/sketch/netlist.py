"""From grid geometry to a solver ``Circuit``: which grid points touch.

Rules, as a person reads a drawing: ends that touch connect; a wire end or
part terminal lying on the middle of another wire makes a T-junction there;
wires that merely cross do not connect; collinear wires that overlap are one
conductor.  Each wire is cut at every connection point on it, so every
circuit wire part is a straight segment between two placed points and the
circuit keeps the geometry of the drawing.
"""
from __future__ import annotations

import bisect
from collections import Counter, defaultdict
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from itertools import chain

from solver import Circuit, CircuitError
from solver.circuit import Part

from .bench_parts import cable_resistance, lamp_hot_resistance
from .kinds import KINDS
from .model import PlacedPart, Sketch, Wire

__all__ = ["Netlist", "to_circuit", "wire_groups", "PointGroups", "WIRE_PREFIX", "GROUND_TIE_PREFIX", "point_name"]

GridPoint = tuple[int, int]

# Names of the circuit parts made here start with "~", which part names may not.
WIRE_PREFIX = "~w"
GROUND_TIE_PREFIX = "~gnd"


@dataclass
class Netlist:
    """A sketch as a circuit, with what the canvas needs to draw connections."""

    circuit: Circuit
    ground: str | None
    point_at: dict[GridPoint, str] = field(default_factory=dict)
    wire_parts: dict[int, list[str]] = field(default_factory=dict)
    junctions: list[GridPoint] = field(default_factory=list)
    open_ends: list[GridPoint] = field(default_factory=list)


@dataclass
class _Piece:
    """A stretch of conductor between two consecutive connection points (a < b)."""

    a: GridPoint
    b: GridPoint
    wires: list[int]
    name: str = ""


def point_name(p: GridPoint) -> str:
    """The circuit point name of grid point ``p``: ``"x,y"``."""
    return f"{p[0]},{p[1]}"


def _check(parts: list[PlacedPart], wires: list[Wire]) -> None:
    for part in parts:
        if part.kind not in KINDS:
            raise CircuitError(f"{part.name} is of an unknown kind ({part.kind}).", [part.name])
        _check_name(part)
    for w in wires:
        if (w.x1 == w.x2) == (w.y1 == w.y2):  # a run changes exactly one coordinate
            raise CircuitError(
                f"The wire from ({w.x1}, {w.y1}) to ({w.x2}, {w.y2}) is not a horizontal or "
                "vertical run between two different points.",
                [],
            )


def _check_name(part: PlacedPart) -> None:
    if part.name.startswith("~"):
        raise CircuitError(
            f"The name {part.name} starts with '~', which is kept for wires; rename the part.",
            [part.name],
        )


def _runs(wires: list[Wire]):
    """Collinear wires merged where they overlap or touch.

    Yields ``(horizontal, line, lo, hi, members)`` with ``members`` the
    ``(lo, hi, index)`` spans of the sketch wires in the run.
    """
    lines: dict[tuple[bool, int], list[tuple[int, int, int]]] = defaultdict(list)
    for i, w in enumerate(wires):
        if w.y1 == w.y2:
            lines[(True, w.y1)].append((min(w.x1, w.x2), max(w.x1, w.x2), i))
        else:
            lines[(False, w.x1)].append((min(w.y1, w.y2), max(w.y1, w.y2), i))
    for (horizontal, line), spans in sorted(lines.items()):
        spans.sort()
        members = [spans[0]]
        hi = spans[0][1]
        for span in spans[1:]:
            if span[0] > hi:
                yield horizontal, line, members[0][0], hi, members
                members, hi = [], span[1]
            members.append(span)
            hi = max(hi, span[1])
        yield horizontal, line, members[0][0], hi, members


def _pieces(wires: list[Wire], stops: list[GridPoint]) -> list[_Piece]:
    """Cut the merged runs at every stop (terminal or wire end, in sorted order) lying on them."""
    rows: dict[int, list[int]] = defaultdict(list)  # y -> xs of stops
    cols: dict[int, list[int]] = defaultdict(list)  # x -> ys of stops
    for x, y in stops:
        rows[y].append(x)
        cols[x].append(y)
    pieces: list[_Piece] = []
    for horizontal, line, lo, hi, members in _runs(wires):
        along = rows[line] if horizontal else cols[line]
        cuts = along[bisect.bisect_left(along, lo): bisect.bisect_right(along, hi)]
        for t0, t1 in zip(cuts, cuts[1:]):
            owners = [i for wlo, whi, i in members if wlo <= t0 and t1 <= whi]
            a, b = ((t0, line), (t1, line)) if horizontal else ((line, t0), (line, t1))
            pieces.append(_Piece(a, b, sorted(owners)))
    counts: dict[int, int] = defaultdict(int)
    for piece in pieces:
        owner = piece.wires[0]
        counts[owner] += 1
        piece.name = f"{WIRE_PREFIX}{owner}.{counts[owner]}"
    return pieces


def _add_part(c: Circuit, part: PlacedPart, a: str, b: str) -> None:
    """Add ``part`` between points ``a`` and ``b`` as solver primitives under its own name,
    so its current and drop read by name.

    Bench parts reduce to what the solver already has: a meter or fuse of no
    resistance is a closed switch (a conductor), an ideal voltmeter or a blown
    fuse an open switch, everything else a resistor.
    """
    name, kind = part.name, part.kind
    if kind == "resistor":
        c.resistor(name, a, b, part.value("resistance"))
    elif kind == "cell":
        c.cell(name, plus=a, minus=b, emf=part.value("emf"),
               internal_resistance=part.value("internal_resistance"))
    elif kind == "current_source":
        c.current_source(name, a, b, part.value("current"))
    elif kind == "switch":
        c.switch(name, a, b, closed=part.flag("closed"))
    elif kind == "ammeter":
        _resistor_or_conductor(c, name, a, b, part.value("burden"))
    elif kind == "voltmeter":
        if part.flag("ideal"):
            c.switch(name, a, b, closed=False)
        else:
            c.resistor(name, a, b, part.value("input_resistance"))
    elif kind == "fuse":
        if part.flag("blown"):
            c.switch(name, a, b, closed=False)
        else:
            _resistor_or_conductor(c, name, a, b, part.value("resistance"))
    elif kind == "lamp":
        c.resistor(name, a, b, _physical(part, lambda: lamp_hot_resistance(
            part.value("rated_voltage"), part.value("rated_power"))))
    elif kind == "cable":
        c.resistor(name, a, b, _physical(part, lambda: cable_resistance(
            part.value("length"), part.value("cross_section"), part.choice("material"),
            part.flag("both_conductors"))))
    else:
        raise CircuitError(f"{part.name}: Loopwright cannot yet solve a {part.kind}.", [part.name])


def _resistor_or_conductor(c: Circuit, name: str, a: str, b: str, resistance: float) -> None:
    if resistance == 0:
        c.switch(name, a, b, closed=True)
    else:
        c.resistor(name, a, b, resistance)


def _physical(part: PlacedPart, resistance: Callable[[], float]) -> float:
    """A part's resistance from its ratings, with a bad rating reported as a circuit error."""
    try:
        return resistance()
    except ValueError as e:
        raise CircuitError(f"{part.name}: {e}", [part.name]) from None


class PointGroups:
    """Union-find over grid points (path halving)."""

    def __init__(self) -> None:
        self._up: dict[GridPoint, GridPoint] = {}

    def find(self, p: GridPoint) -> GridPoint:
        up = self._up
        up.setdefault(p, p)
        while up[p] != p:
            up[p] = up[up[p]]
            p = up[p]
        return p

    def join(self, p: GridPoint, q: GridPoint) -> None:
        self._up[self.find(p)] = self.find(q)


def wire_groups(wires: list[Wire], terminals: Iterable[GridPoint]) -> PointGroups:
    """Which grid points ``wires`` join, by this module's rules (ends that touch, a wire end
    or one of ``terminals`` on the middle of a wire), as groups: ``find(p) == find(q)``
    when p and q are on one conductor. Parts join nothing here."""
    stops = set(terminals)
    for w in wires:
        stops.add((w.x1, w.y1))
        stops.add((w.x2, w.y2))
    groups = PointGroups()
    for piece in _pieces(wires, sorted(stops)):
        groups.join(piece.a, piece.b)
    return groups


@dataclass(frozen=True)
class _Layout:
    """What a netlist takes from the drawing alone, kept for the next sketch drawn the same way.

    ``ends`` are the circuit point names of each non-ground part's terminals in sketch order,
    ``conductors`` the wire pieces and then the ground ties as ``(name, a, b)``, ``positions``
    each point's place as ``Circuit.place`` keeps it. Never handed out: every netlist gets
    copies of the containers.
    """

    key: tuple | None
    point_at: dict[GridPoint, str]
    positions: dict[str, tuple[float, float]]
    ends: list[tuple[str, str]]
    conductors: list[tuple[str, str, str]]
    ground: str | None
    wire_parts: dict[int, list[str]]
    junctions: list[GridPoint]
    open_ends: list[GridPoint]


_LAYOUTS: tuple[_Layout, ...] = ()   # the last few, newest first (replaced whole: threads may build netlists)
_LAYOUTS_KEPT = 4


def _layout_key(parts: list[PlacedPart], wires: list[Wire]) -> tuple:
    """Everything the layout follows from: each part's kind and terminal points in order, and the wires.

    Names, values, flags and choices are left out: they decide the circuit's parts, which are
    built afresh for every netlist, never where points, pieces, junctions or grounds lie.
    """
    return tuple([(p.kind, p.terminal_points) for p in parts]), tuple(wires)


def _integral(parts: list[PlacedPart], wires: list[Wire]) -> bool:
    """Whether every coordinate is an ``int``: a 1.0 equals 1 in a layout key, yet names its points "1.0,…"."""
    return (all(type(p.x) is int and type(p.y) is int for p in parts)
            and all(type(w.x1) is int and type(w.y1) is int and type(w.x2) is int and type(w.y2) is int
                    for w in wires))


def to_circuit(sketch: Sketch) -> Netlist:
    """The circuit drawn in ``sketch``, every point placed at its grid position.

    Wire parts are named ``~w<wire index>.<piece>`` and run from the lower to
    the higher grid coordinate; several ground symbols are tied together by
    wire parts ``~gnd1``, ``~gnd2``….  Raises ``CircuitError`` (with
    ``.parts``) for a sketch that cannot become a circuit.

    The geometry (points, wire pieces, junctions, open ends, ground ties) of the
    last few drawings is kept: after an edit that leaves every part where it was and
    the wires as they were (a new value, a switch thrown, a rename) only the circuit's
    parts are made again.
    """
    global _LAYOUTS
    parts = sketch.parts
    wires = sketch.wires
    key = _layout_key(parts, wires) if _integral(parts, wires) else None
    layouts = _LAYOUTS
    layout = None if key is None else next((lay for lay in layouts if lay.key == key), None)
    if layout is None:
        _check(parts, wires)
        layout = _new_layout(key, parts, wires)
        if key is not None:
            _LAYOUTS = (layout, *layouts[:_LAYOUTS_KEPT - 1])
    c = Circuit()
    point_at = layout.point_at
    if key is None:
        for p, name in point_at.items():
            c.place(name, p[0], p[1])
    else:  # whole grid coordinates: finite, no -0.0
        c._place_checked(layout.positions)
    _add_parts(c, parts, layout.ends)
    for name, a, b in layout.conductors:
        c.wire(name, a, b)
    return Netlist(
        circuit=c,
        ground=layout.ground,
        point_at=dict(point_at),
        wire_parts={i: list(names) for i, names in layout.wire_parts.items()},
        junctions=list(layout.junctions),
        open_ends=list(layout.open_ends),
    )


_MADE: dict[int, tuple[PlacedPart, str, str, Part]] = {}  # per sketch part (by id): its circuit part


def _add_parts(c: Circuit, parts: list[PlacedPart], ends: list[tuple[str, str]]) -> None:
    """Add the circuit part of every part but the grounds, between its ``ends``.

    Sketch parts are immutable values, and an edit replaces only those it changes: the
    circuit parts made for the others by the last netlist are taken as they are (checked
    when they were made), and only the new ones are made (``_add_part``). A 2,000-part
    drawing then costs a dictionary look-up per part, not a part checked and built.
    """
    global _MADE
    kept, made = _MADE, {}
    look_up, adopt = kept.get, c._adopt
    ends_of = iter(ends)
    for part in parts:
        if part.kind == "ground":
            continue
        a, b = next(ends_of)
        key = id(part)
        hit = look_up(key)
        if hit is None or hit[0] is not part or hit[1] != a or hit[2] != b:
            _check_name(part)
            _add_part(c, part, a, b)
            hit = (part, a, b, c.part(part.name))
        else:
            adopt(hit[3])
        made[key] = hit
    _MADE = made  # replaced whole: the worker thread builds netlists too


def _new_layout(key: tuple | None, parts: list[PlacedPart], wires: list[Wire]) -> _Layout:
    """Work out the layout of a drawing (checked already) not kept."""
    degree = Counter(chain.from_iterable(p.terminal_points for p in parts))  # wire pieces added below
    stops = set(degree)
    for w in wires:
        stops.add((w.x1, w.y1))
        stops.add((w.x2, w.y2))
    points = sorted(stops)
    pieces = _pieces(wires, points)
    point_at = {p: point_name(p) for p in points}
    positions = {name: (float(p[0]), float(p[1])) for p, name in point_at.items()}
    ends = []
    for part in parts:
        if part.kind != "ground":
            a, b = part.terminal_points
            ends.append((point_at[a], point_at[b]))

    wire_parts: dict[int, list[str]] = {i: [] for i in range(len(wires))}
    conductors: list[tuple[str, str, str]] = []
    for piece in pieces:
        conductors.append((piece.name, point_at[piece.a], point_at[piece.b]))
        degree[piece.a] += 1
        degree[piece.b] += 1
        for i in piece.wires:
            wire_parts[i].append(piece.name)
    for i, w in enumerate(wires):
        if (w.x1, w.y1) > (w.x2, w.y2):
            wire_parts[i].reverse()  # list them from the wire's first end

    grounds = [p.terminal_points[0] for p in parts if p.kind == "ground"]
    ground = _tie_grounds(conductors, grounds, pieces, point_at, degree)
    return _Layout(
        key=key,
        point_at=point_at,
        positions=positions,
        ends=ends,
        conductors=conductors,
        ground=ground,
        wire_parts=wire_parts,
        junctions=sorted(p for p, n in degree.items() if n >= 3),
        open_ends=sorted(p for p, n in degree.items() if n == 1),
    )


def _tie_grounds(ties: list[tuple[str, str, str]], grounds: list[GridPoint], pieces: list[_Piece],
                 point_at: dict[GridPoint, str], degree: Counter[GridPoint]) -> str | None:
    """Join the ground symbols' nodes into one (the tie wires appended to ``ties``); the ground point name or None.

    ``grounds`` are the symbols' points in the sketch's order (the first names
    the ground), ``degree`` the terminals and wire pieces at each point.
    The symbols are tied in reading order (row by row, left to right), each to
    the previous one not yet joined, so that grounds along one rail are tied by
    short straight runs that cross nothing: the solver can then still use the
    windows of the drawing, as a person does who reads the grounds as one rail.
    """
    if not grounds:
        return None
    points = list(dict.fromkeys(grounds))
    n = 0
    if len(points) > 1:
        groups = PointGroups()  # which points the wires already join
        for piece in pieces:
            groups.join(piece.a, piece.b)
        previous = None
        for g in sorted(points, key=lambda p: (p[1], p[0])):
            if previous is not None and groups.find(g) != groups.find(previous):
                n += 1
                ties.append((f"{GROUND_TIE_PREFIX}{n}", point_at[previous], point_at[g]))
                groups.join(g, previous)
            previous = g
    # A symbol is no circuit part: its point is a circuit point only if a part, a wire piece or a tie
    # ends there (with two or more symbol points, a tie reaches every one not already wired).
    first = grounds[0]
    return point_at[first] if n or degree[first] > grounds.count(first) else None
