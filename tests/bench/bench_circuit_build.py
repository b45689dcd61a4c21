"""Cost of building a solver ``Circuit`` from a sketch's parts (part of every live re-solve).

Records the ``Circuit`` calls that ``to_circuit()`` makes for the 200-part
grid of bench_live.py and for each demo sketch, then times replaying just
those calls into a new ``Circuit`` (the value and name checks included),
so the solver's share of the netlist time is measured apart from the
sketch's own geometry work. PySide6 is imported first, as in the app.

Run:  python tests/bench/bench_circuit_build.py [--calls 300]
"""
from __future__ import annotations

import argparse
import glob
import os
import sys

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
sys.path[:0] = [ROOT, os.path.dirname(os.path.abspath(__file__))]   # this checkout's code, then the benches

from bench_live import grid_sketch  # noqa: E402  (imports PySide6 and the window, as the app does)
from bench_solve_small import median_ms  # noqa: E402

import app.sketch.netlist as netlist  # noqa: E402
from app.sketch.fileio import load_sketch  # noqa: E402
from solver import Circuit  # noqa: E402

BUILDERS = ("resistor", "cell", "current_source", "wire", "switch", "place")


class _Recorder(Circuit):
    """A Circuit that also keeps each building call made on it."""

    def __init__(self) -> None:
        super().__init__()
        self.calls: list[tuple[str, tuple, dict]] = []

    def __getattribute__(self, name: str):
        attr = super().__getattribute__(name)
        if name in BUILDERS:
            calls = super().__getattribute__("calls")

            def record(*args, **kwargs):
                calls.append((name, args, kwargs))
                return attr(*args, **kwargs)
            return record
        return attr


def recorded_calls(sketch) -> list[tuple[str, tuple, dict]]:
    """The Circuit calls ``to_circuit(sketch)`` makes, in order."""
    real = netlist.Circuit
    netlist.Circuit = _Recorder
    try:
        return netlist.to_circuit(sketch).circuit.calls
    finally:
        netlist.Circuit = real


def build(calls: list[tuple[str, tuple, dict]]) -> Circuit:
    c = Circuit()
    for name, args, kwargs in calls:
        getattr(c, name)(*args, **kwargs)
    return c


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--calls", type=int, default=300, help="timed builds per sketch (the median is printed)")
    args = ap.parse_args(argv)
    sketches = [("grid, 200 parts (bench_live)", grid_sketch(200))]
    for path in sorted(glob.glob(os.path.join(ROOT, "demo_circuits", "*.lwsk"))):
        sketches.append((os.path.basename(path), load_sketch(path)))
    print(f"{'sketch':<34} {'parts':>5} {'calls':>5} {'build ms':>9} {'us/call':>8}")
    for name, sketch in sketches:
        calls = recorded_calls(sketch)
        n_parts = len(build(calls))
        t = median_ms(lambda: build(calls), args.calls)
        print(f"{name:<34} {n_parts:>5} {len(calls):>5} {t:>9.3f} {t * 1e3 / len(calls):>8.2f}", flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
