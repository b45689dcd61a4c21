"""The reading layer's table of mark boxes (``annotations.MarkTable``) picks the marks a repaint
meets: checked against Qt's own rectangle test, ``QRectF.intersects``, on random boxes."""
from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

pytest.importorskip("PySide6")

from PySide6.QtCore import QRectF  # noqa: E402

from app.ui.annotations import MarkTable  # noqa: E402

# boxes on half units and areas on whole ones: no edge of one lies on an edge of the other,
# where a closed test (ours) and Qt's open one would differ by definition
box = st.tuples(st.integers(-40, 40), st.integers(-40, 40), st.integers(1, 12), st.integers(1, 12))
area = st.tuples(st.integers(-50, 50), st.integers(-50, 50), st.integers(1, 30), st.integers(1, 30))


@settings(max_examples=150, deadline=None)
@given(boxes=st.lists(st.tuples(box, st.booleans()), min_size=0, max_size=150),
       areas=st.lists(area, min_size=1, max_size=8),
       gone=st.sets(st.integers(0, 149)), moved=st.lists(st.tuples(st.integers(0, 149), box), max_size=10))
def test_the_table_picks_the_shown_marks_whose_boxes_meet_an_area(boxes, areas, gone, moved):
    table = MarkTable()
    marks = []
    for (x, y, w, h), shown in boxes:
        m = SimpleNamespace(_visible=shown, rect=QRectF(x + 0.5, y + 0.5, w, h))
        table.put(m, (x + 0.5, y + 0.5, x + 0.5 + w, y + 0.5 + h))
        marks.append(m)
    for k, (x, y, w, h) in moved:  # a mark laid out again somewhere else
        if k < len(marks):
            marks[k].rect = QRectF(x + 0.5, y + 0.5, w, h)
            table.put(marks[k], (x + 0.5, y + 0.5, x + 0.5 + w, y + 0.5 + h))
    for k in sorted(gone):
        if k < len(marks):
            table.drop(marks[k])
    live = [m for k, m in enumerate(marks) if k not in gone]
    for m in live[::3]:  # some hidden or shown again after filing
        m._visible = not m._visible
        table.show(m, m._visible)
    rects = [QRectF(x, y, w, h) for x, y, w, h in areas]
    rows = np.array([[r.left(), r.top(), r.right(), r.bottom()] for r in rects])
    expected = [m for m in live if m._visible and any(m.rect.intersects(r) for r in rects)]
    assert table.meeting(rows) == expected
    assert len(table) == len(live)


def test_marks_drawn_over_the_rest_are_picked_apart():
    table = MarkTable()
    marks = [SimpleNamespace(_visible=True) for _ in range(300)]
    for k, m in enumerate(marks):
        table.put(m, (k, 0.0, k + 0.5, 1.0))
    table.draw_over(marks[::2])
    every = np.array([[-1.0, -1.0, 400.0, 2.0]])
    assert table.meeting(every, over=True) == marks[::2]
    assert table.meeting(every, over=False) == marks[1::2]
    for m in marks[:250]:  # most gone: the table packs itself, and keeps what it knew of the rest
        table.drop(m)
    assert table.meeting(every, over=True) == marks[250::2]
    assert table.meeting(every) == marks[250:]
    new = [SimpleNamespace(_visible=True) for _ in range(260)]  # on rows the packing freed
    for k, m in enumerate(new):
        table.put(m, (k, 0.0, k + 0.5, 1.0))
    assert table.meeting(every, over=True) == marks[250::2]
    assert table.meeting(every, over=False) == marks[251::2] + new
