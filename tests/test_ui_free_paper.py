"""Free paper beyond the drawing: the views scroll past its edges, and it grows in steps.

A person zoomed in must be able to scroll to empty paper beside the drawing and draw there;
a part dragged out past the drawing's edge must not move or repaint the whole canvas on
every step (the paper grows once, by a margin, not with each step).
"""
from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QPointF, QRectF, Qt  # noqa: E402

from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.items import OnPaper, to_scene  # noqa: E402
from app.ui.view import WIRE  # noqa: E402
from test_ui_live_solver import lattice  # noqa: E402
from ui_support import open_window  # noqa: E402


def ring_sketch() -> Sketch:
    """A 6 V cell and two resistors in a ring of wires."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 6.0, "internal_resistance": 0.0}))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, 0, False, {"resistance": 100.0}))
    s.add_part(PlacedPart("resistor", "R2", 12, 0, 90, False, {"resistance": 200.0}))
    s.add_wire(Wire(0, 0, 4, 0))
    s.add_wire(Wire(8, 0, 12, 0))
    s.add_wire(Wire(0, 4, 12, 4))
    return s


def _seen(win) -> QRectF:
    """The scene area the canvas shows."""
    return win.view.mapToScene(win.view.viewport().rect()).boundingRect()


def test_zoomed_in_the_view_scrolls_into_free_paper_on_every_side(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, ring_sketch(), size=(700, 500))
    win.view.scale(4, 4)  # the drawing is wider and taller than the canvas now
    drawing = win.scene.content_rect()
    h, v = win.view.horizontalScrollBar(), win.view.verticalScrollBar()
    free = 20 * 20.0  # twenty grid steps of empty paper at least
    h.setValue(h.maximum())
    assert _seen(win).right() >= drawing.right() + free
    h.setValue(h.minimum())
    assert _seen(win).left() <= drawing.left() - free
    v.setValue(v.maximum())
    assert _seen(win).bottom() >= drawing.bottom() + free
    v.setValue(v.minimum())
    assert _seen(win).top() <= drawing.top() - free


def test_a_part_dragged_out_past_the_drawing_repaints_only_around_it(qtbot, tmp_path, monkeypatch):
    sketch = lattice(4, 5)
    win = open_window(qtbot, tmp_path, sketch, size=(900, 700))
    win.view.zoom_fit()
    qtbot.wait(50)
    painted = []
    original = OnPaper.paint_on

    def counting(self, painter, option, exact=False):
        painted.append(self)
        original(self, painter, option, exact)

    monkeypatch.setattr(OnPaper, "paint_on", counting)
    bottom = max(p.y for p in sketch.parts)
    name = next(p.name for p in sketch.parts if p.y == bottom and p.rotation == 0 and p.x == 4)
    win.scene.select([name])
    win.view.setFocus()
    per_step = []
    for _ in range(8):  # down, off the lattice into the empty paper below it
        painted.clear()
        qtbot.keyClick(win.view, Qt.Key.Key_Down)
        qtbot.waitUntil(lambda: win.solver.latest is not None
                        and win.solver.latest.generation == win.solver.generation)
        qtbot.wait(5)
        per_step.append(len(painted))
    assert win.sketch.part(name).y == bottom + 8
    seen_whole = len(sketch.parts) + len(sketch.wires)
    # the first step may grow the paper (one whole repaint); the later ones paint the
    # moved part, its new wires and neighbours, not the whole drawing
    assert max(per_step[2:]) < seen_whole / 2, per_step


def test_keys_walk_the_cursor_far_past_the_drawing_and_the_view_follows(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, ring_sketch(), size=(700, 500))
    win.view.set_mode(WIRE)
    win.view.setFocus()
    start = win.view.cursor_point
    for _ in range(40):  # Shift+arrow: four grid steps each, 160 in all: far past any margin
        qtbot.keyClick(win.view, Qt.Key.Key_Right, Qt.KeyboardModifier.ShiftModifier)
    assert win.view.cursor_point == (start[0] + 160, start[1])
    assert _seen(win).contains(to_scene(win.view.cursor_point))
    assert win.scene.sceneRect().contains(to_scene(win.view.cursor_point) + QPointF(400, 0))


def test_zoom_to_fit_takes_the_paper_back_to_the_drawing_after_a_far_part_is_deleted(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, ring_sketch(), size=(700, 500), active=True)
    far = win.editor.place("resistor", 400, 300)  # 400 grid steps out: the paper grows to reach it
    assert win.scene.sceneRect().contains(to_scene((400, 300)))
    win.scene.select([far])
    win.view.setFocus()
    qtbot.keyClick(win.view, Qt.Key.Key_Delete)
    assert far not in {p.name for p in win.sketch.parts}
    assert win.scene.sceneRect().contains(to_scene((400, 300)))  # kept while editing: no jump
    qtbot.keyClick(win.view, Qt.Key.Key_Home)  # Zoom to Fit
    paper = win.scene.sceneRect()
    drawing = QRectF(to_scene((0, 0)), to_scene((12, 4)))
    assert paper.contains(drawing.adjusted(-400, -400, 400, 400))  # free paper on every side still
    assert paper.width() < drawing.width() + 3 * win.scene.PAPER_MARGIN  # but not out to the part gone
    win.stack.undo()  # the part comes back, and the paper reaches it again
    assert win.scene.sceneRect().contains(to_scene((400, 300)))
