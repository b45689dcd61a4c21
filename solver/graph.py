"""Topology of a circuit as arrays: wires merged into nodes, branches between nodes.

The hot path works on numpy arrays and scipy.sparse.csgraph (components and
breadth-first trees run in C). Their adjacency matrices are built straight
from sorted index arrays (:func:`adjacency`) and handed to scipy as they are
(:func:`canonical_csr`): on sketch-sized circuits scipy's own COO conversion
and format checks cost more than the graph algorithms themselves. :func:`multigraph` gives the same topology as a networkx
MultiGraph for reading and display, built only when asked for.
"""
from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import cached_property
from types import MappingProxyType

import networkx as nx
import numpy as np
from scipy.sparse import csgraph, csr_matrix

from .circuit import CELL, CURRENT_SOURCE, RESISTOR, SWITCH, WIRE, Circuit

__all__ = ["Topology", "contract", "Forest", "canonical_csr", "adjacency", "components", "strong_components",
           "bfs_forest", "bfs_parents", "tree_edges",
           "mst_candidates", "spanning_forest", "least_resistance_forest", "component_roots", "accumulate_to_root",
           "subtree_sums", "multigraph"]


# What a CSR matrix holds besides its arrays and shape (scipy's print limit), taken from one it built.
_CSR_EXTRA = csr_matrix((1, 1)).__dict__.copy()
_CSR_DIRECT = {"_shape", "data", "indices", "indptr"} <= _CSR_EXTRA.keys()
for _key in ("_shape", "data", "indices", "indptr"):
    _CSR_EXTRA.pop(_key, None)
_new = object.__new__


def canonical_csr(data: np.ndarray, indices: np.ndarray, indptr: np.ndarray,
                  shape: tuple[int, int]) -> csr_matrix:
    """A CSR matrix of arrays already in canonical form, without scipy's format checks.

    ``indices`` and ``indptr`` must be int32, each row's columns ascending
    and distinct, ``data`` float64 of the same length as ``indices``: what
    every caller here builds. Scipy's constructor would only confirm that,
    at about 35 µs a matrix (more than a graph search on a sketch). Where a
    scipy version keeps its matrices differently, the ordinary constructor
    is used.
    """
    if not _CSR_DIRECT:
        return csr_matrix((data, indices, indptr), shape=shape)
    m = _new(csr_matrix)
    m.__dict__.update(_CSR_EXTRA, _shape=shape, data=data, indices=indices, indptr=indptr)
    return m


@dataclass
class Forest:
    """A breadth-first spanning forest over ``n`` vertices.

    ``parent[x]`` is the parent of ``x`` (roots are their own parent),
    ``edge[x]`` the index (into the edge list given) of the tree edge from
    ``x`` to its parent (-1 at roots), ``depth[x]`` its distance from the root.
    """

    parent: np.ndarray
    edge: np.ndarray

    @cached_property
    def depth(self) -> np.ndarray:
        """Distance of each vertex from its root; worked out when first asked for, as most forests never need it."""
        return accumulate_to_root(self, np.ones(len(self.parent), dtype=np.int64))


@dataclass
class Topology:
    """Arrays describing a circuit after its conductors are merged into nodes.

    Points are indexed in ``point_names`` order, parts in circuit order.
    ``node_of_point[p]`` is the node of point ``p``; a node is named after its
    first point. ``br_*`` arrays describe the branches (resistors, cells and
    current sources); of them only ``br_r``, ``br_e`` and ``br_j`` hold the
    parts' values, everything else follows from the topology alone. Names are
    tuples and ``point_index`` a read-only mapping, so a topology's parts can
    be shared between solves of the same circuit shape. The conductors (wires
    and closed switches) have a spanning forest over the points, rooted at
    each node's first point; the islands are the connected pieces of the
    nodes joined by branches.
    """

    circuit: Circuit
    part_names: Sequence[str]
    part_kind: Sequence[str]
    point_names: Sequence[str]
    point_index: Mapping[str, int]
    part_a: np.ndarray          # point index of first terminal, per part
    part_b: np.ndarray
    node_of_point: np.ndarray
    node_names: Sequence[str]
    branch_parts: np.ndarray    # part index of each branch
    br_u: np.ndarray            # node of first terminal
    br_v: np.ndarray            # node of second terminal
    br_r: np.ndarray            # series resistance, ohms
    br_e: np.ndarray            # EMF (cells), volts; drives current from second to first terminal
    br_j: np.ndarray            # set current (current sources), amperes
    br_cs: np.ndarray           # bool: current source
    conductor_parts: np.ndarray  # part index of each wire / closed switch
    conductor_forest: Forest     # over points; Forest.edge indexes conductor_parts
    island: np.ndarray           # island of each node, numbered in order of its lowest node
    island_first: np.ndarray     # lowest node of each island

    @property
    def n_points(self) -> int:
        return len(self.point_names)

    @property
    def n_nodes(self) -> int:
        return len(self.node_names)

    @property
    def n_branches(self) -> int:
        return len(self.branch_parts)


_BRANCH, _CONDUCTOR, _NONE = 0, 1, 2
# Each part's role by (kind, closed), as Part.is_branch / Part.is_conductor say, in one look-up.
_ROLE = {(kind, closed): _BRANCH if kind in (RESISTOR, CELL, CURRENT_SOURCE)
         else _CONDUCTOR if kind == WIRE or (kind == SWITCH and closed) else _NONE
         for kind in (RESISTOR, CELL, CURRENT_SOURCE, WIRE, SWITCH) for closed in (True, False)}


def contract(circuit: Circuit) -> Topology:
    """Merge the points joined by wires and closed switches into nodes.

    Union-find is done by :func:`components` on the conductor graph, so it
    runs in C; the islands are the components of the nodes joined by branches.
    """
    parts = circuit.parts
    ends = [end for p in parts for end in (p.a, p.b)]
    point_names = list(dict.fromkeys(ends))   # numbered in order of first use
    point_index = {name: i for i, name in enumerate(point_names)}
    n = len(point_names)
    ab = np.array(list(map(point_index.__getitem__, ends)), dtype=np.int64).reshape(-1, 2)
    pa, pb = ab[:, 0].copy(), ab[:, 1].copy()
    kinds = [p.kind for p in parts]
    role = np.array([_ROLE[p.kind, p.closed] for p in parts], dtype=np.int8)

    cd = np.flatnonzero(role == _CONDUCTOR)
    # Nodes are numbered in order of their first point, so names are stable.
    node_of_point, first_point = components(n, pa[cd], pb[cd])
    node_names = [point_names[i] for i in first_point]

    bi = np.flatnonzero(role == _BRANCH)
    br_u, br_v = node_of_point[pa[bi]], node_of_point[pb[bi]]
    branches = [parts[i] for i in bi.tolist()]
    br_r = np.array([p.resistance for p in branches], dtype=float)
    br_e = np.array([p.emf if p.kind == CELL else 0.0 for p in branches], dtype=float)
    br_j = np.array([p.current if p.kind == CURRENT_SOURCE else 0.0 for p in branches], dtype=float)
    br_cs = np.array([p.kind == CURRENT_SOURCE for p in branches], dtype=bool)
    island, island_first = components(len(first_point), br_u, br_v)
    return Topology(
        circuit=circuit,
        part_names=tuple([p.name for p in parts]),
        part_kind=tuple(kinds),
        point_names=tuple(point_names),
        point_index=MappingProxyType(point_index),
        part_a=pa,
        part_b=pb,
        node_of_point=node_of_point,
        node_names=tuple(node_names),
        branch_parts=bi,
        br_u=br_u,
        br_v=br_v,
        br_r=br_r,
        br_e=br_e,
        br_j=br_j,
        br_cs=br_cs,
        conductor_parts=cd,
        conductor_forest=bfs_forest(n, pa[cd], pb[cd], first_point),
        island=island,
        island_first=island_first,
    )


def adjacency(n: int, u: np.ndarray, v: np.ndarray) -> csr_matrix:
    """The graph with edges ``u[k]–v[k]`` on ``n`` vertices as a symmetric CSR adjacency.

    In scipy's canonical form (each row's neighbours ascending, each once), as
    scipy would build it from COO, so traversals visit neighbours in the same
    order; built from the sorted keys directly (int32 indices, as csgraph
    uses), it skips scipy's conversion and checks. Parallel edges are one
    entry, as :func:`strong_components` needs. Self-loops stay; no traversal
    takes them.
    """
    n64 = np.int64(n)
    key = np.sort(np.concatenate([u * n64 + v, v * n64 + u]), kind="stable")   # row * n + column
    distinct = np.ones(len(key), bool)
    distinct[1:] = key[1:] != key[:-1]
    key = key[distinct]
    indptr = np.searchsorted(key, np.arange(n + 1) * n64).astype(np.int32)
    return canonical_csr(np.ones(len(key)), (key % max(n, 1)).astype(np.int32), indptr, (n, n))


def components(n: int, u: np.ndarray, v: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Connected components of the graph with edges ``u[k]–v[k]``, numbered in order of their lowest vertex.

    Returns (label of each vertex, lowest vertex of each component). On the
    symmetric :func:`adjacency` the strongly connected components are the
    connected ones; csgraph's strong search works on the matrix as given,
    where its undirected search would first build the transpose.
    """
    if len(u) == 0:   # no edges: each vertex alone
        return np.arange(n), np.arange(n)
    return strong_components(adjacency(n, u, v))


def strong_components(graph: csr_matrix) -> tuple[np.ndarray, np.ndarray]:
    """Strongly connected components of a directed graph, numbered in order of their lowest vertex.

    Returns (label of each vertex, lowest vertex of each component), by
    csgraph's search (Pearce's algorithm). ``graph`` must not repeat an
    entry: on repeated entries that search mislabels or never ends.
    """
    n = graph.shape[0]
    k, label = csgraph.connected_components(graph, directed=True, connection="strong")
    lowest = np.full(k, n, dtype=np.int64)
    np.minimum.at(lowest, label, np.arange(n))
    order = np.argsort(lowest)
    rank = np.empty(k, dtype=np.int64)
    rank[order] = np.arange(k)
    return rank[label], lowest[order]


def bfs_forest(n: int, u: np.ndarray, v: np.ndarray, roots: np.ndarray,
               prefer: np.ndarray | None = None) -> Forest:
    """Breadth-first spanning forest of the multigraph with edges ``u[k]–v[k]``.

    Each connected component is rooted at the vertex of ``roots`` that lies
    in it (``roots`` must hold exactly one vertex per component, e.g. from
    :func:`component_roots`). The parents come from the graph alone
    (:func:`bfs_parents`); of parallel edges the tree takes the one with the
    smallest ``prefer`` value (e.g. resistance, :func:`tree_edges`).
    """
    if len(u) == 0:   # no edges: each vertex is a root of its own
        return Forest(parent=np.arange(n), edge=np.full(n, -1, dtype=np.int64))
    parent = bfs_parents(n, u, v, roots)
    return Forest(parent=parent, edge=tree_edges(n, u, v, parent, prefer))


def bfs_parents(n: int, u: np.ndarray, v: np.ndarray, roots: np.ndarray) -> np.ndarray:
    """The parent of each vertex in the breadth-first forest of :func:`bfs_forest` (roots their own parent).

    A virtual super-root joined to every root (the last vertex of the
    adjacency, so each root meets it after its own neighbours) lets one
    C-level ``csgraph.breadth_first_order`` call span all components.
    ``u`` must not be empty.
    """
    s = n  # super-root
    full = adjacency(n + 1, np.concatenate([u, np.full(len(roots), s)]), np.concatenate([v, roots]))
    _, pred = csgraph.breadth_first_order(full, s, directed=True, return_predecessors=True)
    parent = pred[:n].copy()
    is_root = (parent == s) | (parent < 0)
    parent[is_root] = np.flatnonzero(is_root)
    return parent


def tree_edges(n: int, u: np.ndarray, v: np.ndarray, parent: np.ndarray,
               prefer: np.ndarray | None = None) -> np.ndarray:
    """The edge joining each vertex to ``parent`` (-1 at roots): of parallel ones the first by ``prefer``, then index.

    Self-loops never become tree edges. Without parallel edges the result
    does not depend on ``prefer``.
    """
    key = np.minimum(u, v) * (n + 1) + np.maximum(u, v)
    by = np.lexsort((prefer, key)) if prefer is not None else np.argsort(key, kind="stable")
    x = np.flatnonzero(parent != np.arange(n))
    px = parent[x]
    want = np.minimum(x, px) * (n + 1) + np.maximum(x, px)
    edge = np.full(n, -1, dtype=np.int64)
    edge[x] = by[np.searchsorted(key[by], want)]
    return edge


def component_roots(label: np.ndarray, lowest: np.ndarray, preferred: np.ndarray) -> np.ndarray:
    """One root per component (``label``, ``lowest`` from :func:`components`).

    The root of a component is the first vertex of ``preferred`` (in its
    order) that lies in it, else its lowest-numbered vertex.
    """
    root = lowest.copy()
    pref = preferred[::-1]  # later writes win, so reverse to let the first preferred win
    root[label[pref]] = pref
    return root


def accumulate_to_root(forest: Forest, step: np.ndarray) -> np.ndarray:
    """Sum ``step[x]`` along the path from each vertex up to its root (root's step excluded).

    Pointer jumping (Hillis–Steele style doubling), O(n log depth).
    """
    acc = np.where(forest.edge >= 0, step, np.zeros_like(step))
    ptr = forest.parent.copy()
    while True:
        nxt = ptr[ptr]
        if np.array_equal(nxt, ptr):
            break
        acc = acc + acc[ptr]
        ptr = nxt
    return acc


def subtree_sums(forest: Forest, value: np.ndarray) -> np.ndarray:
    """Sum of ``value`` over each vertex's subtree (itself included), level by level."""
    total = np.asarray(value, dtype=float).copy()
    if len(total) == 0:
        return total
    depth = forest.depth
    order = np.argsort(-depth, kind="stable")
    d_sorted = depth[order]
    bounds = (np.flatnonzero(d_sorted[1:] != d_sorted[:-1]) + 1).tolist()
    parent = forest.parent
    for lo, hi in zip([0, *bounds], [*bounds, len(order)]):
        if d_sorted[lo] == 0:
            break
        level = order[lo:hi]
        np.add.at(total, parent[level], total[level])
    return total


def mst_candidates(n: int, u: np.ndarray, v: np.ndarray,
                   weight: np.ndarray | None) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The edges a minimum spanning forest may take: per vertex pair the lightest by ``weight``, then by index.

    Returns (lo, hi, idx, indptr): each pair's lower and higher vertex in
    row-major order, the edge joining it, and the row pointer of the pairs
    as a CSR upper triangle. Self-loops are left out. Without parallel edges
    the result does not depend on ``weight``, which may then be None.
    """
    ok = u != v
    lo, hi = np.minimum(u, v)[ok], np.maximum(u, v)[ok]
    idx = np.flatnonzero(ok)
    order = np.lexsort((hi, lo) if weight is None else (weight[idx], hi, lo))   # lightest of each bundle first
    lo, hi, idx = lo[order], hi[order], idx[order]
    first = np.ones(len(idx), bool)
    first[1:] = (lo[1:] != lo[:-1]) | (hi[1:] != hi[:-1])
    lo, hi, idx = lo[first], hi[first], idx[first]
    indptr = np.zeros(n + 1, dtype=np.int32)
    np.cumsum(np.bincount(lo, minlength=n), out=indptr[1:])
    return lo, hi, idx, indptr


def spanning_forest(n: int, u: np.ndarray, v: np.ndarray, weight: np.ndarray, roots: np.ndarray,
                    candidates: tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray] | None = None) -> Forest:
    """A minimum-weight spanning forest (Kruskal via csgraph), rooted at ``roots``.

    ``weight`` must be positive. ``Forest.edge`` indexes the given edges; of
    parallel edges the lightest is the candidate (``candidates``: those of
    :func:`mst_candidates`, if already known). ``roots`` holds one vertex
    per connected component.
    """
    lo, hi, idx, indptr = mst_candidates(n, u, v, weight) if candidates is None else candidates
    if len(idx) == 0:
        return bfs_forest(n, u[:0], v[:0], roots)
    # The candidates, one per vertex pair in row-major order, are the upper triangle in canonical CSR
    # (of arrays of its own: csgraph may change them in place).
    matrix = canonical_csr(np.asarray(weight[idx], dtype=float), hi.astype(np.int32), indptr.copy(), (n, n))
    mst = csgraph.minimum_spanning_tree(matrix, overwrite=True)
    t_row = np.repeat(np.arange(n), np.diff(mst.indptr))
    tkey = np.minimum(t_row, mst.indices) * n + np.maximum(t_row, mst.indices)
    tree = idx[np.searchsorted(lo * n + hi, tkey)]   # lo * n + hi is ascending
    f = bfs_forest(n, u[tree], v[tree], roots)
    f.edge = np.where(f.edge >= 0, tree[np.maximum(f.edge, 0)], -1)
    return f


def least_resistance_forest(topo: Topology, roots: np.ndarray,
                            candidates: tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray] | None = None) -> Forest:
    """A spanning forest of the branches that prefers low resistance.

    Used when the loop equations of a shallow tree are ill-conditioned: with
    the high-resistance branches as chords, each appears in one loop only and
    the loop matrix stays diagonally dominant. Current sources are taken last.
    Weights are ranks, so zero resistances need no special case.
    ``candidates`` are the branches' :func:`mst_candidates`, if already known.
    """
    nb = topo.n_branches
    weight = np.empty(nb)
    weight[np.argsort(topo.br_r, kind="stable")] = np.arange(1, nb + 1)
    weight[topo.br_cs] = nb + 1.0
    return spanning_forest(topo.n_nodes, topo.br_u, topo.br_v, weight, roots, candidates)


def multigraph(topo: Topology) -> nx.MultiGraph:
    """The circuit as a networkx MultiGraph: nodes by name, one edge per branch, keyed by part name.

    Each edge carries ``kind`` and ``terminals`` (the first and second node);
    wires are already merged into nodes, open switches are not edges.
    """
    g = nx.MultiGraph()
    g.add_nodes_from(topo.node_names)
    for k, pi in enumerate(topo.branch_parts):
        a = topo.node_names[topo.br_u[k]]
        b = topo.node_names[topo.br_v[k]]
        g.add_edge(a, b, key=topo.part_names[pi], kind=topo.part_kind[pi], terminals=(a, b))
    return g
