"""Live solving off the GUI thread, and a canvas patched from one result to the next.

The worker thread builds the netlist from a snapshot and solves it; the
scene touches only the marks whose value, place or side changed. Both must
end in the same state as doing everything afresh.
"""
from __future__ import annotations

import os
import random
from dataclasses import replace

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402

pytest.importorskip("pytestqt")

from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.scene import SketchScene  # noqa: E402
from app.ui.solve_worker import LiveSolver, solve_sketch  # noqa: E402


def series(r1: float = 100.0) -> Sketch:
    """A 12 V cell with 0.5 Ω inside, feeding R1 and 200 Ω in series."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0, "internal_resistance": 0.5}))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": r1}))
    s.add_part(PlacedPart("resistor", "R2", 4, 0, 90, False, {"resistance": 200.0}))
    s.add_wire(Wire(0, 4, 4, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def lattice(rows: int, cols: int) -> Sketch:
    """Resistors joined at their terminals on a grid, fed by a cell in the top-left corner."""
    s = Sketch()
    k = 0
    for r in range(rows):
        for c in range(cols - 1):
            k += 1
            s.add_part(PlacedPart("resistor", f"R{k}", 4 * c, 4 * r, 0, False, {"resistance": 100.0 * k}))
    for r in range(rows - 1):
        for c in range(cols):
            if (r, c) == (0, 0):
                s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 9.0, "internal_resistance": 1.0}))
                continue
            k += 1
            s.add_part(PlacedPart("resistor", f"R{k}", 4 * c, 4 * r, 90, False, {"resistance": 100.0 * k}))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


@pytest.fixture
def threaded(qtbot):
    """A solver that sends every sketch to its worker thread."""
    made = []

    def make(sketch: Sketch) -> LiveSolver:
        solver = LiveSolver(sketch, threaded_from=0)
        made.append(solver)
        return solver

    yield make
    for solver in made:
        solver.shutdown()


def test_the_worker_builds_the_netlist_and_solves_it(qtbot, threaded):
    solver = threaded(series())
    with qtbot.waitSignal(solver.resultReady, timeout=10000) as got:
        solver.request()
    result = got.args[0]
    # Ohm's law around the one loop: I = EMF / (r + R1 + R2) = 12 / 300.5 A
    assert abs(result.readings["R1"][0]) == pytest.approx(12.0 / 300.5, rel=1e-9)
    assert abs(result.readings["R2"][1]) == pytest.approx(200.0 * 12.0 / 300.5, rel=1e-9)
    assert not solver.busy


def test_the_worker_reads_a_copy_later_edits_leave_alone():
    """``Sketch.drawing``: what the worker solves is the sketch as it was when asked."""
    sketch = series()
    copy = sketch.drawing()
    assert copy.parts == sketch.parts and copy.wires == sketch.wires
    sketch.update_part("R1", values={"resistance": 999.0})
    sketch.add_wire(Wire(0, 8, 4, 8))
    assert copy.part("R1").values["resistance"] != 999.0 and len(copy.wires) == len(sketch.wires) - 1
    copy.remove_part("R2")
    assert sketch.has_part("R2")


def test_a_drawing_solved_lately_gives_its_result_again_and_a_new_value_does_not():
    """A change taken back gives the earlier solve's result (the result is a function of the
    parts and wires); a new value at the same places is solved afresh. Ohm's law around the
    one loop: I = 12 / (0.5 + R1 + 200) A."""
    sketch = series(100.0)
    first = solve_sketch(sketch, 1)
    sketch.update_part("R1", values={"resistance": 300.0})
    changed = solve_sketch(sketch, 2)
    sketch.update_part("R1", values={"resistance": 100.0})  # taken back: a new part object, equal to the first
    again = solve_sketch(sketch, 3)
    assert abs(first.readings["R1"][0]) == pytest.approx(12.0 / 300.5, rel=1e-12)
    assert abs(changed.readings["R1"][0]) == pytest.approx(12.0 / 500.5, rel=1e-12)
    assert again.solution is first.solution and again.readings == first.readings
    assert (first.generation, changed.generation, again.generation) == (1, 2, 3)
    sketch.update_part("R1", label="tail lamp")  # not a value, but the cautions name parts: solved afresh
    assert solve_sketch(sketch, 4).solution is not first.solution


def test_edits_during_a_solve_end_in_the_newest_state(qtbot, threaded):
    sketch = series()
    solver = threaded(sketch)
    seen = []
    solver.resultReady.connect(seen.append)
    for r1 in (150.0, 250.0, 400.0):
        sketch.update_part("R1", values={"resistance": r1})
        solver.request()
    qtbot.waitUntil(lambda: not solver.busy and seen and seen[-1].generation == solver.generation, timeout=10000)
    # only the newest state is shown: I = 12 / (0.5 + 400 + 200) A (Ohm's law)
    assert abs(seen[-1].readings["R1"][0]) == pytest.approx(12.0 / 600.5, rel=1e-9)
    assert [r.generation for r in seen] == sorted(r.generation for r in seen)


def test_a_sketch_the_netlist_refuses_is_reported_from_the_worker(qtbot, threaded):
    sketch = series()
    sketch.add_part(PlacedPart("resistor", "~R9", 20, 20, 0, False, {"resistance": 10.0}))
    solver = threaded(sketch)
    with qtbot.waitSignal(solver.resultReady, timeout=10000) as got:
        solver.request()
    result = got.args[0]
    assert result.error and "~R9" in result.error
    assert result.error_parts == ("~R9",)
    assert not solver.busy


def _state(scene: SketchScene):
    """What a person sees: per part its text side and shown marks, plus the visible tags and loop marks."""
    parts = {}
    for name, item in scene.part_items.items():
        marks = tuple((m.isVisible(), m.text if m.isVisible() else "", m.boundingRect().getRect())
                      for m in (item.current_mark, item.drop_mark) if m is not None)
        parts[name] = (item.side, marks)
    tags = sorted((t.pos().x(), t.pos().y(), t.text) for t in scene._tags if t.isVisible())
    loops = sorted((m.home.x(), m.home.y(), m.full_text, m.clockwise) for m in scene._loops if m.isVisible())
    return parts, tags, loops


def test_a_patched_canvas_matches_one_drawn_afresh(qtbot):
    """After a run of random moves and new values, each shown with its solution, the canvas
    reads exactly as a new scene given the last sketch and its solution."""
    rng = random.Random(7)
    sketch = lattice(4, 5)
    scene = SketchScene(sketch)
    scene.show_result(solve_sketch(sketch))
    names = [p.name for p in sketch.parts if p.kind == "resistor"]
    for step in range(40):
        name = rng.choice(names)
        part = sketch.part(name)
        if rng.random() < 0.5:
            sketch.replace_part(name, replace(part, x=part.x + rng.choice((-6, -1, 1, 6)),
                                              y=part.y + rng.choice((-6, 0, 1, 6))))
        else:
            sketch.replace_part(name, replace(part, values={"resistance": rng.choice((1.0, 47.0, 1e3, 1e6))}))
        result = solve_sketch(sketch)
        if step % 13 == 5:
            scene.show_fault("a test fault", [name])  # marks hidden in between must come back
        scene.show_result(result)
        fresh = SketchScene(sketch)
        fresh.show_result(result)
        assert _state(scene) == _state(fresh), f"step {step}"


def _random_edit(rng: random.Random, sketch: Sketch, serial: list[int]) -> str:
    """One random edit of ``sketch``, as a person makes them: a move, a turn, a new value, a
    rename, a deletion, a new part, a new wire or one taken away; the part it concerns."""
    name = rng.choice([p.name for p in sketch.parts if p.kind == "resistor"])
    part = sketch.part(name)
    op = rng.random()
    if op < 0.2:
        sketch.replace_part(name, replace(part, x=part.x + rng.choice((-6, -1, 1, 6)),
                                          y=part.y + rng.choice((-6, 0, 1, 6))))
    elif op < 0.35:
        sketch.replace_part(name, replace(part, rotation=(part.rotation + 90) % 360))
    elif op < 0.45:
        sketch.replace_part(name, replace(part, values={"resistance": rng.choice((1.0, 47.0, 1e3, 1e6))}))
    elif op < 0.55:
        serial[0] += 1
        sketch.replace_part(name, replace(part, name=f"R{serial[0]}"))
    elif op < 0.65 and len(sketch.parts) > 6:
        sketch.remove_part(name)
    elif op < 0.75:
        serial[0] += 1
        sketch.add_part(PlacedPart("resistor", f"R{serial[0]}", rng.randrange(-2, 20), rng.randrange(-2, 20),
                                   rng.choice((0, 90)), False, {"resistance": 220.0}))
    elif op < 0.85 or not sketch.wires:
        x, y, run = rng.randrange(0, 20), rng.randrange(0, 20), rng.randrange(1, 6)
        sketch.add_wire(Wire(x, y, x + run, y) if rng.random() < 0.5 else Wire(x, y, x, y + run))
    else:
        sketch.remove_wire(rng.randrange(len(sketch.wires)))
    return name


def test_a_patched_canvas_matches_one_drawn_afresh_through_every_kind_of_edit(qtbot):
    """As above, with turns, renames, deletions, new parts and wires added and taken away."""
    rng = random.Random(11)
    sketch = lattice(4, 5)
    scene = SketchScene(sketch)
    scene.show_result(solve_sketch(sketch))
    serial = [100]
    for step in range(40):
        name = _random_edit(rng, sketch, serial)
        result = solve_sketch(sketch)
        if step % 17 == 5:
            scene.show_fault("a test fault", [name] if sketch.has_part(name) else [])
        scene.show_result(result)
        fresh = SketchScene(sketch)
        fresh.show_result(result)
        assert _state(scene) == _state(fresh), f"step {step}"


def test_marks_changed_while_too_small_to_read_are_right_once_zoomed_in(qtbot):
    """Marks too small to draw skip their repaint; zooming in must still show the newest values,
    pixel for pixel as a view that showed both solutions readably (the same history, so the
    marks that keep their places from one solution to the next keep the same ones)."""
    from PySide6.QtWidgets import QGraphicsView

    sketch = lattice(3, 4)
    first = solve_sketch(sketch)
    part = sketch.part("R5")
    sketch.replace_part("R5", replace(part, values={"resistance": 3.3}))
    second = solve_sketch(sketch)

    def view_of(scene: SketchScene) -> QGraphicsView:
        view = QGraphicsView(scene)
        view.resize(700, 500)
        view.setCacheMode(QGraphicsView.CacheModeFlag.CacheNone)
        qtbot.addWidget(view)
        view.show()
        qtbot.waitExposed(view)
        return view

    patched = SketchScene(sketch)
    seen = view_of(patched)
    seen.scale(0.2, 0.2)
    patched.show_result(first)
    seen.viewport().grab()  # the marks keep (empty) pictures of themselves at this zoom
    assert not patched.marks_readable()
    patched.show_result(second)
    seen.viewport().grab()
    seen.resetTransform()
    seen.centerOn(120, 80)
    assert patched.marks_readable()

    readable = SketchScene(sketch)  # the same steps, readable throughout (no view yet: nothing too small)
    readable.show_result(first)
    assert readable.marks_readable()
    readable.show_result(second)
    other = view_of(readable)
    other.centerOn(120, 80)
    assert seen.viewport().grab().toImage() == other.viewport().grab().toImage()


def _mark_places(scene) -> list:
    loops = sorted((round(m.pos().x(), 6), round(m.pos().y(), 6), m.side, m.compact, m.full_text)
                   for m in scene._loops if m.isVisible())
    tags = sorted((t.at, t._corner, t.text) for t in scene._tags if t.isVisible())
    return [loops, tags]


def test_marks_an_edit_cannot_wait_for_are_placed_once_drawing_pauses(qtbot, tmp_path):
    from ui_support import open_window
    places = []
    for at_once in (False, True):
        folder = tmp_path / str(at_once)
        folder.mkdir()
        win = open_window(qtbot, folder, lattice(5, 5), name="lattice.lwsk")
        scene = win.scene
        # an upright resistor moved down onto the one below it: the drawing has overlapping
        # parts, so the solver takes a spanning tree's loops instead of the windows, and every
        # loop mark needs a new place
        upright = next(p.name for p in win.sketch.parts if p.kind == "resistor" and p.rotation == 90 and p.y == 4)
        scene.select([upright])
        if at_once:
            win.place_now = scene.place_now_up_to = None
        win.editor.nudge(0, 1)
        if at_once:
            assert not scene._waiting
        else:
            assert len(scene._waiting) > 0  # the edit placed a few and left the rest for later
            qtbot.waitUntil(lambda: not scene._waiting, timeout=3000)
        places.append(_mark_places(scene))
    # placed later, in the same order: the same places as all at once inside the edit
    assert places[0] == places[1]


def test_later_steps_of_a_move_leave_placing_marks_until_it_pauses(qtbot, tmp_path, monkeypatch):
    """A key step after the first (as each step of a drag) is solved and shown at once, but
    its marks are placed only when the steps pause; the first step places some at once."""
    from ui_support import open_window

    win = open_window(qtbot, tmp_path, lattice(5, 5), name="lattice.lwsk")
    scene = win.scene
    placed = []
    inner = SketchScene._place_loop
    monkeypatch.setattr(SketchScene, "_place_loop", lambda self, mark: (placed.append(mark), inner(self, mark)))
    upright = next(p.name for p in win.sketch.parts if p.kind == "resistor" and p.rotation == 90 and p.y == 4)
    scene.select([upright])
    win.editor.nudge(0, 1, apart=True)
    first = len(placed)
    assert first > 0  # the first step of a move places marks inside the edit, as any edit
    generation = win.solver.generation
    win.editor.nudge(0, 1, apart=True)  # the next step of the same move
    assert win.solver.latest.generation == generation + 1  # solved and shown at once
    assert len(placed) == first and scene._waiting  # but nothing placed yet
    qtbot.waitUntil(lambda: not scene._waiting, timeout=3000)
    assert len(placed) > first
    assert not win.editor.stepping
