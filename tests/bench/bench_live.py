"""Time from an edit to the annotations being updated, offscreen, on grids of resistors.

Run: QT_QPA_PLATFORM=offscreen python tests/bench/bench_live.py [--parts 200]
Prints median and 95th percentile for moving a part and for changing a
value, on sketches of about 20, 200 and 2,000 parts. Targets (issue 3):
p95 under 16 ms at 200 parts, under 100 ms at 2,000.

The sketch is a lattice of resistors butted terminal to terminal. "move a part" is a plain
move: the part stays joined to its neighbours by new wires, so the circuit and most values
stay as they were. "move apart" is the move with Alt held: the part comes off its
neighbours, the circuit changes and most values on the drawing change, the heaviest edit.

By default the part moves down and back up and the value cycles through seven,
as when a person tries a change and takes it back; ``--fresh`` makes every edit
bring a state not seen before (a different part moved each time, a new value).
"drag a part" is a drag as a person makes one: a part on the lattice's bottom edge
pulled ten grid steps down into the free paper (each step a state not seen before,
joined to its old neighbours by new wires), then taken back with undo (not timed)
and the next drag begun on another part of that edge.

``--cpu`` times with the GUI thread's CPU time instead of the wall clock: the host's other
load weighs less, so compare variants with it. Only below 400 parts, where the solve runs
inside the edit: above, the worker thread's solve is not counted.

Two times per edit: "handled" is until the edit call returns (the drawing is
free again; large sketches are solved on a worker thread after that), and
"updated" until the newest solution is on the drawing and the canvas has
repainted (the "paints" column counts canvas repaints per edit, to show the
painting is inside the time).

This host is shared and its speed swings (up to 1.7x within minutes has been seen), so
each run also times a fixed pure-Python yardstick (``yardstick_ms``) before and after:
figures from runs whose yardsticks differ are from hosts of different speed.
"""
from __future__ import annotations

import argparse
import math
import os
import statistics
import sys
import time

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import QEvent, QObject, QSettings  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

from app.sketch.model import PlacedPart, Sketch  # noqa: E402
from app.ui.main_window import MainWindow  # noqa: E402


DRAG_STEPS = 10  # grid steps of one drag in "drag a part"


def grid_sketch(n_parts: int) -> Sketch:
    """A rows × cols lattice of 1 kΩ resistors joined at their terminals, fed by a 12 V cell."""
    cols = max(2, round(math.sqrt(n_parts / 2)) + 1)
    rows = max(2, round((n_parts + cols) / (2 * cols - 1)))
    s = Sketch()
    k = 0
    for r in range(rows):
        for c in range(cols - 1):
            k += 1
            s.add_part(PlacedPart("resistor", f"R{k}", 4 * c, 4 * r, 0, False, {"resistance": 1000.0 + k}))
    for r in range(rows - 1):
        for c in range(cols):
            if r == 0 and c == 0:
                s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0, "internal_resistance": 0.5}))
                continue
            k += 1
            s.add_part(PlacedPart("resistor", f"R{k}", 4 * c, 4 * r, 90, False, {"resistance": 1000.0 + k}))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


class PaintCounter(QObject):
    """Counts paint events of the canvas."""

    def __init__(self) -> None:
        super().__init__()
        self.count = 0

    def eventFilter(self, obj, event) -> bool:  # noqa: N802 (Qt's name)
        if event.type() == QEvent.Type.Paint:
            self.count += 1
        return False


def wait_for_result(app: QApplication, win: MainWindow) -> None:
    solver = win.solver
    while solver.latest is None or solver.latest.generation != solver.generation:
        app.processEvents()
        time.sleep(0.0002)
    app.processEvents()  # let the canvas repaint what changed


def measure(app: QApplication, win: MainWindow, edit, reps: int, paints: PaintCounter, prepare=None,
            clock=time.perf_counter):
    """Time ``edit(k)`` for k < reps by ``clock``; ``prepare(k)`` (a selection, say) runs and settles first."""
    handled, updated, painted = [], [], 0
    for k in range(reps):
        if prepare is not None:
            prepare(k)
            app.processEvents()
        before = paints.count
        t0 = clock()
        edit(k)
        t1 = clock()
        wait_for_result(app, win)
        t2 = clock()
        handled.append((t1 - t0) * 1000.0)
        updated.append((t2 - t0) * 1000.0)
        painted += paints.count - before
    return handled, updated, painted / reps


def yardstick_ms(clock=time.perf_counter) -> float:
    """The median time of a fixed pure-Python job (dict, attribute and call work, as the
    edits do), over nine runs: how fast the host is right now."""
    class Box:
        __slots__ = ("v",)

        def __init__(self, v: float) -> None:
            self.v = v

    def job() -> float:
        d = {}
        for i in range(20000):
            d[i % 997] = Box(i * 0.5)
        return sum(b.v for b in d.values())

    times = []
    for _ in range(9):
        t0 = clock()
        job()
        times.append((clock() - t0) * 1000.0)
    return statistics.median(times)


def p95(xs: list[float]) -> float:
    xs = sorted(xs)
    return xs[min(len(xs) - 1, math.ceil(0.95 * len(xs)) - 1)]


def main(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--parts", type=int, nargs="*", choices=(20, 200, 2000), default=[20, 200, 2000],
                        help="sketch sizes to measure (default: all three)")
    parser.add_argument("--fresh", action="store_true",
                        help="edits that never bring back an earlier state (by default a part moves down "
                             "and back up and a value cycles through seven, so texts and windows recur)")
    parser.add_argument("--cpu", action="store_true",
                        help="time with the GUI thread's CPU time, not the wall clock")
    args = parser.parse_args(argv)
    clock = time.thread_time if args.cpu else time.perf_counter
    sizes = [c for c in ((20, 60), (200, 40), (2000, 20)) if c[0] in args.parts]
    app = QApplication.instance() or QApplication(sys.argv[:1])
    # settings of its own, emptied first: every run measures the window as a first start lays it out
    # (a window closed by an earlier run would otherwise bring back its docks and size)
    ini = os.path.join(os.environ.get("TMPDIR", "/tmp"), "loopwright-bench.ini")
    if os.path.exists(ini):
        os.remove(ini)
    settings = QSettings(ini, QSettings.Format.IniFormat)
    before = yardstick_ms(clock)
    print(f"{'parts':>6} {'view':<12} {'edit':<14} {'handled: median':>15} {'p95':>6}   "
          f"{'updated: median':>15} {'p95':>6} {'paints':>6}  target (updated p95)")
    for (n, reps), zoom in [(c, z) for c in sizes for z in ("100 %", "whole sketch")]:
        win = MainWindow(settings)
        win.ask_to_save = lambda: "discard"
        win.resize(1200, 800)
        win.show()
        paints = PaintCounter()
        win.view.viewport().installEventFilter(paints)
        sketch = grid_sketch(n)
        win.set_document(sketch, None)
        wait_for_result(app, win)
        app.processEvents()
        if zoom == "100 %":
            win.view.resetTransform()
            win.view.centerOn(0, 0)
        else:
            win.view.zoom_fit()
        app.processEvents()
        target = {200: "p95 < 16 ms", 2000: "p95 < 100 ms"}.get(n, "")
        names = [p.name for p in sketch.parts if p.kind == "resistor"]
        victim = names[len(names) // 2]

        def pick(k: int) -> None:
            # a new part each time (--fresh), clicked before the move as a person does
            win.scene.select([names[(len(names) // 2 + 7 * k) % len(names)] if args.fresh else victim])

        def move(k: int) -> None:
            win.editor.nudge(0, 1 if args.fresh or k % 2 == 0 else -1)  # --fresh: never moved back

        def move_apart(k: int) -> None:  # as with Alt held: off the parts it touches, so most values change
            win.editor.nudge(0, 1 if args.fresh or k % 2 == 0 else -1, apart=True)

        def revalue(k: int) -> None:
            value = 1000.0 + 13.7 * (k + 1) if args.fresh else 1000.0 + (k % 7) * 100.0
            win.editor.set_values(victim, {"resistance": value})

        bottom = max(p.y for p in sketch.parts if p.kind == "resistor")
        edge = [p.name for p in sketch.parts if p.kind == "resistor" and p.rotation == 0 and p.y == bottom]

        def drag_start(k: int) -> None:
            # every tenth step a new drag: the last one taken back (undo), the next part along
            # the lattice's bottom edge picked, to be pulled down into the free paper below
            if k % DRAG_STEPS == 0:
                if k:
                    win.stack.undo()
                    wait_for_result(app, win)
                win.scene.select([edge[(len(edge) // 2 + 3 * (k // DRAG_STEPS)) % len(edge)]])

        def drag(k: int) -> None:
            win.editor.nudge(0, 1)  # one grid step further on: a state not seen before

        for label, fn, prepare in (("move a part", move, pick), ("move apart", move_apart, pick),
                                   ("change value", revalue, None), ("drag a part", drag, drag_start)):
            handled, updated, painted = measure(app, win, fn, reps, paints, prepare, clock)
            print(f"{len(sketch.parts):>6} {zoom:<12} {label:<14} {statistics.median(handled):>15.1f} "
                  f"{p95(handled):>6.1f}   {statistics.median(updated):>15.1f} {p95(updated):>6.1f} "
                  f"{painted:>6.1f}  {target}")
        win.close()
        win.deleteLater()
        app.processEvents()
    print(f"host yardstick (a fixed pure-Python job): {before:.2f} ms before, {yardstick_ms(clock):.2f} ms after")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
