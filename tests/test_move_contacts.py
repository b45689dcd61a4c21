"""A move or a turn never parts what it touches: parts butted terminal to terminal, or on the
middle of a wire, stay joined by a new wire; Alt moves them off instead.

Which terminals are joined is read through the netlist (``sketch_joins.joined``); the current
of the loop after a move is checked by Ohm's law, worked by hand.
"""
from __future__ import annotations

import sys
from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.sketch.netlist import to_circuit  # noqa: E402
from app.ui.edits import Edit, apply_edit, move_target, rotate_edit  # noqa: E402
from solver import solve  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parent / "bench"))
from bench_live import grid_sketch  # noqa: E402
from sketch_joins import joined  # noqa: E402
from test_ui_drawing import drag  # noqa: E402
from ui_support import open_window  # noqa: E402


def butted_loop() -> Sketch:
    """A 12 V cell (0.5 Ω inside) and three resistors joined terminal to terminal, no wire:
    B1 up the left side, R1 along the top, R2 down the right, R3 along the bottom."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0, "internal_resistance": 0.5}))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 100.0}))
    s.add_part(PlacedPart("resistor", "R2", 4, 0, 90, False, {"resistance": 220.0}))
    s.add_part(PlacedPart("resistor", "R3", 0, 4, 0, False, {"resistance": 150.0}))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


LOOP_AMPS = 12.0 / (0.5 + 100.0 + 220.0 + 150.0)  # Ohm's law round the one loop, by hand


def loop_current(sketch: Sketch) -> float:
    net = to_circuit(sketch)
    return abs(solve(net.circuit, ground=net.ground).current("R2"))


def pairs(groups) -> set[frozenset]:
    """Every two terminals on one node."""
    return {frozenset((a, b)) for g in groups for a in g for b in g if a != b}


def test_a_part_moved_by_keys_stays_joined_to_the_parts_it_touched(qtbot, tmp_path):
    start = butted_loop()
    win = open_window(qtbot, tmp_path, start, active=True)
    assert loop_current(win.sketch) == pytest.approx(LOOP_AMPS, rel=1e-12)
    win.scene.select(["R2"])
    win.view.setFocus()
    for _ in range(3):
        qtbot.keyClick(win.view, Qt.Key.Key_Right)
    assert win.sketch.part("R2").x == 7
    assert joined(win.sketch) == joined(start)
    assert loop_current(win.sketch) == pytest.approx(LOOP_AMPS, rel=1e-12)
    assert {w.normalized() for w in win.sketch.wires} == {Wire(4, 0, 7, 0), Wire(4, 4, 7, 4)}
    assert win.stack.count() == 1  # the key steps in a row are one move
    win.stack.undo()
    assert win.sketch == start


def test_alt_with_the_keys_moves_a_part_off_what_it_touches(qtbot, tmp_path):
    start = butted_loop()
    win = open_window(qtbot, tmp_path, start, active=True)
    win.scene.select(["R2"])
    win.view.setFocus()
    qtbot.keyClick(win.view, Qt.Key.Key_Right, Qt.KeyboardModifier.AltModifier)
    assert win.sketch.part("R2").x == 5 and win.sketch.wires == []
    r2 = {g for g in joined(win.sketch) if any(name == "R2" for name, _ in g)}
    assert r2 == {frozenset({("R2", 0)}), frozenset({("R2", 1)})}  # each end joined to nothing


def test_a_part_dragged_with_the_mouse_stays_joined_and_alt_drag_parts_it(qtbot, tmp_path):
    start = butted_loop()
    win = open_window(qtbot, tmp_path, start, size=(900, 700), centre=(60, 40))
    drag(win, (4, 2), (6, 3))  # R2's body, two right and one down
    assert (win.sketch.part("R2").x, win.sketch.part("R2").y) == (6, 1)
    assert joined(win.sketch) == joined(start)
    assert loop_current(win.sketch) == pytest.approx(LOOP_AMPS, rel=1e-12)
    win.stack.undo()
    assert win.sketch == start
    drag(win, (4, 2), (6, 3), Qt.KeyboardModifier.AltModifier)
    assert (win.sketch.part("R2").x, win.sketch.part("R2").y) == (6, 1)
    assert win.sketch.wires == [] and joined(win.sketch) != joined(start)


def test_keys_carrying_a_part_across_a_wire_do_not_join_it_to_the_wire(qtbot, tmp_path):
    """On the way, R1's right end sits on the middle of the upright wire; only where it ends
    up may join it, and there it touches nothing."""
    start = Sketch()
    start.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 1000.0}))
    start.add_part(PlacedPart("resistor", "R2", 6, 2, 90, False, {"resistance": 1000.0}))
    start.add_wire(Wire(6, -2, 6, 2))
    win = open_window(qtbot, tmp_path, start, active=True)
    win.scene.select(["R1"])
    win.view.setFocus()
    for _ in range(8):
        qtbot.keyClick(win.view, Qt.Key.Key_Right)
    assert win.sketch.part("R1").terminals() == [(8, 0), (12, 0)]
    assert win.sketch.wires == start.wires
    assert joined(win.sketch) == joined(start)


def test_a_turned_part_stays_joined_to_the_parts_it_touched():
    s = butted_loop()
    before = joined(s)
    apply_edit(s, rotate_edit(s, ["R1"]))
    assert s.part("R1").rotation == 90
    assert joined(s) == before
    assert loop_current(s) == pytest.approx(LOOP_AMPS, rel=1e-12)


def test_parts_turned_together_stay_joined_where_they_met():
    """R1 and R2 in a line, meeting at (4, 0), fed by B1 along the bottom; turned upright
    together, the two ends that met go opposite ways and a new wire joins them."""
    s = Sketch()
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 100.0}))
    s.add_part(PlacedPart("resistor", "R2", 4, 0, 0, False, {"resistance": 220.0}))
    s.add_part(PlacedPart("cell", "B1", 0, 4, 0, False, {"emf": 12.0, "internal_resistance": 0.5}))
    for w in (Wire(0, 0, 0, 4), Wire(8, 0, 8, 4), Wire(4, 4, 8, 4)):
        s.add_wire(w)
    before = joined(s)
    apply_edit(s, rotate_edit(s, ["R1", "R2"]))
    assert s.part("R1").terminals()[1] != s.part("R2").terminals()[0]
    assert joined(s) == before
    assert loop_current(s) == pytest.approx(12.0 / (0.5 + 100.0 + 220.0), rel=1e-12)  # Ohm's law, by hand


def lattice() -> Sketch:
    """``bench_live``'s lattice of resistors butted along the lines of a grid (4 steps apart,
    a cell in one corner), with a wire across the middle row's ends, so that moves meet
    terminals, wire ends and wire middles."""
    s = grid_sketch(20)
    s.add_wire(Wire(-2, 4, 18, 4))
    return s


@settings(max_examples=60, deadline=None)
@given(picks=st.sets(st.integers(0, 15), min_size=1, max_size=4),
       dx=st.integers(-5, 5), dy=st.integers(-5, 5), wired=st.booleans())
def test_no_move_parts_terminals_that_were_joined(picks, dx, dy, wired):
    """Any parts moved any way, with or without the wire under them selected: every two
    terminals joined before are joined after (a move may join more, where it lands)."""
    if (dx, dy) == (0, 0):
        return
    s = lattice()
    parts = [p for p in s.parts]
    names = sorted({parts[i % len(parts)].name for i in picks})
    before = pairs(joined(s))
    movers = {n: s.part(n) for n in names}
    staying = {t for p in s.parts if p.name not in movers for t in p.terminal_points}
    base = tuple(s.wires)
    new_parts, new_wires = move_target(movers, base, [0] if wired else [], dx, dy, staying)
    apply_edit(s, Edit([(movers[n], new_parts[n], None) for n in names], base, new_wires))
    assert before <= pairs(joined(s))


@settings(max_examples=60, deadline=None)
@given(picks=st.sets(st.integers(0, 15), min_size=1, max_size=4), mirror=st.booleans())
def test_no_turn_parts_terminals_that_were_joined(picks, mirror):
    """Any parts turned or mirrored together: every two terminals joined before are joined after."""
    s = lattice()
    parts = [p for p in s.parts]
    names = sorted({parts[i % len(parts)].name for i in picks})
    before = pairs(joined(s))
    apply_edit(s, rotate_edit(s, names, mirror=mirror))
    assert before <= pairs(joined(s))


def along_body(sketch: Sketch, name: str) -> list[Wire]:
    """The wires lying along the body of two-terminal part ``name`` (sharing more than a point of its line)."""
    (ax, ay), (bx, by) = sketch.part(name).terminals()
    out = []
    for w in sketch.wires:
        if ax == bx == w.x1 == w.x2:
            lo, hi = sorted((w.y1, w.y2))
            if max(lo, min(ay, by)) < min(hi, max(ay, by)):
                out.append(w)
        elif ay == by == w.y1 == w.y2:
            lo, hi = sorted((w.x1, w.x2))
            if max(lo, min(ax, bx)) < min(hi, max(ax, bx)):
                out.append(w)
    return out


def test_a_wire_following_a_turned_part_is_not_laid_along_its_body():
    """R1 turned upright about its middle: the wire on its right end keeping its direction
    would run into the middle and down the new body; it turns at its fixed end instead."""
    s = Sketch()
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 100.0}))
    s.add_part(PlacedPart("resistor", "R2", 8, 0, 90, False, {"resistance": 220.0}))
    s.add_wire(Wire(4, 0, 8, 0))
    before = joined(s)
    apply_edit(s, rotate_edit(s, ["R1"]))
    assert s.part("R1").terminals()[1] in {(2, 2), (2, -2)}
    assert along_body(s, "R1") == []
    assert joined(s) == before
