"""Topology of a circuit as arrays: wires merged into nodes, branches between nodes.

The hot path works on numpy arrays and scipy.sparse.csgraph (components and
breadth-first trees run in C); :func:`multigraph` gives the same topology as a
networkx MultiGraph for reading and display, built only when asked for.
"""
from __future__ import annotations

from dataclasses import dataclass

import networkx as nx
import numpy as np
from scipy.sparse import coo_matrix, csgraph

from .circuit import CELL, CURRENT_SOURCE, Circuit

__all__ = ["Topology", "contract", "Forest", "bfs_forest", "spanning_forest", "least_resistance_forest", "component_roots",
           "accumulate_to_root", "subtree_sums", "multigraph"]


@dataclass
class Topology:
    """Arrays describing a circuit after its conductors are merged into nodes.

    Points are indexed in ``point_names`` order, parts in circuit order.
    ``node_of_point[p]`` is the node of point ``p``; a node is named after its
    first point. ``br_*`` arrays describe the branches (resistors, cells and
    current sources), ``cd_*`` the conductors (wires and closed switches).
    """

    circuit: Circuit
    part_names: list[str]
    part_kind: list[str]
    point_names: list[str]
    point_index: dict[str, int]
    part_a: np.ndarray          # point index of first terminal, per part
    part_b: np.ndarray
    node_of_point: np.ndarray
    node_names: list[str]
    branch_parts: np.ndarray    # part index of each branch
    br_u: np.ndarray            # node of first terminal
    br_v: np.ndarray            # node of second terminal
    br_r: np.ndarray            # series resistance, ohms
    br_e: np.ndarray            # EMF (cells), volts; drives current from second to first terminal
    br_j: np.ndarray            # set current (current sources), amperes
    br_cs: np.ndarray           # bool: current source
    conductor_parts: np.ndarray  # part index of each wire / closed switch

    @property
    def n_points(self) -> int:
        return len(self.point_names)

    @property
    def n_nodes(self) -> int:
        return len(self.node_names)

    @property
    def n_branches(self) -> int:
        return len(self.branch_parts)


def contract(circuit: Circuit) -> Topology:
    """Merge the points joined by wires and closed switches into nodes.

    Union-find is done by ``scipy.sparse.csgraph.connected_components`` on the
    conductor graph, so it runs in C.
    """
    parts = circuit.parts
    point_index: dict[str, int] = {}
    a_list, b_list = [], []
    for p in parts:  # one pass; points are numbered in order of first use
        a_list.append(point_index.setdefault(p.a, len(point_index)))
        b_list.append(point_index.setdefault(p.b, len(point_index)))
    point_names = list(point_index)
    n = len(point_names)
    pa = np.array(a_list, dtype=np.int64)
    pb = np.array(b_list, dtype=np.int64)
    kinds = [p.kind for p in parts]
    conductor = np.array([p.is_conductor for p in parts], dtype=bool)
    branch = np.array([p.is_branch for p in parts], dtype=bool)

    cd = np.flatnonzero(conductor)
    adj = coo_matrix((np.ones(len(cd)), (pa[cd], pb[cd])), shape=(n, n))
    _, label = csgraph.connected_components(adj, directed=False)
    # Renumber nodes in order of their first point, so names are stable.
    _, first, inverse = np.unique(label, return_index=True, return_inverse=True)
    order = np.argsort(first)
    rank = np.empty_like(order)
    rank[order] = np.arange(len(order))
    node_of_point = rank[inverse.ravel()]
    node_names = [point_names[i] for i in np.sort(first)]

    bi = np.flatnonzero(branch)
    br_r = np.array([parts[i].resistance for i in bi], dtype=float)
    br_e = np.array([parts[i].emf if kinds[i] == CELL else 0.0 for i in bi], dtype=float)
    br_j = np.array([parts[i].current if kinds[i] == CURRENT_SOURCE else 0.0 for i in bi], dtype=float)
    br_cs = np.array([kinds[i] == CURRENT_SOURCE for i in bi], dtype=bool)
    return Topology(
        circuit=circuit,
        part_names=[p.name for p in parts],
        part_kind=kinds,
        point_names=point_names,
        point_index=point_index,
        part_a=pa,
        part_b=pb,
        node_of_point=node_of_point,
        node_names=node_names,
        branch_parts=bi,
        br_u=node_of_point[pa[bi]] if len(bi) else np.zeros(0, np.int64),
        br_v=node_of_point[pb[bi]] if len(bi) else np.zeros(0, np.int64),
        br_r=br_r,
        br_e=br_e,
        br_j=br_j,
        br_cs=br_cs,
        conductor_parts=cd,
    )


@dataclass
class Forest:
    """A breadth-first spanning forest over ``n`` vertices.

    ``parent[x]`` is the parent of ``x`` (roots are their own parent),
    ``edge[x]`` the index (into the edge list given) of the tree edge from
    ``x`` to its parent (-1 at roots), ``depth[x]`` its distance from the root.
    """

    parent: np.ndarray
    edge: np.ndarray
    depth: np.ndarray


def bfs_forest(n: int, u: np.ndarray, v: np.ndarray, roots: np.ndarray,
               prefer: np.ndarray | None = None) -> Forest:
    """Breadth-first spanning forest of the multigraph with edges ``u[k]–v[k]``.

    Each connected component is rooted at the vertex of ``roots`` that lies in
    it (``roots`` must hold exactly one vertex per component, e.g. from
    :func:`component_roots`). A virtual super-root joined to every root lets
    one C-level ``csgraph.breadth_first_order`` call span all components.
    Self-loops are allowed and never become tree edges; of parallel edges the
    one with the smallest ``prefer`` value (e.g. resistance) is taken.
    """
    m = len(u)
    s = n  # super-root
    rows = np.concatenate([u, v, np.full(len(roots), s)])
    cols = np.concatenate([v, u, roots])
    keep = rows != cols
    adj = coo_matrix((np.ones(int(keep.sum())), (rows[keep], cols[keep])), shape=(n + 1, n + 1)).tocsr()
    _, pred = csgraph.breadth_first_order(adj, s, directed=True, return_predecessors=True)
    parent = pred[:n].copy()
    is_root = (parent == s) | (parent < 0)
    parent[is_root] = np.flatnonzero(is_root)

    # The tree edge of x: any edge joining x and parent[x]; look it up by pair key.
    edge = np.full(n, -1, dtype=np.int64)
    if m:
        lo, hi = np.minimum(u, v), np.maximum(u, v)
        key = lo * (n + 1) + hi
        if prefer is not None:
            by = np.lexsort((prefer, key))
            skey, f0 = np.unique(key[by], return_index=True)
            first = by[f0]
        else:
            skey, first = np.unique(key, return_index=True)
        x = np.flatnonzero(~is_root)
        px = parent[x]
        want = np.minimum(x, px) * (n + 1) + np.maximum(x, px)
        pos = np.searchsorted(skey, want)
        edge[x] = first[pos]

    forest = Forest(parent=parent, edge=edge, depth=np.zeros(n, np.int64))
    forest.depth = accumulate_to_root(forest, np.ones(n, dtype=np.int64))
    return forest


def component_roots(n: int, u: np.ndarray, v: np.ndarray, preferred: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Components of the graph and one root per component.

    The root of a component is the first vertex of ``preferred`` (in its order)
    that lies in it, else its lowest-numbered vertex. Returns (labels, roots).
    """
    adj = coo_matrix((np.ones(len(u)), (u, v)), shape=(n, n))
    k, label = csgraph.connected_components(adj, directed=False)
    root = np.full(k, -1, dtype=np.int64)
    pref = preferred[::-1]  # later writes win, so reverse to let the first preferred win
    root[label[pref]] = pref
    lowest = np.full(k, n, dtype=np.int64)
    np.minimum.at(lowest, label, np.arange(n))
    root = np.where(root < 0, lowest, root)
    return label, root


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
    bounds = np.flatnonzero(np.diff(d_sorted)) + 1
    for level in np.split(order, bounds):
        if depth[level[0]] == 0:
            break
        np.add.at(total, forest.parent[level], total[level])
    return total


def spanning_forest(n: int, u: np.ndarray, v: np.ndarray, weight: np.ndarray, roots: np.ndarray) -> Forest:
    """A minimum-weight spanning forest (Kruskal via csgraph), rooted at ``roots``.

    ``weight`` must be positive. ``Forest.edge`` indexes the given edges; of
    parallel edges the lightest is the candidate. ``roots`` holds one vertex
    per connected component.
    """
    ok = u != v
    lo, hi = np.minimum(u, v)[ok], np.maximum(u, v)[ok]
    idx = np.flatnonzero(ok)
    order = np.lexsort((weight[idx], hi, lo))   # lightest of each parallel bundle first
    lo, hi, idx = lo[order], hi[order], idx[order]
    if len(idx) == 0:
        return bfs_forest(n, u[:0], v[:0], roots)
    first = np.r_[True, (lo[1:] != lo[:-1]) | (hi[1:] != hi[:-1])]
    lo, hi, idx = lo[first], hi[first], idx[first]
    mst = csgraph.minimum_spanning_tree(coo_matrix((weight[idx], (lo, hi)), shape=(n, n))).tocoo()
    key = lo * n + hi
    tkey = np.minimum(mst.row, mst.col).astype(np.int64) * n + np.maximum(mst.row, mst.col)
    sk = np.argsort(key)
    tree = idx[sk[np.searchsorted(key[sk], tkey)]]
    f = bfs_forest(n, u[tree], v[tree], roots)
    f.edge = np.where(f.edge >= 0, tree[np.maximum(f.edge, 0)], -1)
    return f


def least_resistance_forest(topo: Topology, roots: np.ndarray) -> Forest:
    """A spanning forest of the branches that prefers low resistance.

    Used when the loop equations of a shallow tree are ill-conditioned: with
    the high-resistance branches as chords, each appears in one loop only and
    the loop matrix stays diagonally dominant. Current sources are taken last.
    Weights are ranks, so zero resistances need no special case.
    """
    nb = topo.n_branches
    weight = np.empty(nb)
    weight[np.argsort(topo.br_r, kind="stable")] = np.arange(1, nb + 1)
    weight[topo.br_cs] = nb + 1.0
    return spanning_forest(topo.n_nodes, topo.br_u, topo.br_v, weight, roots)


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
