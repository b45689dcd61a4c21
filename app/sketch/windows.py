"""Where each loop of a solution lies on the drawing: its window's corners and a point inside.

A loop's window is bounded by its parts and by the drawn wires between one part's end and
the next part's start (the solver joins the points a wire links into one node, so a loop
lists only its parts). The canvas puts the loop's mark inside it (``SketchScene._place_loop``).
Windows are kept from one solve to the next: most are the same after an edit.
"""
from __future__ import annotations

import networkx as nx

from .netlist import WIRE_PREFIX

__all__ = ["loop_windows", "forget_kept"]


class _Conductors:
    """The drawn wires of a circuit as a graph of its points, built at the first question.

    The solver joins the points a wire links into one node, so a loop lists only the parts
    it runs through; where one part's end and the next part's start are different points, the
    loop runs along the wires between them (``route``), and its window is bounded by them.
    """

    def __init__(self, circuit) -> None:
        self._circuit = circuit
        self._graph: nx.Graph | None = None

    def route(self, a: str, b: str) -> list[str]:
        """The points from ``a`` to ``b`` along the fewest wire pieces ([a, b] if none join them)."""
        if self._graph is None:
            self._graph = nx.Graph()
            self._graph.add_edges_from((p.a, p.b) for p in self._circuit.parts if p.name.startswith(WIRE_PREFIX))
        try:
            return nx.shortest_path(self._graph, a, b)
        except (nx.NodeNotFound, nx.NetworkXNoPath):  # joined otherwise (two ground symbols, say)
            return [a, b]


def _corners(loop, ends: dict[str, tuple[str, str]], pos: dict[str, tuple[float, float]],
             wires: _Conductors) -> tuple[tuple[tuple[float, float], ...] | None, tuple]:
    """The corners of the loop's window in grid units: through its parts' ends and along the
    wires between them, from the lowest corner (the same window gives the same corners
    whichever branch the solver's loop starts from); None when it has no area to speak of.
    And the wire routes taken: (from, to, points) each."""
    pts: list[tuple[float, float]] = []
    routes = []
    last: str | None = None
    first_point = ends[loop.parts[0][0]][0 if loop.parts[0][1] > 0 else 1]
    for name, sign in loop.parts:
        a, b = ends[name] if sign > 0 else ends[name][::-1]
        if a not in pos or b not in pos:
            return None, ()
        way = [a, b]
        if last is not None and last != a:
            routes.append((last, a, route := tuple(wires.route(last, a))))
            way = [*route[1:], b]
        for point in way:
            q = pos.get(point)
            if q is None:
                return None, ()
            if not pts or pts[-1] != q:
                pts.append(q)
        last = b
    if last is not None and last != first_point:
        routes.append((last, first_point, route := tuple(wires.route(last, first_point))))
        for point in route[1:-1]:
            if point in pos and pts[-1] != pos[point]:
                pts.append(pos[point])
    if len(pts) > 1 and pts[0] == pts[-1]:
        pts.pop()
    if len(pts) < 3:
        return None, tuple(routes)
    first = pts.index(min(pts))
    return tuple(pts[first:] + pts[:first]), tuple(routes)


def _loop_centre(corners: tuple[tuple[float, float], ...]) -> tuple[float, float]:
    """A point inside the window of ``corners``: its area centroid, else the mean of its corners."""
    pts = list(corners) + [corners[0]]
    area = cx = cy = 0.0
    for (x0, y0), (x1, y1) in zip(pts, pts[1:]):
        cross = x0 * y1 - x1 * y0
        area += cross
        cx += (x0 + x1) * cross
        cy += (y0 + y1) * cross
    if abs(area) > 1e-9:
        c = (cx / (3 * area), cy / (3 * area))
        if _inside(c, pts):
            return c
    n = len(corners)
    return sum(p[0] for p in corners) / n, sum(p[1] for p in corners) / n


_WINDOWS: dict[tuple, tuple] = {}  # per loop (its parts, signs and end points): centre, corners, routes
_WINDOWS_KEPT = 4096


def _window(loop, ends: dict[str, tuple[str, str]], pos: dict[str, tuple[float, float]], wires: _Conductors
            ) -> tuple[tuple[float, float] | None, list[tuple[float, float]]]:
    """``_loop_centre`` of ``loop``'s window and its corners.

    Kept by the loop's parts with their signs and end names (the netlist names each point
    by its grid position, ``netlist.point_name``): most windows are the same from one solve
    to the next. A kept window that ran along wires between parts serves only while the
    wires still run that way. The outline list is shared between results: read it, never
    change it.
    """
    key = tuple((name, sign, ends.get(name)) for name, sign in loop.parts)
    hit = _WINDOWS.get(key)
    if hit is not None and all(tuple(wires.route(a, b)) == way for a, b, way in hit[2]):
        return hit[0], hit[1]
    corners, routes = _corners(loop, ends, pos, wires)
    if len(_WINDOWS) >= _WINDOWS_KEPT:
        _WINDOWS.clear()
    hit = _WINDOWS[key] = (None, [], routes) if corners is None else (_loop_centre(corners), list(corners), routes)
    return hit[0], hit[1]


_LAST_WINDOWS: list[tuple[dict, list, list]] = []   # (ends, loop parts, windows) of the last solves, newest first
_LAST_KEPT = 4


def loop_windows(loops: list, circuit) -> list[tuple[tuple[float, float] | None, list[tuple[float, float]]]]:
    """:func:`_window` of each loop of a solution of ``circuit``.

    After a value edit the parts, their end points and the loops are those of the
    last solve (the solver lists the loops of a kept shape with the same tuples), and
    after a move taken back, or an undo, those of one before: then that solve's windows
    are the answer, found without a look-up per loop. The last ``_LAST_KEPT`` are kept.
    """
    ends = {p.name: (p.a, p.b) for p in circuit.parts}
    members = [loop.parts for loop in loops]
    for k, (e, m, w) in enumerate(_LAST_WINDOWS):
        if m == members and e == ends:
            if k:
                _LAST_WINDOWS.insert(0, _LAST_WINDOWS.pop(k))
            return w
    pos, wires = circuit.positions, _Conductors(circuit)
    windows = [_window(loop, ends, pos, wires) for loop in loops]
    _LAST_WINDOWS.insert(0, (ends, members, windows))
    del _LAST_WINDOWS[_LAST_KEPT:]
    return windows


def _inside(p: tuple[float, float], poly: list[tuple[float, float]]) -> bool:
    x, y = p
    inside = False
    for (x0, y0), (x1, y1) in zip(poly, poly[1:]):
        if (y0 > y) != (y1 > y) and x < x0 + (y - y0) * (x1 - x0) / (y1 - y0):
            inside = not inside
    return inside


def forget_kept() -> None:
    """Drop every kept window (the next solve works each out afresh)."""
    _WINDOWS.clear()
    _LAST_WINDOWS.clear()
