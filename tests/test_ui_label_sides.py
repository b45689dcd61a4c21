"""Which side of its symbol a part's text goes: away from the middle of the drawing, unless a
neighbour's symbol or text is there and the other side is freer (``app/ui/label_sides.py``).

That the sides follow from the drawing alone, whatever edits made it, is checked by
``test_ui_live_solver.py::test_a_patched_canvas_matches_one_drawn_afresh`` (random moves in a
crowded lattice); here a drag by keys and undo show it as a person meets it.
"""
from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import Qt  # noqa: E402

from app.sketch.model import PlacedPart, Sketch  # noqa: E402
from app.ui.label_sides import LabelSides, order_key  # noqa: E402
from app.ui.scene import SketchScene  # noqa: E402
from ui_support import open_window  # noqa: E402

UP, DOWN = -1, 1


def crowded(with_neighbour: bool = True) -> Sketch:
    """R1 lies across in the upper half of the drawing (its text would go above it); R2 lies
    across three grid steps above it, where that text would be; the cell and R3 lie far
    below, holding the middle of the drawing down."""
    s = Sketch()
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 470.0}))
    if with_neighbour:
        s.add_part(PlacedPart("resistor", "R2", 0, -3, 0, False, {"resistance": 680.0}))
    s.add_part(PlacedPart("cell", "B1", 20, 16, 90, False, {"emf": 9.0}))
    s.add_part(PlacedPart("resistor", "R3", 24, 20, 0, False, {"resistance": 1000.0}))
    return s


def test_a_text_goes_away_from_the_middle_when_nothing_is_there(qtbot):
    scene = SketchScene(crowded(with_neighbour=False))
    assert scene.part_items["R1"].side == UP


def test_a_text_with_a_symbol_in_its_way_goes_to_the_free_side(qtbot):
    scene = SketchScene(crowded())
    r1, r2 = scene.part_items["R1"], scene.part_items["R2"]
    assert r2.side == UP  # nothing above R2
    assert r1.side == DOWN
    assert not r1.text_block().intersects(r2.body_box()) and not r1.text_block().intersects(r2.text_block())


def test_moving_the_neighbour_away_and_back_by_keys_turns_the_text_back_and_again(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, crowded(), active=True)
    r1 = win.scene.part_items["R1"]
    assert r1.side == DOWN
    win.scene.select(["R2"])
    win.view.setFocus()
    for _ in range(4):
        qtbot.keyClick(win.view, Qt.Key.Key_Up, Qt.KeyboardModifier.ShiftModifier)  # 16 grid steps up
    assert win.sketch.part("R2").y == -19
    assert r1.side == UP  # the room above R1 is free again
    qtbot.keyClick(win, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)  # the move is one undo step
    assert win.sketch.part("R2").y == -3
    assert r1.side == DOWN


def _overlap(scene: SketchScene) -> float:
    """How much the parts' text blocks cover other parts' symbols and text blocks, in all."""
    items = list(scene.part_items.values())
    total = 0.0
    for a in items:
        if not a.lines:
            continue
        for b in items:
            if b is not a:
                for box in (b.body_box(), b.text_block()):
                    common = a.text_block().intersected(box)
                    if not common.isEmpty():
                        total += common.width() * common.height()
    return total


def grid() -> Sketch:
    """Three rows of three resistors butted end to end, joined by two rows of four upright
    ones, a 12 V cell in the corner grounded below: as tight as parts can be drawn."""
    s = Sketch()
    k = 0
    for r in range(3):
        for c in range(3):
            k += 1
            s.add_part(PlacedPart("resistor", f"R{k}", 4 * c, 4 * r, 0, False, {"resistance": 1000.0 + k}))
    for r in range(2):
        for c in range(4):
            if r == c == 0:
                s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0, "internal_resistance": 0.5}))
            else:
                k += 1
                s.add_part(PlacedPart("resistor", f"R{k}", 4 * c, 4 * r, 90, False, {"resistance": 1000.0 + k}))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def test_a_crowded_grid_has_less_text_over_text_than_with_every_text_away(qtbot, monkeypatch):
    sketch = grid()
    settled = _overlap(SketchScene(sketch))

    def away_only(self, items, item, name, k):
        if item.side != self._away[name]:
            item.set_side(self._away[name])
            return True
        return False

    monkeypatch.setattr(LabelSides, "_settle", away_only)
    assert settled < 0.85 * _overlap(SketchScene(sketch))


def huddle(renamed: str = "R2") -> Sketch:
    """Six resistors huddled within nine grid steps, lying across and upright, so that their
    texts contend for the same room; a cell far off holds the middle of the drawing away."""
    s = Sketch()
    for name, x, y, turn in (("R1", 3, 4, 0), ("R2", 6, 7, 0), ("R3", 1, 1, 0), ("R4", 6, 8, 90),
                             ("R5", 0, 3, 90), ("R6", 4, 2, 0)):
        s.add_part(PlacedPart("resistor", renamed if name == "R2" else name, x, y, turn, False,
                              {"resistance": 100.0}))
    s.add_part(PlacedPart("cell", "B1", 20, 20, 90, False, {"emf": 9.0}))
    return s


def test_renaming_a_part_turns_no_neighbours_text(qtbot):
    # the settling order follows where parts stand, not their names: with the designators'
    # order, R2 renamed R12 settled after R4 instead of before it, and R4's text turned over
    before = SketchScene(huddle()).part_items
    after = SketchScene(huddle("R12")).part_items
    assert {n: before[n].side for n in before if n != "R2"} == {n: after[n].side for n in after if n != "R12"}
    assert before["R2"].side == after["R12"].side


def test_parts_are_settled_column_by_column_from_the_left_then_from_the_top():
    parts = [PlacedPart("resistor", n, x, y) for n, x, y in
             (("R10", 0, 0), ("R2", 0, 0), ("B1", 5, 0), ("R1", 0, 4), ("PV1", -3, 4))]
    assert [p.name for p in sorted(parts, key=order_key)] == ["PV1", "R2", "R10", "R1", "B1"]
