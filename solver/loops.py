"""Choosing the loops of the mesh equations.

Two methods, both giving an independent and complete set of loops (a cycle
basis of the circuit graph after wires are merged):

* :func:`window_loops` — when every point has a position and no two parts
  cross, the windows (bounded faces) of the drawing, each traversed clockwise
  on screen, as a person draws mesh currents by hand. Faces are found from
  the positions alone: sort each point's segments by angle and follow
  half-edges (the rotation-system face tracing of planar embeddings, e.g.
  de Berg et al., *Computational Geometry*, 3rd ed., ch. 2 on doubly-connected
  edge lists).
* :func:`fundamental_loops` — otherwise, the fundamental loops of a
  breadth-first spanning tree (each chord closed through the tree; short
  loops because BFS trees are shallow; Kirchhoff 1847, see also
  Deo, *Graph Theory with Applications*, 1974, §4.6).

Both return a :class:`LoopSet`: the loop-branch incidence matrix ``B``
(rows loops, columns branches, +1 where the loop runs from the branch's
first terminal to its second) and what is needed to list each loop's parts
in order lazily.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.sparse import coo_matrix, csgraph, csr_matrix

from .graph import Forest, Topology

__all__ = ["LoopSet", "window_loops", "fundamental_loops", "segments_cross"]


@dataclass
class LoopSet:
    """Loops as a sparse incidence matrix plus ordered membership.

    ``B`` is (loops × branches). ``entries`` holds, per loop, its
    ``(branch, sign)`` pairs in traversal order as three arrays sorted by
    loop: ``loop``, ``branch``, ``sign``. ``clockwise[l]`` is +1 if loop ``l``
    runs clockwise on screen, -1 anticlockwise, 0 unknown.
    """

    method: str
    B: csr_matrix
    loop: np.ndarray
    branch: np.ndarray
    sign: np.ndarray
    clockwise: np.ndarray

    @property
    def n_loops(self) -> int:
        return self.B.shape[0]

    def flip(self, mask: np.ndarray) -> None:
        """Reverse the direction of the loops in ``mask`` (their order and signs)."""
        if not mask.any():
            return
        flip_rows = np.where(mask, -1.0, 1.0)
        self.B = csr_matrix(self.B.multiply(flip_rows[:, None]))
        sel = mask[self.loop]
        self.sign = np.where(sel, -self.sign, self.sign)
        # reverse traversal order inside flipped loops
        pos = np.arange(len(self.loop))
        key = np.where(sel, -pos, pos)
        order = np.lexsort((key, self.loop))
        self.loop, self.branch, self.sign = self.loop[order], self.branch[order], self.sign[order]
        self.clockwise = np.where(mask, -self.clockwise, self.clockwise)


def cycle_space_dimension(topo: Topology) -> int:
    """Number of independent loops: branches − nodes + components (Kirchhoff)."""
    n = topo.n_nodes
    adj = coo_matrix((np.ones(topo.n_branches), (topo.br_u, topo.br_v)), shape=(n, n))
    k, _ = csgraph.connected_components(adj, directed=False)
    return topo.n_branches - n + k


def _orient(ax, ay, bx, by, cx, cy):
    return np.sign((bx - ax) * (cy - ay) - (by - ay) * (cx - ax))


def _grid_segments_cross(p: np.ndarray, q: np.ndarray) -> bool | None:
    """Crossing test for horizontal/vertical segments with integer ends, or None if not such.

    Two such segments can only meet at integer points, so it is enough to
    list the integer points inside each segment: a drawing has a crossing,
    overlap or T-touch exactly when some segment's inner point is also a
    point of another segment. (End points are unique per point, checked by
    the caller.)
    """
    if not (np.all(p == np.round(p)) and np.all(q == np.round(q))):
        return None
    d = q - p
    if np.any((d[:, 0] != 0) & (d[:, 1] != 0)):
        return None
    length = np.abs(d).sum(axis=1).astype(np.int64)
    inner = np.maximum(length - 1, 0)
    total = int(inner.sum())
    if total > 50 * len(p) + 1_000_000:
        return None
    pi = p.astype(np.int64)
    lo = pi.min(axis=0)
    span = int((np.maximum(p, q).astype(np.int64) - lo).max()) + 1
    key_of = lambda xy: (xy[:, 0] - lo[0]) * span + (xy[:, 1] - lo[1])  # noqa: E731
    seg = np.repeat(np.arange(len(p)), inner)
    k = 1 + np.arange(total) - np.repeat(np.cumsum(inner) - inner, inner)
    step = np.sign(d).astype(np.int64)
    pts = pi[seg] + step[seg] * k[:, None]
    inner_keys = key_of(pts)
    if len(np.unique(inner_keys)) != total:
        return True
    ends = np.unique(np.concatenate([key_of(pi), key_of(q.astype(np.int64))]))
    return bool(np.isin(inner_keys, ends).any())


def segments_cross(p: np.ndarray, q: np.ndarray, ia: np.ndarray, ib: np.ndarray) -> bool:
    """True if any two segments meet anywhere but at a shared end point.

    ``p``/``q`` are (n, 2) end coordinates and ``ia``/``ib`` the point ids of
    the ends. Segments that overlap along a line, or where an end lies on
    another segment's interior, count as crossing. Candidate pairs come from a
    uniform grid hash of bounding boxes, so the cost is near linear for
    drawings made of short segments; the exact test uses orientation signs.
    """
    n = len(p)
    if n < 2:
        return False
    fast = _grid_segments_cross(p, q)
    if fast is not None:
        return fast
    lo = np.minimum(p, q)
    hi = np.maximum(p, q)
    length = np.hypot(*(q - p).T)
    h = float(np.median(length)) or 1.0
    c0 = np.floor(lo / h).astype(np.int64)
    c1 = np.floor(hi / h).astype(np.int64)
    span = (c1 - c0 + 1)
    count = span[:, 0] * span[:, 1]
    total = int(count.sum())
    if total > 40_000_000:
        return True  # unreasonable geometry: let the caller use fundamental loops
    seg = np.repeat(np.arange(n), count)
    k = np.arange(total) - np.repeat(np.cumsum(count) - count, count)
    cx = c0[seg, 0] + k % span[seg, 0]
    cy = c0[seg, 1] + k // span[seg, 0]
    cx -= cx.min()
    cy -= cy.min()
    cell = cx * (int(cy.max()) + 1) + cy
    order = np.lexsort((seg, cell))
    cell, seg = cell[order], seg[order]
    start = np.flatnonzero(np.r_[True, cell[1:] != cell[:-1]])
    end = np.r_[start[1:], len(cell)]
    group_end = np.repeat(end, end - start)
    pos = np.arange(len(cell))
    npairs = group_end - pos - 1
    i = np.repeat(pos, npairs)
    j = i + 1 + (np.arange(int(npairs.sum())) - np.repeat(np.cumsum(npairs) - npairs, npairs))
    s, t = seg[i], seg[j]
    if len(s) == 0:
        return False
    pair = np.unique(np.minimum(s, t) * n + np.maximum(s, t))
    s, t = pair // n, pair % n
    # bounding boxes must touch
    touch = np.all(lo[s] <= hi[t], axis=1) & np.all(lo[t] <= hi[s], axis=1)
    s, t = s[touch], t[touch]
    if len(s) == 0:
        return False
    P1, P2, Q1, Q2 = p[s], q[s], p[t], q[t]
    o1 = _orient(*P1.T, *P2.T, *Q1.T)
    o2 = _orient(*P1.T, *P2.T, *Q2.T)
    o3 = _orient(*Q1.T, *Q2.T, *P1.T)
    o4 = _orient(*Q1.T, *Q2.T, *P2.T)
    collinear = (o1 == 0) & (o2 == 0)
    meet = (o1 * o2 <= 0) & (o3 * o4 <= 0)
    # collinear pairs: do the 1-D projections overlap in more than a point?
    d = P2 - P1
    tq1 = np.einsum("ij,ij->i", Q1 - P1, d)
    tq2 = np.einsum("ij,ij->i", Q2 - P1, d)
    dd = np.einsum("ij,ij->i", d, d)
    overlap = (np.maximum(tq1, tq2) > 0) & (np.minimum(tq1, tq2) < dd)
    shared = (ia[s] == ia[t]) | (ia[s] == ib[t]) | (ib[s] == ia[t]) | (ib[s] == ib[t])
    bad_shared = shared & collinear & overlap
    bad_apart = ~shared & np.where(collinear, overlap | ((tq1 == 0) | (tq1 == dd) | (tq2 == 0) | (tq2 == dd)), meet)
    return bool(np.any(bad_shared | bad_apart))


def window_loops(topo: Topology) -> LoopSet | None:
    """The windows of the drawing as clockwise loops, or None when they cannot be used.

    None when a point lacks a position, two points share a position, two
    segments cross, or the faces do not form a complete set of loops (e.g.
    wires tied between distant points).
    """
    pos = topo.circuit.positions
    if topo.n_branches == 0:
        return None
    geo = np.concatenate([topo.branch_parts, topo.conductor_parts])
    pa, pb = topo.part_a[geo], topo.part_b[geo]
    used = np.unique(np.concatenate([pa, pb]))
    names = topo.point_names
    if any(names[i] not in pos for i in used):
        return None
    xy = np.full((topo.n_points, 2), np.nan)
    xy[used] = [pos[names[i]] for i in used]
    if len(np.unique(xy[used], axis=0)) != len(used):
        return None
    if segments_cross(xy[pa], xy[pb], pa, pb):
        return None

    m = len(geo)
    # half-edge 2e runs a->b, 2e+1 runs b->a
    origin = np.empty(2 * m, np.int64)
    origin[0::2], origin[1::2] = pa, pb
    dest = np.empty(2 * m, np.int64)
    dest[0::2], dest[1::2] = pb, pa
    d = xy[dest] - xy[origin]
    angle = np.arctan2(d[:, 1], d[:, 0])
    order = np.lexsort((angle, origin))           # around each point by increasing angle
    rank = np.empty(2 * m, np.int64)
    rank[order] = np.arange(2 * m)
    o_sorted = origin[order]
    first = np.searchsorted(o_sorted, o_sorted, side="left")
    deg = np.searchsorted(o_sorted, o_sorted, side="right") - first
    # next(h) = the half-edge just before twin(h) in angular order around dest(h)
    twin = np.arange(2 * m) ^ 1
    rt = rank[twin]
    start_t, deg_t = first[rt], deg[rt]
    nxt = order[start_t + (rt - start_t - 1) % deg_t]
    ncomp, face = csgraph.connected_components(
        coo_matrix((np.ones(2 * m), (np.arange(2 * m), nxt)), shape=(2 * m, 2 * m)), connection="weak")
    cross = xy[origin, 0] * xy[dest, 1] - xy[dest, 0] * xy[origin, 1]
    area = np.bincount(face, weights=cross, minlength=ncomp) / 2.0
    scale = np.bincount(face, weights=np.abs(cross), minlength=ncomp) + 1e-300
    bounded = area > 1e-12 * scale        # positive with y down = clockwise on screen

    # Euler's formula per geometric component: bounded faces = E - V + C.
    gadj = coo_matrix((np.ones(m), (pa, pb)), shape=(topo.n_points, topo.n_points))
    gk, glabel = csgraph.connected_components(gadj, directed=False)
    isolated = topo.n_points - len(used)
    if int(bounded.sum()) != m - len(used) + (gk - isolated):
        return None

    # Branch incidence of each bounded face; conductors carry no term.
    nb = topo.n_branches
    he = np.arange(2 * m)
    e = he >> 1
    is_branch = e < nb
    keep = bounded[face] & is_branch
    face_id = np.cumsum(bounded) - 1
    rows = face_id[face[keep]]
    cols = e[keep]
    vals = np.where(he[keep] & 1, -1.0, 1.0)
    B = csr_matrix(coo_matrix((vals, (rows, cols)), shape=(int(bounded.sum()), nb)))
    B.eliminate_zeros()
    nonempty = np.diff(B.indptr) > 0
    if int(nonempty.sum()) != cycle_space_dimension(topo):
        return None
    B = B[nonempty]

    # Traversal order: follow next() from the lowest half-edge of each face.
    loop_of_face = np.full(ncomp, -1, np.int64)
    loop_of_face[np.flatnonzero(bounded)[nonempty]] = np.arange(int(nonempty.sum()))
    step = _cycle_positions(nxt, face, ncomp)
    sel = (loop_of_face[face] >= 0) & is_branch
    # drop branches that cancel (a dangling branch walked both ways)
    lf = loop_of_face[face[sel]]
    br = e[sel]
    sg = np.where(he[sel] & 1, -1, 1)
    keep2 = np.asarray(B[lf, br]).ravel() != 0
    ordr = np.lexsort((step[sel][keep2], lf[keep2]))
    loop = lf[keep2][ordr]
    branch = br[keep2][ordr]
    sign = sg[keep2][ordr]
    # a branch walked both ways cancels in B; keep only the first walk
    key = loop * (nb + 1) + branch
    _, firstk = np.unique(key, return_index=True)
    firstk.sort()
    return LoopSet("windows", B, loop[firstk], branch[firstk], sign[firstk],
                   np.ones(B.shape[0], np.int64))


def _cycle_positions(nxt: np.ndarray, face: np.ndarray, nfaces: int) -> np.ndarray:
    """Position of each element along its cycle of the permutation ``nxt``.

    Counted from the lowest-numbered element of the cycle, by pointer jumping
    (O(n log n), no Python loop per element).
    """
    n = len(nxt)
    start = np.full(nfaces, n, np.int64)
    np.minimum.at(start, face, np.arange(n))
    is_start = np.zeros(n, bool)
    is_start[start] = True
    # distance to the start going forward: jump until we hit the start
    dist = np.where(is_start, 0, 1).astype(np.int64)
    ptr = np.where(is_start, np.arange(n), nxt)
    while True:
        done = is_start[ptr]
        if done.all():
            break
        ptr2 = np.where(done, ptr, ptr[ptr])
        dist = np.where(done, dist, dist + dist[ptr])
        ptr = ptr2
    length = np.bincount(face, minlength=nfaces)
    return (length[face] - dist) % length[face]


def fundamental_loops(topo: Topology, forest: Forest, tree_branch: np.ndarray) -> LoopSet:
    """Fundamental loops of a spanning forest: each chord closed through the tree.

    ``forest`` spans the nodes; ``tree_branch[x]`` is the branch joining node
    ``x`` to its parent (-1 at roots). Every branch not in the tree is a chord;
    its loop runs along the chord from its first terminal to its second, then
    back through the tree. All chords are walked together, one tree step per
    round, so the cost is (depth × chords) in numpy, not in Python.
    """
    nb = topo.n_branches
    in_tree = np.zeros(nb, bool)
    in_tree[tree_branch[tree_branch >= 0]] = True
    chords = np.flatnonzero(~in_tree)
    L = len(chords)
    loops = [np.arange(L)]
    branches = [chords]
    signs = [np.ones(L, np.int64)]
    steps = [np.zeros(L, np.int64)]
    x = topo.br_v[chords].copy()   # walking up from the chord's second terminal…
    y = topo.br_u[chords].copy()   # …and from its first, to meet in the middle
    active = np.flatnonzero(x != y)
    depth, parent = forest.depth, forest.parent
    step = 1
    side_a: list[tuple[np.ndarray, np.ndarray, np.ndarray, int]] = []
    while len(active):
        xa, ya = x[active], y[active]
        up_x = depth[xa] >= depth[ya]
        # side b (from x): traversing x -> parent(x)
        ix = active[up_x]
        bx = tree_branch[x[ix]]
        loops.append(ix)
        branches.append(bx)
        signs.append(np.where(topo.br_u[bx] == x[ix], 1, -1))
        steps.append(np.full(len(ix), step))
        x[ix] = parent[x[ix]]
        # side a (from y): walked later in reverse, parent(y) -> y
        iy = active[~up_x]
        by = tree_branch[y[iy]]
        side_a.append((iy, by, np.where(topo.br_u[by] == parent[y[iy]], 1, -1), step))
        y[iy] = parent[y[iy]]
        active = active[x[active] != y[active]]
        step += 1
    big = 2 * step + 1
    for iy, by, sy, st in side_a:
        loops.append(iy)
        branches.append(by)
        signs.append(sy)
        steps.append(np.full(len(iy), big - st))
    loop = np.concatenate(loops)
    branch = np.concatenate(branches)
    sign = np.concatenate(signs)
    order = np.lexsort((np.concatenate(steps), loop))
    loop, branch, sign = loop[order], branch[order], sign[order]
    B = csr_matrix(coo_matrix((sign.astype(float), (loop, branch)), shape=(L, nb)))
    return LoopSet("fundamental", B, loop, branch, sign, np.zeros(L, np.int64))


def orient_clockwise(loops: LoopSet, topo: Topology) -> None:
    """Turn loops clockwise on screen where every node on them has a position.

    A node's position is that of its first placed point; the loop's polygon
    through its nodes gives the sense by the shoelace formula.
    """
    pos = topo.circuit.positions
    nxy = np.full((topo.n_nodes, 2), np.nan)
    for p, i in topo.point_index.items():
        if p in pos:
            node = topo.node_of_point[i]
            if np.isnan(nxy[node, 0]):
                nxy[node] = pos[p]
    u = np.where(loops.sign > 0, topo.br_u[loops.branch], topo.br_v[loops.branch])
    v = np.where(loops.sign > 0, topo.br_v[loops.branch], topo.br_u[loops.branch])
    cross = nxy[u, 0] * nxy[v, 1] - nxy[v, 0] * nxy[u, 1]
    L = loops.n_loops
    known = np.ones(L, bool)
    np.logical_and.at(known, loops.loop, np.isfinite(cross))
    area = np.bincount(loops.loop, weights=np.nan_to_num(cross), minlength=L)
    sense = np.where(known & (area > 0), 1, np.where(known & (area < 0), -1, 0))
    loops.clockwise = sense
    loops.flip(sense < 0)
