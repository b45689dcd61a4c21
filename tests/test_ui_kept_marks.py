"""The reading layer's kept pictures: marks that did not change come from a picture per view.

When more than ``ReadingLayer.FEW`` marks change at once, those marks are drawn over the
rest from then on, and each view keeps one picture per group of the others
(``ReadingLayer._split``, ``_kept_pictures``). What the canvas shows must not depend on
that: after every kind of edit it is held against

- a repaint from nothing (``resetCachedContent`` drops the kept pictures), which finds a
  picture left stale by a change it missed;
- the same marks drawn with no picture (``KEEP`` off, the split kept), which finds a
  picture that lands marks on other pixels than drawing them does;
- the layer drawn in one pass with no kept pictures and no marks drawn over the rest
  (``KEEP`` off), as before the pictures existed, which finds marks drawn in a different
  order of groups (a tag under the part marks it hangs among, say).

Antialiased edges may differ by a shade, so a pixel counts as wrong only when a colour
channel is more than 24 levels off (a text left behind or lost is far more).
"""
from __future__ import annotations

import os
import sys
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
from PySide6.QtCore import QPointF, Qt  # noqa: E402

from app.ui.annotations import ReadingLayer  # noqa: E402
from ui_support import canvas_pixels as _canvas, open_window  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parent / "bench"))
from bench_live import grid_sketch  # noqa: E402


def _off(a: np.ndarray, b: np.ndarray) -> int:
    return int((np.abs(a - b).max(axis=2) > 24).sum())


def _from_nothing(win) -> np.ndarray:
    win.view.resetCachedContent()
    win.view.viewport().repaint()
    return _canvas(win)


def _in_one_pass(win, monkeypatch) -> np.ndarray:
    """The canvas with every mark drawn in one pass, group by group, no picture kept."""
    layer = win.scene._readings
    with monkeypatch.context() as m:
        m.setattr(ReadingLayer, "KEEP", False)
        m.setattr(layer, "_hot", {})
        m.setattr(layer, "_hot_in", tuple({} for _ in ReadingLayer.GROUPS))
        for table in layer.tables:  # none drawn over the rest
            m.setattr(table, "_over", np.zeros_like(table._over))
        return _from_nothing(win)


def _drawn(win, monkeypatch) -> np.ndarray:
    """The canvas with the marks drawn, none copied from a picture (the same marks drawn over the rest)."""
    with monkeypatch.context() as m:
        m.setattr(ReadingLayer, "KEEP", False)
        return _from_nothing(win)


def _watch_pictures(monkeypatch) -> list:
    """What ``ReadingLayer._kept_pictures`` returns from now on, call by call (None: marks drawn)."""
    used = []
    inner = ReadingLayer._kept_pictures
    monkeypatch.setattr(ReadingLayer, "_kept_pictures", lambda self, *a: (used.append(r := inner(self, *a)), r)[1])
    return used


def _grid_window(qtbot, tmp_path):
    """A window on the 200-part grid of ``bench_live``, and its resistors' names."""
    win = open_window(qtbot, tmp_path, grid_sketch(200), size=(1100, 700), centre=(80, 60))
    return win, [p.name for p in win.editor.sketch.parts if p.kind == "resistor"]


def _settle(qtbot, win) -> None:
    qtbot.waitUntil(lambda: not win.solver.busy)
    win.scene.settle_marks()


def _move(qtbot, win, name: str, dy: int) -> None:
    """The part moved off what it touches (a plain move keeps it joined, and values stay)."""
    win.scene.select([name])
    win.editor.nudge(0, dy, apart=True)
    _settle(qtbot, win)


def test_kept_pictures_show_what_drawing_every_mark_shows_through_moves_values_and_scrolls(qtbot, tmp_path,
                                                                                         monkeypatch):
    used = _watch_pictures(monkeypatch)
    win, names = _grid_window(qtbot, tmp_path)
    victim, other = names[len(names) // 2], names[5]
    layer = win.scene._readings
    steps = []
    down = [False]

    def toggle() -> None:  # the part off its grid point and back on: most values change, the same marks each time
        _move(qtbot, win, victim, -1 if down[0] else 1)
        down[0] = not down[0]

    for whole in (False, True):
        if whole:
            win.view.zoom_fit()
        for k in range(3):
            toggle()
            steps.append(("move", whole, k))
        used.clear()
        toggle()
        _canvas(win)  # painted
        assert any(p is not None for p in used), ("the pictures are the path under test", whole)
        assert 0 < len(layer._hot) < sum(map(len, layer.tables))
        shown = _canvas(win)  # as the kept pictures drew it
        assert _off(shown, _from_nothing(win)) == 0, ("move with pictures", whole)
        assert _off(shown, _in_one_pass(win, monkeypatch)) == 0, ("move with pictures", whole)
        toggle()  # pictures made afresh, then used
        toggle()
        gone = next(n for n in names if n != victim and id(win.scene.part_items[n].current_mark) in layer._hot)
        win.scene.select([gone])  # a part whose marks are drawn over the rest
        gone_marks = {id(win.scene.part_items[gone].current_mark), id(win.scene.part_items[gone].drop_mark)}
        win.editor.delete_selection()
        _settle(qtbot, win)
        assert not gone_marks & layer._hot.keys()  # nothing holds the marks of a part no longer drawn
        assert not any(gone_marks & d.keys() for d in layer._hot_in)
        shown = _canvas(win)  # no marks of the deleted part left behind
        assert _off(shown, _from_nothing(win)) == 0, ("delete", whole)
        assert _off(shown, _in_one_pass(win, monkeypatch)) == 0, ("delete", whole)
        win.stack.undo()
        _settle(qtbot, win)
        steps.append(("undo", whole))
        toggle()
        steps.append(("move after undo", whole))
        win.editor.set_values(other, {"resistance": 47.0 if whole else 68.0})  # another part: kept marks change
        _settle(qtbot, win)
        steps.append(("value", whole))
        toggle()
        steps.append(("move after value", whole))
        win.scene.set_layer("potentials", False)
        steps.append(("tags off", whole))
        win.scene.set_layer("potentials", True)
        steps.append(("tags on", whole))
        if not whole:
            win.view.centerOn(QPointF(300, 200))  # a scroll: the pictures are of another place
            toggle()
            toggle()
            steps.append(("scroll and move", whole))
        shown = _canvas(win)  # after repaints of regions and of the whole view, with pictures fresh or stale
        assert _off(shown, _from_nothing(win)) == 0, steps
        assert _off(shown, _in_one_pass(win, monkeypatch)) == 0, steps


def test_values_changed_while_too_small_to_read_are_not_shown_from_a_stale_picture(qtbot, tmp_path, monkeypatch):
    """Marks take a new value without a repaint while no view can show them (zoomed far out);
    coming back to the very zoom and place of the kept pictures must show the new values."""
    win, names = _grid_window(qtbot, tmp_path)
    victim = names[len(names) // 2]
    for k in range(3):
        _move(qtbot, win, victim, 1 if k % 2 == 0 else -1)
    before = _canvas(win)
    assert win.scene._readings._kept  # pictures kept of this view
    transform = win.view.transform()
    h, v = win.view.horizontalScrollBar().value(), win.view.verticalScrollBar().value()
    win.view.scale(0.1, 0.1)
    _settle(qtbot, win)
    assert not win.scene.marks_readable()
    win.editor.set_values(names[0], {"resistance": 3.3})  # near the cell: values everywhere change
    _settle(qtbot, win)
    win.view.setTransform(transform)
    win.view.horizontalScrollBar().setValue(h)
    win.view.verticalScrollBar().setValue(v)
    win.view.viewport().repaint()
    shown = _canvas(win)
    assert _off(shown, before) > 0  # the new values are drawn
    assert _off(shown, _from_nothing(win)) == 0
    assert _off(shown, _in_one_pass(win, monkeypatch)) == 0


def test_every_unseen_change_of_a_kept_mark_makes_the_pictures_stale(qtbot, tmp_path):
    """The pictures are made for a count of changes to kept marks: a part mark or a loop mark
    in a kept picture that takes a new text with no repaint (no view can read it) must still
    count; one out of every picture's area leaves them as they are."""
    win, names = _grid_window(qtbot, tmp_path)
    for k in range(3):
        _move(qtbot, win, names[len(names) // 2], 1 if k % 2 == 0 else -1)
        _canvas(win)  # painted: the view keeps its pictures
    layer = win.scene._readings
    assert layer._pictured

    def pictured(mark) -> bool:
        left, top, right, bottom = mark._scene_box
        return any(left <= r and right >= x and top <= b and bottom >= y for x, y, r, b in layer._pictured)

    kept = [item.current_mark for item in win.scene.part_items.values()
            if item.current_mark is not None and item.current_mark.value and id(item.current_mark) not in layer._hot
            and pictured(item.current_mark)]
    loops = [m for m in win.scene._loops if m.active and id(m) not in layer._hot and pictured(m)]
    assert kept and loops
    loop = loops[0]
    loop.set_layout(loop.side, False)  # its name and current shown, laid out as for a paint
    loop.figure()
    for change in (lambda: kept[0].set_value(kept[0].value * 1.5, readable=False),
                   lambda: loop.set_loop(loop.name, 0.0123, loop.clockwise, readable=False),  # a new text
                   lambda: loop.set_loop(loop.name, 0.0123, not loop.clockwise, readable=False)):  # turned
        before = layer._changes
        change()
        assert layer._changes > before
    unseen = kept[0]
    layer._pictured = [(1e6, 1e6, 1e6 + 1, 1e6 + 1)]  # as if the view showed a place far from every mark
    before = layer._changes
    unseen.set_value(unseen.value * 1.5, readable=False)
    assert layer._changes == before


def test_a_part_dragged_with_the_mouse_leaves_the_canvas_as_a_full_repaint_draws_it(qtbot, tmp_path, monkeypatch):
    """Real mouse drags of a part off its grid point and back, painted after every one, as a
    person drags: from the second on, the marks that did not change come from kept pictures."""
    from test_ui_drawing import drag

    used = _watch_pictures(monkeypatch)
    win, names = _grid_window(qtbot, tmp_path)
    part = win.editor.sketch.part(names[len(names) // 2])
    mid = (part.x + 1, part.y) if part.rotation == 0 else (part.x, part.y + 1)  # on its body, off the middle (an upright part has its middle there too)
    _canvas(win)
    win.view.resetTransform()  # at 100 %, the part in the middle of the view
    win.view.centerOn(QPointF(mid[0] * 20.0, mid[1] * 20.0))
    _canvas(win)
    for k in range(4):
        a, b = (mid, (mid[0], mid[1] + 1)) if k % 2 == 0 else ((mid[0], mid[1] + 1), mid)
        drag(win, a, b, Qt.KeyboardModifier.AltModifier)  # Alt: off the parts it touches, so values change
        _settle(qtbot, win)
        assert win.editor.sketch.part(part.name).y == part.y + (1 if k % 2 == 0 else 0)
        used.clear()
        shown = _canvas(win)
    assert any(p is not None for p in used)
    assert _off(shown, _from_nothing(win)) == 0
    assert _off(shown, _drawn(win, monkeypatch)) == 0
    assert _off(shown, _in_one_pass(win, monkeypatch)) == 0
