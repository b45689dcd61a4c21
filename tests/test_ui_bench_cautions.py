"""Bench parts in the window, with real mouse and key events: a fuse too small for its load,
blowing it, meter readings, the equivalent at two points and preferred values.

Expected figures are worked out by hand beside each check (Ohm's law, parallel
resistors, a divider's Thevenin equivalent) or read from the IEC 60063 tables.
"""
from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QPoint, QPointF, QRectF, Qt  # noqa: E402

from app.assess import DISCLAIMER  # noqa: E402
from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.bench_marks import Badge, MeterFace  # noqa: E402
from app.ui.readings import EFFECT  # noqa: E402
from ui_support import open_window as open_bench_window  # noqa: E402


def supply_with_a_gap() -> Sketch:
    """12 V ideal cell; R3 (24 Ω) straight across it; a gap in the top rail from (0,0) to (4,0)
    for a fuse; downstream R1 (6 Ω) and R2 (12 Ω)."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0}))
    s.add_part(PlacedPart("resistor", "R3", -4, 0, 90, False, {"resistance": 24.0}))
    s.add_part(PlacedPart("resistor", "R1", 8, 0, 90, False, {"resistance": 6.0}))
    s.add_part(PlacedPart("resistor", "R2", 12, 0, 90, False, {"resistance": 12.0}))
    for w in (Wire(-4, 0, 0, 0), Wire(-4, 4, 0, 4), Wire(4, 0, 12, 0), Wire(0, 4, 12, 4)):
        s.add_wire(w)
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def divider() -> Sketch:
    """10 V cell over R1 = R2 = 1 kΩ; the voltmeter PV1 (10 MΩ) can be added across R2."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 10.0}))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 1000.0}))
    s.add_part(PlacedPart("resistor", "R2", 4, 0, 90, False, {"resistance": 1000.0}))
    s.add_wire(Wire(0, 4, 4, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def open_window(qtbot, tmp_path, sketch: Sketch):
    w = open_bench_window(qtbot, tmp_path, sketch, size=(1200, 800), centre=(80, 40), active=True, name="bench.lwsk")
    w.view.setFocus()
    return w


def at(win, x: float, y: float) -> QPoint:
    return win.view.mapFromScene(QPointF(x * 20.0, y * 20.0))


def click(qtbot, win, x: float, y: float) -> None:
    vp = win.view.viewport()
    qtbot.mouseMove(vp, at(win, x, y))
    qtbot.mouseClick(vp, Qt.MouseButton.LeftButton, pos=at(win, x, y))


def key(qtbot, win, k, mods=Qt.KeyboardModifier.NoModifier) -> None:
    qtbot.keyClick(win.view, k, mods)


def current(win, name: str) -> float:
    return win.readings_model.rows[name][0]


def test_a_fuse_too_small_is_flagged_on_the_canvas_and_blowing_it_stops_the_current_downstream(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, supply_with_a_gap())
    key(qtbot, win, Qt.Key.Key_U)  # the fuse tool
    assert win.view.mode == "fuse" and win.view.rotation == 0
    click(qtbot, win, 2, 0)  # the middle of the gap in the top rail
    key(qtbot, win, Qt.Key.Key_Escape)
    fuse = win.sketch.part("F1")
    assert fuse.kind == "fuse" and fuse.terminals() == [(0, 0), (4, 0)]
    assert fuse.value("rating") == 1.0  # the default rating, far below the load
    # By hand (Ohm's law): R1 takes 12/6 = 2 A and R2 12/12 = 1 A, so the fuse carries 3 A,
    # 2 A (200 %) above its 1 A rating; R3 across the cell takes 12/24 = 0.5 A.
    assert current(win, "F1") == pytest.approx(3.0)
    badge = win.bench.marks.badge("F1")
    assert isinstance(badge, Badge) and badge.scene() is win.scene
    assert badge.parentItem() is win.scene.part_items["F1"] and badge.isVisible()
    assert badge.text == "OVER +2.00 A (200 %)"
    assert badge.shape_name == "triangle"  # a shape as well as the colour
    assert "F1" in badge.toolTip() and "3.00 A" in badge.toolTip()
    entries = [t for t in win.bench.panel.texts() if t.startswith("Warning:") and "F1" in t]
    assert entries and "F1 carries 3.00 A" in entries[0]
    assert win.bench.panel.disclaimer.text() == DISCLAIMER and not win.bench.panel.disclaimer.isHidden()

    # Select the fuse by clicking it, then blow it with T.
    key(qtbot, win, Qt.Key.Key_Q)
    click(qtbot, win, 2, 0)
    assert win.scene.selected_parts() == ["F1"]
    key(qtbot, win, Qt.Key.Key_T)
    assert win.sketch.part("F1").flag("blown")
    for name in ("F1", "R1", "R2"):  # downstream of the blown fuse: nothing flows
        assert current(win, name) == pytest.approx(0.0, abs=1e-12)
        assert win.scene.part_items[name].current_mark.value == pytest.approx(0.0, abs=1e-12)
    assert current(win, "R3") == pytest.approx(0.5)  # upstream of the fuse, still 12/24 A
    assert win.bench.marks.badge_text("F1") == "BLOWN"
    assert win.bench.marks.badge("F1").shape_name != "triangle"

    key(qtbot, win, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)
    assert current(win, "R1") == pytest.approx(2.0)
    assert win.bench.marks.badge_text("F1").startswith("OVER")


def fused_supply(qtbot, tmp_path):
    """The supply with a 2.5 A fuse in its gap, open: the window, its cautions list and the fuse's row."""
    s = supply_with_a_gap()
    s.add_part(PlacedPart("fuse", "F1", 0, 0, 0, False, {"rating": 2.5}))
    win = open_window(qtbot, tmp_path, s)
    lst = win.bench.panel.list
    return win, lst, next(i for i in range(lst.count()) if "F1 carries" in lst.item(i).text())


def test_picking_a_caution_selects_its_part(qtbot, tmp_path):
    win, lst, row = fused_supply(qtbot, tmp_path)
    rect = lst.visualItemRect(lst.item(row))
    qtbot.mouseClick(lst.viewport(), Qt.MouseButton.LeftButton, pos=rect.center())
    assert win.scene.selected_parts() == ["F1"]
    # by hand: 3 A through a 2.5 A fuse is 0.5 A (20 %) over
    assert win.bench.marks.badge_text("F1") == "OVER +500 mA (20 %)"


def test_the_cautions_list_keeps_its_place_while_edits_leave_it_unchanged(qtbot, tmp_path):
    win, lst, row = fused_supply(qtbot, tmp_path)
    lst.setCurrentRow(row)
    # R3 sits straight across the ideal cell: 24 -> 30 ohm changes the cell's current, not the fuse's
    win.editor.set_values("R3", {"resistance": 30.0})
    qtbot.waitUntil(lambda: not win.solver.busy)
    assert lst.currentRow() == row and "F1 carries" in lst.currentItem().text()
    # R1 6 -> 3 ohm: 4 A + 1 A through the fuse (Ohm's law), a new text, so the list is filled again
    win.editor.set_values("R1", {"resistance": 3.0})
    qtbot.waitUntil(lambda: not win.solver.busy)
    assert any("F1 carries 5.00 A" in lst.item(i).text() for i in range(lst.count()))


def test_a_voltmeter_shows_its_loaded_reading_and_its_effect(qtbot, tmp_path):
    s = divider()
    s.add_part(PlacedPart("voltmeter", "PV1", 8, 0, 90, False, {"input_resistance": 1000.0}))
    s.add_wire(Wire(4, 0, 8, 0))
    s.add_wire(Wire(4, 4, 8, 4))
    win = open_window(qtbot, tmp_path, s)
    # By hand: 1 kΩ meter across the lower 1 kΩ makes 500 Ω, so it reads 10·500/1500 = 3.333 V;
    # an ideal meter would read 5 V, so the meter shifts its own reading by −33 %.
    face = win.bench.marks._faces["PV1"]
    assert isinstance(face, MeterFace) and face.isVisible()
    assert win.bench.marks.reading_text("PV1") == "3.333 V"
    row = win.readings_model.row_of("PV1")
    assert win.readings_model.text(row, EFFECT) == "-33 %"


def test_equivalent_at_two_points_picked_on_the_canvas(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, divider())
    win.bench.act_equivalent.trigger()
    assert win.bench.picking
    click(qtbot, win, 4, 0)  # top of R2
    click(qtbot, win, 4, 4)  # bottom of R2
    dialog = win.bench.dialog
    assert dialog is not None and not win.bench.picking
    eq = dialog.equivalent
    # Thevenin of a divider by hand: 10 V · 1k/(1k + 1k) = 5 V behind 1k ∥ 1k = 500 Ω,
    # Norton 5/500 = 10 mA; the best load is 500 Ω drawing 5²/(4·500) = 12.5 mW (Jacobi's law).
    assert eq.open_voltage == pytest.approx(5.0)
    assert eq.resistance == pytest.approx(500.0)
    texts = [dialog.table.item(r, 1).text() for r in range(dialog.table.rowCount())]
    assert "5.00 V" in texts and "500 Ω" in texts and "10.0 mA" in texts and "12.5 mW" in texts
    dialog.close()


def test_picking_a_point_that_is_no_terminal_says_so(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, divider())
    win.bench.act_equivalent.trigger()
    click(qtbot, win, 2, 2)  # empty grid inside the loop
    assert win.bench.picking and win.bench.picked == []
    assert "not a terminal" in win.hint_text.text()
    key(qtbot, win, Qt.Key.Key_Escape)
    assert not win.bench.picking


def test_preferred_values_for_a_resistor_and_using_one(qtbot, tmp_path):
    s = divider()
    s.replace_part("R1", PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 5000.0}))
    win = open_window(qtbot, tmp_path, s)
    click(qtbot, win, 2, 0)
    assert win.scene.selected_parts() == ["R1"]
    dialog = win.bench.preferred_values()
    rows = {(dialog.table.item(r, 0).text(), dialog.table.item(r, 1).text()) for r in range(dialog.table.rowCount())}
    # IEC 60063: E12 has 4.7 and 5.6, E24 4.7 and 5.1, E96 4.99 and 5.11 either side of 5
    assert {("E12", "4.70 kΩ"), ("E12", "5.60 kΩ"), ("E24", "5.10 kΩ"), ("E96", "4.99 kΩ"),
            ("E96", "5.11 kΩ")} <= rows
    r = next(r for r in range(dialog.table.rowCount()) if dialog.table.item(r, 1).text() == "5.10 kΩ")
    qtbot.mouseClick(dialog.table.viewport(), Qt.MouseButton.LeftButton,
                     pos=dialog.table.visualItemRect(dialog.table.item(r, 0)).center())
    depth = win.stack.count()
    qtbot.mouseClick(dialog.use_button, Qt.MouseButton.LeftButton)
    assert win.sketch.part("R1").value("resistance") == 5100.0
    assert win.stack.count() == depth + 1
    dialog.close()


def test_badges_of_parts_side_by_side_do_not_cover_each_other(qtbot, tmp_path):
    """A 120 V, 0.2 Ω bank through F1 (5 A), then W1 (10 m of 0.5 mm² pair) butted to it, into
    R1 (10 Ω, 100 W). By hand: W1 is 0.0172 Ω·mm²/m × 20 m / 0.5 mm² = 0.688 Ω (handbook
    resistivity of copper at 20 °C), so I = 120 / (0.2 + 0.688 + 10) = 11.0 A: F1 is over its
    rating and W1 drops 7.6 V (6.5 %, above 3 %). Their badges hang under the two bodies side
    by side; each must stay clear of the other's."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 120.0, "internal_resistance": 0.2}))
    s.add_part(PlacedPart("fuse", "F1", 0, 0, 0, False, {"rating": 5.0}))
    s.add_part(PlacedPart("cable", "W1", 4, 0, 0, False, {"length": 10.0, "cross_section": 0.5}))
    s.add_part(PlacedPart("resistor", "R1", 8, 0, 90, False, {"resistance": 10.0, "power_rating": 100.0}))
    s.add_wire(Wire(0, 4, 8, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    win = open_bench_window(qtbot, tmp_path, s)
    qtbot.waitUntil(lambda: win.bench.marks.badge("W1") is not None and win.bench.marks.badge("F1") is not None)
    assert abs(win.readings_model.rows["F1"][0]) == pytest.approx(120.0 / (0.2 + 0.0172 * 20 / 0.5 + 10.0), rel=2e-3)
    badges = [b for b in win.scene.items() if isinstance(b, Badge) and b.isVisible()]
    assert len(badges) >= 3
    rects = [b.mapRectToScene(b.rect) for b in badges]
    for i, a in enumerate(rects):
        for b in rects[i + 1:]:
            assert not a.intersects(b), (a, b)


def test_badges_of_a_lamp_row_keep_off_the_rails_and_the_neighbours(qtbot, tmp_path):
    """Four 12 V 21 W lamps six grid steps apart on a 14.4 V charging rail (10 mΩ source). By
    hand: each lamp is 12² / 21 = 6.857 Ω, so the rail stands at 14.4 × 1.714 / (1.714 + 0.01)
    = 14.32 V and each lamp takes 14.32² / 6.857 = 29.9 W, 142 % of its rating (P = V² / R).
    Hung at the foot of each lamp's text, the badges would lie over the bottom rail and the
    next lamp's terminal; each must keep clear of the wires, of every other part's symbol and
    text, and of the other badges."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 14.4, "internal_resistance": 0.01}))
    xs = [0, 6, 12, 18, 24]
    for k, x in enumerate(xs[1:]):
        s.add_part(PlacedPart("lamp", f"H{k + 1}", x, 0, 90, False, {"rated_voltage": 12.0, "rated_power": 21.0}))
    for y in (0, 4):
        for a, b in zip(xs, xs[1:]):
            s.add_wire(Wire(a, y, b, y))
    win = open_bench_window(qtbot, tmp_path, s)
    qtbot.waitUntil(lambda: all(win.bench.marks.badge(f"H{k}") is not None for k in range(1, 5)))
    lamp = 12.0 ** 2 / 21.0
    rail = 14.4 * (lamp / 4) / (lamp / 4 + 0.01)
    assert win.readings_model.rows["H1"][2] == pytest.approx(rail ** 2 / lamp, rel=2e-3)
    assert "142 %" in win.bench.marks.badge_text("H1")
    items = win.scene.part_items
    badges = {n: win.bench.marks.badge(n).mapRectToScene(win.bench.marks.badge(n).rect) for n in ("H1", "H2", "H3", "H4")}
    grid = 20.0  # scene units per grid step (theme.GRID)
    wires = [QRectF(QPointF(min(w.x1, w.x2) * grid, min(w.y1, w.y2) * grid),
                    QPointF(max(w.x1, w.x2) * grid, max(w.y1, w.y2) * grid)).adjusted(-1, -1, 1, 1) for w in s.wires]

    def covers(a, b) -> bool:  # more than an edge grazing it
        common = a.intersected(b)
        return common.width() > 2 and common.height() > 2

    for name, box in badges.items():
        assert not any(covers(box, w) for w in wires), name
        for other, item in items.items():
            if other != name:
                assert not covers(box, item.body_box()) and not covers(box, item.text_block()), (name, other)
        assert not any(box.intersects(b) for n, b in badges.items() if n != name), name
