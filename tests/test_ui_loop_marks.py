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
