"""Loop-current marks keep clear of the parts' own texts, also in tight windows."""
from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.annotations import LoopMark  # noqa: E402
from app.ui.scene import SketchScene  # noqa: E402
from app.ui.solve_worker import solve_sketch  # noqa: E402


def ladder(width: int) -> Sketch:
    """A cell feeding two upright resistors in parallel, the second ``width`` grid steps from the first."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0, "internal_resistance": 0.5}))
    s.add_part(PlacedPart("resistor", "R1", 8, 0, 90, False, {"resistance": 250.0}))
    s.add_part(PlacedPart("resistor", "R2", 8 + width, 0, 90, False, {"resistance": 2200.0}))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    for w in (Wire(0, 0, 8, 0), Wire(8, 0, 8 + width, 0), Wire(0, 4, 8, 4), Wire(8, 4, 8 + width, 4)):
        s.add_wire(w)
    return s


def part_texts(scene: SketchScene):
    for item in scene.part_items.values():
        if item.lines:
            yield item.part.name, item.mapRectToScene(item.label_rect)
        for mark in (item.current_mark, item.drop_mark):
            if mark is not None and mark.isVisible():
                yield item.part.name, mark.mapRectToScene(mark.text_rect)


@pytest.mark.parametrize("width", [4, 6, 12])
def test_loop_marks_cover_no_part_text(qapp, width):
    sketch = ladder(width)
    scene = SketchScene(sketch)
    result = solve_sketch(sketch)
    assert result.solved and len(result.loops) == 2
    scene.show_result(result)
    marks = [i for i in scene.items() if isinstance(i, LoopMark) and i.isVisible()]
    assert len(marks) == 2
    for mark in marks:
        rect = mark.sceneBoundingRect()
        for name, text in part_texts(scene):
            assert not rect.intersects(text), f"{mark.text} covers a text of {name}"
        assert mark.outline.containsPoint(mark.pos(), Qt.FillRule.OddEvenFill), "the mark left its window"
        assert mark.toolTip().startswith("Loop current " + mark.name)


def test_roomy_window_shows_the_loop_current(qapp):
    sketch = ladder(12)
    scene = SketchScene(sketch)
    scene.show_result(solve_sketch(sketch))
    marks = [i for i in scene.items() if isinstance(i, LoopMark) and i.isVisible()]
    assert marks and all(not m.compact and m.text.endswith("A") for m in marks)


def stubbed_ladder() -> Sketch:
    """A 12 mA source feeding 250 Ω and 2.2 kΩ in parallel, each drawn between two rails on
    wire stubs, both with a description: the window between them is bounded by the rails."""
    s = Sketch()
    s.add_part(PlacedPart("current_source", "I1", 0, 2, 90, False, {"current": 0.012}))
    s.add_part(PlacedPart("resistor", "R1", 8, 2, 90, False, {"resistance": 250.0}, label="receiver shunt"))
    s.add_part(PlacedPart("resistor", "R2", 16, 2, 90, False, {"resistance": 2200.0}, label="indicator"))
    s.add_part(PlacedPart("ground", "GND1", 0, 8))
    for w in (Wire(0, 0, 0, 2), Wire(0, 6, 0, 8), Wire(0, 0, 16, 0), Wire(0, 8, 16, 8),
              Wire(8, 0, 8, 2), Wire(8, 6, 8, 8), Wire(16, 0, 16, 2), Wire(16, 6, 16, 8)):
        s.add_wire(w)
    return s


def test_window_runs_along_the_wires(qapp):
    result = solve_sketch(stubbed_ladder())
    assert result.solved and len(result.loops) == 2
    for outline in result.loop_outlines:  # up to the rails (y 0 and 8), not the parts' ends (y 2 and 6)
        ys = {y for _, y in outline}
        assert min(ys) == 0 and max(ys) == 8, outline


def test_window_between_described_parts_shows_the_loop_current(qapp):
    sketch = stubbed_ladder()
    scene = SketchScene(sketch)
    result = solve_sketch(sketch)
    scene.show_result(result)
    marks = {m.name: m for m in scene.items() if isinstance(m, LoopMark) and m.isVisible()}
    assert set(marks) == {"L1", "L2"}
    # current divider, by hand: 12 mA × 250 / (250 + 2200) = 1.2245 mA in the 2.2 kΩ, the
    # outer branch, whose current is the outer loop's current
    outer = min(marks.values(), key=lambda m: abs(m.home.x() - 12 * 20))
    assert not outer.compact, "the window has room below the texts: the current should show"
    assert outer.full_text.endswith("1.22 mA")
    rect = outer.sceneBoundingRect()
    for name, text in part_texts(scene):
        assert not rect.intersects(text), f"{outer.text} covers a text of {name}"
    assert outer.outline.containsPoint(outer.pos(), Qt.FillRule.OddEvenFill)


def test_loop_currents_show_beside_caution_badges(qapp):
    """Parallel lamps with over-power badges under their texts (a demo sketch): the windows
    between them still have room for each loop's name and current, clear of every text and badge."""
    from pathlib import Path

    from app.sketch.fileio import load_sketch
    from app.ui.bench_marks import Badge, BenchMarks

    sketch = load_sketch(Path(__file__).resolve().parents[1] / "demo_circuits" / "market_stall_lamps.lwsk")
    scene = SketchScene(sketch)
    result = solve_sketch(sketch)
    BenchMarks(scene, scene.part_items).show(result.assessment)  # as the window and ``shot`` do
    scene.show_result(result)
    scene.settle_marks()
    badges = [i.sceneBoundingRect() for i in scene.items() if isinstance(i, Badge) and i.isVisible()]
    assert badges
    marks = [m for m in scene.items() if isinstance(m, LoopMark) and m.isVisible()]
    assert len(marks) == 3
    for mark in marks:
        assert not mark.compact, f"{mark.name} shows its name alone"
        rect = mark.sceneBoundingRect()
        for name, text in part_texts(scene):
            assert not rect.intersects(text), f"{mark.text} covers a text of {name}"
        assert not any(rect.intersects(b) for b in badges), f"{mark.text} covers a badge"


def test_a_window_follows_its_wires_when_only_the_wires_move(qapp):
    """The same parts at the same places, the top rail drawn two steps higher: the windows
    (kept from one solve to the next by their parts) must reach the new rail."""
    sketch = stubbed_ladder()
    before = solve_sketch(sketch)
    assert all(min(y for _, y in o) == 0 for o in before.loop_outlines)
    higher = Sketch()
    for p in sketch.parts:
        higher.add_part(p)
    for w in (Wire(0, -2, 0, 2), Wire(0, 6, 0, 8), Wire(0, -2, 16, -2), Wire(0, 8, 16, 8),
              Wire(8, -2, 8, 2), Wire(8, 6, 8, 8), Wire(16, -2, 16, 2), Wire(16, 6, 16, 8)):
        higher.add_wire(w)
    after = solve_sketch(higher)
    assert after.solved and len(after.loop_outlines) == 2
    assert all(min(y for _, y in o) == -2 for o in after.loop_outlines), after.loop_outlines
