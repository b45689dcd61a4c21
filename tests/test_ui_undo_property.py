"""Undo that always comes back: random edit sequences through the window's own undo stack.

Any sequence of drawing steps (place, wire, move, drag, turn, mirror, delete,
values, flags, choices, renames, current tags, duplicates, with undos and
redos in between), undone completely, gives exactly the document it started
from; redone completely, exactly the document it ended with.  The canvas
follows the document both ways.
"""
from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")
hypothesis = pytest.importorskip("hypothesis")

from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402
from PySide6.QtCore import QSettings  # noqa: E402

from app.sketch.kinds import KINDS  # noqa: E402
from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.main_window import MainWindow  # noqa: E402
from app.ui.solve_worker import LiveSolver  # noqa: E402

KIND_NAMES = sorted(KINDS)
coord = st.integers(-6, 14)
small = st.integers(-3, 3)
mask = st.integers(0, 2 ** 12 - 1)
STEP = st.one_of(
    st.tuples(st.just("place"), st.sampled_from(KIND_NAMES), coord, coord, st.sampled_from([0, 90, 180, 270])),
    st.tuples(st.just("wire"), coord, coord, coord, coord, st.booleans()),
    st.tuples(st.just("move"), mask, mask, small, small),
    st.tuples(st.just("drag"), mask, st.lists(st.tuples(small, small), min_size=1, max_size=4)),
    st.tuples(st.just("turn"), mask, st.booleans()),
    st.tuples(st.just("delete"), mask, mask),
    st.tuples(st.just("value"), st.integers(0, 50), st.integers(0, 3), st.floats(0.001, 1e4)),
    st.tuples(st.just("flag"), st.integers(0, 50)),
    st.tuples(st.just("choice"), st.integers(0, 50), st.integers(0, 5)),
    st.tuples(st.just("rename"), st.integers(0, 50), st.integers(1, 30)),
    st.tuples(st.just("tag"), st.integers(0, 50), st.integers(1, 6), st.booleans()),
    st.tuples(st.just("duplicate"), mask, mask),
    st.tuples(st.just("undo"), st.integers(1, 4)),
    st.tuples(st.just("redo"), st.integers(1, 4)),
)


def sequences(longest: int, shortest: int = 0) -> st.SearchStrategy[list[tuple]]:
    """Step lists of a length drawn evenly up to ``longest`` (plain lists stay short on average)."""
    return st.integers(shortest, longest).flatmap(lambda n: st.lists(STEP, min_size=n, max_size=n))


def start_sketch() -> Sketch:
    """A small loop with a tag, so undo has something of the start to protect."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0}))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 100.0}))
    s.add_part(PlacedPart("switch", "S1", 4, 0, 90, False))
    s.add_wire(Wire(0, 4, 4, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def picked(items: list, bits: int) -> list:
    return [x for i, x in enumerate(items[:12]) if bits >> i & 1]


def do_step(win: MainWindow, step: tuple) -> None:
    """Carry out one step the way the window's own tools do (through ``win.editor``)."""
    ed, sk, op = win.editor, win.sketch, step[0]
    names = [p.name for p in sk.parts]
    wires = list(range(len(sk.wires)))
    one = names[step[1] % len(names)] if names and isinstance(step[1], int) and op in {
        "value", "flag", "choice", "rename", "tag"} else None
    if op == "place":
        ed.place(step[1], step[2], step[3], step[4])
    elif op == "wire":
        ed.add_wire((step[1], step[2]), (step[3], step[4]), step[5])
    elif op == "move":
        ed.move(picked(names, step[1]), picked(wires, step[2]), step[3], step[4])
    elif op == "drag":
        win.scene.select(picked(names, step[1]))
        ed.begin_drag()
        for dx, dy in step[2]:
            ed.drag_to(dx, dy)
        ed.end_drag()
    elif op == "turn":
        ed.rotate(picked(names, step[1]), mirror=step[2])
    elif op == "delete":
        ed.delete(picked(names, step[1]), picked(wires, step[2]))
    elif op == "duplicate":
        win.scene.select(picked(names, step[1]), picked(wires, step[2]))
        ed.duplicate()
    elif one is None:
        if op == "undo":
            for _ in range(step[1]):
                win.stack.undo()
        elif op == "redo":
            for _ in range(step[1]):
                win.stack.redo()
    else:
        spec = KINDS[sk.part(one).kind]
        if op == "value" and spec.value_fields:
            ed.set_values(one, {spec.value_fields[step[2] % len(spec.value_fields)].key: step[3]})
        elif op == "flag" and spec.flags:
            ed.set_flag(one, spec.flags[0], not sk.part(one).flag(spec.flags[0]))
        elif op == "choice" and spec.choices:
            field = spec.choices[0]
            ed.set_choice(one, field.key, field.keys[step[2] % len(field.keys)])
        elif op == "rename":
            try:
                ed.rename(one, f"X{step[2]}")
            except ValueError:
                pass  # the name is taken: refused, as in the part panel
        elif op == "tag" and spec.kind != "ground":
            win.hand.tag_part(one, f"I{step[2]}", step[3])


def assert_canvas_follows(win: MainWindow) -> None:
    assert set(win.scene.part_items) == {p.name for p in win.sketch.parts}
    assert len(win.scene.wire_items) == len(win.sketch.wires)


def check_round_trip(win: MainWindow, steps: list[tuple]) -> None:
    win.set_document(start_sketch(), None)
    start = win.sketch.snapshot()
    for step in steps:
        do_step(win, step)
    final, final_index = win.sketch.snapshot(), win.stack.index()
    while win.stack.canUndo():
        win.stack.undo()
    assert win.sketch.snapshot() == start
    assert win.sketch == start_sketch()
    assert not win.modified
    assert_canvas_follows(win)
    while win.stack.index() < final_index:
        win.stack.redo()
    assert win.sketch.snapshot() == final
    assert_canvas_follows(win)


@pytest.fixture
def win(qtbot, tmp_path, monkeypatch):
    # solving after each step is not what is checked here and would take most of the time
    monkeypatch.setattr(LiveSolver, "request", lambda self: None)
    w = MainWindow(QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat))
    w.ask_to_save = lambda: "discard"
    w.hand.ask_tag_name = lambda suggestion, part: suggestion
    qtbot.addWidget(w)
    return w


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture,
                                                                   HealthCheck.too_slow])
@given(steps=sequences(200))
def test_undo_all_gives_the_start_and_redo_all_the_end(win, steps):
    check_round_trip(win, steps)


@pytest.mark.slow
@settings(max_examples=500, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture,
                                                                    HealthCheck.too_slow])
@given(steps=sequences(200, 100))
def test_undo_round_trip_long_run(win, steps):
    check_round_trip(win, steps)


def test_a_merged_drag_and_a_drag_back_to_the_start(win):
    """Steps that merge (one drag) undo as one; a drag that ends where it began leaves no step."""
    check_round_trip(win, [("drag", 0b11, [(1, 0), (2, 1)]), ("drag", 0b1, [(1, 0), (0, 0)])])
    assert win.stack.count() == 1




def test_a_deleted_parts_tag_stays_with_it(win):
    win.set_document(start_sketch(), None)
    assert win.hand.tag_part("R1", "I1")
    win.editor.delete(["R1"], [])
    win.editor.rename("S1", "R1")
    while win.stack.canUndo():
        win.stack.undo()
    assert win.sketch == start_sketch()
