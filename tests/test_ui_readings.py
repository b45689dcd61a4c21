"""The Readings table: its texts against Ohm's law, and which rows a new solution repaints.

The table tells its view only about the rows whose texts change, so these tests check
both halves: a changed row shows its new text and is covered by ``dataChanged`` (and
repainted), and a row whose text stays is neither.
"""
from __future__ import annotations

import random

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QElapsedTimer, QEvent, QObject, Qt  # noqa: E402
from PySide6.QtGui import QRegion  # noqa: E402

from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.readings import BRANCH, EFFECT, ReadingsModel, ReadingsView  # noqa: E402
from app.units import format_value  # noqa: E402
from ui_support import open_window  # noqa: E402

DISPLAY = Qt.ItemDataRole.DisplayRole


class Spy:
    """The (first row, last row, first column, last column) of every dataChanged of a model."""

    def __init__(self, model) -> None:
        self.ranges: list[tuple[int, int, int, int]] = []
        model.dataChanged.connect(lambda a, b, roles=None: self.ranges.append((a.row(), b.row(), a.column(),
                                                                                b.column())))

    def rows(self, column: int) -> set[int]:
        return {r for lo, hi, c0, c1 in self.ranges if c0 <= column <= c1 for r in range(lo, hi + 1)}


class PaintSpy(QObject):
    """The region of a widget painted since the last ``clear``."""

    def __init__(self, widget) -> None:
        super().__init__()
        self.region = QRegion()
        widget.installEventFilter(self)

    def eventFilter(self, obj, event) -> bool:  # noqa: N802 (Qt's name)
        if event.type() == QEvent.Type.Paint:
            self.region = self.region.united(event.region())
        return False

    def clear(self) -> None:
        self.region = QRegion()


def shown(model: ReadingsModel, name: str, column: int) -> str:
    """What the view is handed for a cell (the display role, as a delegate asks for it)."""
    return model.data(model.index(model.row_of(name), column), DISPLAY)


def parallel_sketch(r1: float, r2: float) -> Sketch:
    """An ideal 12 V cell across two resistors side by side: B1 | R1 | R2, joined top and bottom."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0, "internal_resistance": 0.0}))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, 90, False, {"resistance": r1}))
    s.add_part(PlacedPart("resistor", "R2", 8, 0, 90, False, {"resistance": r2}))
    for y in (0, 4):
        s.add_wire(Wire(0, y, 4, y))
        s.add_wire(Wire(4, y, 8, y))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def solved(qtbot, win) -> None:
    qtbot.waitUntil(lambda: win.solver.latest is not None and win.solver.latest.generation == win.solver.generation
                    and not win.solver.busy)
    # the drawing first: the table repaints its new values once drawing pauses
    qtbot.waitUntil(lambda: not win.readings.catching_up)
    qtbot.wait(1)


def test_texts_follow_ohms_law_and_a_new_value_repaints_only_the_rows_it_changes(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, parallel_sketch(1000.0, 3000.0))
    solved(qtbot, win)
    model = win.readings_model
    # Ohm's law across an ideal cell: each branch carries 12 V / R; the cell carries the sum
    # (KCL); Joule's law P = V·I.  Signs: the drop across a resistor has the sign of its
    # current (passive convention), and its power is positive (it absorbs).
    for name, r in (("R1", 1000.0), ("R2", 3000.0)):
        row = model.row_of(name)
        i = model.rows[name][0]
        assert shown(model, name, 1) in (format_value(12.0 / r, "A"), format_value(-12.0 / r, "A"))
        assert shown(model, name, 2) == format_value(12.0 if i > 0 else -12.0, "V")
        assert shown(model, name, 3) == format_value(12.0 ** 2 / r, "W") == model.text(row, 3)
    assert shown(model, "B1", 3) == format_value(-12.0 * (12.0 / 1000 + 12.0 / 3000), "W")  # it delivers

    spy, paints = Spy(model), PaintSpy(win.readings.viewport())
    win.editor.set_values("R2", {"resistance": 1500.0})
    solved(qtbot, win)
    # R1 still has 12 V across it, so its texts stay; R2's and the cell's change
    assert shown(model, "R2", 3) == format_value(12.0 ** 2 / 1500.0, "W")
    assert shown(model, "R2", 1) in (format_value(12.0 / 1500, "A"), format_value(-12.0 / 1500, "A"))
    assert shown(model, "B1", 3) == format_value(-12.0 * (12.0 / 1000 + 12.0 / 1500), "W")
    assert shown(model, "R1", 3) == format_value(12.0 ** 2 / 1000.0, "W")
    assert spy.rows(1) == spy.rows(3) == {model.row_of("R2"), model.row_of("B1")}
    view = win.readings
    for name in ("R2", "B1"):
        rect = view.visualRect(model.index(model.row_of(name), 3))
        assert not rect.isEmpty() and paints.region.contains(rect), f"{name}'s new power was not repainted"
    # (an update reaches a pixel past its row, so look at the middle of R1's cells)
    assert not any(paints.region.contains(view.visualRect(model.index(model.row_of("R1"), c)).center())
                   for c in (1, 2, 3))


def test_while_values_keep_changing_the_table_still_repaints_now_and_then(qtbot):
    model, names = rows_of(6)
    view = ReadingsView(model)
    qtbot.addWidget(view)
    view.resize(420, 300)
    view.show()
    qtbot.waitExposed(view)
    model.set_readings({n: (0.5e-3, 1.0, 1e-3) for n in names})  # a first fill (the columns are fitted)
    qtbot.waitUntil(lambda: not view.catching_up)
    qtbot.wait(1)
    paints = PaintSpy(view.viewport())
    cell = view.visualRect(model.index(0, 1))
    model.set_readings({n: (0.7e-3, 1.0, 1e-3) for n in names})
    assert view.catching_up and paints.region.isEmpty()  # no event handled yet: the repaint waits
    timer = QElapsedTimer()
    timer.start()
    k = 0
    # new values every 10 ms, never a pause of CATCH_UP_MS: the table catches up at least
    # every STALE_MOST_MS all the same, and shows the values it was given last
    while timer.elapsed() < 3 * ReadingsView.STALE_MOST_MS:
        k += 1
        model.set_readings({n: (k * 1e-3, 1.0, 1e-3) for n in names})
        qtbot.wait(10)
    assert paints.region.contains(cell.center())
    qtbot.waitUntil(lambda: not view.catching_up)
    assert model.data(model.index(0, 1), DISPLAY) == format_value(k * 1e-3, "A")
    qtbot.wait(ReadingsView.CATCH_UP_MS)  # the last catch-up's repaint lands
    paints.clear()
    qtbot.wait(ReadingsView.CATCH_UP_MS * 3)
    assert not paints.region.contains(cell.center())  # and nothing is left to repaint


def rows_of(n: int) -> tuple[ReadingsModel, list[str]]:
    class Parts:  # what set_parts reads of a sketch
        parts = [PlacedPart("resistor", f"R{k}", 0, 0) for k in range(1, n + 1)]

    model = ReadingsModel()
    model.set_parts(Parts())
    return model, model.names


def test_only_rows_whose_texts_change_at_three_figures_are_reported(qtbot):
    model, names = rows_of(12)
    view = ReadingsView(model)
    qtbot.addWidget(view)
    view.resize(420, 400)  # every row on screen
    view.show()
    qtbot.waitExposed(view)
    model.set_readings({n: (1e-3, 1.0, 1e-3) for n in names})
    qtbot.wait(1)
    assert all(model.text(r, 1) == "1.00 mA" for r in range(12))
    spy = Spy(model)
    new = {n: (1e-3, 1.0, 1e-3) for n in names}
    new["R2"] = (1.0004e-3, 1.0004, 1.0004e-3)  # a new value with the same texts at 3 figures
    new["R3"] = (1.006e-3, 1.0, 1e-3)           # a new current text
    new["R4"] = (1e-3, 1.0, 1.006e-3)           # a new power text
    new["R5"] = (1.006e-3, 1.0, 1e-3)           # R4 and R5: one run of rows
    new["R10"] = (-1e-3, 1.0, 1e-3)
    model.set_readings(new)
    rows = {model.row_of(n) for n in ("R3", "R4", "R5", "R10")}
    assert spy.rows(1) == spy.rows(2) == spy.rows(3) == rows
    assert (model.row_of("R3"), model.row_of("R5"), 1, 3) in spy.ranges  # R3..R5 are rows 2..4: one signal
    assert model.text(model.row_of("R3"), 1) == "1.01 mA" and model.text(model.row_of("R10"), 1) == "-1.00 mA"
    assert model.text(model.row_of("R4"), 3) == "1.01 mW" and model.text(model.row_of("R2"), 2) == "1.00 V"
    spy.ranges.clear()
    model.set_readings({})  # an error: every row shows dashes
    assert spy.rows(2) == set(range(12)) and {model.text(r, c) for r in range(12) for c in (1, 2, 3)} == {"—"}


def test_rows_off_screen_and_after_scrolling_show_the_newest_values(qtbot):
    model, names = rows_of(300)
    view = ReadingsView(model)
    qtbot.addWidget(view)
    view.resize(420, 200)  # a few rows on screen
    view.show()
    qtbot.waitExposed(view)
    rng = random.Random(7)
    values = {n: (1e-3, 1.0, 1e-3) for n in names}
    spy = Spy(model)
    model.set_readings(dict(values))  # the first values: every row, in signals of at most 200 cells
    assert spy.rows(1) == spy.rows(3) == set(range(300))
    assert all((hi - lo + 1) * (c1 - c0 + 1) <= 200 for lo, hi, c0, c1 in spy.ranges)

    def texts() -> list[list[str]]:
        return [[format_value(values[n][0], "A"), format_value(values[n][1], "V"), format_value(values[n][2], "W")]
                for n in names]

    for step in range(12):
        spy = Spy(model)
        before = texts()
        changed = rng.sample(names, 40)
        for n in changed[:30]:
            values[n] = (rng.uniform(-1, 1), rng.uniform(-10, 10), rng.uniform(0, 1e-3))
        for n in changed[30:]:  # new values, same texts
            values[n] = tuple(v * (1 + 1e-9) for v in values[n])
        model.set_readings(dict(values))
        after = texts()
        moved = {r for r in range(300) if before[r] != after[r]}
        assert moved <= spy.rows(1) <= {model.row_of(n) for n in changed}
        # a table view repaints all it shows for a signal over more than 200 cells
        assert all((hi - lo + 1) * (c1 - c0 + 1) <= 200 for lo, hi, c0, c1 in spy.ranges)
        qtbot.wait(1)
        on_screen = range(view.rowAt(0), view.rowAt(view.viewport().height() - 1) + 1)
        assert len(on_screen) > 3
        assert [[model.data(model.index(r, c), DISPLAY) for c in (1, 2, 3)] for r in on_screen] == \
            [after[r] for r in on_screen]
        if step % 4 == 3:  # now and then every row is read (as when the columns are fitted)
            assert [[model.text(r, c) for c in (1, 2, 3)] for r in range(300)] == after
        view.verticalScrollBar().setValue(rng.randrange(view.verticalScrollBar().maximum() + 1))
        qtbot.wait(1)


def test_meter_effects_and_branch_names_report_only_the_parts_they_change(qtbot):
    model, names = rows_of(8)
    model.set_effects({"R2": ("-3 %", "R2 reads 0.97 A"), "R5": ("+1 %", "R5")})
    model.set_branch_names({n: "Ia" for n in names})
    spy = Spy(model)
    model.set_effects({"R2": ("-3 %", "R2 reads 0.97 A"), "R6": ("+1 %", "R6")})
    assert spy.rows(EFFECT) == {model.row_of("R5"), model.row_of("R6")} and spy.rows(BRANCH) == set()
    assert model.text(model.row_of("R6"), EFFECT) == "+1 %" and model.text(model.row_of("R5"), EFFECT) == ""
    spy.ranges.clear()
    model.set_branch_names({**{n: "Ia" for n in names}, "R3": "\u2212Ib"})
    assert spy.rows(BRANCH) == {model.row_of("R3")} and spy.rows(EFFECT) == set()
    assert model.text(model.row_of("R3"), BRANCH) == "\u2212Ib"


def test_values_that_arrive_later_are_not_cut_short_by_columns_fitted_to_zeros(qtbot, tmp_path):
    # B1 9 V, S1 open, R1 and R2 1 kΩ in series: the first solution is all zeros ("0 A"), and
    # the columns are fitted then. Closing S1 gives 9 V / 2 kΩ = −4.50 mA through the cell
    # (Ohm's law; negative: the cell delivers) and P = −9 V × 4.5 mA = −40.5 mW.
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 9.0, "internal_resistance": 0.0}))
    s.add_part(PlacedPart("switch", "S1", 0, 0, 0, False, flags={"closed": False}))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, 90, False, {"resistance": 1000.0}))
    s.add_part(PlacedPart("resistor", "R2", 0, 4, 0, False, {"resistance": 1000.0}))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    win = open_window(qtbot, tmp_path, s)
    solved(qtbot, win)
    model, view = win.readings_model, win.readings
    assert shown(model, "B1", 1) == format_value(0.0, "A")
    win.editor.set_flag("S1", "closed", True)
    solved(qtbot, win)
    assert shown(model, "B1", 1) == format_value(-9.0 / 2000.0, "A")
    assert shown(model, "B1", 3) == format_value(-9.0 * 9.0 / 2000.0, "W")
    for name in model.names:
        for column in (1, 2, 3):
            # the width Qt's own delegate asks for to show the cell's text whole
            need = view.sizeHintForIndex(model.index(model.row_of(name), column)).width()
            assert view.columnWidth(column) >= need, f"{name}'s {shown(model, name, column)!r} is cut short"


def test_the_row_of_a_part_selected_on_the_canvas_stays_in_sight_when_its_panel_grows(qtbot, tmp_path):
    # twelve resistors and a cable run: selecting the cable (last row) shows its five value rows
    # in the part panel, which takes height from the table after the table scrolled to the row
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0}))
    for k in range(12):
        s.add_part(PlacedPart("resistor", f"R{k + 1}", 4 + 4 * k, 0, 90, False, {"resistance": 100.0}))
        s.add_wire(Wire(4 * k, 0, 4 * k + 4, 0))
        s.add_wire(Wire(4 * k, 4, 4 * k + 4, 4))
    s.add_part(PlacedPart("cable", "W1", 48, 0, 0, False))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    win = open_window(qtbot, tmp_path, s, size=(1024, 640))
    solved(qtbot, win)
    view, model = win.readings, win.readings_model
    win.scene.select(["W1"])
    qtbot.waitUntil(lambda: win.part_panel.isVisible())
    qtbot.wait(50)
    row = view.visualRect(model.index(model.row_of("W1"), 0))
    assert view.viewport().rect().intersects(row), "W1's row is out of sight"
