"""Drawing on the canvas with real mouse and key events, checked against the solver and by hand.

Every interaction here goes through qtbot mouse and key events on the
canvas; the document is only read, never edited directly.
"""
from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QPoint, QPointF, QSettings, Qt  # noqa: E402
from PySide6.QtGui import QMouseEvent  # noqa: E402
from PySide6.QtWidgets import QApplication, QLineEdit  # noqa: E402

from app.sketch.fileio import load_sketch  # noqa: E402
from app.sketch.model import Sketch  # noqa: E402
from app.sketch.netlist import to_circuit  # noqa: E402
from app.ui.main_window import MainWindow  # noqa: E402
from app.units import format_value  # noqa: E402
from solver import solve  # noqa: E402


@pytest.fixture
def win(qtbot, tmp_path):
    w = MainWindow(QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat))
    w.prompts = []
    w.ask_to_save = lambda: (w.prompts.append("asked"), "discard")[1]
    w.tell = lambda title, message: pytest.fail(f"unexpected message: {message}")
    qtbot.addWidget(w)
    w.resize(1100, 760)
    w.show()
    qtbot.waitExposed(w)
    w.view.resetTransform()
    w.view.centerOn(QPointF(80, 40))
    w.view.setFocus()
    return w


def at(win, x: int, y: int) -> QPoint:
    """Viewport position of grid point (x, y)."""
    return win.view.mapFromScene(QPointF(x * 20.0, y * 20.0))


def click(qtbot, win, x, y, button=Qt.MouseButton.LeftButton):
    vp = win.view.viewport()
    qtbot.mouseMove(vp, at(win, x, y))
    qtbot.mouseClick(vp, button, pos=at(win, x, y))


def key(qtbot, win, k, mods=Qt.KeyboardModifier.NoModifier):
    qtbot.keyClick(win.view, k, mods)


def turn_to(qtbot, win, rotation):
    """Press Space until the part being placed points the wanted way (the tool remembers its last turn)."""
    for _ in range(4):
        if win.view.rotation == rotation:
            return
        key(qtbot, win, Qt.Key.Key_Space)
    assert win.view.rotation == rotation


def place(qtbot, win, kind_key, x, y, rotation=0):
    """Choose a part by its key, turn it with Space, click where its body's middle goes."""
    key(qtbot, win, kind_key)
    turn_to(qtbot, win, rotation)
    click(qtbot, win, x, y)
    key(qtbot, win, Qt.Key.Key_Escape)


def wire(qtbot, win, *points):
    key(qtbot, win, Qt.Key.Key_W)
    for p in points:
        click(qtbot, win, *p)
    key(qtbot, win, Qt.Key.Key_Escape)
    key(qtbot, win, Qt.Key.Key_Escape)


def drag(win, a, b, modifiers=Qt.KeyboardModifier.NoModifier):
    """Press at grid point a, move in steps to b, release (real mouse events on the viewport,
    with ``modifiers`` held)."""
    vp = win.view.viewport()
    buttons = Qt.MouseButton.LeftButton

    def send(kind, pos, btn, held):
        ev = QMouseEvent(kind, QPointF(pos), QPointF(vp.mapToGlobal(pos)), btn, held, modifiers)
        QApplication.sendEvent(vp, ev)

    p0 = at(win, *a)
    send(QMouseEvent.Type.MouseButtonPress, p0, Qt.MouseButton.LeftButton, buttons)
    steps = 6
    for k in range(1, steps + 1):
        x = a[0] + (b[0] - a[0]) * k / steps
        y = a[1] + (b[1] - a[1]) * k / steps
        pos = win.view.mapFromScene(QPointF(x * 20.0, y * 20.0))
        send(QMouseEvent.Type.MouseMove, pos, Qt.MouseButton.NoButton, buttons)
    send(QMouseEvent.Type.MouseButtonRelease, at(win, *b), Qt.MouseButton.LeftButton, Qt.MouseButton.NoButton)


def draw_two_meshes(qtbot, win):
    """A 9 V cell feeding R1 in series with R2 in parallel with R3 + R4 (all 1 kΩ by default).

    Grid: B1 upright at x=0 (plus at the top), R1 along the top from x=0 to 4,
    R2 upright at x=4, R3 along the top from 4 to 8, R4 upright at x=8, a
    bottom wire from x=0 to 8 (a T-junction under R2) and a ground.
    """
    place(qtbot, win, Qt.Key.Key_B, 0, 2, rotation=90)
    place(qtbot, win, Qt.Key.Key_R, 2, 0)
    place(qtbot, win, Qt.Key.Key_R, 4, 2, rotation=90)
    # R3 by keyboard alone: cursor to (6, 0) with the arrows, Enter places it
    key(qtbot, win, Qt.Key.Key_R)
    turn_to(qtbot, win, 0)
    win.view.move_cursor_to((2, 0))  # start the cursor from a known point; the arrows do the rest
    for _ in range(4):
        key(qtbot, win, Qt.Key.Key_Right)
    key(qtbot, win, Qt.Key.Key_Return)
    key(qtbot, win, Qt.Key.Key_Escape)
    place(qtbot, win, Qt.Key.Key_R, 8, 2, rotation=90)
    wire(qtbot, win, (0, 4), (8, 4))
    place(qtbot, win, Qt.Key.Key_G, 0, 4)


def test_two_mesh_circuit_drawn_by_mouse_and_keys_is_annotated_with_solver_currents(qtbot, win):
    draw_two_meshes(qtbot, win)
    s = win.sketch
    assert sorted(p.name for p in s.parts) == ["B1", "GND1", "R1", "R2", "R3", "R4"]
    assert s.part("R3").terminals() == [(4, 0), (8, 0)]
    # the engine's own answer for the drawn document
    net = to_circuit(s)
    sol = solve(net.circuit, ground=net.ground)
    items = win.scene.part_items
    for name in ("B1", "R1", "R2", "R3", "R4"):
        mark = items[name].current_mark
        assert mark.isVisible()
        assert mark.value == pytest.approx(sol.current(name), rel=1e-9, abs=1e-15)
        assert mark.text == format_value(abs(sol.current(name)), "A")
    # and by hand (series-parallel reduction, Ohm's law): R_total = 1k + 1k || 2k
    emf, r = 9.0, 1000.0
    i_total = emf / (r + r * 2 * r / (3 * r))
    assert items["R1"].current_mark.value == pytest.approx(i_total)
    assert items["R2"].current_mark.value == pytest.approx(i_total * 2 / 3)
    assert items["R4"].current_mark.value == pytest.approx(i_total / 3)
    assert items["R2"].drop_mark.value == pytest.approx(i_total * 2 / 3 * r)
    assert "Solved" in win.status_text.text()
    assert win.readings_model.text(win.readings_model.row_of("R1"), 1) == format_value(i_total, "A")


def test_no_potential_tag_hides_a_part_label_or_value_drawn_after_it(qtbot, win):
    """The tag at the junction of R1, R2 and R3 is hung before R3 is placed; R3's label then
    lands where the tag hangs. Every label and value text stays in sight (the geometry of
    each text is read from its item, the tag's box from the tag)."""
    draw_two_meshes(qtbot, win)
    scene = win.scene
    texts = []
    for item in scene.part_items.values():
        if item.lines:
            texts.append((item.part.name, item.mapRectToScene(item.label_rect)))
        for mark in (item.current_mark, item.drop_mark):
            if mark is not None and mark.isVisible():
                texts.append((item.part.name, mark.text_rect.translated(item.pos())))
    tags = [t for t in scene._tags if t.isVisible()]
    assert len(tags) >= 3
    for tag in tags:
        box = tag.rect_at(tag._corner).translated(tag.pos())
        hidden = [name for name, rect in texts if box.intersected(rect).width() * box.intersected(rect).height() > 1]
        assert not hidden, f"the {tag.text} tag hides text of {hidden}"


def test_undo_all_gives_the_empty_sketch_and_redo_all_the_same_document(qtbot, win):
    draw_two_meshes(qtbot, win)
    drag(win, (6, 0), (6, -2))  # move R3 up two steps: its wires stretch, one undo step
    drawn = Sketch()
    for p in win.sketch.parts:
        drawn.add_part(p)
    for w in win.sketch.wires:
        drawn.add_wire(w)
    assert win.sketch.part("R3").terminals() == [(4, -2), (8, -2)]
    n = win.stack.count()
    for _ in range(n):
        key(qtbot, win, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)
    assert win.sketch == Sketch()
    assert not win.scene.part_items and not win.scene.wire_items
    for _ in range(n):
        win.act_redo.trigger()
    assert win.sketch == drawn
    assert win.stack.undoText() == "Move"  # the whole drag is one step


def test_moving_a_part_stretches_the_wires_on_its_terminals(qtbot, win):
    place(qtbot, win, Qt.Key.Key_R, 2, 0)
    wire(qtbot, win, (4, 0), (8, 0))
    drag(win, (2, 0), (2, 3))
    s = win.sketch
    assert s.part("R1").terminals() == [(0, 3), (4, 3)]
    ends = {e for w in s.wires for e in w.ends}
    assert (4, 3) in ends and (8, 0) in ends  # still attached, still reaching the far end
    assert all(w.x1 == w.x2 or w.y1 == w.y2 for w in s.wires)


def test_turning_a_wired_part_keeps_its_wires_on_its_terminals(qtbot, win):
    # one loop: a cell and R1 joined by wires; then R1 is turned by Space
    place(qtbot, win, Qt.Key.Key_B, 0, 2, rotation=90)       # plus at (0, 0), minus at (0, 4)
    place(qtbot, win, Qt.Key.Key_R, 6, 0)                    # R1 from (4, 0) to (8, 0)
    wire(qtbot, win, (0, 0), (4, 0))
    wire(qtbot, win, (8, 0), (8, 4), (0, 4))
    click(qtbot, win, 6, 0)                                   # select R1
    key(qtbot, win, Qt.Key.Key_Space)                         # turn it a quarter
    s = win.sketch
    part = s.part("R1")
    assert part.rotation == 90
    ends = {e for w in s.wires for e in w.ends}
    assert set(part.terminals()) <= ends                      # both terminals still wired
    assert all(w.x1 == w.x2 or w.y1 == w.y2 for w in s.wires)
    net = to_circuit(s)
    assert not net.open_ends
    sol = solve(net.circuit, ground=net.ground)
    # Ohm's law round the single loop: I = E / (R + r), with the parts' default values
    cell, r1 = s.part("B1"), s.part("R1")
    expected = cell.value("emf") / (r1.value("resistance") + cell.value("internal_resistance"))
    assert abs(sol.current("R1")) == pytest.approx(expected, rel=1e-9)
    key(qtbot, win, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)   # undo the turn
    assert win.sketch.part("R1").rotation == 0


def test_save_close_reopen_gives_the_identical_document(qtbot, win, tmp_path):
    draw_two_meshes(qtbot, win)
    path = tmp_path / "two_meshes.lwsk"
    assert win.save_to(path)
    assert not win.isWindowModified()
    drawn = load_sketch(path)
    assert drawn == win.sketch
    key(qtbot, win, Qt.Key.Key_W, Qt.KeyboardModifier.ControlModifier)  # Close
    assert win.prompts == []  # saved: closing does not ask
    assert win.sketch == Sketch()
    assert win.open_path(path)
    assert win.sketch == drawn
    assert win.recent_files()[0] == str(path.resolve())


def test_a_short_circuit_drawn_on_the_canvas_marks_the_shorted_cell(qtbot, win):
    place(qtbot, win, Qt.Key.Key_B, 0, 2, rotation=90)      # ideal 9 V cell, plus at (0, 0)
    place(qtbot, win, Qt.Key.Key_R, 2, 0)               # R1 from (0, 0) to (4, 0)
    wire(qtbot, win, (4, 0), (4, 4), (0, 4))            # R1 back to the minus terminal
    assert win.scene.part_items["R1"].current_mark.isVisible()
    wire(qtbot, win, (0, 0), (-3, 0), (-3, 4), (0, 4))  # a bare wire across the cell
    items = win.scene.part_items
    assert items["B1"].flagged
    assert not items["R1"].flagged
    # the wires that make the short are marked too, and only those (the bare run left of the cell)
    flagged = [w.wire for w in win.scene.wire_items if w.flagged]
    assert flagged and all(max(w.x1, w.x2) <= 0 for w in flagged)
    assert "Not solved" in win.scene.fault_text
    assert not items["R1"].current_mark.isVisible()  # stale results hidden
    assert win.readings_model.text(win.readings_model.row_of("R1"), 1) == "—"
    assert "Not solved" in win.status_text.text()
    key(qtbot, win, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)  # undo the last leg
    assert not items["B1"].flagged
    assert items["R1"].current_mark.isVisible()


def test_a_wire_bends_around_the_part_it_starts_from_rather_than_over_it(qtbot, win):
    """Joining a cell's plus to a resistor up and to the right: the bend asked for (across
    first) would run along the cell's body and short it, so the wire goes up first; the
    band shown while drawing is the wire that lands."""
    place(qtbot, win, Qt.Key.Key_B, 0, 0)               # ideal 9 V cell, plus (-2, 0), minus (2, 0)
    place(qtbot, win, Qt.Key.Key_R, 4, -2)              # R1 from (2, -2) to (6, -2)
    key(qtbot, win, Qt.Key.Key_W)
    assert win.view.horizontal_first                    # the bend asked for: across, then up
    click(qtbot, win, -2, 0)
    qtbot.mouseMove(win.view.viewport(), at(win, 2, -2))
    shown = [(round(p.x() / 20), round(p.y() / 20)) for p in win.view._rubber.points]
    assert "bends the other way" in win.hint_text.text()  # Space did not do it: say why
    click(qtbot, win, 2, -2)
    key(qtbot, win, Qt.Key.Key_Escape)
    legs = [(w.x1, w.y1, w.x2, w.y2) for w in win.sketch.wires]
    assert legs == [(-2, 0, -2, -2), (-2, -2, 2, -2)]
    assert shown == [(-2, 0), (-2, -2), (2, -2)]
    assert not win.scene.part_items["B1"].flagged
    wire(qtbot, win, (6, -2), (2, 0))                   # R1's far end to the minus: not along R1
    assert [(w.x1, w.y1, w.x2, w.y2) for w in win.sketch.wires[2:]] == [(6, -2, 6, 0), (6, 0, 2, 0)]
    # Ohm's law: 9 V across 1 kΩ
    assert abs(win.scene.part_items["R1"].current_mark.value) == pytest.approx(9.0 / 1000.0)


def test_the_fault_frame_strikes_through_none_of_the_flagged_parts_label(qtbot, win):
    """A current source drawn level on its own has no return path and is flagged; its frame
    goes round the symbol and the label above it, so no fault-coloured pixel lies on the label."""
    import numpy as np

    from app.ui.theme import current_theme
    from ui_support import canvas_pixels

    place(qtbot, win, Qt.Key.Key_I, 2, 0)               # I1 from (0, 0) to (4, 0), alone
    item = win.scene.part_items["I1"]
    qtbot.waitUntil(lambda: item.flagged)
    win.view.viewport().repaint()
    px = canvas_pixels(win)
    box = win.view.mapFromScene(item.mapRectToScene(item.label_rect)).boundingRect()
    patch = px[box.top():box.bottom() + 1, box.left():box.right() + 1, :3]
    fault = current_theme().fault
    near = np.abs(patch - np.array([fault.blue(), fault.green(), fault.red()])).sum(axis=2) < 90
    assert patch.size and not near.any(), f"{int(near.sum())} fault-coloured pixels on I1's label"


def test_value_typed_in_place_accepts_iec_code_and_refuses_nonsense(qtbot, win):
    place(qtbot, win, Qt.Key.Key_R, 2, 0)
    vp = win.view.viewport()
    qtbot.mouseDClick(vp, Qt.MouseButton.LeftButton, pos=at(win, 2, 0))
    editor = win._inline
    assert editor is not None
    editor.line.selectAll()
    qtbot.keyClicks(editor.line, "abc")
    qtbot.keyClick(editor.line, Qt.Key.Key_Return)
    assert editor.message.isVisible() and "Not accepted" in editor.message.text()
    assert win.sketch.part("R1").value("resistance") == 1000.0
    editor.line.selectAll()
    qtbot.keyClicks(editor.line, "4k7")
    qtbot.keyClick(editor.line, Qt.Key.Key_Return)
    assert win.sketch.part("R1").value("resistance") == 4700.0
    assert win._inline is None


def test_value_typed_in_the_part_panel_accepts_iec_code_and_refuses_nonsense(qtbot, win):
    place(qtbot, win, Qt.Key.Key_R, 2, 0)
    click(qtbot, win, 2, 0)
    field = win.part_panel.field("resistance")
    field.selectAll()
    qtbot.keyClicks(field, "abc")
    qtbot.keyClick(field, Qt.Key.Key_Return)
    assert win.part_panel.message.isVisible()
    assert "abc" in win.part_panel.message.text()
    assert win.sketch.part("R1").value("resistance") == 1000.0
    field = win.part_panel.field("resistance")
    field.selectAll()
    qtbot.keyClicks(field, "4k7")
    qtbot.keyClick(field, Qt.Key.Key_Return)
    assert win.sketch.part("R1").value("resistance") == 4700.0
    assert win.scene.part_items["R1"].lines[0].endswith("4.70 kΩ")


def test_a_loop_drawn_with_the_keyboard_alone_is_solved(qtbot, win):
    """Place, turn, move and wire by keys only: a cell and a resistor in one loop."""
    win.view.move_cursor_to((0, 0))
    key(qtbot, win, Qt.Key.Key_B)
    turn_to(qtbot, win, 90)                    # upright
    for _ in range(2):
        key(qtbot, win, Qt.Key.Key_Down)       # body centre at (0, 2)
    key(qtbot, win, Qt.Key.Key_Return)
    key(qtbot, win, Qt.Key.Key_R)
    turn_to(qtbot, win, 90)
    key(qtbot, win, Qt.Key.Key_Right, Qt.KeyboardModifier.ShiftModifier)  # four steps right
    key(qtbot, win, Qt.Key.Key_Return)         # R1 upright at x = 4
    key(qtbot, win, Qt.Key.Key_W)
    key(qtbot, win, Qt.Key.Key_Up, Qt.KeyboardModifier.ShiftModifier)
    for _ in range(2):
        key(qtbot, win, Qt.Key.Key_Up)         # (4, 0)? cursor was at (4, 2): up 4 then 2 more
    win.view.move_cursor_to(win.view.cursor_point)
    # walk the cursor to R1's top terminal, start the wire, walk to the cell's plus, finish
    while win.view.cursor_point[1] < 0:
        key(qtbot, win, Qt.Key.Key_Down)
    key(qtbot, win, Qt.Key.Key_Return)
    key(qtbot, win, Qt.Key.Key_Left, Qt.KeyboardModifier.ShiftModifier)
    key(qtbot, win, Qt.Key.Key_Return)
    key(qtbot, win, Qt.Key.Key_Down, Qt.KeyboardModifier.ShiftModifier)
    key(qtbot, win, Qt.Key.Key_Return)         # (0, 4): cell minus, wire ends here
    key(qtbot, win, Qt.Key.Key_Right, Qt.KeyboardModifier.ShiftModifier)
    key(qtbot, win, Qt.Key.Key_Return)
    key(qtbot, win, Qt.Key.Key_Left, Qt.KeyboardModifier.ShiftModifier)
    key(qtbot, win, Qt.Key.Key_Return)
    key(qtbot, win, Qt.Key.Key_Escape)
    key(qtbot, win, Qt.Key.Key_Escape)
    s = win.sketch
    assert s.part("B1").terminals() == [(0, 0), (0, 4)]
    assert s.part("R1").terminals() == [(4, 0), (4, 4)]
    # Ohm's law: 9 V across 1 kΩ, flowing down through R1 (first terminal at the top)
    assert win.scene.part_items["R1"].current_mark.value == pytest.approx(9.0 / 1000.0)
    # Tab selects a part, arrows move it, Space turns it
    key(qtbot, win, Qt.Key.Key_Tab)
    assert win.scene.selected_parts() == ["B1"]
    key(qtbot, win, Qt.Key.Key_Tab)
    assert win.scene.selected_parts() == ["R1"]
    key(qtbot, win, Qt.Key.Key_Right)
    assert s.part("R1").terminals() == [(5, 0), (5, 4)]



def test_a_value_typed_in_the_part_panel_is_named_in_the_undo_menu(qtbot, win):
    draw_two_meshes(qtbot, win)
    name = next(p.name for p in win.sketch.parts if p.kind == "resistor")
    win.scene.select([name])
    edit = win.part_panel.findChild(QLineEdit, "resistance")
    edit.clear()
    qtbot.keyClicks(edit, "4k7")
    qtbot.keyClick(edit, Qt.Key.Key_Return)
    assert win.sketch.part(name).value("resistance") == 4700.0
    assert win.stack.undoText() == f"Set {name} resistance 4.70 kΩ"


def test_a_middle_button_drag_pans_the_drawing_and_changes_nothing(qtbot, win):
    draw_two_meshes(qtbot, win)
    win.view.scale(6.0, 6.0)  # larger than the view both ways, so there is room to pan
    QApplication.processEvents()
    vp = win.view.viewport()
    before = win.view.mapToScene(vp.rect().center())
    document = (list(win.sketch.parts), list(win.sketch.wires))
    a, b = QPoint(300, 300), QPoint(240, 270)
    qtbot.mousePress(vp, Qt.MouseButton.MiddleButton, pos=a)
    ev = QMouseEvent(QMouseEvent.Type.MouseMove, QPointF(b), QPointF(vp.mapToGlobal(b)), Qt.MouseButton.NoButton,
                     Qt.MouseButton.MiddleButton, Qt.KeyboardModifier.NoModifier)
    QApplication.sendEvent(vp, ev)
    qtbot.mouseRelease(vp, Qt.MouseButton.MiddleButton, pos=b)
    after = win.view.mapToScene(vp.rect().center())
    # the drawing follows the pointer: 60 px left and 30 px up, at the view's pixels per scene unit
    zoom = win.view.transform().m11()
    assert (after - before).x() == pytest.approx(60 / zoom, abs=0.5)
    assert (after - before).y() == pytest.approx(30 / zoom, abs=0.5)
    assert (list(win.sketch.parts), list(win.sketch.wires)) == document
