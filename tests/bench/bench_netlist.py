"""Per-edit cost of the netlist and the cautions, with the solver's circuit building measured apart.

After every edit the window runs ``to_circuit()`` and then ``assess()`` on the
solved result. For the 200-part grid of bench_live.py and each demo sketch
this prints the median time of ``to_circuit()``, of replaying the same
``Circuit`` builder calls alone (resistor, cell, wire, place, …: the solver's
share), the difference (the netlist's own share) and of ``assess()``, on
one solution again and again and, as after an edit, each call on a fresh
solution (whose looked-up-once tables are then built inside the call). Each figure is given for several runs, since the machine is shared and noisy.
PySide6 is imported first, as in the desktop window.

Run:  python tests/bench/bench_netlist.py [--calls 300] [--runs 3]
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

from bench_solve_small import bench_sketches, median_ms  # noqa: E402  (imports PySide6 and the window)

from app.assess.cautions import assess  # noqa: E402
from app.sketch import netlist  # noqa: E402
from app.sketch.model import Sketch  # noqa: E402
from solver import Circuit, solve  # noqa: E402

_BUILDERS = ("resistor", "cell", "current_source", "wire", "switch", "place")


class _Recording(Circuit):
    """A Circuit that also keeps every builder call, to replay them alone."""

    def __init__(self) -> None:
        super().__init__()
        self.calls: list[tuple[str, tuple, dict]] = []

    def __getattribute__(self, name: str):
        attr = super().__getattribute__(name)
        if name not in _BUILDERS:
            return attr
        calls = super().__getattribute__("calls")

        def recorded(*args, **kwargs):
            calls.append((name, args, kwargs))
            return attr(*args, **kwargs)
        return recorded


def builder_calls(sketch: Sketch) -> list[tuple[str, tuple, dict]]:
    """The Circuit builder calls ``to_circuit(sketch)`` makes, in order."""
    plain = netlist.Circuit
    netlist.Circuit = _Recording
    try:
        return netlist.to_circuit(sketch).circuit.calls
    finally:
        netlist.Circuit = plain


def replay(calls: list[tuple[str, tuple, dict]]) -> Circuit:
    """A fresh circuit built by ``calls`` alone."""
    c = Circuit()
    for name, args, kwargs in calls:
        getattr(c, name)(*args, **kwargs)
    return c


def median_fresh_ms(fn, fresh: list) -> float:
    """Median wall time of ``fn(x)`` in milliseconds, once for each ``x`` in ``fresh``."""
    times = []
    for x in fresh:
        t0 = time.perf_counter()
        fn(x)
        times.append(time.perf_counter() - t0)
    return statistics.median(times) * 1e3


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--calls", type=int, default=300, help="timed calls per figure (the median is printed)")
    ap.add_argument("--runs", type=int, default=3, help="figures per sketch, to show the spread")
    args = ap.parse_args(argv)
    sketches = bench_sketches()
    print("medians in ms, one figure per run; netlist's own = to_circuit - Circuit builders")
    heads = ("to_circuit", "Circuit builders", "netlist own", "assess", "assess, fresh")
    print(f"{'sketch':<30} " + " ".join(f"{h:>18}" for h in heads))
    for name, sketch in sketches:
        calls = builder_calls(sketch)
        net = netlist.to_circuit(sketch)
        sol = solve(net.circuit, ground=net.ground)
        rows = []
        for _ in range(args.runs):
            total = median_ms(lambda: netlist.to_circuit(sketch), args.calls)
            builders = median_ms(lambda: replay(calls), args.calls)
            cautions = median_ms(lambda: assess(sketch, net, sol), args.calls)
            fresh = [solve(net.circuit, ground=net.ground) for _ in range(args.calls // 3)]
            first = median_fresh_ms(lambda s: assess(sketch, net, s), fresh)
            rows.append((total, builders, total - builders, cautions, first))
        cols = ["/".join(f"{r[k]:.2f}" for r in rows) for k in range(5)]
        print(f"{name:<30} " + " ".join(f"{c:>18}" for c in cols), flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
