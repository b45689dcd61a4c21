"""Per-call cost of the solver and the netlist on sketch-sized circuits (the live re-solve after each edit).

For the 200-part grid of bench_live.py and each demo sketch it prints the
parts, the loops used and the median time of ``to_circuit()`` and of
``solve()`` over many calls. PySide6 is imported first, as in the desktop
window, since its import hook makes every run-time import cost more.

Run:  python tests/bench/bench_solve_small.py [--calls 300]
"""
from __future__ import annotations

import argparse
import glob
import os
import statistics
import sys
import time

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
sys.path[:0] = [ROOT, os.path.dirname(os.path.abspath(__file__))]   # this checkout's code, then bench_live

from bench_live import grid_sketch  # noqa: E402  (imports PySide6 and the window, as the app does)

from app.sketch.fileio import load_sketch  # noqa: E402
from app.sketch.model import Sketch  # noqa: E402
from app.sketch.netlist import to_circuit  # noqa: E402
from solver import solve  # noqa: E402


def median_ms(fn, calls: int) -> float:
    """Median wall time of ``fn()`` in milliseconds, after a few warm-up calls."""
    for _ in range(5):
        fn()
    times = []
    for _ in range(calls):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times) * 1e3


def bench_sketches() -> list[tuple[str, Sketch]]:
    """The sketches the per-call benches time: bench_live's 200-part grid and every demo."""
    sketches: list[tuple[str, Sketch]] = [("grid, 200 parts (bench_live)", grid_sketch(200))]
    for path in sorted(glob.glob(os.path.join(ROOT, "demo_circuits", "*.lwsk"))):
        sketches.append((os.path.basename(path), load_sketch(path)))
    return sketches


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--calls", type=int, default=300, help="timed calls per sketch (the median is printed)")
    args = ap.parse_args(argv)
    sketches = bench_sketches()
    print(f"{'sketch':<34} {'parts':>5} {'loops':>5} {'method':>11} {'to_circuit ms':>14} {'solve ms':>9}")
    for name, sketch in sketches:
        net = to_circuit(sketch)
        sol = solve(net.circuit, ground=net.ground)
        t_net = median_ms(lambda: to_circuit(sketch), args.calls)
        t_solve = median_ms(lambda: solve(net.circuit, ground=net.ground), args.calls)
        print(f"{name:<34} {len(sketch.parts):>5} {len(sol.loops):>5} {sol.loop_method:>11} "
              f"{t_net:>14.3f} {t_solve:>9.3f}", flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
