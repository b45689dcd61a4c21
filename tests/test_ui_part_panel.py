"""The Part panel for bench parts: presets, ratings, AWG entry, flags, each one undoable step."""
from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QCoreApplication, QPoint, QPointF, Qt  # noqa: E402

from app.sketch.bench_parts import CELL_PRESETS  # noqa: E402
from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from ui_support import open_window, type_into  # noqa: E402


def bench() -> Sketch:
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 5.0, "internal_resistance": 1.0}))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 100.0}))
    s.add_part(PlacedPart("cable", "W1", 4, 0, 90, False))
    s.add_wire(Wire(0, 4, 4, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


@pytest.fixture
def win(qtbot, tmp_path):
    return open_window(qtbot, tmp_path, bench(), name="bench.lwsk")


def click_part(qtbot, win, scene_point: QPointF) -> None:
    qtbot.mouseClick(win.view.viewport(), Qt.MouseButton.LeftButton, pos=win.view.mapFromScene(scene_point))


def choose(qtbot, combo, data) -> None:
    """Pick the entry holding ``data`` with the arrow keys, as a person would."""
    combo.setFocus()
    target = combo.findData(data)
    assert target >= 0
    while combo.currentIndex() != target:
        qtbot.keyClick(combo, Qt.Key.Key_Down if combo.currentIndex() < target else Qt.Key.Key_Up)


def test_a_preset_fills_the_cell_and_undo_restores_it(qtbot, win):
    click_part(qtbot, win, QPointF(0, 40))  # the cell stands upright at x = 0
    assert win.part_panel.name == "B1"
    depth = win.stack.count()
    combo = win.part_panel.combo("preset")
    combo.setFocus()
    qtbot.keyClick(combo, Qt.Key.Key_End)  # the last preset: a 12 V lithium iron phosphate battery
    assert combo.currentData() == "lifepo4_12v"
    b1 = win.sketch.part("B1")
    preset = CELL_PRESETS["lifepo4_12v"]
    assert (b1.value("emf"), b1.value("internal_resistance"), b1.value("capacity")) == (
        preset.emf, preset.internal_resistance, preset.capacity)
    assert b1.value("emf") != 5.0 and b1.value("internal_resistance") != 1.0
    assert win.part_panel.field("emf").text().startswith("12.8")
    assert win.stack.count() == depth + 1  # one step, however many values it filled
    qtbot.keyClick(win.view, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)
    b1 = win.sketch.part("B1")
    assert (b1.value("emf"), b1.value("internal_resistance"), b1.choice("preset")) == (5.0, 1.0, "custom")
    assert win.part_panel.field("emf").text().startswith("5")
    assert win.part_panel.combo("preset").currentData() == "custom"


def test_an_edited_preset_value_is_kept_and_said(qtbot, win):
    win.scene.select(["B1"])
    choose(qtbot, win.part_panel.combo("preset"), "alkaline")
    type_into(qtbot, win.part_panel.field("emf"), "1.6")
    assert win.sketch.part("B1").value("emf") == pytest.approx(1.6)
    assert "changed since the preset" in win.part_panel.derived.text()


def test_cable_cross_section_takes_a_wire_gauge(qtbot, win):
    win.scene.select(["W1"])
    type_into(qtbot, win.part_panel.field("cross_section"), "14 AWG")
    # 14 AWG is 2.08 mm² (ASTM B258 table, from memory)
    assert win.sketch.part("W1").value("cross_section") == pytest.approx(2.08, abs=0.005)
    assert win.part_panel.field("cross_section").text().startswith("2.08")
    label = win.scene.part_items["W1"].lines[-1]
    assert "2.08 mm²" in label and "mmm" not in label


def test_a_plain_square_millimetre_value_is_not_prefixed(qtbot, win):
    win.scene.select(["W1"])
    type_into(qtbot, win.part_panel.field("cross_section"), "0.75")
    assert win.sketch.part("W1").value("cross_section") == 0.75
    assert "0.75 mm²" in win.scene.part_items["W1"].lines[-1]
    type_into(qtbot, win.part_panel.field("cross_section"), "750m")
    assert win.sketch.part("W1").value("cross_section") == 0.75  # refused, unchanged
    assert win.part_panel.message.isVisible()


def test_power_rating_from_the_list_or_typed(qtbot, win):
    win.scene.select(["R1"])
    combo = win.part_panel.combo("power_rating")
    choose(qtbot, combo, 0.25)
    assert win.sketch.part("R1").value("power_rating") == 0.25
    type_into(qtbot, combo.lineEdit(), "3 W")
    assert win.sketch.part("R1").value("power_rating") == 3.0
    type_into(qtbot, combo.lineEdit(), "1/8")
    assert win.sketch.part("R1").value("power_rating") == 0.125
    type_into(qtbot, win.part_panel.field("tolerance"), "1 %")
    assert win.sketch.part("R1").value("tolerance") == 1.0


def test_material_and_conductor_flag_are_undoable_steps(qtbot, win):
    win.scene.select(["W1"])
    depth = win.stack.count()
    choose(qtbot, win.part_panel.combo("material"), "aluminium")
    box = win.part_panel.check_box("both_conductors")
    QCoreApplication.sendPostedEvents(box)  # a new panel row shows itself by a posted call
    assert box.isVisible()
    qtbot.mouseClick(box, Qt.MouseButton.LeftButton, pos=QPoint(8, box.height() // 2))  # on the tick box
    w1 = win.sketch.part("W1")
    assert (w1.choice("material"), w1.flag("both_conductors")) == ("aluminium", False)
    assert win.stack.count() == depth + 2
    win.stack.undo()
    win.stack.undo()
    w1 = win.sketch.part("W1")
    assert (w1.choice("material"), w1.flag("both_conductors")) == ("copper", True)
    assert win.part_panel.check_box("both_conductors").isChecked()


@pytest.mark.parametrize("bad", ["Feed resistor", "R1\u00e9", "R" * 40, "-R1"])
def test_a_designator_the_file_could_not_hold_is_refused_before_it_is_taken(win, bad):
    # the .lwsk name rule (assets/lwsk.schema.json): refusing at the rename keeps every sketch savable
    before = win.sketch.snapshot()
    with pytest.raises(ValueError, match="designator"):
        win.editor.rename("R1", bad)
    assert win.sketch.snapshot() == before
    win.editor.rename("R1", "R_feed")
    assert win.sketch.has_part("R_feed")


@pytest.mark.parametrize("typed, word", [("1e19", "beyond"), ("0.5p", "below")])
def test_values_beyond_any_real_part_are_refused_where_they_are_typed(typed, word):
    # the solver's own limits (solver/circuit.py): refused at entry rather than later in the status line
    from app.ui.valuetext import read_value
    with pytest.raises(ValueError, match=word):
        read_value(typed, "Ω", "Resistance", False)
    assert read_value("4k7", "Ω", "Resistance", False) == 4700.0  # IEC 60062 code


def test_clicking_from_one_resistor_to_another_shows_and_edits_the_second(qtbot, tmp_path):
    s = Sketch()
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 100.0}))
    s.add_part(PlacedPart("resistor", "R2", 0, 6, 0, False, {"resistance": 220.0, "power_rating": 0.25}))
    win = open_window(qtbot, tmp_path, s, name="two.lwsk", active=True)
    win.scene.select(["R1"])
    first = win.part_panel.field("resistance")
    assert first.text() == "100 Ω"
    type_into(qtbot, first, "abc")  # refused: a message in words, nothing changed
    assert win.part_panel.message.isVisible()
    win.scene.select(["R2"])
    field = win.part_panel.field("resistance")
    assert win.part_panel.name == "R2" and field.text() == "220 Ω"
    assert not win.part_panel.message.isVisible()  # R1's refusal is not shown against R2
    assert win.part_panel.field("designator").text() == "R2"
    assert win.part_panel.combo("power_rating").currentText() == "1/4 W"
    type_into(qtbot, field, "4k7")
    assert win.sketch.part("R2").value("resistance") == 4700.0  # IEC 60062 code: 4k7 = 4.7 kΩ
    assert win.sketch.part("R1").value("resistance") == 100.0
    # a field with the focus when the selection moves on shows the new part, and leaving it
    # changes nothing (it must not carry one part's value over to the other)
    win.scene.select(["R1"])
    field.setFocus()
    QCoreApplication.processEvents()
    win.scene.select(["R2"])
    assert field.hasFocus() and field.text() == "4.70 kΩ"
    win.view.setFocus()
    QCoreApplication.processEvents()
    assert win.sketch.part("R1").value("resistance") == 100.0
    assert win.sketch.part("R2").value("resistance") == 4700.0
