"""What a solve finds from a circuit's topology alone, kept for the next solve of the same shape.

The desktop window solves again after every edit, and most edits change a
value (a resistance, an EMF, a set current), not the drawing. Everything that
follows from the topology alone is then the same as last time: the nodes
(:func:`graph.contract` without the values), each island's reference, the
windows of the drawing (:func:`loops.window_loops`), the breadth-first tree
and its fundamental loops. A :class:`Shape` holds those results, a
:class:`ShapeCache` the last few shapes by key.

The key is ``Circuit._shape_key()`` (each part's kind, name, terminals and
switch state in order, and every position) with the ground: everything the
cached results are computed from. What depends on the values is worked out
on every solve: the checks (an ideal cell is one with zero internal
resistance, balance uses EMFs and currents), the spread of resistances, the
least-resistance tree, the tree edge among parallel branches (the lowest
resistance wins), the equations and all results. So a solve gives the same
output, bit for bit, from a cached shape as from a fresh one.

Cached arrays are read-only and nothing in the solver writes to them; each
solve gets a new :class:`Topology` holding them with its own value arrays
and circuit, and a cached shape holds no circuit. A few results are filled
in on first need (which branches hold which values, whether branches run
in parallel, the breadth-first tree, the candidate edges of a minimum
spanning tree, the fundamental loops of the last tree seen); each is a pure function of the shape (and the tree)
stored by one attribute assignment, so threads may share shapes without a
lock. The cache itself is guarded by a lock. Circuits of more than
``CACHE_MAX_PARTS`` parts are not cached: their shapes are large, and the
topology work is a smaller share of their solve.
"""
from __future__ import annotations

import threading
from collections import OrderedDict
from dataclasses import fields

import numpy as np

from .circuit import CELL, CURRENT_SOURCE, Circuit
from .graph import Forest, Topology, bfs_parents, least_resistance_forest, mst_candidates, tree_edges
from .loops import LoopSet, fundamental_loops, orient_clockwise

__all__ = ["Shape", "ShapeKey", "ShapeCache", "CACHE", "CACHE_SIZE", "CACHE_MAX_PARTS"]

CACHE_SIZE = 6              # shapes kept (the last ones solved)
CACHE_MAX_PARTS = 10_000    # larger circuits are solved without the cache

_VALUE_FIELDS = ("circuit", "br_r", "br_e", "br_j")
_SHAPE_FIELDS = tuple(f.name for f in fields(Topology) if f.name not in _VALUE_FIELDS)


def _freeze(*arrays: np.ndarray) -> None:
    for a in arrays:
        a.flags.writeable = False


def _parallel(n: int, u: np.ndarray, v: np.ndarray) -> bool:
    """Whether two edges ``u[k]–v[k]`` that are not self-loops join the same pair of vertices."""
    key = (np.minimum(u, v) * (n + 1) + np.maximum(u, v))[u != v]
    key.sort()
    return bool(np.any(key[1:] == key[:-1]))


def _freeze_loops(ls: LoopSet) -> None:
    _freeze(ls.b_loop, ls.b_branch, ls.b_value, ls.loop, ls.branch, ls.sign, ls.clockwise)


class Shape:
    """The value-free results of one circuit shape with its ground.

    ``roots`` is each island's reference node, ``own`` the references of
    islands with a branch that are not ground, ``windows`` the windows of the
    drawing (None when it has none to give). Built from a solve's topology,
    whose shared arrays it makes read-only.
    """

    __slots__ = ("_fields", "_values", "ground_node", "roots", "own", "windows", "_parallel", "_candidates",
                 "_walk", "_fundamental", "_least")

    def __init__(self, topo: Topology, ground_node: int, roots: np.ndarray, own: tuple[int, ...],
                 windows: LoopSet | None) -> None:
        forest = topo.conductor_forest
        if len(topo.conductor_parts):   # every solve needs its depth: worked out now, so the shared forest never changes
            _freeze(forest.depth)
        _freeze(topo.part_a, topo.part_b, topo.node_of_point, topo.branch_parts, topo.br_u, topo.br_v, topo.br_cs,
                topo.conductor_parts, topo.island, topo.island_first, forest.parent, forest.edge, roots)
        if windows is not None:
            _freeze_loops(windows)
        self._fields = {name: getattr(topo, name) for name in _SHAPE_FIELDS}
        self.ground_node = ground_node
        self.roots = roots
        self.own = own
        self.windows = windows
        self._values: tuple[list[int], list[int], list[int]] | None = None
        self._parallel: bool | None = None
        self._candidates: tuple[np.ndarray, ...] | None = None
        self._walk: tuple[np.ndarray, Forest | None] | None = None
        self._fundamental: tuple[np.ndarray, LoopSet] | None = None
        self._least: tuple[np.ndarray, Forest] | None = None  # resistance order, its least-resistance tree

    def _has_parallel(self, topo: Topology) -> bool:
        """Whether branches run in parallel: then the trees' edges among them depend on the resistances."""
        if self._parallel is None:
            self._parallel = _parallel(topo.n_nodes, topo.br_u, topo.br_v)
        return self._parallel

    def topology(self, circuit: Circuit) -> Topology:
        """The topology of ``circuit`` (of this shape): the shared arrays with its own values.

        The values are read as :func:`graph.contract` reads them: the
        resistance of every branch, the EMF of cells and the current of
        sources (0 for the other branches).
        """
        if self._values is None:
            branches = self._fields["branch_parts"].tolist()
            kind = self._fields["part_kind"]
            self._values = (branches, [k for k, i in enumerate(branches) if kind[i] == CELL],
                            [k for k, i in enumerate(branches) if kind[i] == CURRENT_SOURCE])
        branches, cells, sources = self._values
        parts = circuit.parts
        bp = [parts[i] for i in branches]
        br_r = np.array([p.resistance for p in bp], dtype=float)
        br_e = np.zeros(len(bp))
        br_e[cells] = [bp[k].emf for k in cells]
        br_j = np.zeros(len(bp))
        br_j[sources] = [bp[k].current for k in sources]
        return Topology(circuit=circuit, br_r=br_r, br_e=br_e, br_j=br_j, **self._fields)

    def bfs_walk(self, topo: Topology) -> Forest:
        """``bfs_forest(n_nodes, br_u, br_v, roots, prefer=br_r)`` for ``topo`` (of this shape).

        The parents follow from the shape; so does the whole forest unless
        parallel branches leave the tree edge to the lowest resistance.
        """
        memo = self._walk
        if memo is None:
            n = topo.n_nodes
            if topo.n_branches == 0:
                fixed = Forest(parent=np.arange(n), edge=np.full(n, -1, dtype=np.int64))
                parent = fixed.parent
            else:
                parent = bfs_parents(n, topo.br_u, topo.br_v, self.roots)
                fixed = (None if self._has_parallel(topo) else
                         Forest(parent=parent, edge=tree_edges(n, topo.br_u, topo.br_v, parent)))
            _freeze(parent, *(() if fixed is None else (fixed.edge,)))
            memo = self._walk = (parent, fixed)
        parent, fixed = memo
        if fixed is not None:
            return fixed
        return Forest(parent=parent, edge=tree_edges(topo.n_nodes, topo.br_u, topo.br_v, parent, topo.br_r))

    def least_resistance_forest(self, topo: Topology) -> Forest:
        """``graph.least_resistance_forest(topo, roots)`` for ``topo`` (of this shape).

        The tree depends on the resistances only through their order (its weights are
        ranks), so it is kept for the last order seen: a move leaves every value as it was,
        and a new value mostly leaves the order too. Without parallel branches the
        candidate edges follow from the shape and are worked out once.
        """
        order = np.argsort(topo.br_r, kind="stable")
        memo = self._least
        if memo is not None and np.array_equal(memo[0], order):
            return memo[1]
        if self._has_parallel(topo):
            forest = least_resistance_forest(topo, self.roots)
        else:
            if self._candidates is None:
                candidates = mst_candidates(topo.n_nodes, topo.br_u, topo.br_v, None)
                _freeze(*candidates)
                self._candidates = candidates
            forest = least_resistance_forest(topo, self.roots, self._candidates)
        _freeze(order, forest.parent, forest.edge, forest.depth)  # shared from now on: never changed
        self._least = (order, forest)
        return forest

    def fundamental(self, topo: Topology, walk: Forest) -> LoopSet:
        """The fundamental loops of ``walk`` (a :meth:`bfs_walk` or :meth:`least_resistance_forest`),
        clockwise where the drawing allows.

        Kept for the last tree asked for: with parallel branches, or with a least-resistance
        tree, the tree and so the loops can change with the values; a new value mostly
        leaves the tree as it was.
        """
        memo = self._fundamental
        if memo is not None and np.array_equal(memo[0], walk.edge):
            return memo[1]
        # A forest of its own, so the shared walk never gains a cached depth.
        loops = fundamental_loops(topo, Forest(parent=walk.parent, edge=walk.edge), walk.edge)
        if topo.circuit.positions:
            orient_clockwise(loops, topo)
        _freeze_loops(loops)
        edge = walk.edge.copy()
        _freeze(edge)
        self._fundamental = (edge, loops)
        return loops


class ShapeKey:
    """A cache key that hashes its (large) tuple once: a tuple would be hashed again at every look-up."""

    __slots__ = ("value", "_hash")

    def __init__(self, value: tuple) -> None:
        self.value = value
        self._hash = hash(value)

    def __hash__(self) -> int:
        return self._hash

    def __eq__(self, other: object) -> bool:
        return isinstance(other, ShapeKey) and self._hash == other._hash and self.value == other.value


class ShapeCache:
    """The last ``size`` shapes solved, by key, least recently used dropped first; safe across threads."""

    def __init__(self, size: int = CACHE_SIZE) -> None:
        self.size = size
        self._entries: OrderedDict[ShapeKey, tuple[ShapeKey, Shape]] = OrderedDict()
        self._lock = threading.Lock()

    def get(self, key: ShapeKey) -> Shape | None:
        """The shape kept under ``key``, or None."""
        with self._lock:
            entry = self._entries.get(key)
            if entry is None:
                return None
            self._entries.move_to_end(entry[0])   # the stored key: found by identity, not compared again
            return entry[1]

    def put(self, key: ShapeKey, shape: Shape) -> None:
        """Keep ``shape`` under ``key``, dropping the least recently used beyond ``size``."""
        with self._lock:
            self._entries[key] = (key, shape)
            self._entries.move_to_end(key)
            while len(self._entries) > self.size:
                self._entries.popitem(last=False)

    def clear(self) -> None:
        """Forget every shape."""
        with self._lock:
            self._entries.clear()

    def __len__(self) -> int:
        return len(self._entries)


CACHE = ShapeCache()
