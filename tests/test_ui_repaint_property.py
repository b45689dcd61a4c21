"""After any run of edits the canvas shows what a full repaint draws: nothing stale, nothing lost.

The canvas repaints only what an edit changed (the marks' boxes, often a region of many
small rectangles, see ``ReadingLayer._repaint``; the paper under a moved part, see
``items.OnPaper``). Random edits (new values, moves, undo,
scrolling) are made through the editor; after each one the window's last painted pixels
are held against a full repaint of the canvas. Antialiased edges where marks overlap may
come out a shade apart when drawn in pieces, so a pixel counts as wrong only when a colour
channel is more than 24 levels off (a text or arrow left behind or lost is far more).
"""
from __future__ import annotations

import os
import random
import sys
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtCore import QPointF  # noqa: E402

from ui_support import canvas_pixels as _canvas, open_window  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parent / "bench"))
from bench_live import grid_sketch  # noqa: E402


def _wrong_after_random_edits(qtbot, tmp_path, parts: int, whole: bool, edits: int) -> list:
    win = open_window(qtbot, tmp_path, grid_sketch(parts), size=(1100, 700), centre=(80, 60))
    if whole:
        win.view.zoom_fit()
    rng = random.Random(5)
    names = [p.name for p in win.editor.sketch.parts if p.kind == "resistor"]
    wrong = []
    for k in range(edits):
        op, name = rng.random(), rng.choice(names)
        if op < 0.5:
            win.editor.set_values(name, {"resistance": rng.choice([3.3, 10.0, 470.0, 1e3, 1.2e3, 2.2e3, 1e5])})
        elif op < 0.8:
            win.scene.select([name])
            win.editor.nudge(rng.choice([-1, 0, 1]), rng.choice([-1, 0, 1]))
        elif op < 0.9:
            win.stack.undo()
        elif not whole:
            win.view.centerOn(QPointF(rng.randrange(0, 600), rng.randrange(0, 400)))
        qtbot.waitUntil(lambda: not win.solver.busy)
        win.scene.settle_marks()  # marks waiting for a quiet moment take their places now
        shown = _canvas(win)
        win.view.resetCachedContent()  # the paper with the drawing on it too, painted afresh
        win.view.viewport().repaint()
        off = int((np.abs(shown - _canvas(win)).max(axis=2) > 24).sum())
        if off:
            wrong.append((k, name, off))
    return wrong


def test_random_edits_on_a_small_sketch_leave_the_canvas_as_a_full_repaint_draws_it(qtbot, tmp_path):
    assert _wrong_after_random_edits(qtbot, tmp_path, 20, whole=False, edits=60) == []


@pytest.mark.slow
@pytest.mark.parametrize("whole", [False, True])
def test_random_edits_on_a_large_sketch_leave_the_canvas_as_a_full_repaint_draws_it(qtbot, tmp_path, whole):
    assert _wrong_after_random_edits(qtbot, tmp_path, 200, whole=whole, edits=150) == []


def test_an_edit_that_changes_most_values_repaints_every_view_that_shows_them(qtbot, tmp_path, monkeypatch):
    """A move that changes more marks than ``ReadingLayer.FEW`` has each view repaint all it shows
    (not a region of that many boxes): the canvas must then match a full repaint, at 100 % and seen whole."""
    from app.ui.annotations import ReadingLayer

    sizes = []
    inner = ReadingLayer._repaint
    monkeypatch.setattr(ReadingLayer, "_repaint",
                        lambda self, boxes, marks=None: (sizes.append(len(boxes)), inner(self, boxes, marks)))
    win = open_window(qtbot, tmp_path, grid_sketch(200), size=(1100, 700), centre=(80, 60))
    names = [p.name for p in win.editor.sketch.parts if p.kind == "resistor"]
    victim = names[len(names) // 2]  # as bench_live moves it: the loops and most values change
    for whole in (False, True):
        if whole:
            win.view.zoom_fit()
        for k in range(4):
            sizes.clear()
            win.scene.select([victim])
            win.editor.nudge(0, 1 if k % 2 == 0 else -1, apart=True)  # off the parts it touches
            qtbot.waitUntil(lambda: not win.solver.busy)
            win.scene.settle_marks()
            assert max(sizes) > ReadingLayer.FEW  # the path under test
            shown = _canvas(win)
            win.view.resetCachedContent()
            win.view.viewport().repaint()
            assert int((np.abs(shown - _canvas(win)).max(axis=2) > 24).sum()) == 0, (whole, k)
