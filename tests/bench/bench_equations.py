"""Per-call cost of the hand analysis on sketch-sized circuits (the Equations panel's refresh after each edit).

For grids of 20, 200 and 399 parts (``grid_sketch`` of bench_live.py) it
prints the parts, branches and loops and the median time of ``analyse()``, of
``equations(a, "branch")`` and ``equations(a, "mesh")`` on a fresh analysis
(as the panel does after an edit), and of ``check_equation`` for a right and
a wrong KVL equation. Targets: each form ≤ 10 ms at 200 parts and ≤ 25 ms at
399, ``analyse()`` ≤ 5 ms at 200. PySide6 is imported first, as in the
desktop window.

Run:  python tests/bench/bench_equations.py [--calls 30]
"""
from __future__ import annotations

import argparse
import os
import statistics
import sys
import time

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
sys.path[:0] = [ROOT, os.path.dirname(os.path.abspath(__file__))]   # this checkout's code, then bench_live

from bench_live import grid_sketch  # noqa: E402  (imports PySide6 and the window, as the app does)

from app.analysis import analyse, check_equation, equations  # noqa: E402
from app.sketch.netlist import to_circuit  # noqa: E402
from solver import solve  # noqa: E402


def median_ms(fn, calls: int, setup=lambda: None) -> float:
    """Median wall time of ``fn(setup())`` in milliseconds (``setup`` not timed), after a few warm-up calls."""
    for _ in range(3):
        fn(setup())
    times = []
    for _ in range(calls):
        arg = setup()
        t0 = time.perf_counter()
        fn(arg)
        times.append(time.perf_counter() - t0)
    return statistics.median(times) * 1e3


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--calls", type=int, default=30, help="timed calls per figure (the median is printed)")
    args = ap.parse_args(argv)
    print(f"{'sketch':<10} {'parts':>5} {'branches':>8} {'loops':>5} {'analyse ms':>11} {'branch ms':>10} "
          f"{'mesh ms':>8} {'check ok ms':>12} {'check bad ms':>13}")
    for n in (20, 200, 399):
        net = to_circuit(grid_sketch(n))
        c = net.circuit
        sol = solve(c, ground=net.ground)
        a = analyse(sol, c)
        fresh = lambda: analyse(sol, c)   # noqa: E731  (each edit brings a new analysis)
        right = equations(a, "branch")[0].text
        wrong = right.replace(" - ", " + ", 1)
        t_an = median_ms(lambda _: analyse(sol, c), args.calls)
        t_br = median_ms(lambda x: equations(x, "branch"), args.calls, fresh)
        t_me = median_ms(lambda x: equations(x, "mesh"), args.calls, fresh)
        t_ok = median_ms(lambda x: check_equation(x, right), max(3, args.calls // 5), fresh)
        t_bad = median_ms(lambda x: check_equation(x, wrong), max(3, args.calls // 5), fresh)
        print(f"grid {n:<5} {len(sol.parts):>5} {len(a.branches.branches):>8} {len(sol.loops):>5} {t_an:>11.2f} "
              f"{t_br:>10.2f} {t_me:>8.2f} {t_ok:>12.2f} {t_bad:>13.2f}", flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
