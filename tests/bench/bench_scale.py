"""Scale benchmark: the mesh solver against a sparse nodal solve of the same grids.

Square grids of n x n points, 1 ohm between neighbours, every point placed (so
the solver takes the windows of the drawing as its loops), and a 1 V cell
joined to opposite corners round the outside of the grid so nothing crosses.
For each size it prints the branches, the time of ``solve()``, the time of a
nodal solve with scipy (vectorised assembly from the same Circuit + spsolve),
their ratio, the peak memory of each (tracemalloc, in a separate run so the
timings are not slowed by tracing) and, at the end, the growth exponent of
each time against the number of branches (least-squares slope in log-log).

Targets (from the issue): ratio <= 2 at 200 x 200; cost growing no faster
than about branches^1.5.

Run:  python tests/bench/bench_scale.py [--sizes 50 100 200 300] [--repeat 3]
"""
from __future__ import annotations

import argparse
import resource
import sys
import time
import tracemalloc

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy.sparse import csgraph

from solver import Circuit, solve


def grid_circuit(n: int) -> Circuit:
    """n x n points at integer positions, 1 ohm bonds, a 1 V cell round the outside between opposite corners."""
    c = Circuit()
    for y in range(n):
        for x in range(n):
            if x + 1 < n:
                c.resistor(f"Rh{x}_{y}", f"p{x}_{y}", f"p{x + 1}_{y}", 1.0)
            if y + 1 < n:
                c.resistor(f"Rv{x}_{y}", f"p{x}_{y}", f"p{x}_{y + 1}", 1.0)
            c.place(f"p{x}_{y}", x, y)
    far = f"p{n - 1}_{n - 1}"
    c.wire("W1", "p0_0", "o1")
    c.place("o1", -1, 0)
    c.wire("W2", "o1", "o2")
    c.place("o2", -1, n)
    c.cell("B1", plus="o3", minus="o2", emf=1.0)
    c.place("o3", n - 1, n)
    c.wire("W3", "o3", far)
    return c


def nodal_solve(c: Circuit, ground: str) -> np.ndarray:
    """Resistor currents by modified nodal analysis (Ho, Ruehli & Brennan 1975), assembled with numpy."""
    parts = c.parts
    index = {p: i for i, p in enumerate(c.points)}
    kind = np.array([p.kind for p in parts])
    a = np.fromiter((index[p.a] for p in parts), np.int64, len(parts))
    b = np.fromiter((index[p.b] for p in parts), np.int64, len(parts))
    ohms = np.fromiter((p.resistance for p in parts), float, len(parts))
    emf = np.fromiter((p.emf for p in parts), float, len(parts))
    npt = len(index)
    wire = kind == "wire"
    adj = sp.coo_matrix((np.ones(wire.sum()), (a[wire], b[wire])), shape=(npt, npt))
    _, node = csgraph.connected_components(adj, directed=False)
    u, v = node[a], node[b]
    nn = int(node.max()) + 1
    col = np.arange(nn) - (np.arange(nn) > node[index[ground]])   # unknown of each node ...
    col[node[index[ground]]] = -1                                   # ... the ground has none
    m = nn - 1
    res = np.flatnonzero(kind == "resistor")
    cells = np.flatnonzero(kind == "cell")
    g = 1.0 / ohms[res]
    ru, rv = col[u[res]], col[v[res]]
    cu, cv = col[u[cells]], col[v[cells]]
    k = m + np.arange(len(cells))
    one = np.ones(len(cells))
    # KCL stamps of the conductances; a cell's current (plus -> minus through it) leaves
    # its plus node and enters its minus node; its own row: V+ - V- - r*i = E
    rows = np.concatenate([ru, rv, ru, rv, cu, cv, k, k, k])
    cols = np.concatenate([ru, rv, rv, ru, k, k, cu, cv, k])
    vals = np.concatenate([g, g, -g, -g, one, -one, one, -one, -ohms[cells]])
    ok = (rows >= 0) & (cols >= 0)
    size = m + len(cells)
    mat = sp.csc_matrix((vals[ok], (rows[ok], cols[ok])), shape=(size, size))
    rhs = np.zeros(size)
    rhs[m:] = emf[cells]
    x = spla.spsolve(mat, rhs)
    pot = np.append(x[:m], 0.0)          # index -1 reads the ground's 0 V
    return (pot[ru] - pot[rv]) * g


def best_time(fn, repeat: int) -> tuple[float, object]:
    best, out = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def peak_bytes(fn) -> int:
    tracemalloc.start()
    try:
        fn()
        return tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="+", default=[50, 100, 200, 300], help="grid sides, in points")
    ap.add_argument("--repeat", type=int, default=3, help="timed runs per size (best is kept)")
    args = ap.parse_args(argv)

    print(f"{'grid':>9} {'branches':>9} {'solve s':>9} {'nodal s':>9} {'ratio':>6} "
          f"{'solve MiB':>10} {'nodal MiB':>10} {'max rel diff':>13} {'loops':>12}")
    rows = []
    for n in args.sizes:
        c = grid_circuit(n)
        branches = sum(p.kind in ("resistor", "cell", "current_source") for p in c.parts)
        t_mesh, sol = best_time(lambda: solve(c, ground="p0_0"), args.repeat)
        t_nodal, i_nodal = best_time(lambda: nodal_solve(c, "p0_0"), args.repeat)
        names = [p.name for p in c.parts if p.kind == "resistor"]
        i_mesh = np.array([sol.current(nm) for nm in names])
        diff = float(np.max(np.abs(i_mesh - i_nodal)) / np.max(np.abs(i_nodal)))
        m_mesh = peak_bytes(lambda: solve(c, ground="p0_0")) / 2**20
        m_nodal = peak_bytes(lambda: nodal_solve(c, "p0_0")) / 2**20
        rows.append((branches, t_mesh, t_nodal))
        print(f"{n:>4}x{n:<4} {branches:>9} {t_mesh:>9.3f} {t_nodal:>9.3f} {t_mesh / t_nodal:>6.2f} "
              f"{m_mesh:>10.1f} {m_nodal:>10.1f} {diff:>13.1e} {getattr(sol, 'loop_method', '?'):>12}", flush=True)
    if len(rows) >= 2:
        br, tm, tn = (np.array(col, float) for col in zip(*rows))
        e_mesh = np.polyfit(np.log(br), np.log(tm), 1)[0]
        e_nodal = np.polyfit(np.log(br), np.log(tn), 1)[0]
        print(f"growth exponent (time ~ branches^k): solve k = {e_mesh:.2f}, nodal k = {e_nodal:.2f}")
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    print(f"peak resident set of the whole run: {rss / 1024:.0f} MiB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
