"""Solve time when only values change, against a solve of a topology not seen before.

For the 200-part grid of bench_live.py and each demo sketch it prints the
median time of ``solve()`` in two ways, each on circuits made by
``to_circuit()`` before timing:

- new shape: every call solves a circuit whose topology the solver has not
  kept (the shape cache is emptied before each call), as after an edit to
  the drawing;
- values only: every call solves the same topology with a different value
  (one resistance, EMF or set current changed), as after a value edit.

Run:  python tests/bench/bench_value_resolve.py [--calls 300] [--rounds 3]
The two ways are timed call by call in alternation (each on the same load);
the range of the medians over rounds, and of their ratio, is printed.
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

from bench_solve_small import bench_sketches  # noqa: E402  (imports PySide6 and the window, as the app does)

from app.sketch.model import Sketch  # noqa: E402
from app.sketch.netlist import to_circuit  # noqa: E402
from solver import Circuit, solve  # noqa: E402
from solver.topocache import CACHE  # noqa: E402

VALUE_KEYS = ("resistance", "emf", "current", "internal_resistance")


def variants(sketch: Sketch, count: int) -> list[Circuit]:
    """``count`` circuits of the sketch, each with one part's value scaled a little differently."""
    valued = [(i, k) for i, p in enumerate(sketch.parts) for k in VALUE_KEYS if p.values.get(k)]
    out = []
    for n in range(count):
        i, k = valued[n % len(valued)]
        part = sketch.parts[i]
        old = part.values[k]
        part.values[k] = old * (1.0 + 1e-3 * (n + 1))
        out.append(to_circuit(sketch).circuit)
        part.values[k] = old
    return out


def paired_ms(circuits: list[Circuit], ground: str | None) -> tuple[float, float]:
    """Median milliseconds of a new-shape solve and of a values-only solve, timed in alternation.

    Each pair empties the cache, solves one variant (new shape), then the
    next variant (same shape, other values), so both see the same load.
    """
    miss, hit = [], []
    for c, d in zip(circuits, circuits[1:] + circuits[:1]):
        CACHE.clear()
        t0 = time.perf_counter()
        solve(c, ground=ground)
        t1 = time.perf_counter()
        solve(d, ground=ground)
        t2 = time.perf_counter()
        miss.append(t1 - t0)
        hit.append(t2 - t1)
    return statistics.median(miss) * 1e3, statistics.median(hit) * 1e3


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--calls", type=int, default=300, help="timed calls per way and round")
    ap.add_argument("--rounds", type=int, default=3, help="rounds of both ways, back to back")
    args = ap.parse_args(argv)
    sketches = bench_sketches()
    print(f"{'sketch':<34} {'parts':>5} {'new shape ms':>15} {'values only ms':>15} {'ratio':>11}")
    for name, sketch in sketches:
        ground = to_circuit(sketch).ground
        circuits = variants(sketch, args.calls)
        for c in circuits[:5]:   # warm-up
            solve(c, ground=ground)
        miss, hit = map(list, zip(*(paired_ms(circuits, ground) for _ in range(args.rounds))))
        ratios = [h / m for h, m in zip(hit, miss)]
        print(f"{name:<34} {len(sketch.parts):>5} {min(miss):>7.3f}–{max(miss):<7.3f} {min(hit):>7.3f}–{max(hit):<7.3f}"
              f" {min(ratios):>5.0%}–{max(ratios):<5.0%}", flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
