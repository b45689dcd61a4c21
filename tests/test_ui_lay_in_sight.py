"""On a large sketch a new solution's values are laid only on the marks some view can show;
the others wait (``SketchScene._owed``) until they come into sight or the drawing pauses.

Whatever was put off, what the canvas shows must be what laying every value at once shows,
and every mark in sight must show the solution's own figures.
"""
from __future__ import annotations

import os
import sys
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402

from app.ui.scene import SketchScene  # noqa: E402
from app.units import format_value  # noqa: E402
from ui_support import canvas_pixels, open_window  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parent / "bench"))
from bench_live import grid_sketch  # noqa: E402


def _window(qtbot, tmp_path, monkeypatch):
    monkeypatch.setattr(SketchScene, "LAY_IN_SIGHT_FROM", 50)  # the 200-part grid counts as large
    win = open_window(qtbot, tmp_path, grid_sketch(200), size=(800, 560))
    win.scene._place_timer.setInterval(10 ** 6)  # no pause in the drawing (a pause lays every value)
    canvas_pixels(win)  # the window's first zoom to the whole sketch is done
    win.view.resetTransform()  # 100 %: the grid's far corner is out of sight
    win.view.centerOn(0, 0)
    canvas_pixels(win)
    return win


def _shown_as_solved(win, name: str) -> bool:
    item = win.scene.part_items[name]
    current, drop, _ = win.solver.latest.readings[name]
    return (item.current_mark.text == format_value(abs(current), "A")
            and item.drop_mark.text == format_value(abs(drop), "V"))


def _edit_everything(qtbot, win, names: list[str]) -> None:
    """A part near the cell moved off what it touches: nearly every value in the grid changes."""
    win.scene.select([names[0]])
    win.editor.nudge(0, 1, apart=True)
    assert win.solver.latest.generation == win.solver.generation  # solved inside the edit (few parts)


def test_marks_out_of_sight_are_laid_when_they_come_into_it(qtbot, tmp_path, monkeypatch):
    win = _window(qtbot, tmp_path, monkeypatch)
    names = [p.name for p in win.sketch.parts if p.kind == "resistor"]
    far = names[-1]
    assert _shown_as_solved(win, names[1])
    _edit_everything(qtbot, win, names)
    canvas_pixels(win)
    item = win.scene.part_items[names[1]]
    assert _shown_as_solved(win, names[1]), "a part in sight shows the new solution at once"
    assert far in win.scene._owed and not _shown_as_solved(win, far)  # put off: its old value stays
    item = win.scene.part_items[far]
    win.view.centerOn(item.sceneBoundingRect().center())
    scrolled = canvas_pixels(win)
    assert _shown_as_solved(win, far), "scrolled into sight: the new value is on it before it is painted"
    win.scene.settle_marks()  # every value laid, then the canvas drawn from nothing
    assert not win.scene._owed
    win.view.resetCachedContent()
    win.view.viewport().repaint()
    assert int((np.abs(canvas_pixels(win) - scrolled).max(axis=2) > 24).sum()) == 0


def test_zooming_out_and_back_in_shows_every_new_value(qtbot, tmp_path, monkeypatch):
    win = _window(qtbot, tmp_path, monkeypatch)
    names = [p.name for p in win.sketch.parts if p.kind == "resistor"]
    _edit_everything(qtbot, win, names)
    canvas_pixels(win)
    assert win.scene._owed
    win.view.zoom_fit()  # the whole grid in sight
    canvas_pixels(win)
    if win.scene.marks_readable():
        assert not win.scene._owed
    win.view.resetTransform()
    win.view.centerOn(win.scene.part_items[names[-1]].sceneBoundingRect().center())
    canvas_pixels(win)
    assert _shown_as_solved(win, names[-1])


def test_a_picture_of_the_sketch_lays_every_value(qtbot, tmp_path, monkeypatch):
    win = _window(qtbot, tmp_path, monkeypatch)
    names = [p.name for p in win.sketch.parts if p.kind == "resistor"]
    _edit_everything(qtbot, win, names)
    assert win.scene._owed
    win.scene.settle_marks()  # what ``shot`` and a pause in the drawing do
    assert not win.scene._owed
    assert all(_shown_as_solved(win, n) for n in names)


def test_a_small_sketch_lays_every_value_at_once(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, grid_sketch(200), size=(800, 560))
    assert len(win.sketch.parts) < SketchScene.LAY_IN_SIGHT_FROM
    canvas_pixels(win)
    win.view.resetTransform()
    win.view.centerOn(0, 0)
    names = [p.name for p in win.sketch.parts if p.kind == "resistor"]
    _edit_everything(qtbot, win, names)
    assert not win.scene._owed and _shown_as_solved(win, names[-1])
