"""A part's description ('drive motor'): typed in the Part panel, shown under its value on the
drawing, kept in the file, undoable, and hidden with the View menu's layer."""
from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QModelIndex, QRectF, Qt  # noqa: E402

from app.sketch.fileio import LABEL_MAX, load_sketch  # noqa: E402
from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.edits import add_parts_edit  # noqa: E402
from app.ui.items import PartItem, shown_description  # noqa: E402
from ui_support import open_window, type_into  # noqa: E402


def loop() -> Sketch:
    """B1 upright on the left, R1 across the top, R2 upright on the right: one loop."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0, "internal_resistance": 0.0}))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 100.0}))
    s.add_part(PlacedPart("resistor", "R2", 4, 0, 90, False, {"resistance": 200.0}))
    s.add_wire(Wire(0, 4, 4, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def text_rows(item: PartItem) -> list[QRectF]:
    """The scene boxes of every text row the part shows: its label's rows and its two marks'."""
    r = item.label_rect
    h = r.height() / len(item.lines)
    rows = [QRectF(r.left(), r.top() + k * h, r.width(), h) for k in range(len(item.lines))]
    rows += [item.current_mark.text_rect, item.drop_mark.text_rect]
    return [item.mapRectToScene(b) for b in rows]


def overlapping(rows: list[QRectF]) -> list[tuple[int, int]]:
    """Pairs of rows that share more than a hairline of height where they meet side to side."""
    out = []
    for i, a in enumerate(rows):
        for j, b in enumerate(rows[i + 1:], i + 1):
            both = a.intersected(b)
            if both.height() > 0.5 and both.width() > 0.5:
                out.append((i, j))
    return out


def test_a_description_typed_in_the_part_panel_is_drawn_saved_and_undone(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop(), active=True)
    win.scene.select(["R2"])
    depth = win.stack.count()
    type_into(qtbot, win.part_panel.field("description"), "  drive   motor ")
    assert win.sketch.part("R2").label == "drive motor"  # spaces run together
    assert win.part_panel.field("description").text() == "drive motor"  # shown as kept
    assert win.stack.count() == depth + 1
    assert win.stack.undoText() == "Describe R2"
    item = win.scene.part_items["R2"]
    assert item.lines == ["R2", "200 Ω", "drive motor"]
    win.save()
    assert load_sketch(win.path).part("R2").label == "drive motor"
    # the Readings table names it in the Part column's tooltip
    model = win.readings_model
    row = model.names.index("R2")
    assert model.data(model.index(row, 0, QModelIndex()), Qt.ItemDataRole.ToolTipRole) == "R2: drive motor"
    qtbot.keyClick(win.view, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)
    assert win.sketch.part("R2").label == ""
    assert item.lines == ["R2", "200 Ω"]
    assert win.part_panel.field("description").text() == ""


@pytest.mark.parametrize("name", ["R1", "R2", "B1"])  # across with the text above, upright, upright on the left
def test_the_description_row_takes_no_room_of_the_values_or_the_marks(qtbot, tmp_path, name):
    win = open_window(qtbot, tmp_path, loop())
    item = win.scene.part_items[name]
    assert item.current_mark.isVisible() and item.drop_mark.isVisible()  # solved: both marks shown
    assert overlapping(text_rows(item)) == []
    plain = [r.height() for r in text_rows(item)]
    win.editor.describe(name, "bay 3 heater")
    rows = text_rows(item)
    assert len(rows) == len(plain) + 1
    assert overlapping(rows) == [], [(r.top(), r.bottom(), r.left(), r.right()) for r in rows]
    # the marks' text boxes hold the same heights: they moved, they did not shrink
    assert [r.height() for r in rows[-2:]] == plain[-2:]


def test_the_layer_hides_descriptions_and_puts_the_marks_back(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop())
    item = win.scene.part_items["R2"]
    before = item.current_mark.text_rect
    win.editor.describe("R2", "receiver shunt")
    assert item.current_mark.text_rect != before
    win.layer_actions["descriptions"].trigger()  # View ▸ Part descriptions, off
    assert item.lines == ["R2", "200 Ω"]
    assert item.current_mark.text_rect == before
    assert item.toolTip() == "R2: receiver shunt"  # still said on hover
    win.layer_actions["descriptions"].trigger()
    assert item.lines[-1] == "receiver shunt"


def test_a_long_description_is_cut_on_the_drawing_and_whole_in_the_tooltip(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop())
    long = "feed from the forward distribution board, port side"
    win.editor.describe("R1", long)
    item = win.scene.part_items["R1"]
    shown = item.lines[-1]
    assert shown == shown_description(long)
    assert len(shown) == PartItem.DESCRIPTION_MAX and shown.endswith("…")
    assert long.startswith(shown[:-1])
    assert item.toolTip() == f"R1: {long}"


def test_descriptions_that_cannot_be_kept_are_refused_in_words(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop())
    depth = win.stack.count()
    with pytest.raises(ValueError, match=f"at most {LABEL_MAX} characters"):
        win.editor.describe("R1", "x" * (LABEL_MAX + 1))
    with pytest.raises(ValueError, match="control characters"):
        win.editor.describe("R1", "lamp\x07")
    with pytest.raises(ValueError, match="broken character"):
        win.editor.describe("R1", "lamp\ud800")  # a lone surrogate: the file loader refuses it too
    assert win.stack.count() == depth and win.sketch.part("R1").label == ""
    win.editor.describe("R1", "tail\tlamp\n")  # pasted with a tab and a line break: one line
    assert win.sketch.part("R1").label == "tail lamp"
    # the panel's field holds no more than a file keeps
    win.scene.select(["R1"])
    assert win.part_panel.field("description").maxLength() == LABEL_MAX


def test_a_part_placed_with_the_layer_off_shows_no_description(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop())
    win.layer_actions["descriptions"].trigger()
    part = PlacedPart("resistor", "R9", 8, 0, 90, False, {"resistance": 10.0}, label="spare")
    win.editor.push(add_parts_edit(win.sketch, [part]), "Add")
    assert win.scene.part_items["R9"].lines == ["R9", "10.0 Ω"]


@pytest.mark.parametrize("demo", ["sensor_current_loop.lwsk", "bench_supply_fixture.lwsk"])
def test_turning_descriptions_on_moves_the_marks_off_them(qapp, demo):
    """Loop marks and potential tags keep their places from one edit to the next; placed
    while descriptions were hidden, they must move off the descriptions once shown."""
    from pathlib import Path

    from app.ui.annotations import LoopMark, PotentialTag
    from app.ui.scene import SketchScene
    from app.ui.solve_worker import solve_sketch

    sketch = load_sketch(Path(__file__).resolve().parents[1] / "demo_circuits" / demo)
    scene = SketchScene(sketch)
    scene.set_layer("descriptions", False)
    scene.show_result(solve_sketch(sketch))
    scene.settle_marks()
    scene.set_layer("descriptions", True)
    scene.settle_marks()
    rows = [(item.part.name, r) for item in scene.part_items.values() if item.current_mark is not None
            for r in text_rows(item)]
    assert any(item.described and item.part.label for item in scene.part_items.values())
    marks = [m for m in scene.items() if isinstance(m, (LoopMark, PotentialTag)) and m.isVisible()]
    assert marks
    for mark in marks:
        rect = mark.sceneBoundingRect()
        hidden = [name for name, r in rows if rect.intersects(r)]
        assert not hidden, f"{type(mark).__name__} {mark.text} lies over a text of {hidden}"


def test_turning_a_layer_on_leaves_the_next_solution_its_changed_parts(qapp):
    """Between an edit and its solution (a large sketch's solve runs on a worker thread) the
    parts the edit changed are noted, so the solution can hang again the tags they now hide;
    turning a layer on in between must not take that note away."""
    from app.ui.scene import SketchScene
    from app.ui.solve_worker import solve_sketch

    sketch = loop()
    scene = SketchScene(sketch)
    scene.show_result(solve_sketch(sketch))
    scene.settle_marks()
    sketch.update_part("R2", label="bay 3 heater")  # the edit: R2's text grows
    assert "R2" in scene._new_parts
    scene.set_layer("drops", False)
    scene.set_layer("drops", True)
    assert "R2" in scene._new_parts
