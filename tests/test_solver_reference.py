"""The mesh-current solver held against outside truth.

Every physics check names its source beside it. The references are: networkx
``resistance_distance``; an independent modified nodal analysis written with
scipy.sparse (tests/reference_nodal.py); F. Y. Wu's closed form for finite
lattices; classic textbook results (cube, infinite ladder, bridge, maximum
power transfer); and the circuit laws themselves (KCL, KVL, Tellegen's
theorem) checked on every solution.
"""
from __future__ import annotations

import math
import random

import networkx as nx
import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, note, settings
from hypothesis import strategies as st

from reference_nodal import ReferenceFailed, SingularCircuit, nodal_solve
from solver import Circuit, CircuitError, IllConditionedError, solve

# ---------------------------------------------------------------------------
# Laws every solution must satisfy
# ---------------------------------------------------------------------------

LAW_RTOL = 1e-9     # relative to the size of each equation's terms (task brief)
FLOOR = 1e-15       # ... plus this fraction of the circuit's natural scale: double-precision noise


def natural_scales(c: Circuit) -> tuple[float, float]:
    """Voltage and current scales set by the sources: a floor for rounding noise in near-zero readings."""
    emf = max((p.emf for p in c.parts if p.kind == "cell"), default=0.0)
    amps = max((p.current for p in c.parts if p.kind == "current_source"), default=0.0)
    ohms = [p.resistance for p in c.parts if p.resistance > 0]
    v_nat = emf + amps * math.fsum(ohms)
    i_nat = amps + (emf / min(ohms) if ohms else 0.0)
    return v_nat or 1e-300, i_nat or 1e-300


def _node_map(c: Circuit) -> dict[str, str]:
    """Points merged through wires and closed switches (own union-find, not the solver's)."""
    parent = {p: p for p in c.points}

    def find(x: str) -> str:
        while parent[x] != x:
            x = parent[x]
        return x

    for p in c.parts:
        if p.kind == "wire" or (p.kind == "switch" and p.closed):
            parent[find(p.a)] = find(p.b)
    return {p: find(p) for p in c.points}


def check_laws(c: Circuit, sol, rtol: float = LAW_RTOL) -> None:
    """KCL at every point, KVL around every reported loop, Tellegen's theorem; nothing NaN.

    Kirchhoff's laws (G. Kirchhoff, Ann. Phys. 64, 1845); Tellegen's theorem
    (B. D. H. Tellegen, Philips Res. Rep. 7, 1952): the powers absorbed by
    all branches of a network sum to zero.
    """
    parts = c.parts
    cur = {p.name: sol.current(p.name) for p in parts}
    volt = {p.name: sol.voltage(p.name) for p in parts}
    powr = {p.name: sol.power(p.name) for p in parts}
    for table in (cur, volt, powr):
        bad = {k: v for k, v in table.items() if not math.isfinite(v)}
        assert not bad, f"non-finite readings {bad}"
    for p in c.points:
        assert math.isfinite(sol.potential(p)), f"potential of {p} is not finite"
    for p in parts:
        if p.kind == "switch" and not p.closed:
            assert cur[p.name] == 0.0, f"open switch {p.name} carries {cur[p.name]}"

    v_nat, i_nat = natural_scales(c)
    terms: dict[str, list[float]] = {pt: [] for pt in c.points}
    for p in parts:
        terms[p.a].append(cur[p.name])    # leaves the first terminal
        terms[p.b].append(-cur[p.name])   # enters at the second
    for pt, t in terms.items():
        scale = math.fsum(abs(x) for x in t)
        assert abs(math.fsum(t)) <= rtol * scale + FLOOR * i_nat, f"KCL fails at {pt}: {t}"

    # KVL and the power sum are held to rtol times the sum of the magnitudes of their terms
    # (a backward-error measure); a cell contributes its EMF and its I*r drop as two terms
    by_name = {p.name: p for p in parts}
    v_term = {p.name: (p.emf + abs(cur[p.name]) * p.resistance) if p.kind == "cell" else abs(volt[p.name])
              for p in parts}
    node = _node_map(c)
    through = {p.name: 0.0 for p in parts}
    for loop in sol.loops:
        for name, _ in loop.parts:
            through[name] += abs(loop.current)
    for k, loop in enumerate(sol.loops):
        pairs = list(loop.parts)
        assert pairs, f"loop {k} has no parts"
        # the loop must close: every node entered as often as it is left
        balance: dict[str, int] = {}
        for name, sign in pairs:
            assert sign in (1, -1), f"loop {k}: sign {sign!r} for {name}"
            p = by_name[name]
            start, end = (p.a, p.b) if sign > 0 else (p.b, p.a)
            balance[node[start]] = balance.get(node[start], 0) + 1
            balance[node[end]] = balance.get(node[end], 0) - 1
        assert all(v == 0 for v in balance.values()), f"loop {k} does not close: {pairs}"
        drops = [sign * volt[name] for name, sign in pairs]
        scale = math.fsum(v_term[name] for name, _ in pairs)
        # rounding floor: the loop's equation terms, each resistance times the loop currents through it
        # (where loop currents cancel in a branch, double precision resolves no better than that)
        equation = math.fsum(by_name[name].resistance * through[name] for name, _ in pairs)
        assert abs(math.fsum(drops)) <= rtol * scale + FLOOR * (v_nat + equation), \
            f"KVL fails around loop {k}: {pairs}, drops {drops}"
        assert math.isfinite(loop.current)

    absorbed = list(powr.values())
    scale = math.fsum(v_term[p.name] * abs(cur[p.name]) for p in parts)
    assert abs(math.fsum(absorbed)) <= rtol * scale + FLOOR * v_nat * i_nat, \
        f"Tellegen: absorbed powers sum to {math.fsum(absorbed)}, not zero"
    for name, p in powr.items():
        assert p == pytest.approx(volt[name] * cur[name], rel=1e-12, abs=1e-300)


def check_loop_basis(c: Circuit, sol) -> None:
    """The loops form a basis of the cycle space, and their currents superpose to the branch currents.

    Dimension of the cycle space: branches - nodes + components (Kirchhoff
    1847, the cyclomatic number); mesh currents by definition superpose to
    the branch currents (every branch current is the signed sum of the loop
    currents through it).
    """
    node = _node_map(c)
    branches = [p for p in c.parts if p.kind in ("resistor", "cell", "current_source")]
    nodes = sorted({node[p] for p in c.points})
    parent = {n: n for n in nodes}

    def find(x: str) -> str:
        while parent[x] != x:
            x = parent[x]
        return x

    for p in branches:
        parent[find(node[p.a])] = find(node[p.b])
    components = len({find(n) for n in nodes})
    dim = len(branches) - len(nodes) + components
    loops = list(sol.loops)
    assert len(loops) == dim, f"{len(loops)} loops reported, cycle space has dimension {dim}"
    col = {p.name: k for k, p in enumerate(branches)}
    if dim:
        b = np.zeros((dim, len(branches)))
        for k, loop in enumerate(loops):
            for name, sign in loop.parts:
                if name in col:
                    b[k, col[name]] += sign
        assert np.linalg.matrix_rank(b) == dim, "reported loops are not independent"
        i_loop = np.array([loop.current for loop in loops])
        superposed = b.T @ i_loop
        scale = float(np.max(np.abs(i_loop))) or 1.0
    else:
        superposed, scale = np.zeros(len(branches)), 1.0
    for p, s in zip(branches, superposed):
        assert sol.current(p.name) == pytest.approx(s, rel=1e-9, abs=1e-12 * scale), p.name


def compare_with_reference(c: Circuit, sol, ref, rtol: float = 1e-7) -> None:
    """Solver readings equal the nodal reference (potentials compared within each island)."""
    v_nat, i_nat = natural_scales(c)
    i_scale = max(max((abs(v) for v in ref.current.values()), default=0.0), 1e-4 * i_nat)
    v_scale = max(max((abs(v) for v in ref.potential.values()), default=0.0), 1e-4 * v_nat)
    for p in c.parts:
        if p.kind in ("wire", "switch") and p.closed and p.name not in ref.wire_determinate:
            continue  # current shared round a loop of conductors: undefined
        assert sol.current(p.name) == pytest.approx(ref.current[p.name], rel=rtol, abs=1e-9 * i_scale), p.name
        if p.name in ref.voltage:
            assert sol.voltage(p.name) == pytest.approx(ref.voltage[p.name], rel=rtol, abs=1e-9 * v_scale), p.name
            assert sol.power(p.name) == pytest.approx(
                ref.voltage[p.name] * ref.current[p.name], rel=2 * rtol, abs=1e-9 * i_scale * v_scale), p.name
    for pt, v_ref in ref.potential.items():
        base = ref.island_ref[ref.island[pt]]
        got = sol.potential(pt) - sol.potential(base)
        assert got == pytest.approx(v_ref - ref.potential[base], rel=rtol, abs=1e-9 * v_scale), pt


# ---------------------------------------------------------------------------
# networkx resistance_distance (reference library)
# ---------------------------------------------------------------------------

def _graph_circuit(g: nx.Graph, weight: str | None = None) -> Circuit:
    c = Circuit()
    for k, (u, v, data) in enumerate(g.edges(data=True)):
        c.resistor(f"R{k + 1}", f"n{u}", f"n{v}", data[weight] if weight else 1.0)
    return c


def _two_point_by_current(c: Circuit, u: str, v: str) -> float:
    """Resistance between u and v: drive 1 A in at v and out at u, read V(v) - V(u)."""
    c.current_source("Itest", u, v, 1.0)   # drives 1 A through itself from u to v
    sol = solve(c, ground=u)
    check_laws(c, sol)
    check_loop_basis(c, sol)
    assert sol.current("Itest") == pytest.approx(1.0)
    return sol.potential(v) - sol.potential(u)


def _two_point_by_cell(c: Circuit, u: str, v: str) -> float:
    """Resistance between u and v: a 1 V ideal cell across them, R = 1 V / current drawn."""
    c.cell("Btest", plus=v, minus=u, emf=1.0)
    sol = solve(c, ground=u)
    check_laws(c, sol)
    check_loop_basis(c, sol)
    assert sol.voltage("Btest") == pytest.approx(1.0)
    return 1.0 / -sol.current("Btest")   # a delivering cell carries negative current (passive sign rule)


def test_networkx_documented_example():
    # networkx.resistance_distance docstring: Graph([(1,2),(1,3),(1,4),(3,4),(3,5),(4,5)]), nodes 1-3 -> 0.625
    g = nx.Graph([(1, 2), (1, 3), (1, 4), (3, 4), (3, 5), (4, 5)])
    assert nx.resistance_distance(g, 1, 3) == pytest.approx(0.625)
    assert _two_point_by_current(_graph_circuit(g), "n1", "n3") == pytest.approx(0.625, rel=1e-12)
    assert _two_point_by_cell(_graph_circuit(g), "n1", "n3") == pytest.approx(0.625, rel=1e-12)


@pytest.mark.parametrize("seed", range(8))
def test_networkx_random_graphs(seed):
    # reference: networkx.resistance_distance with edge weights as resistances (invert_weight=True)
    rng = random.Random(seed)
    n = rng.randint(5, 14)
    g = nx.gnm_random_graph(n, rng.randint(n, 3 * n), seed=seed)
    g = g.subgraph(max(nx.connected_components(g), key=len)).copy()
    for u, v in g.edges:
        g.edges[u, v]["ohms"] = 10 ** rng.uniform(-1, 3)
    u, v = rng.sample(sorted(g.nodes), 2)
    expected = nx.resistance_distance(g, u, v, weight="ohms", invert_weight=True)
    assert _two_point_by_current(_graph_circuit(g, "ohms"), f"n{u}", f"n{v}") == pytest.approx(expected, rel=1e-9)
    assert _two_point_by_cell(_graph_circuit(g, "ohms"), f"n{u}", f"n{v}") == pytest.approx(expected, rel=1e-9)


def _proper_drawing(g: nx.Graph, pos: dict) -> bool:
    """True if no two edges cross or overlap and no edge runs through a point (straight segments)."""
    def orient(a, b, c):
        return (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])

    def on_segment(a, b, p):
        return orient(a, b, p) == 0 and min(a[0], b[0]) <= p[0] <= max(a[0], b[0]) \
            and min(a[1], b[1]) <= p[1] <= max(a[1], b[1])

    edges = list(g.edges)
    for u, v in edges:
        for w in g.nodes:
            if w not in (u, v) and on_segment(pos[u], pos[v], pos[w]):
                return False
    for i, (a, b) in enumerate(edges):
        for c, d in edges[i + 1:]:
            if {a, b} & {c, d}:
                continue
            p, q, r, s = pos[a], pos[b], pos[c], pos[d]
            if orient(p, q, r) * orient(p, q, s) < 0 and orient(r, s, p) * orient(r, s, q) < 0:
                return False
    return True


@pytest.mark.parametrize("seed", range(6))
def test_networkx_random_planar_drawings(seed):
    # reference: networkx.resistance_distance; positions: networkx straight-line planar drawing
    # (combinatorial_embedding_to_pos), so the solver takes the windows of the drawing as its loops
    rng = random.Random(100 + seed)
    for attempt in range(200):
        n = rng.randint(5, 10)
        g = nx.gnm_random_graph(n, rng.randint(n, 2 * n), seed=rng.randrange(10**6))
        if not nx.is_connected(g):
            continue
        u, v = rng.sample(sorted(g.nodes), 2)
        if g.has_edge(u, v):
            continue
        drawn = g.copy()
        drawn.add_edge(u, v)   # the source's own segment must not cross either
        ok, emb = nx.check_planarity(drawn)
        if not ok:
            continue
        pos = nx.combinatorial_embedding_to_pos(emb)
        if _proper_drawing(drawn, pos):
            break
    else:
        pytest.fail("no planar test graph found")
    for a, b in g.edges:
        g.edges[a, b]["ohms"] = 10 ** rng.uniform(0, 2)
    expected = nx.resistance_distance(g, u, v, weight="ohms", invert_weight=True)
    c = _graph_circuit(g, "ohms")
    for node, (x, y) in pos.items():
        c.place(f"n{node}", x, y)
    assert _two_point_by_current(c, f"n{u}", f"n{v}") == pytest.approx(expected, rel=1e-9)


# ---------------------------------------------------------------------------
# F. Y. Wu, "Theory of resistor networks: the two-point resistance",
# J. Phys. A 37 (2004) 6653 — free-boundary M x N lattice
# ---------------------------------------------------------------------------

def wu_two_point(m: int, n: int, r: float, s: float, p1: tuple[int, int], p2: tuple[int, int]) -> float:
    """Two-point resistance of an M x N lattice with free boundaries (Wu 2004, the M x N result).

    Nodes (x, y), 0 <= x < M, 0 <= y < N; bonds along x of resistance r,
    along y of resistance s. With theta_m = m*pi/M, phi_n = n*pi/N:
    R = r/N |x1-x2| + s/M |y1-y2| + 2/(MN) sum_{m=1}^{M-1} sum_{n=1}^{N-1}
        [cos((x1+1/2)theta_m) cos((y1+1/2)phi_n) - cos((x2+1/2)theta_m) cos((y2+1/2)phi_n)]^2
        / [r^-1 (1 - cos theta_m) + s^-1 (1 - cos phi_n)].
    """
    (x1, y1), (x2, y2) = p1, p2
    th = np.pi * np.arange(1, m) / m
    ph = np.pi * np.arange(1, n) / n
    num = (np.outer(np.cos((x1 + 0.5) * th), np.cos((y1 + 0.5) * ph))
           - np.outer(np.cos((x2 + 0.5) * th), np.cos((y2 + 0.5) * ph))) ** 2
    den = (1 - np.cos(th))[:, None] / r + (1 - np.cos(ph))[None, :] / s
    return r / n * abs(x1 - x2) + s / m * abs(y1 - y2) + 2.0 / (m * n) * float(np.sum(num / den))


def _lattice(m: int, n: int, r: float, s: float, placed: bool) -> Circuit:
    c = Circuit()
    for y in range(n):
        for x in range(m):
            if x + 1 < m:
                c.resistor(f"Rh{x}_{y}", f"p{x}_{y}", f"p{x + 1}_{y}", r)
            if y + 1 < n:
                c.resistor(f"Rv{x}_{y}", f"p{x}_{y}", f"p{x}_{y + 1}", s)
            if placed:
                c.place(f"p{x}_{y}", x, y)
    return c


def test_wu_lattice_formula_matches_networkx():
    # guards the test's own transcription of Wu's formula against networkx.resistance_distance
    g = nx.grid_2d_graph(5, 4)
    for (a, b) in g.edges:
        g.edges[a, b]["ohms"] = 2.0 if a[1] == b[1] else 3.0   # along x: 2, along y: 3
    for p1, p2 in [((0, 0), (4, 3)), ((1, 2), (3, 1)), ((2, 2), (2, 0))]:
        expected = nx.resistance_distance(g, p1, p2, weight="ohms", invert_weight=True)
        assert wu_two_point(5, 4, 2.0, 3.0, p1, p2) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("m,n,r,s", [(6, 5, 1.0, 1.0), (7, 4, 47.0, 150.0), (3, 9, 0.2, 5.0)])
def test_wu_lattice_placed_corner_to_corner(m, n, r, s):
    # Wu (2004): placed lattice, the source routed round the outside so nothing crosses: window loops
    c = _lattice(m, n, r, s, placed=True)
    far = f"p{m - 1}_{n - 1}"
    c.wire("Wa", "p0_0", "o1")
    c.place("o1", 0, -1)
    c.current_source("Itest", "o1", "o2", 1.0)   # 1 A out of p0_0 round to the far corner
    c.place("o2", m, -1)
    c.wire("Wb", "o2", "o3")
    c.place("o3", m, n - 1)
    c.wire("Wc", "o3", far)
    sol = solve(c, ground="p0_0")
    check_laws(c, sol)
    check_loop_basis(c, sol)
    expected = wu_two_point(m, n, r, s, (0, 0), (m - 1, n - 1))
    assert sol.potential(far) - sol.potential("p0_0") == pytest.approx(expected, rel=1e-9)
    # windows of the drawing, clockwise on screen (y downwards): each lattice cell is one loop
    assert len(sol.loops) == (m - 1) * (n - 1) + 1
    assert all(loop.orientation == "clockwise" for loop in sol.loops)
    cells = [loop for loop in sol.loops if all(name.startswith("R") for name, _ in loop.parts)]
    assert len(cells) == (m - 1) * (n - 1)
    pos = c.positions
    parts = {p.name: p for p in c.parts}
    for loop in cells:
        starts = [parts[name].a if sign > 0 else parts[name].b for name, sign in loop.parts]
        xy = [pos[pt] for pt in starts]
        area = 0.5 * sum(x0 * y1 - x1 * y0 for (x0, y0), (x1, y1) in zip(xy, xy[1:] + xy[:1]))
        assert area == pytest.approx(1.0)   # a unit window; positive shoelace with y down = clockwise


@pytest.mark.parametrize("m,n,p1,p2", [(6, 6, (2, 2), (3, 3)), (8, 5, (1, 3), (6, 1)), (5, 7, (0, 3), (4, 3))])
def test_wu_lattice_unplaced(m, n, p1, p2):
    # Wu (2004): same lattice, no positions: the solver uses fundamental loops; interior points
    r, s = 10.0, 22.0
    c = _lattice(m, n, r, s, placed=False)
    got = _two_point_by_current(c, f"p{p1[0]}_{p1[1]}", f"p{p2[0]}_{p2[1]}")
    assert got == pytest.approx(wu_two_point(m, n, r, s, p1, p2), rel=1e-9)
    c = _lattice(m, n, r, s, placed=False)
    got = _two_point_by_cell(c, f"p{p1[0]}_{p1[1]}", f"p{p2[0]}_{p2[1]}")
    assert got == pytest.approx(wu_two_point(m, n, r, s, p1, p2), rel=1e-9)


# ---------------------------------------------------------------------------
# Classic networks
# ---------------------------------------------------------------------------

CUBE_R = 470.0
_CUBE_SCREEN = {  # a drawing of the cube with no crossings: face z=0 outside, face z=1 inside
    "v000": (0, 0), "v100": (4, 0), "v110": (4, 4), "v010": (0, 4),
    "v001": (1, 1), "v101": (3, 1), "v111": (3, 3), "v011": (1, 3),
}


def _cube() -> Circuit:
    c = Circuit()
    verts = [(x, y, z) for x in (0, 1) for y in (0, 1) for z in (0, 1)]
    k = 0
    for a in verts:
        for b in verts:
            if a < b and sum(i != j for i, j in zip(a, b)) == 1:
                k += 1
                c.resistor(f"R{k}", "v%d%d%d" % a, "v%d%d%d" % b, CUBE_R)
    return c


@pytest.mark.parametrize("far,factor", [("v111", 5 / 6), ("v110", 3 / 4), ("v100", 7 / 12)])
def test_cube_of_resistors(far, factor):
    # cube of twelve equal resistors: 5R/6 body diagonal, 3R/4 face diagonal, 7R/12 edge
    # (Halliday & Resnick, Physics, 3rd ed.; values from memory)
    assert _two_point_by_current(_cube(), "v000", far) == pytest.approx(factor * CUBE_R, rel=1e-12)
    assert _two_point_by_cell(_cube(), "v000", far) == pytest.approx(factor * CUBE_R, rel=1e-12)


@pytest.mark.parametrize("far,factor,route", [
    ("v100", 7 / 12, [(0, -1), (4, -1)]),            # edge: round the top
    ("v110", 3 / 4, [(-1, 0), (-1, 5), (4, 5)]),      # face diagonal: round the left and bottom
])
def test_cube_drawn_without_crossings(far, factor, route):
    # same values (Halliday & Resnick, from memory), cube placed so the solver uses window loops
    c = _cube()
    for pt, (x, y) in _CUBE_SCREEN.items():
        c.place(pt, x, y)
    chain = ["v000"] + [f"o{k}" for k in range(len(route))] + [far]
    for k, (x, y) in enumerate(route):
        c.place(f"o{k}", x, y)
    c.current_source("Itest", chain[0], chain[1], 1.0)
    for k, (a, b) in enumerate(zip(chain[1:], chain[2:])):
        c.wire(f"W{k}", a, b)
    sol = solve(c, ground="v000")
    check_laws(c, sol)
    check_loop_basis(c, sol)
    assert all(loop.orientation == "clockwise" for loop in sol.loops)
    assert sol.potential(far) - sol.potential("v000") == pytest.approx(factor * CUBE_R, rel=1e-12)


@pytest.mark.parametrize("placed", [True, False])
def test_long_ladder_approaches_infinite_ladder(placed):
    # infinite ladder of equal series and shunt resistors: R(1+sqrt 5)/2 (from memory);
    # a finite ladder converges geometrically, so 40 sections agree to rounding
    r, sections = 330.0, 40
    c = Circuit()
    c.cell("B1", plus="a0", minus="g0", emf=5.0)
    for k in range(sections):
        c.resistor(f"Rs{k + 1}", f"a{k}", f"a{k + 1}", r)
        c.resistor(f"Rp{k + 1}", f"a{k + 1}", f"g{k + 1}", r)
        c.wire(f"W{k + 1}", f"g{k}", f"g{k + 1}")
    if placed:
        for k in range(sections + 1):
            c.place(f"a{k}", k, 0)
            c.place(f"g{k}", k, 1)
    sol = solve(c, ground="g0")
    check_laws(c, sol)
    check_loop_basis(c, sol)
    if placed:
        assert all(loop.orientation == "clockwise" for loop in sol.loops)
    assert 5.0 / -sol.current("B1") == pytest.approx(r * (1 + math.sqrt(5)) / 2, rel=1e-12)


def _bridge(r1: float, r2: float, r3: float, r4: float, rg: float, emf: float) -> Circuit:
    c = Circuit()
    c.cell("B1", plus="t", minus="g", emf=emf)
    c.resistor("R1", "t", "m1", r1)
    c.resistor("R2", "m1", "g", r2)
    c.resistor("R3", "t", "m2", r3)
    c.resistor("R4", "m2", "g", r4)
    c.resistor("RG", "m1", "m2", rg)   # the detector
    return c


def test_wheatstone_bridge_balanced():
    # Wheatstone bridge: R1/R2 = R3/R4 gives zero detector current (any handbook)
    c = _bridge(100.0, 220.0, 470.0, 1034.0, 50.0, 12.0)
    sol = solve(c, ground="g")
    check_laws(c, sol)
    supply = -sol.current("B1")
    assert supply == pytest.approx(12.0 / 320.0 + 12.0 / 1504.0, rel=1e-12)   # two dividers, Ohm's law
    assert abs(sol.current("RG")) <= 1e-12 * supply


def test_wheatstone_bridge_unbalanced():
    # detector current from Thevenin's theorem (any handbook):
    # V_th = E (R2/(R1+R2) - R4/(R3+R4)), R_th = R1||R2 + R3||R4, I = V_th / (R_th + R_G)
    r1, r2, r3, r4, rg, e = 100.0, 220.0, 470.0, 1000.0, 50.0, 12.0
    sol = solve(_bridge(r1, r2, r3, r4, rg, e), ground="g")
    v_th = e * (r2 / (r1 + r2) - r4 / (r3 + r4))
    r_th = r1 * r2 / (r1 + r2) + r3 * r4 / (r3 + r4)
    assert sol.current("RG") == pytest.approx(v_th / (r_th + rg), rel=1e-12)


def test_maximum_power_transfer():
    # maximum power transfer (Jacobi's law): the load takes most power at R_load = r_internal,
    # and then P = E^2 / (4 r)
    emf, r_int = 12.0, 2.2
    loads = sorted(set(np.round(np.geomspace(0.1, 50.0, 61), 6)) | {r_int})
    powers = []
    for rl in loads:
        c = Circuit()
        c.cell("B1", plus="a", minus="g", emf=emf, internal_resistance=r_int)
        c.resistor("RL", "a", "g", float(rl))
        sol = solve(c, ground="g")
        check_laws(c, sol)
        powers.append(sol.power("RL"))
    best = int(np.argmax(powers))
    assert loads[best] == r_int
    assert powers[best] == pytest.approx(emf ** 2 / (4 * r_int), rel=1e-12)
    assert all(p < powers[best] for k, p in enumerate(powers) if k != best)


# ---------------------------------------------------------------------------
# Random circuits against the nodal reference (hypothesis)
# ---------------------------------------------------------------------------

_KINDS = ["resistor"] * 6 + ["ideal_cell", "cell", "cell", "current_source", "wire", "wire",
                             "closed_switch", "open_switch"]


def _add_random_part(draw, c: Circuit, name_no: int, a: str, b: str, r_exp) -> None:
    kind = draw(st.sampled_from(_KINDS))
    if kind == "resistor":
        c.resistor(f"R{name_no}", a, b, 10 ** draw(st.floats(*r_exp)))
    elif kind == "ideal_cell":
        c.cell(f"B{name_no}", plus=a, minus=b, emf=draw(st.floats(0.5, 48.0)))
    elif kind == "cell":
        c.cell(f"B{name_no}", plus=a, minus=b, emf=draw(st.floats(0.5, 48.0)),
               internal_resistance=10 ** draw(st.floats(*r_exp)))
    elif kind == "current_source":
        c.current_source(f"I{name_no}", a, b, 10 ** draw(st.floats(-3.0, 0.0)))
    elif kind == "wire":
        c.wire(f"W{name_no}", a, b)
    else:
        c.switch(f"S{name_no}", a, b, closed=kind == "closed_switch")


@st.composite
def random_circuits(draw, r_exp=(-1.0, 4.0), max_parts=9):
    """Small circuits of every part kind over one to three islands, often with parallel branches."""
    c = Circuit()
    count = 0
    for isl in range(draw(st.integers(1, 3))):
        pts = [f"i{isl}p{k}" for k in range(draw(st.integers(2, 5)))]
        for _ in range(draw(st.integers(1, max_parts))):
            a = draw(st.sampled_from(pts))
            b = draw(st.sampled_from([p for p in pts if p != a]))
            count += 1
            _add_random_part(draw, c, count, a, b, r_exp)
    ground = draw(st.one_of(st.none(), st.sampled_from(c.points)))
    return c, ground


@st.composite
def random_drawings(draw, r_exp=(-1.0, 4.0)):
    """Circuits drawn on a small grid with no crossings: parts along grid lines and one diagonal per square."""
    w, h = draw(st.integers(2, 4)), draw(st.integers(2, 4))
    segments = []
    for x in range(w):
        for y in range(h):
            if x + 1 < w:
                segments.append(((x, y), (x + 1, y)))
            if y + 1 < h:
                segments.append(((x, y), (x, y + 1)))
            if x + 1 < w and y + 1 < h:
                segments.append(((x, y), (x + 1, y + 1)))
    c = Circuit()
    chosen = draw(st.lists(st.sampled_from(segments), min_size=1, max_size=14, unique=True))
    for k, (p, q) in enumerate(chosen):
        if draw(st.booleans()):
            p, q = q, p
        _add_random_part(draw, c, k + 1, "p%d_%d" % p, "p%d_%d" % q, r_exp)
    place_by_name(c)
    ground = draw(st.one_of(st.none(), st.sampled_from(c.points)))
    return c, ground


def place_by_name(c: Circuit) -> None:
    """Put each point named ``p<x>_<y>`` at grid position (x, y)."""
    for pt in c.points:
        x, y = pt[1:].split("_")
        c.place(pt, int(x), int(y))


def assert_clockwise_windows(c: Circuit, count: int) -> None:
    """Place the points by name, solve, hold the laws, and expect ``count`` clockwise windows."""
    place_by_name(c)
    sol = solve(c)
    check_laws(c, sol)
    assert len(sol.loops) == count
    assert all(loop.orientation == "clockwise" for loop in sol.loops)


def _describe(c: Circuit, ground) -> str:
    lines = [f"ground={ground!r}"]
    for p in c.parts:
        lines.append(f"  {p.kind} {p.name} {p.a}->{p.b} R={p.resistance!r} E={p.emf!r} "
                     f"I={p.current!r} closed={p.closed}")
    return "\n".join(lines)


def _check_against_reference(c: Circuit, ground) -> None:
    note(_describe(c, ground))
    try:
        ref = nodal_solve(c, ground)
    except SingularCircuit:
        with pytest.raises(CircuitError) as err:
            solve(c, ground=ground)
        assert str(err.value).strip(), "error without a message"
        assert set(err.value.parts) <= {p.name for p in c.parts}, err.value.parts
        return
    try:
        sol = solve(c, ground=ground)
    except CircuitError as e:
        pytest.fail(f"solver refused a regular circuit: {e} {e.parts}\n{_describe(c, ground)}")
    check_laws(c, sol)
    check_loop_basis(c, sol)
    compare_with_reference(c, sol, ref)
    if ground is not None:
        assert sol.potential(ground) == 0.0


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(random_circuits())
def test_random_circuits_match_nodal_reference(case):
    # reference: independent modified nodal analysis with scipy.sparse (tests/reference_nodal.py);
    # laws: KCL, KVL (Kirchhoff 1845) and Tellegen's theorem (Philips Res. Rep. 7, 1952)
    _check_against_reference(*case)


def _has_loop(c: Circuit) -> bool:
    node = _node_map(c)
    branches = [p for p in c.parts if p.kind in ("resistor", "cell", "current_source")]
    g = nx.MultiGraph()
    g.add_nodes_from(set(node.values()))
    g.add_edges_from((node[p.a], node[p.b]) for p in branches)
    return len(branches) - g.number_of_nodes() + nx.number_connected_components(g) > 0


@settings(max_examples=250, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(random_drawings())
def test_random_drawings_match_nodal_reference(case):
    # same references, on drawings with no crossings (the solver should take their windows as loops)
    c, ground = case
    _check_against_reference(c, ground)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(random_drawings())
def test_random_drawings_use_clockwise_windows(case):
    # design notes, Solver API: placed points and no crossings -> the windows, clockwise by default
    c, ground = case
    note(_describe(c, ground))
    assume(_has_loop(c))
    try:
        sol = solve(c, ground=ground)
    except CircuitError:
        return
    assert all(loop.orientation == "clockwise" for loop in sol.loops), [(lp.parts, lp.orientation)
                                                                         for lp in sol.loops]


def test_drawing_with_wire_triangle_uses_windows():
    # design notes, Solver API: placed points and no crossings -> windows, clockwise;
    # three triangles: R3-R7-R6, R6-I8-R4, and R7 shorted by the wires W1, W5
    c = Circuit()
    c.wire("W1", "p1_0", "p2_1")
    c.resistor("R3", "p0_0", "p1_0", 1.0)
    c.resistor("R4", "p0_0", "p0_1", 1.0)
    c.wire("W5", "p1_1", "p2_1")
    c.resistor("R6", "p0_0", "p1_1", 1.0)
    c.resistor("R7", "p1_0", "p1_1", 10.0)
    c.current_source("I8", "p0_1", "p1_1", 1.0)
    assert_clockwise_windows(c, 3)


def test_drawing_with_wires_round_a_hexagon_uses_windows():
    # design notes, Solver API: placed points and no crossings -> windows, clockwise. Bounded faces:
    # (0,0)-(1,0)-(1,1): R14, R6; (0,0)-(1,1)-(0,1): R6, R9; the hexagon (1,0)-(2,1)-(2,2)-(1,2)-(0,1)-(1,1):
    # R4, B1, R9, R14 -- three windows for three independent loops
    c = Circuit()
    c.cell("B1", plus="p0_1", minus="p1_2", emf=1.0)
    c.resistor("R4", "p1_2", "p2_2", 1.0)
    c.resistor("R6", "p0_0", "p1_1", 1.0)
    c.wire("W8", "p0_0", "p1_0")
    c.resistor("R9", "p0_1", "p1_1", 1.0)
    c.wire("W10", "p2_1", "p2_2")
    c.wire("W11", "p0_0", "p0_1")
    c.wire("W12", "p1_0", "p2_1")
    c.resistor("R14", "p1_0", "p1_1", 100.0)
    assert_clockwise_windows(c, 3)


def test_placed_drawing_without_loops():
    # KCL: with no closed loop nothing flows; the cell's EMF still sets the far point (KVL along the path)
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=9.0)
    c.resistor("R1", "a", "b", 100.0)
    c.place("a", 0, 0)
    c.place("g", 0, 1)
    c.place("b", 1, 0)
    sol = solve(c, ground="g")
    assert sol.current("R1") == 0.0 and sol.current("B1") == 0.0
    assert sol.potential("b") == pytest.approx(9.0)


@pytest.mark.parametrize("ohms", [77.4, 470.0, 1000.0])
def test_equal_and_opposite_current_sources_across_a_resistor(ohms):
    # KCL: the two sources' currents cancel at each node, so the resistor carries nothing
    c = Circuit()
    c.resistor("R1", "a", "c", ohms)
    c.current_source("I1", "a", "c", 1.0)
    c.current_source("I2", "c", "a", 1.0)
    sol = solve(c, ground="a")
    check_laws(c, sol)
    assert abs(sol.current("R1")) <= 1e-12
    assert abs(sol.potential("c")) <= 1e-12 * ohms


# ---------------------------------------------------------------------------
# Values over eighteen decades
# ---------------------------------------------------------------------------

def test_wide_range_series_chain():
    # one loop, 1 uOhm ... 1 TOhm in series: Ohm's law I = E / sum R, and the drops add up (KVL)
    c = Circuit()
    values = [10.0 ** k for k in range(-6, 13)]
    c.cell("B1", plus="n0", minus=f"n{len(values)}", emf=10.0)
    for k, r in enumerate(values):
        c.resistor(f"R{k}", f"n{k + 1}", f"n{k}", r)
    sol = solve(c, ground="n0")
    check_laws(c, sol)
    i = 10.0 / math.fsum(values)
    for k, r in enumerate(values):
        assert sol.current(f"R{k}") == pytest.approx(-i, rel=1e-12)
        assert sol.voltage(f"R{k}") == pytest.approx(-i * r, rel=1e-12)


@pytest.mark.parametrize("placed", [True, False])
def test_wide_range_parallel_bank(placed):
    # 1 uOhm ... 1 TOhm each straight across one cell: Ohm's law per branch, or a refusal as ill-conditioned
    c = Circuit()
    values = [10.0 ** k for k in range(-6, 13, 2)]
    c.cell("B1", plus="t0", minus="b0", emf=1.5, internal_resistance=1e-3)
    for k, r in enumerate(values):
        c.resistor(f"R{k}", f"t{k + 1}", f"b{k + 1}", r)
        c.wire(f"Wt{k}", f"t{k}", f"t{k + 1}")
        c.wire(f"Wb{k}", f"b{k}", f"b{k + 1}")
    if placed:
        for k in range(len(values) + 1):
            c.place(f"t{k}", k, 0)
            c.place(f"b{k}", k, 1)
    try:
        sol = solve(c, ground="b0")
    except IllConditionedError:
        return
    check_laws(c, sol)
    ref = nodal_solve(c, "b0")
    for k, r in enumerate(values):
        assert sol.current(f"R{k}") == pytest.approx(ref.current[f"R{k}"], rel=1e-9)


@pytest.mark.parametrize("big", [1e7, 1e9, 1e12])
@pytest.mark.parametrize("big_first", [True, False])
def test_high_and_low_resistances_across_an_ideal_cell(big, big_first):
    # KVL: every part straight across an ideal cell has the cell's EMF across it; Ohm's law for each current
    c = Circuit()
    values = [big, 1.0, 1.0, 1.0] if big_first else [1.0, 1.0, 1.0, big]
    for k, r in enumerate(values):
        c.resistor(f"R{k + 1}", "p", "q", r)
    c.cell("B1", plus="p", minus="q", emf=1.0)
    try:
        sol = solve(c, ground="q")
    except IllConditionedError:
        return
    check_laws(c, sol)
    for k, r in enumerate(values):
        assert sol.voltage(f"R{k + 1}") == pytest.approx(1.0, rel=1e-12)
        assert sol.current(f"R{k + 1}") == pytest.approx(1.0 / r, rel=1e-9)


@pytest.mark.parametrize("r5", [1e6, 1e7, 10 ** 7.5, 1e8, 1e10])
def test_cells_returning_through_a_high_resistance(r5):
    # Thevenin's theorem (any handbook): R2 || B4 between p0 and p1 is 0.5 V behind 0.5 ohm, so the
    # loop p0-p1-p4-p0 carries I = -1.5 / (R5 + 0.5) and V(R2) = 0.5 + 0.5 I, V(R5) = R5 I
    c = Circuit()
    c.resistor("R2", "p0", "p1", 1.0)
    c.cell("B3", plus="p1", minus="p4", emf=1.0)
    c.cell("B4", plus="p0", minus="p1", emf=1.0, internal_resistance=1.0)
    c.resistor("R5", "p4", "p0", r5)
    try:
        sol = solve(c)
    except IllConditionedError:
        return
    check_laws(c, sol)
    i = -1.5 / (r5 + 0.5)
    assert sol.voltage("R2") == pytest.approx(0.5 + 0.5 * i, rel=1e-9)
    assert sol.voltage("R5") == pytest.approx(r5 * i, rel=1e-9)
    assert sol.current("R5") == pytest.approx(i, rel=1e-9)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(random_circuits(r_exp=(-6.0, 12.0), max_parts=7))
def test_random_wide_range_circuits_keep_the_laws(case):
    # resistances from 1 uOhm to 1 TOhm: KCL/KVL/Tellegen to 1e-9 relative, or an ill-conditioning refusal
    c, ground = case
    note(_describe(c, ground))
    try:
        nodal_solve(c, ground)
        regular = True
    except SingularCircuit:
        regular = False
    except ReferenceFailed:
        regular = None   # regular by topology, but beyond what nodal analysis resolves: laws only
    try:
        sol = solve(c, ground=ground)
    except CircuitError as e:
        assert regular is False or isinstance(e, IllConditionedError), f"{e}\n{_describe(c, ground)}"
        return
    assert regular is not False, f"solver accepted a singular circuit\n{_describe(c, ground)}"
    check_laws(c, sol)


def test_islands_are_the_connected_pieces_networkx_finds():
    # networkx connected_components (reference library) over every part but open switches
    c = Circuit()
    c.cell("B1", plus="a", minus="b", emf=9.0, internal_resistance=1.0)
    c.resistor("R1", "a", "b", 10.0)
    c.switch("S1", "b", "c", closed=False)           # joins nothing
    c.resistor("R2", "c", "d", 5.0)
    c.wire("W1", "d", "e")
    c.current_source("I1", "e", "c", 0.1)
    c.resistor("R3", "x", "y", 1.0)
    g = nx.Graph()
    g.add_nodes_from(c.points)
    g.add_edges_from((p.a, p.b) for p in c.parts if not (p.kind == "switch" and not p.closed))
    expected = sorted(sorted(comp) for comp in nx.connected_components(g))
    assert sorted(sorted(isl) for isl in solve(c).islands) == expected
