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

Both return a :class:`LoopSet`: the entries of the loop-branch incidence
matrix B (rows loops, columns branches, +1 where the loop runs from the
branch's first terminal to its second) and what is needed to list each
loop's parts in order lazily. B is kept as plain entry arrays, not as a
scipy matrix: on sketch-sized circuits building and checking a sparse matrix
costs more than all the sums made over it.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from scipy.sparse import csr_matrix

from .graph import Forest, Topology, bfs_forest, canonical_csr, components, spanning_forest

__all__ = ["LoopSet", "window_loops", "fundamental_loops", "orient_clockwise", "crossing_mask"]


@dataclass
class LoopSet:
    """Loops as the entries of their incidence matrix plus ordered membership.

    ``n_loops`` loops; the incidence matrix B (loops × branches) has its
    non-zero entries in ``b_loop``, ``b_branch`` and ``b_value``, row by row
    with the branches ascending in each row (the storage order of a
    canonical CSR matrix, so sums over them add in scipy's order).
    ``loop``, ``branch`` and ``sign`` list each loop's ``(branch, sign)``
    pairs in traversal order, sorted by loop. ``clockwise[l]`` is +1 if loop
    ``l`` runs clockwise on screen, -1 anticlockwise, 0 unknown.

    ``members`` is kept by :attr:`Solution.loops`: each loop's ``(name, sign)``
    parts and orientation word, with the part names they were read from. A
    loop set of a kept shape serves many solves of circuits with the same part
    names, so their loops are listed once; :meth:`flip` forgets them.
    """

    method: str
    n_loops: int
    b_loop: np.ndarray
    b_branch: np.ndarray
    b_value: np.ndarray
    loop: np.ndarray
    branch: np.ndarray
    sign: np.ndarray
    clockwise: np.ndarray
    members: tuple | None = field(default=None, repr=False, compare=False)

    def matrix(self, nb: int) -> csr_matrix:
        """B as a scipy CSR matrix over ``nb`` branches (for the sparse solve of large systems)."""
        indptr = np.zeros(self.n_loops + 1, dtype=np.int32)
        np.cumsum(np.bincount(self.b_loop, minlength=self.n_loops), out=indptr[1:])
        return canonical_csr(self.b_value, self.b_branch.astype(np.int32), indptr, (self.n_loops, nb))

    def flip(self, mask: np.ndarray) -> None:
        """Reverse the direction of the loops in ``mask`` (their order and signs)."""
        self.members = None
        if not mask.any():
            return
        self.b_value = self.b_value * np.where(mask, -1.0, 1.0)[self.b_loop]
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
    return topo.n_branches - topo.n_nodes + len(topo.island_first)


def _orient(ax, ay, bx, by, cx, cy):
    return np.sign((bx - ax) * (cy - ay) - (by - ay) * (cx - ax))


def _grid_crossings(p: np.ndarray, q: np.ndarray) -> np.ndarray | None:
    """Crossing mask for horizontal/vertical segments with integer ends, or None if not such.

    Two such segments can only meet at integer points, so it is enough to
    list the integer points inside each segment: a segment is in a crossing,
    overlap or T-touch exactly when one of its inner points is also a point
    of another segment, or another segment's inner point is its end. (End
    points are unique per point, checked by the caller.)
    """
    n = len(p)
    ends = np.concatenate([p, q])   # first ends, then second ends
    if not np.all(ends == np.round(ends)):
        return None
    d = q - p
    if np.any((d[:, 0] != 0) & (d[:, 1] != 0)):
        return None
    inner = np.maximum(np.abs(d).sum(axis=1).astype(np.int64) - 1, 0)
    total = int(inner.sum())
    if total > 50 * n + 1_000_000:
        return None
    ends = ends.astype(np.int64)
    ends -= ends.min(axis=0)
    span = int(ends.max()) + 1
    end_keys = ends[:, 0] * span + ends[:, 1]   # one key per grid point
    step = np.sign(d).astype(np.int64)
    seg = np.repeat(np.arange(n), inner)
    k = 1 + np.arange(total) - np.repeat(np.cumsum(inner) - inner, inner)
    inner_keys = end_keys[seg] + (step[:, 0] * span + step[:, 1])[seg] * k   # key of p + k·step
    mask = np.zeros(n, bool)
    if total == 0:
        return mask
    # All points, inner ones first, grouped by key in one sort: an inner point is in a crossing
    # when its key occurs again (inner or end), an end when its key occurs as an inner point.
    keys = np.concatenate([inner_keys, end_keys])
    owner = np.concatenate([seg, np.arange(n), np.arange(n)])
    order = np.argsort(keys)
    sk = keys[order]
    start = np.ones(len(sk), bool)
    start[1:] = sk[1:] != sk[:-1]
    group = np.cumsum(start) - 1
    inner_first = order < total
    n_inner = np.bincount(group, weights=inner_first)
    n_all = np.bincount(group)
    hit = np.where(inner_first, n_all[group] > 1, n_inner[group] > 0)
    mask[owner[order[hit]]] = True
    return mask


def crossing_mask(p: np.ndarray, q: np.ndarray, ia: np.ndarray, ib: np.ndarray) -> np.ndarray:
    """Which segments meet another anywhere but at a shared end point.

    ``p``/``q`` are (n, 2) end coordinates and ``ia``/``ib`` the point ids of
    the ends. Segments that overlap along a line, or where an end lies on
    another segment's interior, count as crossing. Candidate pairs come from a
    uniform grid hash of bounding boxes, so the cost is near linear for
    drawings made of short segments; the exact test uses orientation signs.
    """
    n = len(p)
    mask = np.zeros(n, bool)
    if n < 2:
        return mask
    fast = _grid_crossings(p, q)
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
        mask[:] = True  # unreasonable geometry: let the caller use fundamental loops
        return mask
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
        return mask
    pair = np.unique(np.minimum(s, t) * n + np.maximum(s, t))
    s, t = pair // n, pair % n
    touch = np.all(lo[s] <= hi[t], axis=1) & np.all(lo[t] <= hi[s], axis=1)
    s, t = s[touch], t[touch]
    if len(s) == 0:
        return mask
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
    bad = bad_shared | bad_apart
    mask[s[bad]] = True
    mask[t[bad]] = True
    return mask


def window_loops(topo: Topology) -> LoopSet | None:
    """The windows of the drawing as clockwise loops, or None when they cannot be used.

    Wires and closed switches drawn across other parts (and ties between
    points with no drawn path, such as several ground symbols) are left out
    of the drawing; each one that closes a loop adds the loop through the
    drawing's tree, oriented clockwise where it can be. None when a point
    lacks a position, two points share a position, two branches cross, or
    the loops found do not form a complete set.
    """
    pos = topo.circuit.positions
    if topo.n_branches == 0:
        return None
    nb = topo.n_branches
    geo = np.concatenate([topo.branch_parts, topo.conductor_parts])
    pa, pb = topo.part_a[geo], topo.part_b[geo]
    used = _used_points(topo.n_points, pa, pb)
    names = [topo.point_names[i] for i in used.tolist()]
    if any(name not in pos for name in names):
        return None
    xy = np.full((topo.n_points, 2), np.nan)
    xy[used] = [pos[name] for name in names]
    at = np.sort(xy[used, 0] + 1j * xy[used, 1])   # positions as complex numbers, sorted by x then y
    if np.any(at[1:] == at[:-1]):   # two points at one position
        return None
    crossing = crossing_mask(xy[pa], xy[pb], pa, pb)
    lifted = np.zeros(len(geo), bool)
    lifted[nb:] = crossing[nb:]
    if lifted.any():
        keep = ~lifted
        if crossing_mask(xy[pa[keep]], xy[pb[keep]], pa[keep], pb[keep]).any():
            return None
    elif crossing.any():
        return None
    # A ring of conductors would make faces that differ only by wires; keep a
    # spanning forest of the drawn conductors and lift the ring closers too
    # (their ends are joined anyway, so they close no loop of their own).
    # The drawing's connected pieces are the islands unless conductors are lifted.
    dc = np.flatnonzero(~lifted[nb:])
    if len(dc) == len(topo.conductor_parts):
        cforest = topo.conductor_forest   # the same forest: over all conductors, from each node's lowest point
        piece_of_point = topo.island[topo.node_of_point]
    else:
        ca, cb = pa[nb + dc], pb[nb + dc]
        cforest = bfs_forest(topo.n_points, ca, cb, components(topo.n_points, ca, cb)[1])
        piece_of_point, _ = components(topo.n_points, np.concatenate([pa[:nb], ca]), np.concatenate([pb[:nb], cb]))
    ring = np.ones(len(dc), bool)
    ring[cforest.edge[cforest.edge >= 0]] = False
    lifted[nb + dc[ring]] = True
    drawn = np.flatnonzero(~lifted)
    faces = _faces(topo, xy, pa[drawn], pb[drawn], np.minimum(drawn, nb), piece_of_point)
    if faces is None:
        return None
    parts = [_isolate_shorted(faces, topo)]
    if lifted.any():
        ties = _tie_loops(topo, topo.conductor_parts[lifted[nb:]], geo[nb:][~lifted[nb:]], xy)
        parts.append(ties)
    loops = _concat(parts, nb)
    if loops.n_loops != cycle_space_dimension(topo):
        return None
    return loops


def _used_points(n: int, pa: np.ndarray, pb: np.ndarray) -> np.ndarray:
    """The points (ascending) that are an end of some segment ``pa[k]–pb[k]``."""
    used = np.zeros(n, bool)
    used[pa] = True
    used[pb] = True
    return np.flatnonzero(used)


def _faces(topo: Topology, xy: np.ndarray, pa: np.ndarray, pb: np.ndarray, branch_of: np.ndarray,
           piece_of_point: np.ndarray) -> LoopSet | None:
    """Bounded faces of a crossing-free straight-line drawing as clockwise loops.

    ``pa``/``pb`` are the point ids of the segments; ``branch_of[e]`` is the
    branch of segment ``e``, or ``nb`` for a conductor (no term);
    ``piece_of_point`` labels the connected pieces of the drawing. Faces are
    traced with half-edges sorted by angle around each point; Euler's formula
    (bounded faces = E − V + C) confirms the drawing is planar as given.
    """
    nb = topo.n_branches
    m = len(pa)
    used = _used_points(topo.n_points, pa, pb)
    origin = np.empty(2 * m, np.int64)
    origin[0::2], origin[1::2] = pa, pb          # half-edge 2e runs a->b, 2e+1 runs b->a
    dest = np.empty(2 * m, np.int64)
    dest[0::2], dest[1::2] = pb, pa
    d = xy[dest] - xy[origin]
    angle = np.arctan2(d[:, 1], d[:, 0])
    order = np.lexsort((angle, origin))           # around each point by increasing angle
    rank = np.empty(2 * m, np.int64)
    rank[order] = np.arange(2 * m)
    o_sorted = origin[order]
    degree = np.bincount(origin, minlength=topo.n_points)
    first = (np.cumsum(degree) - degree)[o_sorted]   # where each point's half-edges start in ``order``
    deg = degree[o_sorted]
    # next(h) = the half-edge just before twin(h) in angular order around dest(h)
    rt = rank[np.arange(2 * m) ^ 1]
    start_t, deg_t = first[rt], deg[rt]
    nxt = order[start_t + (rt - start_t - 1) % deg_t]
    # The faces are the cycles of the permutation nxt, each numbered in order of its lowest half-edge.
    face, ncomp, position = _cycles(nxt)
    cross = xy[origin, 0] * xy[dest, 1] - xy[dest, 0] * xy[origin, 1]
    area = np.bincount(face, weights=cross, minlength=ncomp) / 2.0
    scale = np.bincount(face, weights=np.abs(cross), minlength=ncomp) + 1e-300
    bounded = area > 1e-12 * scale        # positive with y down = clockwise on screen

    # Euler's formula over the drawing's own pieces.
    pieces = np.count_nonzero(np.bincount(piece_of_point[used]))
    if int(bounded.sum()) != m - len(used) + pieces:
        return None

    e = np.arange(2 * m) >> 1
    br = branch_of[e]
    is_branch = br < nb
    fb = np.flatnonzero(bounded)
    face_row = np.full(ncomp, -1, np.int64)
    face_row[fb] = np.arange(len(fb))
    sel = bounded[face] & is_branch
    rows = face_row[face[sel]]
    sg = np.where(np.arange(2 * m)[sel] & 1, -1, 1)
    step = position[sel]
    return _from_entries("windows", rows, br[sel], sg, step, len(fb), nb, clockwise=1)


def _isolate_shorted(ls: LoopSet, topo: Topology) -> LoopSet:
    """Keep a shorted branch (both ends on one node) in its own window only.

    A branch shorted by wires bounds a window made of itself and those wires;
    the window on its other side would carry it too, so its current would be a
    difference of two loop currents, exact only to rounding. Dropping it from
    the other window (which is that window merged with the shorted one, the
    same loop electrically) leaves its current exactly its own loop current.
    """
    shorted = topo.br_u == topo.br_v
    sel = shorted[ls.branch]
    if not sel.any():
        return ls
    nnz = np.bincount(ls.b_loop, minlength=ls.n_loops)
    pure_row = np.full(topo.n_branches, -1, np.int64)
    lone = sel & (nnz[ls.loop] == 1)
    pure_row[ls.branch[lone]] = ls.loop[lone]
    drop = sel & (pure_row[ls.branch] >= 0) & (pure_row[ls.branch] != ls.loop)
    if not drop.any():
        return ls
    keep = ~drop
    loop, branch, sign = ls.loop[keep], ls.branch[keep], ls.sign[keep]
    b_loop, b_branch, b_value, _ = _incidence(loop, branch, sign, topo.n_branches)
    return LoopSet(ls.method, ls.n_loops, b_loop, b_branch, b_value, loop, branch, sign, ls.clockwise)


def _incidence(loop: np.ndarray, branch: np.ndarray, sign: np.ndarray,
               nb: int) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The loop-branch incidence matrix of (loop, branch, sign) entries, and which entries it keeps.

    Returns the matrix's (loop, branch, value) entries and the mask of kept
    entries. Entries for the same loop and branch are summed and zero sums
    dropped, leaving the entries in canonical CSR order (row by row, each
    row's columns ascending), as scipy would store them from COO; an entry
    is kept when its sum is not zero.
    """
    key = loop * nb + branch
    order = np.argsort(key, kind="stable")
    skey = key[order]
    new = np.ones(len(skey), bool)
    new[1:] = skey[1:] != skey[:-1]
    group = np.cumsum(new) - 1
    total = np.bincount(group, weights=sign[order], minlength=int(new.sum()))
    kept = np.empty(len(key), bool)
    kept[order] = total[group] != 0
    nonzero = total != 0
    rows, cols = np.divmod(skey[new][nonzero], max(nb, 1))
    return rows, cols, total[nonzero], kept


def _from_entries(method: str, loop: np.ndarray, branch: np.ndarray, sign: np.ndarray,
                  step: np.ndarray, n_loops: int, nb: int, clockwise: int) -> LoopSet:
    """A LoopSet from (loop, branch, sign, step) entries; drops cancelling and empty loops.

    A branch walked both ways in one loop (a dangling branch inside a window)
    cancels; a loop with no branch left (only wires) is dropped.
    """
    b_loop, b_branch, b_value, kept = _incidence(loop, branch, sign, nb)
    nonempty = np.bincount(b_loop, minlength=n_loops) > 0
    new_id = np.cumsum(nonempty) - 1
    keep = kept & nonempty[loop]
    loop, branch, sign, step = new_id[loop[keep]], branch[keep], sign[keep], step[keep]
    order = np.lexsort((step, loop))
    loop, branch, sign = loop[order], branch[order], sign[order]
    # a branch met twice the same way: keep its first entry
    key = loop * (nb + 1) + branch
    by = np.argsort(key, kind="stable")
    first = np.ones(len(key), bool)
    first[1:] = key[by][1:] != key[by][:-1]
    firstk = np.sort(by[first])
    n_kept = int(np.count_nonzero(nonempty))
    return LoopSet(method, n_kept, new_id[b_loop], b_branch, b_value, loop[firstk], branch[firstk], sign[firstk],
                   np.full(n_kept, clockwise, np.int64))


def _concat(sets: list[LoopSet], nb: int) -> LoopSet:
    """Several loop sets as one (loops renumbered in order)."""
    if len(sets) == 1:
        return sets[0]
    offset = np.cumsum([0] + [ls.n_loops for ls in sets[:-1]])
    return LoopSet(
        sets[0].method,
        sum(ls.n_loops for ls in sets),
        np.concatenate([ls.b_loop + o for ls, o in zip(sets, offset)]),
        np.concatenate([ls.b_branch for ls in sets]),
        np.concatenate([ls.b_value for ls in sets]),
        np.concatenate([ls.loop + o for ls, o in zip(sets, offset)]),
        np.concatenate([ls.branch for ls in sets]),
        np.concatenate([ls.sign for ls in sets]),
        np.concatenate([ls.clockwise for ls in sets]),
    )


def _tie_loops(topo: Topology, ties: np.ndarray, drawn_conductors: np.ndarray, xy: np.ndarray) -> LoopSet:
    """Loops closed by conductors that are not part of the drawing (ties).

    Nodes are formed by the drawn conductors only. A spanning forest over
    branches and ties that takes ties only to join islands leaves the other
    ties as chords; each closes the loop tie → tree path back, which is
    oriented clockwise on screen by the shoelace sum of its points.
    """
    nb, npnt = topo.n_branches, topo.n_points
    ca, cb = topo.part_a[drawn_conductors], topo.part_b[drawn_conductors]
    lab, lowest = components(npnt, ca, cb)
    nn = len(lowest)
    pa_b = topo.part_a[topo.branch_parts]
    pb_b = topo.part_b[topo.branch_parts]
    eu = np.concatenate([lab[pa_b], lab[topo.part_a[ties]]])   # edges: branches, then ties
    ev = np.concatenate([lab[pb_b], lab[topo.part_b[ties]]])
    weight = np.r_[np.ones(nb), np.full(len(ties), 2.0)]
    _, roots = components(nn, eu, ev)
    forest = spanning_forest(nn, eu, ev, weight, roots)
    in_tree = np.zeros(len(eu), bool)
    in_tree[forest.edge[forest.edge >= 0]] = True
    chords = nb + np.flatnonzero(~in_tree[nb:])
    chords = chords[eu[chords] != ev[chords]]
    # the loop runs along the tie from a to b, then back from b to a through the tree
    loop, edge, sign, step = _tree_paths(forest, forest.edge, ev[chords], eu[chords], eu)
    is_branch = edge < nb
    ls = _from_entries("windows", loop[is_branch], edge[is_branch], sign[is_branch], step[is_branch],
                       len(chords), nb, clockwise=0)
    if ls.n_loops == 0:
        return ls
    # orientation: shoelace over each branch's ends, closing the gaps (wires, ties) straight
    u = np.where(ls.sign > 0, pa_b[ls.branch], pb_b[ls.branch])
    v = np.where(ls.sign > 0, pb_b[ls.branch], pa_b[ls.branch])
    last = np.r_[ls.loop[1:] != ls.loop[:-1], True]
    first_u = u[np.searchsorted(ls.loop, ls.loop)]
    to = np.where(last, first_u, np.roll(u, -1))
    cross = (xy[u, 0] * xy[v, 1] - xy[v, 0] * xy[u, 1]) + (xy[v, 0] * xy[to, 1] - xy[to, 0] * xy[v, 1])
    sense = np.sign(np.bincount(ls.loop, weights=cross, minlength=ls.n_loops)).astype(np.int64)
    ls.flip(sense < 0)
    ls.clockwise = np.where(sense == 0, 0, 1)
    return ls


def _tree_paths(forest: Forest, tree_branch: np.ndarray, start: np.ndarray, end: np.ndarray,
                br_u: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Tree paths from ``start[k]`` to ``end[k]`` as (path, branch, sign, step) entries.

    All paths are walked together, one tree step per round, so the cost is
    (depth × paths) in numpy, not in Python. Sign +1 where the path runs from
    the branch's first terminal (node ``br_u``) to its second. Steps start at 1.
    """
    x, y = start.copy(), end.copy()
    loops, branches, signs, steps = [], [], [], []
    active = np.flatnonzero(x != y)
    depth, parent = forest.depth, forest.parent
    step = 1
    side_y: list[tuple[np.ndarray, np.ndarray, np.ndarray, int]] = []
    while len(active):
        up_x = depth[x[active]] >= depth[y[active]]
        ix = active[up_x]                          # from the start side: x -> parent(x)
        bx = tree_branch[x[ix]]
        loops.append(ix)
        branches.append(bx)
        signs.append(np.where(br_u[bx] == x[ix], 1, -1))
        steps.append(np.full(len(ix), step))
        x[ix] = parent[x[ix]]
        iy = active[~up_x]                         # from the end side, walked later: parent(y) -> y
        by = tree_branch[y[iy]]
        side_y.append((iy, by, np.where(br_u[by] == parent[y[iy]], 1, -1), step))
        y[iy] = parent[y[iy]]
        active = active[x[active] != y[active]]
        step += 1
    big = 2 * step + 1
    for iy, by, sy, st in side_y:
        loops.append(iy)
        branches.append(by)
        signs.append(sy)
        steps.append(np.full(len(iy), big - st))
    if not loops:
        z = np.zeros(0, np.int64)
        return z, z, z, z
    return (np.concatenate(loops), np.concatenate(branches), np.concatenate(signs), np.concatenate(steps))


def _cycles(nxt: np.ndarray) -> tuple[np.ndarray, int, np.ndarray]:
    """The cycles of the permutation ``nxt``: (cycle of each element, number of cycles, position along it).

    Cycles are numbered in order of their lowest element and positions
    counted from it. By pointer jumping (O(n log n), no Python loop per
    element): after k rounds each element knows the lowest element among its
    next 2^k and how far ahead it lies; when a round finds nothing lower,
    that is the lowest of the whole cycle (following the jumps round a cycle
    the values found can only fall, so they are all equal, and the windows
    cover the cycle).
    """
    n = len(nxt)
    low = np.arange(n)
    ahead = np.zeros(n, np.int64)
    ptr = nxt
    span = 1
    while True:
        cand = low[ptr]
        lower = cand < low
        if not lower.any():
            break
        low = np.where(lower, cand, low)
        ahead = np.where(lower, ahead[ptr] + span, ahead)
        ptr = ptr[ptr]
        span *= 2
    start = low == np.arange(n)
    face = (np.cumsum(start) - 1)[low]
    ncycles = int(np.count_nonzero(start))
    length = np.bincount(face, minlength=ncycles)
    return face, ncycles, (length[face] - ahead) % length[face]


def fundamental_loops(topo: Topology, forest: Forest, tree_branch: np.ndarray) -> LoopSet:
    """Fundamental loops of a spanning forest: each chord closed through the tree.

    ``forest`` spans the nodes; ``tree_branch[x]`` is the branch joining node
    ``x`` to its parent (-1 at roots). Every branch not in the tree is a chord;
    its loop runs along the chord from its first terminal to its second, then
    back through the tree.
    """
    nb = topo.n_branches
    in_tree = np.zeros(nb, bool)
    in_tree[tree_branch[tree_branch >= 0]] = True
    chords = np.flatnonzero(~in_tree)
    L = len(chords)
    loop, branch, sign, step = _tree_paths(forest, tree_branch, topo.br_v[chords], topo.br_u[chords], topo.br_u)
    loop = np.concatenate([np.arange(L), loop])
    branch = np.concatenate([chords, branch])
    sign = np.concatenate([np.ones(L, np.int64), sign])
    step = np.concatenate([np.zeros(L, np.int64), step])
    order = np.lexsort((step, loop))
    loop, branch, sign = loop[order], branch[order], sign[order]
    b_loop, b_branch, b_value, _ = _incidence(loop, branch, sign, nb)
    return LoopSet("fundamental", L, b_loop, b_branch, b_value, loop, branch, sign, np.zeros(L, np.int64))


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
