"""The current and drop marks are painted by one layer: what the canvas shows follows every edit.

These tests look at the canvas's own pixels (``QWidget.grab``), so a mark the layer forgot to
repaint, left behind at an old place or drew while its layer is off shows up as wrong pixels.
The values themselves are checked against the engine elsewhere (test_ui_drawing).
"""
from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import QRectF  # noqa: E402
from PySide6.QtGui import QColor  # noqa: E402

from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.theme import current_theme  # noqa: E402
from ui_support import open_window, painted_canvas  # noqa: E402


def divider() -> Sketch:
    """A 9 V cell across two resistors in series (1.5 mA), drawn as one window."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 9.0, "internal_resistance": 0.0}))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, 0, False, {"resistance": 2000.0}))
    s.add_part(PlacedPart("resistor", "R2", 12, 0, 90, False, {"resistance": 4000.0}))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    for w in (Wire(0, 0, 4, 0), Wire(8, 0, 12, 0), Wire(0, 4, 12, 4)):
        s.add_wire(w)
    return s


def ink_in(win, scene_rect: QRectF, colour: QColor) -> int:
    """Pixels of the canvas inside ``scene_rect`` nearer ``colour`` than the paper (the sum of
    channel differences under 150 of the 400-odd between the mark colours and the paper)."""
    image = painted_canvas(win)  # what was painted last: the canvas repaints what changed, and only that
    box = win.view.mapFromScene(scene_rect).boundingRect().intersected(image.rect())
    want = (colour.red(), colour.green(), colour.blue())
    n = 0
    for y in range(box.top(), box.bottom() + 1):
        for x in range(box.left(), box.right() + 1):
            c = QColor(image.pixel(x, y))
            if sum(abs(a - b) for a, b in zip((c.red(), c.green(), c.blue()), want)) < 150:
                n += 1
    return n


def text_box(win, name: str, which: str) -> QRectF:
    item = win.scene.part_items[name]
    mark = item.current_mark if which == "current" else item.drop_mark
    return mark.mapRectToScene(mark.text_rect)


def test_marks_are_painted_and_follow_layers(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, divider(), size=(1100, 700), centre=(160, 40))
    th = current_theme()
    assert win.scene.part_items["R1"].current_mark.text == "1.50 mA"  # 9 V / 6 kΩ (Ohm's law)
    current, drop = text_box(win, "R1", "current"), text_box(win, "R1", "drop")
    assert ink_in(win, current, th.current) > 10
    assert ink_in(win, drop, th.drop) > 10
    win.layer_actions["currents"].trigger()   # currents off: their text goes, the drops stay
    assert ink_in(win, current, th.current) == 0
    assert ink_in(win, drop, th.drop) > 10
    win.layer_actions["currents"].trigger()
    assert ink_in(win, current, th.current) > 10


def test_marks_leave_with_their_part_and_follow_a_move(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, divider(), size=(1100, 700), centre=(160, 40))
    th = current_theme()
    before = text_box(win, "R2", "current")
    assert ink_in(win, before, th.current) > 10
    win.scene.select(["R2"])
    win.editor.nudge(4, 0)                  # its wires stretch after it: the same 1.5 mA flows
    qtbot.waitUntil(lambda: not win.solver.busy)
    after = text_box(win, "R2", "current")
    assert not after.intersects(before)
    assert ink_in(win, after, th.current) > 10
    assert ink_in(win, before, th.current) == 0   # nothing left behind where it was
    win.stack.undo()
    qtbot.waitUntil(lambda: not win.solver.busy)
    assert ink_in(win, text_box(win, "R2", "current"), th.current) > 10
    win.scene.select(["R2"])
    win.editor.delete_selection()
    qtbot.waitUntil(lambda: not win.solver.busy)
    assert ink_in(win, before, th.current) == 0
