"""Where a live edit's time goes, offscreen: the GUI thread's CPU time per stage of the flow.

Run: QT_QPA_PLATFORM=offscreen python tests/bench/bench_phases.py [--parts 200] [--view 100|whole]
     [--edit move|value] [--without STAGE]

Two ways to look at one edit (the edits are ``bench_live``'s: a part moved down and back up,
off its neighbours or joined to them, or a value cycled through seven):

- By default each stage in ``STAGES`` is timed where it runs, and its mean time per edit
  printed; a stage's time takes in the stages it calls (shown indented under it).
- ``--without STAGE`` switches that stage off for every other block of 12 edits in one
  process and prints the whole edit's median and 95th percentile with and without it. The
  difference is the stage's cost in place, with what it makes the rest do (the repaint a
  new solution asks for, say) and what it does to the processor's caches, which timing a
  stage alone misses. The drawing is wrong while a stage is off: this is for measuring only.

The host's speed drifts, so read the figures of one run against each other, not against
another run's. The GUI thread's CPU clock leaves out the host's other load (below 400 parts,
where the solve runs inside the edit).
"""
from __future__ import annotations

import argparse
import importlib
import os
import statistics
import sys
import time
from collections import defaultdict

from bench_live import grid_sketch, p95, wait_for_result

# (label, where, depth): ``where`` is "module:name" or "module:Class.method"
STAGES = [
    ("to circuit (netlist)", "app.ui.solve_worker:to_circuit", 0),
    ("solve", "app.ui.solve_worker:solve", 0),
    ("cautions", "app.ui.solve_worker:assess_result", 0),
    ("laying the solution on the marks", "app.ui.scene:SketchScene._show_solution", 0),
    ("placing marks", "app.ui.scene:SketchScene._place", 1),
    ("Readings table", "app.ui.readings:ReadingsModel.set_readings", 0),
    ("canvas paint", "app.ui.view:CanvasView.paintEvent", 0),
    ("reading layer", "app.ui.annotations:ReadingLayer.paint", 1),
    ("connection dots", "app.ui.items:JunctionLayer.paint", 1),
]
BLOCK = 12  # edits per block with --without; the first two of each block are not counted


def _owner_and_name(where: str) -> tuple[object, str]:
    module, name = where.split(":")
    owner = importlib.import_module(module)
    *classes, attr = name.split(".")
    for c in classes:
        owner = getattr(owner, c)
    return owner, attr


def _wrap(where: str, spent: dict[str, float], label: str, off: list[bool], live: list[bool]) -> None:
    """Replace ``where`` by a function that adds its CPU time to ``spent[label]`` while
    ``live[0]``, or does nothing while ``off[0]``. Done before any window exists: PySide looks
    a Qt virtual's Python override up per object, so a method swapped on the class later
    may not be seen."""
    owner, attr = _owner_and_name(where)
    inner = getattr(owner, attr)

    def timed(*args, **kwargs):
        if off[0]:
            return None
        t = time.thread_time()
        try:
            return inner(*args, **kwargs)
        finally:
            if live[0]:
                spent[label] += time.thread_time() - t

    setattr(owner, attr, timed)


def main(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--parts", type=int, default=200, choices=(20, 200, 2000))
    parser.add_argument("--view", default="100", choices=("100", "whole"))
    parser.add_argument("--edit", default="apart", choices=("apart", "move", "value"),
                        help="apart (default): a part moved off its neighbours (Alt held), most values "
                             "change; move: a plain move, the part stays joined; value: a new resistance")
    parser.add_argument("--edits", type=int, default=240, help="edits to make (default 240)")
    parser.add_argument("--without", choices=[label for label, _, _ in STAGES], metavar="STAGE",
                        help="a stage to switch off in every other block of edits: " +
                             ", ".join(f'"{label}"' for label, _, _ in STAGES))
    args = parser.parse_args(argv)

    spent: dict[str, float] = defaultdict(float)
    off, live = [False], [False]  # the stage named by --without is off; stages count during edits
    for label, where, _ in STAGES:
        _wrap(where, spent, label, off if label == args.without else [False], live)

    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from app.ui.main_window import MainWindow

    app = QApplication.instance() or QApplication(sys.argv[:1])
    ini = os.path.join(os.environ.get("TMPDIR", "/tmp"), "loopwright-bench-phases.ini")
    if os.path.exists(ini):
        os.remove(ini)  # a first start's window, as bench_live measures
    settings = QSettings(ini, QSettings.Format.IniFormat)
    win = MainWindow(settings)
    win.ask_to_save = lambda: "discard"
    win.resize(1200, 800)
    win.show()
    sketch = grid_sketch(args.parts)
    win.set_document(sketch, None)
    wait_for_result(app, win)
    if args.view == "100":
        win.view.resetTransform()
        win.view.centerOn(0, 0)
    else:
        win.view.zoom_fit()
    app.processEvents()
    names = [p.name for p in sketch.parts if p.kind == "resistor"]
    victim = names[len(names) // 2]

    times: dict[bool, list[float]] = {False: [], True: []}
    for k in range(args.edits):
        off[0] = args.without is not None and (k // BLOCK) % 2 == 1
        if args.edit != "value":
            win.scene.select([victim])  # clicked before the move, as a person does
            app.processEvents()
        counts = k >= BLOCK and k % BLOCK >= 2  # the first block warms up, and the first two of each switch
        live[0] = counts
        t = time.thread_time()
        if args.edit != "value":
            win.editor.nudge(0, 1 if k % 2 == 0 else -1, apart=args.edit == "apart")
        else:
            win.editor.set_values(victim, {"resistance": 1000.0 + (k % 7) * 100.0})
        wait_for_result(app, win)
        live[0] = False
        if counts:
            times[off[0]].append((time.thread_time() - t) * 1000.0)
    off[0] = False
    counted = len(times[False]) + len(times[True])

    print(f"{args.parts} parts, {args.view} %" if args.view == "100" else f"{args.parts} parts, whole sketch",
          f"{args.edit}: GUI-thread CPU per edit, ms")
    if args.without is None:
        xs = times[False]
        print(f"  edit, start to repainted: median {statistics.median(xs):.2f}  p95 {p95(xs):.2f}")
        for label, _, depth in STAGES:
            print(f"  {'  ' * depth}{label:<{36 - 2 * depth}} {spent[label] / counted * 1000.0:6.2f}")
    else:
        for without in (False, True):
            xs = times[without]
            print(f"  {'without' if without else 'with':<8} {args.without}: median {statistics.median(xs):6.2f}  "
                  f"p95 {p95(xs):6.2f}  ({len(xs)} edits)")
    win.close()
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
