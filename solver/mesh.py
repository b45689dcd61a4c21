"""Mesh-current (loop-current) analysis: assemble Z·i = e and solve it.

For loops with incidence matrix B (loops × branches), branch resistances R
and EMFs E, KVL around every loop gives (B R Bᵀ)·j = −B·E, where j are the
loop currents and the branch currents follow as Bᵀ·j, so KCL holds by
construction (Maxwell's loop-current method; see e.g. Desoer & Kuh, *Basic
Circuit Theory*, 1969, ch. 10). A current source adds its voltage as an
unknown in every loop through it and one constraint row fixing its current,
so any placement works, supermeshes included:

    [ Z    Bs ] [j]   [ −B·E ]
    [ Bsᵀ  0  ] [w] = [  J   ]

Small systems are assembled from the loop matrix's entries and solved dense
with numpy, large ones assembled by sparse matrix products and solved with a
sparse LU (SuperLU via scipy); never a Python loop per entry.

What follows from the topology alone (the nodes, each island's reference,
the windows of the drawing, the breadth-first tree and its loops) is kept
for the last few circuit shapes solved (:mod:`solver.topocache`, keyed on
every part's kind, name, terminals and switch state, the positions and the
ground), so a re-solve after a value edit skips it. Everything that depends
on a value is worked out on every solve, so the result is the same, bit for
bit, whether or not the shape was kept.
"""
from __future__ import annotations

import numpy as np
import scipy.sparse as sp
from scipy.sparse.linalg import splu

from .checks import check_current_sources, check_ideal_cells
from .circuit import Circuit
from .errors import IllConditionedError, UnknownPartError
from .graph import Topology, accumulate_to_root, component_roots, contract, subtree_sums
from .loops import LoopSet, fundamental_loops, orient_clockwise, window_loops
from .solution import Note, Solution
from .topocache import CACHE, CACHE_MAX_PARTS, Shape, ShapeKey

__all__ = ["solve", "DENSE_LIMIT", "KVL_TOLERANCE"]

DENSE_LIMIT = 400       # unknowns up to which the dense solver is used
KVL_TOLERANCE = 1e-9    # largest relative KVL residual accepted
ROUNDING = 1e-15        # residual allowed per unit of equation terms: double-precision noise
TINY = 1e-300           # results below this are rounding residue and shown as zero
WIDE_SPREAD = 1e3       # resistance ratio above which fundamental loops follow the least-resistance tree


def solve(circuit: Circuit, ground: str | None = None) -> Solution:
    """Solve ``circuit`` by mesh-current analysis.

    Parameters
    ----------
    circuit : Circuit
        The parts and points; positions (``Circuit.place``) let the loops be
        the windows of the drawing.
    ground : str, optional
        The point whose potential is 0 V. Without one, each connected island
        is measured from a point of its own and a note says so.

    Returns
    -------
    Solution

    Raises
    ------
    CircuitError
        With a plain message and ``.parts`` when the circuit has no unique
        solution (shorted ideal cell, unbalanced ideal-cell loop, current
        sources with no return path or in conflicting series) or when the
        equations are too ill-conditioned to trust.

    Example
    -------
    >>> c = Circuit()
    >>> c.cell("B1", plus="a", minus="g", emf=12.0)
    >>> c.resistor("R1", "a", "b", 4.0)
    >>> c.resistor("R2", "b", "g", 2.0)
    >>> round(solve(c, ground="g").potential("b"), 9)
    4.0
    """
    if not isinstance(circuit, Circuit):
        raise TypeError("solve() takes a Circuit")
    key = circuit._shape_key() if len(circuit) <= CACHE_MAX_PARTS and (ground is None or type(ground) is str) \
        else None
    if key is not None:
        key = ShapeKey((key, ground))
    shape = CACHE.get(key) if key is not None else None
    if shape is not None:
        topo = shape.topology(circuit)
        check_ideal_cells(topo)
        check_current_sources(topo)
    else:
        topo = contract(circuit)
        if ground is not None and ground not in topo.point_index:
            raise UnknownPartError(f"There is no point named {ground} to use as ground.", [])
        check_ideal_cells(topo)
        check_current_sources(topo)
        shape = _shape(topo, ground)
        if key is not None:
            CACHE.put(key, shape)
    ground_node = shape.ground_node
    label = topo.island

    # Windows when the drawing allows, else a shallow tree's loops; if either is
    # too ill-conditioned, the loops of a least-resistance tree. With resistances
    # spread over more than three decades the shallow tree is skipped: its loops may carry a
    # large resistance in several loops and lose digits without failing KVL.
    # The potentials are walked along the tree of the fundamental loops tried (see below).
    positive = topo.br_r[topo.br_r > 0]
    wide = len(positive) > 0 and positive.max() > WIDE_SPREAD * positive.min()
    if wide:
        walk = shape.least_resistance_forest(topo)
        makers = [lambda: shape.windows, lambda: shape.fundamental(topo, walk)]
    else:
        walk = shape.bfs_walk(topo)
        makers = [lambda: shape.windows, lambda: shape.fundamental(topo, walk),
                  lambda: _oriented(_least_resistance_loops(topo, shape), topo)]
    failure: IllConditionedError | None = None
    for make in makers:
        loops = make()
        if loops is None:
            continue
        try:
            j, i_br, v_br = _branch_solution(topo, loops)
            break
        except IllConditionedError as exc:
            failure = exc
    else:
        assert failure is not None
        raise failure

    # Node potentials: walk a tree from each island's reference. With resistances
    # spread wide, a least-resistance tree, so no potential is carried through a
    # large resistance whose drop is only rounding noise (ideal cells and low
    # resistances fix potentials best).
    k = walk.edge
    step = np.zeros(topo.n_nodes)
    has = k >= 0
    step[has] = np.where(topo.br_u[k[has]] == np.flatnonzero(has), v_br[k[has]], -v_br[k[has]])
    potential = accumulate_to_root(walk, step)

    current = np.zeros(len(topo.part_names))
    voltage = np.zeros(len(topo.part_names))
    current[topo.branch_parts] = i_br
    voltage[topo.branch_parts] = v_br
    current[topo.conductor_parts] = _conductor_currents(topo, i_br)
    pnode = topo.node_of_point
    voltage_all = potential[pnode[topo.part_a]] - potential[pnode[topo.part_b]]
    other = np.ones(len(topo.part_names), bool)
    other[topo.branch_parts] = False
    voltage[other] = voltage_all[other]
    voltage[topo.conductor_parts] = 0.0

    if not (np.all(np.isfinite(current)) and np.all(np.isfinite(voltage)) and np.all(np.isfinite(potential))
            and np.all(np.isfinite(voltage * current))):
        raise IllConditionedError(
            "The results are too large to represent: check for values far beyond real parts.",
            _extreme_parts(topo))
    for arr in (current, voltage, potential):   # subnormal results are rounding residue
        arr[np.abs(arr) < TINY] = 0.0
    notes = _notes(topo, loops, i_br, shape.own, ground_node)
    references = [topo.node_names[r] for r in shape.own]
    return Solution(topo, current, voltage, potential, loops, j, notes, ground, references, label)


def _shape(topo: Topology, ground: str | None) -> Shape:
    """What the solve of ``topo`` with ``ground`` finds from the topology alone (see :mod:`solver.topocache`)."""
    ground_node = topo.node_of_point[topo.point_index[ground]] if ground is not None else -1
    roots = component_roots(topo.island, topo.island_first, _preferred_references(topo, ground_node))
    # islands with a branch that are measured from a point of their own (not ground)
    with_branch = np.zeros(len(roots), bool)
    with_branch[topo.island[topo.br_u]] = True
    own = tuple(sorted(int(r) for r in roots[with_branch] if r != ground_node))
    return Shape(topo, ground_node, roots, own, window_loops(topo))


def _oriented(loops: LoopSet, topo: Topology) -> LoopSet:
    """Fundamental ``loops`` turned clockwise on screen where the drawing places them."""
    if topo.circuit.positions:
        orient_clockwise(loops, topo)
    return loops


def _preferred_references(topo: Topology, ground_node: int) -> np.ndarray:
    """Reference candidates in order: ground, then each cell's minus terminal, then any node."""
    kinds = topo.part_kind
    cells = [k for k, pi in enumerate(topo.branch_parts.tolist()) if kinds[pi] == "cell"]
    pref = ([ground_node] if ground_node >= 0 else []) + [int(topo.br_v[k]) for k in cells]
    return np.array(pref, dtype=np.int64)


def _least_resistance_loops(topo: Topology, shape: Shape) -> LoopSet:
    tree = shape.least_resistance_forest(topo)
    return fundamental_loops(topo, tree, tree.edge)


def _branch_solution(topo: Topology, loops: LoopSet) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Loop currents, branch currents and branch voltages, checked against KVL."""
    j, w = _solve_mesh(topo, loops)
    cs = np.flatnonzero(topo.br_cs)
    loop, branch, sign = loops.b_loop, loops.b_branch, loops.b_value
    i_br = np.bincount(branch, weights=sign * j[loop], minlength=topo.n_branches)   # Bᵀ·j
    i_br[cs] = topo.br_j[cs]
    v_br = topo.br_r * i_br + topo.br_e
    v_br[cs] = w
    size = np.abs(topo.br_r * i_br) + np.abs(topo.br_e) + np.abs(np.where(topo.br_cs, v_br, 0.0))
    _check_kvl(loops, j, v_br, size, topo)
    return j, i_br, v_br


def _solve_mesh(topo: Topology, loops: LoopSet) -> tuple[np.ndarray, np.ndarray]:
    """Loop currents ``j`` and current-source voltages ``w``.

    The block system is scaled symmetrically by its diagonal (so resistances
    from µΩ to TΩ stay in range), solved, and refined once. Small systems are
    assembled and solved dense (no sparse bookkeeping for a few dozen loops),
    large ones sparse.
    """
    L = loops.n_loops
    cs = np.flatnonzero(topo.br_cs)
    if L == 0:
        return np.zeros(0), np.zeros(len(cs))
    loop, branch, value = loops.b_loop, loops.b_branch, loops.b_value
    e = -np.bincount(loop, weights=value * topo.br_e[branch], minlength=L)   # −B·E, summed in scipy's order
    rhs = np.concatenate([e, topo.br_j[cs]])
    n = L + len(cs)
    try:
        if n <= DENSE_LIMIT:
            Bd = np.zeros((L, topo.n_branches))
            Bd[loop, branch] = value
            A = np.zeros((n, n))
            A[:L, :L] = (Bd * topo.br_r) @ Bd.T
            A[:L, L:] = Bd[:, cs]
            A[L:, :L] = Bd[:, cs].T
            s = _diagonal_scale(np.abs(np.diagonal(A)))
            As = A * s[:, None] * s[None, :]
            bs = s * rhs
            y = np.linalg.solve(As, bs)
            y = y + np.linalg.solve(As, bs - As @ y)  # one step of iterative refinement
        else:
            B = loops.matrix(topo.n_branches)
            Z = (B @ sp.diags(topo.br_r) @ B.T).tocsr()
            if len(cs):
                Bs = B[:, cs]
                A = sp.bmat([[Z, Bs], [Bs.T, None]], format="csc")
            else:
                A = Z.tocsc()
            s = _diagonal_scale(np.abs(A.diagonal()))
            S = sp.diags(s)
            As = (S @ A @ S).tocsc()
            bs = s * rhs
            lu = splu(As, permc_spec="MMD_AT_PLUS_A" if not len(cs) else "COLAMD")
            y = lu.solve(bs)
            y = y + lu.solve(bs - As @ y)
    except (np.linalg.LinAlgError, RuntimeError):
        # The topology checks rule out true singularity, so this is rounding.
        raise _too_wide(topo) from None
    if not np.all(np.isfinite(y)):
        raise _too_wide(topo)
    x = s * y
    return x[:L], x[L:]


def _too_wide(topo: Topology) -> IllConditionedError:
    return IllConditionedError(
        "The loop equations are too ill-conditioned to solve: the values in this "
        "circuit span too wide a range to give trustworthy results.", _extreme_parts(topo))


def _diagonal_scale(d: np.ndarray) -> np.ndarray:
    """1/sqrt of the diagonal where it is positive, 1 elsewhere (the current-source rows)."""
    return np.where(d > 0, 1.0 / np.sqrt(np.where(d > 0, d, 1.0)), 1.0)


def _extreme_parts(topo: Topology) -> list[str]:
    """The parts with the largest and the smallest resistance, and the largest EMF: where to look."""
    if topo.n_branches == 0:
        return []
    r = np.where(topo.br_cs, np.nan, topo.br_r)
    picks = []
    if np.any(np.isfinite(r) & (r > 0)):
        rp = np.where(r > 0, r, np.nan)
        picks += [int(np.nanargmax(rp)), int(np.nanargmin(rp))]
    picks.append(int(np.argmax(np.abs(topo.br_e) + np.abs(topo.br_j))))
    return [topo.part_names[topo.branch_parts[k]] for k in dict.fromkeys(picks)]


def _check_kvl(loops: LoopSet, j: np.ndarray, v_br: np.ndarray, size: np.ndarray, topo: Topology) -> None:
    """Raise :class:`IllConditionedError` if any loop's KVL residual is above tolerance.

    The residual must be within ``KVL_TOLERANCE`` of the loop's terms as a
    person adds them (``size``: |R·i|, |E|, a source's voltage), give or take
    rounding: 1e-15 of the loop's equation terms (each resistance times the
    loop currents through it, and the largest term in the circuit), which is
    what double precision can resolve when loop currents cancel in a branch.
    Products with B, Bᵀ and |B| are ``np.bincount`` sums over the loop
    matrix's entries, which add the terms in the order scipy's sparse
    products would.
    """
    if loops.n_loops == 0:
        return
    L = loops.n_loops
    loop, branch, sign = loops.b_loop, loops.b_branch, loops.b_value
    res = np.abs(np.bincount(loop, weights=sign * v_br[branch], minlength=L))   # |B·v|
    mag = np.abs(sign)   # the entries of |B|
    through = np.bincount(branch, weights=mag * np.abs(j)[loop], minlength=topo.n_branches)   # |B|ᵀ·|j|
    equation = np.bincount(loop, weights=mag * (topo.br_r * through)[branch], minlength=L) \
        + float(size.max(initial=0.0))
    scale = np.bincount(loop, weights=mag * size[branch], minlength=L)   # |B|·size
    allowed = KVL_TOLERANCE * scale + ROUNDING * equation
    worst = int(np.argmax(res - allowed))
    if res[worst] > allowed[worst]:
        names = [topo.part_names[topo.branch_parts[b]] for b in branch[loop == worst]]
        rel = res[worst] / max(scale[worst], 1e-300)
        raise IllConditionedError(
            "The loop equations are too ill-conditioned to trust: around one loop the "
            f"voltages fail to add up to zero by {rel:.1e} of their size. The values "
            "span too wide a range; check for extreme resistances.", names)


def _conductor_currents(topo: Topology, i_br: np.ndarray) -> np.ndarray:
    """Currents in wires and closed switches, from KCL at each point.

    Within each node the conductors form a graph; along a spanning forest of
    it each conductor carries the current delivered into the points beyond
    it. Conductors closing a ring of wires carry none (the split round a
    zero-ohm ring is not determined by the circuit).
    """
    cd = topo.conductor_parts
    if len(cd) == 0:
        return np.zeros(0)
    npnt = topo.n_points
    inj = np.zeros(npnt)
    pa = topo.part_a[topo.branch_parts]
    pb = topo.part_b[topo.branch_parts]
    np.add.at(inj, pa, -i_br)
    np.add.at(inj, pb, i_br)
    ca = topo.part_a[cd]
    forest = topo.conductor_forest
    total = subtree_sums(forest, inj)
    out = np.zeros(len(cd))
    x = np.flatnonzero(forest.edge >= 0)
    c = forest.edge[x]
    out[c] = np.where(ca[c] == x, total[x], -total[x])
    return out


def _notes(topo: Topology, loops: LoopSet, i_br: np.ndarray, islands: tuple[int, ...], ground_node: int) -> list[Note]:
    """Open and shorted parts, and the islands (``islands``: their reference nodes) not measured from ground."""
    notes: list[Note] = []
    names = topo.part_names
    bp = topo.branch_parts
    if islands:
        refs = ", ".join(topo.node_names[r] for r in islands)
        if ground_node < 0:
            msg = (f"No ground is chosen, so potentials are measured from point {refs}."
                   if len(islands) == 1 else
                   f"No ground is chosen; each separate part of the circuit is measured from its own point: {refs}.")
        else:
            msg = (f"Some parts of the circuit are not connected to ground; their potentials are "
                   f"measured from point {refs} instead.")
        notes.append(Note("reference", msg, ()))
    in_loop = np.zeros(topo.n_branches, bool)
    in_loop[loops.b_branch] = True
    shorted = topo.br_u == topo.br_v
    for k in np.flatnonzero(~in_loop & ~topo.br_cs):
        notes.append(Note("open", f"{names[bp[k]]} is open: it is not in any closed loop, so it carries no current.",
                          (names[bp[k]],)))
    for k in np.flatnonzero(shorted & ~topo.br_cs):
        name = names[bp[k]]
        if topo.part_kind[bp[k]] == "cell":
            notes.append(Note("shorted",
                              f"{name} is shorted: it drives {abs(i_br[k]):.4g} A through its own internal "
                              "resistance. A real battery shorted like this can overheat, vent or start a fire.",
                              (name,)))
        else:
            notes.append(Note("shorted", f"{name} is shorted: both its ends are on the same node, so it carries no current.",
                              (name,)))
    return notes
