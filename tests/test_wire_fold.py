"""Wires that follow a moved part never fold back on themselves or leave dead-end stubs.

Moving a wired part stretches its wires wire by wire; a later move can run a
stretch back over a bend an earlier move made.  These tests drive the moves
through the editor (and once through real arrow keys) and check that the
fold is taken out, that nothing another conductor touches is lost, and that
the circuit solves as before.
"""
from __future__ import annotations

from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from hypothesis import given  # noqa: E402
from hypothesis import strategies as st  # noqa: E402
from PySide6.QtCore import QPointF, Qt  # noqa: E402
from PySide6.QtGui import QMouseEvent  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

from app.sketch.fileio import load_sketch  # noqa: E402
from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.sketch.netlist import to_circuit  # noqa: E402
from app.ui.edits import Edit, apply_edit, move_target, route, straighten  # noqa: E402
from solver import solve  # noqa: E402

from reference_nodal import nodal_solve  # noqa: E402
from sketch_joins import joined  # noqa: E402
from ui_support import open_window  # noqa: E402

DEMO = Path(__file__).resolve().parent.parent / "demo_circuits" / "bench_supply_fixture.lwsk"
GridPoint = tuple[int, int]


# -- reading a sketch ------------------------------------------------------------------------
def segments(wires) -> set[Wire]:
    return {w.normalized() for w in wires}


def _on(w: Wire, q: GridPoint) -> bool:
    return min(w.x1, w.x2) <= q[0] <= max(w.x1, w.x2) and min(w.y1, w.y2) <= q[1] <= max(w.y1, w.y2)


def stubs(sketch: Sketch) -> set[GridPoint]:
    """Wire ends nothing else touches (no terminal, no other wire through or ending there)."""
    terms = {t for p in sketch.parts for t in p.terminals()}
    wires = sketch.wires
    return {e for i, w in enumerate(wires) for e in w.ends
            if e not in terms and not any(_on(v, e) for j, v in enumerate(wires) if j != i)}


def dead_folds(sketch: Sketch) -> list[tuple[Wire, Wire]]:
    """Pairs of wires from one end point, lying over each other, where nothing else touches that point."""
    terms = {t for p in sketch.parts for t in p.terminals()}
    wires = sketch.wires
    out = []
    for i, w in enumerate(wires):
        for j in range(i + 1, len(wires)):
            v = wires[j]
            if (w.y1 == w.y2) != (v.y1 == v.y2):
                continue
            axis = 0 if w.y1 == w.y2 else 1
            for p in set(w.ends) & set(v.ends):
                q = w.ends[1] if w.ends[0] == p else w.ends[0]
                r = v.ends[1] if v.ends[0] == p else v.ends[0]
                alone = p not in terms and not any(_on(u, p) for k, u in enumerate(wires) if k not in (i, j))
                if alone and (q[axis] > p[axis]) == (r[axis] > p[axis]):
                    out.append((w, v))
    return out


def currents(sketch: Sketch) -> dict[str, float]:
    net = to_circuit(sketch)
    sol = solve(net.circuit, ground=net.ground)
    return {p.name: sol.current(p.name) for p in sketch.parts if p.kind != "ground"}


def nodal_currents(sketch: Sketch) -> dict[str, float]:
    net = to_circuit(sketch)
    ref = nodal_solve(net.circuit, ground=net.ground)
    return {p.name: ref.current[p.name] for p in sketch.parts if p.kind != "ground"}


# -- the bench supply fixture: R2 moved right, down two, and back diagonally ---------------------
def test_demo_move_and_back_leaves_no_stub_and_the_same_wires(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, DEMO)
    start = load_sketch(DEMO)
    before = currents(win.sketch)
    for dx, dy in [(1, 0), (0, 2), (-1, -2)]:
        win.editor.move(["R2"], [], dx, dy)  # three moves, each on the document the last one left
        assert not dead_folds(win.sketch)
    assert win.sketch.part("R2") == start.part("R2")
    assert to_circuit(win.sketch).open_ends == []          # (9, 2) and (9, 6) were left open before
    assert segments(win.sketch.wires) == segments(start.wires)
    # (not the very list: on the way a stretched wire turned at its fixed end rather than run
    # down R2's body, and it comes back as the same run, listed last)
    assert joined(win.sketch) == joined(start)
    after = currents(win.sketch)
    assert after == pytest.approx(before, rel=1e-12)
    # Independent check, Ohm's law with series/parallel resistances: 12 V over 0.05 + 47 + 100 || (220 + 330).
    total = 0.05 + 47.0 + 100.0 * 550.0 / 650.0
    i = 12.0 / total
    assert abs(after["R1"]) == pytest.approx(i, rel=1e-9)
    assert abs(after["R2"]) == pytest.approx(i * 550.0 / 650.0, rel=1e-9)
    assert abs(after["R4"]) == pytest.approx(i * 100.0 / 650.0, rel=1e-9)
    # and against an independent nodal analysis (tests/reference_nodal.py, scipy.sparse)
    assert after == pytest.approx(nodal_currents(win.sketch), rel=1e-9, abs=1e-15)
    # every move is one step: undo all gives the file as opened, redo all the moved state
    for _ in range(3):
        win.stack.undo()
    assert win.sketch == start
    for _ in range(3):
        win.stack.redo()
    assert segments(win.sketch.wires) == segments(start.wires)


def _mouse_drag(win, a: tuple[float, float], b: tuple[float, float]) -> None:
    """Press at grid point ``a``, move in steps to ``b`` and release (real mouse events on the canvas)."""
    vp = win.view.viewport()
    left = Qt.MouseButton.LeftButton

    def send(kind, grid, button, held):
        pos = win.view.mapFromScene(QPointF(grid[0] * 20.0, grid[1] * 20.0))
        QApplication.sendEvent(vp, QMouseEvent(kind, QPointF(pos), QPointF(vp.mapToGlobal(pos)), button, held,
                                               Qt.KeyboardModifier.NoModifier))

    send(QMouseEvent.Type.MouseButtonPress, a, left, left)
    for k in range(1, 7):
        send(QMouseEvent.Type.MouseMove, (a[0] + (b[0] - a[0]) * k / 6, a[1] + (b[1] - a[1]) * k / 6),
             Qt.MouseButton.NoButton, left)
    send(QMouseEvent.Type.MouseButtonRelease, b, left, Qt.MouseButton.NoButton)


def test_demo_moved_with_arrow_keys_and_dragged_back(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, DEMO, size=(1000, 700), centre=(160, 80), active=True)
    start = load_sketch(DEMO)
    win.scene.select(["R2"])
    win.view.setFocus()
    for k in (Qt.Key.Key_Right, Qt.Key.Key_Down, Qt.Key.Key_Down):
        qtbot.keyClick(win.view, k)
    assert win.sketch.part("R2").terminals() == [(9, 4), (9, 8)]
    _mouse_drag(win, (9, 6), (8, 4))      # the body's middle, one left and two up
    assert win.sketch.part("R2") == start.part("R2")
    assert not dead_folds(win.sketch)
    assert to_circuit(win.sketch).open_ends == []
    assert segments(win.sketch.wires) == segments(start.wires)
    assert joined(win.sketch) == joined(start)
    assert win.stack.count() == 2         # the key steps in a row are one move, then the drag
    for _ in range(2):
        qtbot.keyClick(win.view, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)
    assert win.sketch == start


def test_demo_dragged_there_and_back_is_one_step(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, DEMO)
    start = load_sketch(DEMO)
    win.scene.select(["R2"])
    win.editor.begin_drag()
    for dx, dy in [(1, 0), (1, 1), (1, 2), (0, 1), (0, 0)]:
        win.editor.drag_to(dx, dy)
        assert not dead_folds(win.sketch)
    win.editor.end_drag()
    assert win.sketch == start           # a drag that ends where it began changes nothing
    win.scene.select(["R2"])
    win.editor.nudge(1, 0)
    win.editor.nudge(0, 2)
    win.editor.begin_drag()              # drag offsets count from where the drag began
    for dx, dy in [(0, -1), (-1, -1), (-1, -2)]:
        win.editor.drag_to(dx, dy)
    win.editor.end_drag()
    assert win.sketch.wires == start.wires
    assert win.stack.count() == 2         # the two nudges in a row are one step, the drag another
    win.stack.undo()
    assert win.sketch.part("R2").y == start.part("R2").y + 2
    assert win.sketch.wires != start.wires
    win.stack.undo()
    assert win.sketch == start
    for _ in range(3):
        win.stack.redo()
    assert win.sketch.wires == start.wires


# -- straightening by itself ------------------------------------------------------------------------
def test_a_fold_nothing_touches_is_taken_out():
    # a wire from (0,0) to (4,0) and a stretch from (4,0) back to (1,0): the stub (1,0)..(4,0) goes
    out = straighten((Wire(0, 0, 4, 0), Wire(4, 0, 1, 0)), terminals=[(0, 0), (1, 0)])
    assert out == (Wire(0, 0, 1, 0),)


def test_a_doubled_stub_goes_entirely():
    out = straighten((Wire(8, 2, 9, 2), Wire(9, 2, 8, 2)), terminals=[(8, 2)])
    assert out == ()


def test_a_fold_point_that_is_touched_keeps_its_connection():
    terminal_at_turn = straighten((Wire(0, 0, 4, 0), Wire(4, 0, 1, 0)), terminals=[(0, 0), (1, 0), (4, 0)])
    assert segments(terminal_at_turn) == {Wire(0, 0, 1, 0), Wire(1, 0, 4, 0)}
    # another wire's end at the turn: kept, and the overlap made single
    t_end = straighten((Wire(0, 0, 4, 0), Wire(4, 0, 1, 0), Wire(4, 0, 4, 3)), terminals=[(0, 0), (1, 0)],
                       changed=[1])
    assert segments(t_end) == {Wire(0, 0, 1, 0), Wire(1, 0, 4, 0), Wire(4, 0, 4, 3)}
    # a wire passing through the turn point (the turn makes a T-junction there): kept
    through = straighten((Wire(0, 0, 4, 0), Wire(4, 0, 1, 0), Wire(4, -2, 4, 3)), terminals=[(0, 0), (1, 0)],
                         changed=[1])
    assert segments(through) == {Wire(0, 0, 1, 0), Wire(1, 0, 4, 0), Wire(4, -2, 4, 3)}


def test_a_stub_is_cut_back_only_to_the_last_point_something_touches():
    # a T-junction at (3,0) on the stub: the stub keeps (1,0)..(3,0); a crossing at (2,0) is no stop
    wires = (Wire(0, 0, 5, 0), Wire(5, 0, 1, 0), Wire(3, 0, 3, 4), Wire(2, -1, 2, 1))
    out = straighten(wires, terminals=[(0, 0), (1, 0)], changed=[1])
    assert segments(out) == {Wire(0, 0, 1, 0), Wire(1, 0, 3, 0), Wire(3, 0, 3, 4), Wire(2, -1, 2, 1)}


def test_carried_wires_are_never_altered():
    wires = (Wire(0, 0, 4, 0), Wire(4, 0, 1, 0))
    assert straighten(wires, terminals=[], changed=[1], carried=[0]) == wires


# -- random sketches and moves --------------------------------------------------------------------
ROT = st.sampled_from([0, 90, 180, 270])
PART = st.tuples(st.integers(0, 8), st.integers(0, 8), ROT)
MOVE = st.tuples(st.integers(1, 15), st.integers(-3, 3), st.integers(-3, 3)).filter(lambda m: m[1:] != (0, 0))


def build(parts, links) -> Sketch:
    s = Sketch()
    for k, (x, y, rot) in enumerate(parts):
        s.add_part(PlacedPart("resistor", f"R{k + 1}", x, y, rot))
    terms = [t for p in s.parts for t in p.terminals()]
    have = set()
    for a, b, horizontal_first in links:
        ta, tb = terms[a % len(terms)], terms[b % len(terms)]
        for w in route(ta, tb, horizontal_first):
            if w.normalized() not in have:
                have.add(w.normalized())
                s.add_wire(w)
    return s


def move(sketch: Sketch, names: list[str], dx: int, dy: int, *, settle: bool = True) -> None:
    """What ``Editor.move`` does, without the window (``settle`` False: the bare stretch)."""
    movers = {n: sketch.part(n) for n in names}
    base = tuple(sketch.wires)
    new_parts, new_wires = move_target(movers, base, [], dx, dy)
    apply_edit(sketch, Edit([(movers[n], new_parts[n], None) for n in names], base,
                            new_wires if settle else tuple(new_wires)))


@given(parts=st.lists(PART, min_size=1, max_size=4),
       links=st.lists(st.tuples(st.integers(0, 7), st.integers(0, 7), st.booleans()), min_size=1, max_size=5),
       moves=st.lists(MOVE, min_size=1, max_size=4))
def test_moves_and_their_inverses_join_what_the_stretch_joins_and_leave_no_fold(parts, links, moves):
    """Along moves and then their inverses in reverse order, every step:
    joins exactly the terminals the bare stretch (wires following, nothing straightened) joins, so a
    move changes connectivity only as following the moved terminals does; leaves no fold at a point
    nothing else touches; and leaves no stub the bare stretch would not leave."""
    s = build(parts, links)
    names = [p.name for p in s.parts]
    steps = [([n for i, n in enumerate(names) if bits >> i & 1] or names[:1], dx, dy)
             for bits, dx, dy in moves]
    steps += [(ns, -dx, -dy) for ns, dx, dy in reversed(steps)]
    folds_at_start = len(dead_folds(s))
    for ns, dx, dy in steps:
        bare = s.drawing()
        move(bare, ns, dx, dy, settle=False)
        move(s, ns, dx, dy)
        assert joined(s) == joined(bare)
        assert len(dead_folds(s)) <= folds_at_start
        assert stubs(s) <= stubs(bare)
    assert [p.terminals() for p in s.parts] == [p.terminals() for p in build(parts, links).parts]
