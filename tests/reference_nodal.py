"""An independent reference solver for the tests: modified nodal analysis (MNA) with scipy.sparse.

This is deliberately a different method from the program's mesh-current
solver: the unknowns are node potentials (plus one current per cell), the
equations are KCL at every node and one branch equation per cell, and the
system is solved with ``scipy.sparse.linalg.spsolve`` (SuperLU). Method:
C.-W. Ho, A. E. Ruehli and P. A. Brennan, "The modified nodal approach to
network analysis", IEEE Trans. Circuits Syst. 22 (1975) 504.

It reads only ``circuit.parts`` (name, kind, a, b, resistance, emf, current,
closed), so it shares no code with the solver beyond the part records.

Whether the equations have a unique solution is decided combinatorially, with
no numerical threshold: for positive resistances the MNA matrix is regular
exactly when the ideal cells (no internal resistance) form no loop, shorts
included, and no island is cut into pieces by current sources alone.
"""
from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field

import warnings

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

__all__ = ["NodalResult", "ReferenceFailed", "SingularCircuit", "nodal_solve"]

_CONDUCTOR_KINDS = ("wire", "switch")


class ReferenceFailed(Exception):
    """The nodal matrix is numerically singular although the circuit is regular by topology.

    Nodal analysis adds conductances: with values over eighteen decades a small
    one vanishes beside a large one at a shared node, so this reference cannot
    judge such a circuit (the mesh solver may still solve it).
    """


class SingularCircuit(Exception):
    """The circuit has no unique DC solution; ``parts`` names the parts at fault."""

    def __init__(self, reason: str, parts: Iterable[str]) -> None:
        super().__init__(reason)
        self.reason = reason
        self.parts = tuple(parts)


@dataclass
class NodalResult:
    """Reference readings, in the solver's sign conventions.

    ``current[p]`` flows through part ``p`` from its first terminal to its
    second; ``voltage[p]`` is V(first) - V(second), given only when both
    terminals lie in the same island (else the difference is arbitrary);
    ``potential[pt]`` is relative to the ground in the ground's island and to
    ``island_ref[island[pt]]`` in every other island; ``node[pt]`` names the
    node (points merged through conductors) of each point. ``wire_determinate``
    holds the wires and closed switches whose current KCL fixes (those on no
    loop of conductors); the others share their current in an undefined way.
    """

    current: dict[str, float]
    voltage: dict[str, float]
    potential: dict[str, float]
    island: dict[str, int]
    island_ref: dict[int, str]
    node: dict[str, str]
    wire_determinate: set[str] = field(default_factory=set)


class _UnionFind:
    def __init__(self, items: Iterable) -> None:
        self.parent = {x: x for x in items}

    def find(self, x):
        root = x
        while self.parent[root] != root:
            root = self.parent[root]
        while self.parent[x] != root:
            self.parent[x], x = root, self.parent[x]
        return root

    def union(self, x, y) -> bool:
        """Join the sets of x and y; False if they were already one set."""
        rx, ry = self.find(x), self.find(y)
        if rx == ry:
            return False
        self.parent[rx] = ry
        return True


def _is_conductor(part) -> bool:
    return part.kind == "wire" or (part.kind == "switch" and part.closed)


def _points(parts) -> list[str]:
    seen: dict[str, None] = {}
    for p in parts:
        seen.setdefault(p.a)
        seen.setdefault(p.b)
    return list(seen)


def _check_regular(parts, node_of: dict[str, str]) -> None:
    """Raise SingularCircuit for a loop of ideal cells or an island cut by current sources."""
    ideal = _UnionFind(set(node_of.values()))
    for p in parts:
        if p.kind == "cell" and p.resistance == 0.0:
            if not ideal.union(node_of[p.a], node_of[p.b]):
                raise SingularCircuit("ideal cell on a loop of ideal cells (or shorted)", [p.name])
    # Every island must be held together by resistors and cells alone.
    held = _UnionFind(set(node_of.values()))
    for p in parts:
        if p.kind in ("resistor", "cell"):
            held.union(node_of[p.a], node_of[p.b])
    for p in parts:
        if p.kind == "current_source" and held.find(node_of[p.a]) != held.find(node_of[p.b]):
            raise SingularCircuit("current source across a cut of current sources", [p.name])


def _wire_currents(parts, current: dict[str, float]) -> tuple[dict[str, float], set[str]]:
    """Currents in wires and closed switches from KCL at each point (least norm on conductor loops)."""
    wires = [p for p in parts if _is_conductor(p)]
    if not wires:
        return {}, set()
    outflow: dict[str, float] = {}
    for p in parts:
        if p.name in current:
            outflow[p.a] = outflow.get(p.a, 0.0) + current[p.name]
            outflow[p.b] = outflow.get(p.b, 0.0) - current[p.name]
    pts = _points(wires)
    row = {pt: k for k, pt in enumerate(pts)}
    inc = np.zeros((len(pts), len(wires)))
    for k, w in enumerate(wires):
        inc[row[w.a], k] += 1.0
        inc[row[w.b], k] -= 1.0
    rhs = np.array([-outflow.get(pt, 0.0) for pt in pts])
    sol, *_ = np.linalg.lstsq(inc, rhs, rcond=None)
    determinate = set()
    for k, w in enumerate(wires):  # a conductor is determinate when it is a bridge of the conductor graph
        uf = _UnionFind(pts)
        for j, o in enumerate(wires):
            if j != k:
                uf.union(o.a, o.b)
        if uf.find(w.a) != uf.find(w.b):
            determinate.add(w.name)
    return {w.name: float(sol[k]) for k, w in enumerate(wires)}, determinate


def nodal_solve(circuit, ground: str | None = None) -> NodalResult:
    """Solve ``circuit`` by modified nodal analysis; raise SingularCircuit if it has no unique solution."""
    parts = list(circuit.parts)
    points = _points(parts)
    # Nodes: points merged through wires and closed switches.
    uf = _UnionFind(points)
    for p in parts:
        if _is_conductor(p):
            uf.union(p.a, p.b)
    node_of = {pt: uf.find(pt) for pt in points}
    # Islands: points joined by anything but an open switch.
    isl = _UnionFind(points)
    for p in parts:
        if not (p.kind == "switch" and not p.closed):
            isl.union(p.a, p.b)
    island_root = {pt: isl.find(pt) for pt in points}
    island_ids = {r: k for k, r in enumerate(dict.fromkeys(island_root[pt] for pt in points))}
    island = {pt: island_ids[island_root[pt]] for pt in points}
    island_ref: dict[int, str] = {}
    if ground is not None and ground in island:
        island_ref[island[ground]] = ground
    for pt in points:
        island_ref.setdefault(island[pt], pt)
    _check_regular(parts, node_of)

    ref_nodes = {node_of[pt] for pt in island_ref.values()}
    unknown_nodes = [n for n in dict.fromkeys(node_of[pt] for pt in points) if n not in ref_nodes]
    col = {n: k for k, n in enumerate(unknown_nodes)}
    cells = [p for p in parts if p.kind == "cell"]
    nv = len(unknown_nodes)
    size = nv + len(cells)
    rows: list[int] = []
    cols: list[int] = []
    vals: list[float] = []
    rhs = np.zeros(size)

    def stamp(r: int, c: int, v: float) -> None:
        rows.append(r)
        cols.append(c)
        vals.append(v)

    for p in parts:
        na, nb = node_of[p.a], node_of[p.b]
        if p.kind == "resistor":
            if na == nb:  # shorted: it stamps nothing (adding +g and -g would only add rounding)
                continue
            g = 1.0 / p.resistance
            for x, y in ((na, nb), (nb, na)):
                if x in col:
                    stamp(col[x], col[x], g)
                    if y in col:
                        stamp(col[x], col[y], -g)
        elif p.kind == "current_source":  # KCL: the set current leaves node a and enters node b
            if na in col:
                rhs[col[na]] -= p.current
            if nb in col:
                rhs[col[nb]] += p.current
    for k, p in enumerate(cells):
        r = nv + k
        na, nb = node_of[p.a], node_of[p.b]
        # cell current i (a -> b through the cell) leaves node a, enters node b
        # branch equation: V(a) - V(b) - r*i = emf (plus terminal a)
        if na in col:
            stamp(col[na], r, 1.0)
            stamp(r, col[na], 1.0)
        if nb in col:
            stamp(col[nb], r, -1.0)
            stamp(r, col[nb], -1.0)
        stamp(r, r, -p.resistance)
        rhs[r] = p.emf

    if size:
        mat = sp.csc_matrix((vals, (rows, cols)), shape=(size, size))
        with warnings.catch_warnings():
            warnings.simplefilter("error", spla.MatrixRankWarning)
            try:
                x = np.atleast_1d(spla.spsolve(mat, rhs))
            except spla.MatrixRankWarning:
                raise ReferenceFailed("the nodal matrix is singular in floating point") from None
        if not np.all(np.isfinite(x)):
            raise ReferenceFailed("reference solve gave non-finite values")
    else:
        x = np.zeros(0)

    node_v = {n: 0.0 for n in ref_nodes}
    node_v.update({n: float(x[k]) for n, k in col.items()})
    potential = {pt: node_v[node_of[pt]] for pt in points}
    current: dict[str, float] = {}
    for p in parts:
        if p.kind == "resistor":
            current[p.name] = (potential[p.a] - potential[p.b]) / p.resistance
        elif p.kind == "current_source":
            current[p.name] = float(p.current)
        elif p.kind == "switch" and not p.closed:
            current[p.name] = 0.0
    for k, p in enumerate(cells):
        current[p.name] = float(x[nv + k])
    wire_i, determinate = _wire_currents(parts, current)
    current.update(wire_i)
    voltage = {p.name: potential[p.a] - potential[p.b] for p in parts if island[p.a] == island[p.b]}
    return NodalResult(current, voltage, potential, island, island_ref, node_of, determinate)
