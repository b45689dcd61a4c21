"""Checking a hand analysis in the window, by mouse and keys: tags on the canvas, the Check panel, the
Equations panel's selection both ways, loops traced on the canvas."""
from __future__ import annotations

from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtGui import QGuiApplication  # noqa: E402
from PySide6.QtWidgets import QTabBar  # noqa: E402

from app.sketch.fileio import load_sketch  # noqa: E402
from app.sketch.model import BranchTag  # noqa: E402
from app.ui.readings import BRANCH  # noqa: E402
from ui_support import open_window  # noqa: E402

FIXTURE = Path(__file__).resolve().parent.parent / "demo_circuits" / "bench_supply_fixture.lwsk"
# The fixture: B1 (12 V, 0.05 Ω) feeds R1 47 Ω into a top-right junction; R2 100 Ω drops to the bottom
# rail; R3 220 Ω and R4 330 Ω in series run round the right-hand window: two windows.


@pytest.fixture
def win(qtbot, tmp_path):
    return open_window(qtbot, tmp_path, FIXTURE, size=(1400, 900), centre=(90, 50), name="fixture.lwsk")


def at(win, name: str):
    """The view position of the middle of a part's body."""
    item = win.scene.part_items[name]
    t0, t1 = (item.mapToScene(p) for p in item.terminal_points()[:2])
    return win.view.mapFromScene((t0 + t1) / 2)


def click(qtbot, win, name: str) -> None:
    qtbot.mouseClick(win.view.viewport(), Qt.MouseButton.LeftButton, pos=at(win, name))


def tag(qtbot, win, part: str, name: str) -> None:
    win.hand.ask_tag_name = lambda suggestion, p: name
    click(qtbot, win, part)
    assert win.scene.selected_parts() == [part]
    qtbot.keyClick(win.view, Qt.Key.Key_N)


def show_equations(qtbot, win):
    """Bring the Equations tab (tabbed with Readings) to the front by clicking it, as a person does."""
    bar = next(b for b in win.findChildren(QTabBar)
               if any(b.tabText(i) == "Equations" for i in range(b.count())))
    tab = next(i for i in range(bar.count()) if bar.tabText(i) == "Equations")
    qtbot.mouseClick(bar, Qt.MouseButton.LeftButton, pos=bar.tabRect(tab).center())
    panel = win.hand.equations
    qtbot.waitUntil(lambda: not panel.stale and bool(panel.shown))
    return panel


def check(qtbot, win, text: str):
    panel = win.hand.checks
    panel.entry.clear()
    qtbot.keyClicks(panel.entry, text)
    qtbot.keyClick(panel.entry, Qt.Key.Key_Return)
    return panel.last


def test_tags_on_the_canvas_then_a_right_and_a_wrong_equation_in_the_check_panel(qtbot, win, tmp_path):
    tag(qtbot, win, "R1", "Ia")
    tag(qtbot, win, "R2", "Ib")
    assert win.sketch.tags == [BranchTag("Ia", "R1", True), BranchTag("Ib", "R2", True)]
    assert set(win.hand.layer.marks) == {"R1", "R2"} and win.hand.layer.marks["R2"].isVisible()
    assert win.isWindowModified()
    # Readings name each part's current by its branch: R1 carries Ia as tagged; B1, in series with R1,
    # passes Ia from its minus to its plus terminal, against its own first-to-second direction: -Ia.
    model = win.readings_model

    def as_named(part):
        return model.text(model.row_of(part), BRANCH)

    qtbot.waitUntil(lambda: as_named("R1") == "Ia" and as_named("R2") == "Ib")
    assert as_named("B1") == "\u2212Ia"
    # B1 is in series with R1: tagging it moves Ia there rather than putting two names on one branch.
    tag(qtbot, win, "B1", "Ia")
    assert [t.part for t in win.sketch.tags] == ["B1", "R2"]
    qtbot.keyClick(win.view, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)
    assert [t.part for t in win.sketch.tags] == ["R1", "R2"]
    click(qtbot, win, "R2")
    qtbot.keyClick(win.view, Qt.Key.Key_N, Qt.KeyboardModifier.ShiftModifier)  # flip: Ib counted upwards
    assert win.sketch.tag_on("R2") == BranchTag("Ib", "R2", False)
    assert win.hand.state.analysis.branches.named("Ib").value < 0  # the current really flows down
    qtbot.keyClick(win.view, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)
    assert win.sketch.tag_on("R2") == BranchTag("Ib", "R2", True)

    # By hand: the drop across R2 (Ib down through it) equals the drops across R3 and R4, whose branch
    # carries what is left of Ia at the top junction (KCL): Ia - Ib.
    good = "Ib*R2 = (Ia - Ib)*R3 + (Ia - Ib)*R4"
    outcome = check(qtbot, win, good)
    assert outcome.ok and outcome.label == "L2"
    assert "Valid." in win.hand.checks.verdict_text and "L2" in win.hand.checks.verdict_text

    bad = "Ib*R2 = (Ia - Ib)*R3 - (Ia - Ib)*R4"
    outcome = check(qtbot, win, bad)
    assert not outcome.ok
    where = bad.index("- (Ia - Ib)*R4")
    sign = [(m, c) for m, c in outcome.lines if "wrong sign" in m]
    assert sign and "R4" in sign[0][0] and sign[0][1] == where
    assert win.hand.checks.entry.cursorPosition() == where
    shown = win.hand.checks.verdict_text
    assert "Not valid" in shown and bad + "\n" + " " * where + "^" in shown

    kept = win.hand.checks.kept
    assert [kept.item(i).text().split(":")[0] for i in range(kept.count())] == ["✔ valid — L2", "✘ not valid"]

    # Saved with the sketch; a reviewer reopening the file sees both checks, evaluated afresh.
    path = tmp_path / "reviewed.lwsk"
    assert win.save_to(path)
    again = load_sketch(path)
    assert [c.text for c in again.checks] == [good, bad] and len(again.tags) == 2
    assert win.open_path(path)
    assert [o.ok for o in win.hand.checks.outcomes] == [True, False]


def test_answers_typed_in_the_check_panel_are_compared_within_the_tolerance(qtbot, win):
    tag(qtbot, win, "R1", "Ia")
    feed = 12 / (0.05 + 47 + 100 * 550 / 650)  # series and parallel resistances by hand: 91.14 mA
    assert check(qtbot, win, f"Ia = {feed * 1e3:.2f}m").ok
    outcome = check(qtbot, win, f"Ia = {feed * 1.1 * 1e3:.1f}m")
    assert not outcome.ok and "expected" in win.hand.checks.verdict_text
    assert win.sketch.checks[-1].kind == "values"


def test_equations_selection_and_canvas_selection_follow_each_other(qtbot, win):
    panel = show_equations(qtbot, win)
    titles = [e.title for e in panel.shown]
    assert len([t for t in titles if t.startswith("KVL")]) == 2 and any(t.startswith("KCL") for t in titles)
    assert all("residual" in e.numeric for e in panel.shown)
    click(qtbot, win, "R4")
    chosen = panel.selected()
    assert chosen and all("R4" in e.parts for e in chosen)
    assert "L2" in {e.label for e in chosen} and "L1" not in {e.label for e in chosen}
    assert win.hand.band.isVisible()

    row = next(i for i, e in enumerate(panel.shown) if e.law == "KCL")
    item = panel.list.item(row)
    qtbot.mouseClick(panel.list.viewport(), Qt.MouseButton.LeftButton, pos=panel.list.visualItemRect(item).center())
    assert [e.law for e in panel.selected()] == ["KCL"]
    assert win.hand.band.isVisible() and win.hand.band._rings  # the junction is ringed
    assert win.scene.selected_parts() == ["R4"]  # the canvas selection is left as the person made it

    panel.list.clearSelection()
    assert not win.hand.band.isVisible()
    text = panel.copy(latex=True)
    assert QGuiApplication.clipboard().text() == text and "\\quad" in text
    qtbot.mouseClick(panel.mesh_button, Qt.MouseButton.LeftButton)
    assert panel.form == "mesh" and all(e.form == "mesh" for e in panel.shown)
    assert "IL1" in panel.copy()


def test_a_loop_traced_on_the_canvas_and_a_refused_one(qtbot, win):
    panel = show_equations(qtbot, win)
    before = len(panel.shown)
    qtbot.keyClick(win.view, Qt.Key.Key_L, Qt.KeyboardModifier.ControlModifier)
    assert win.hand.tracer.active
    for name in ("B1", "R1", "R3", "R4"):  # round the outside of both windows
        click(qtbot, win, name)
    qtbot.keyClick(win.view, Qt.Key.Key_Return)
    assert not win.hand.tracer.active
    assert len(panel.shown) == before + 1
    own = panel.shown[-1]
    assert own.label == "your loop" and set(own.parts) == {"B1", "R1", "R3", "R4"}
    assert abs(own.residual) < 1e-9 * own.size

    qtbot.keyClick(win.view, Qt.Key.Key_L, Qt.KeyboardModifier.ControlModifier)
    click(qtbot, win, "R1")
    click(qtbot, win, "R3")
    qtbot.keyClick(win.view, Qt.Key.Key_Return)
    assert "not closed" in panel.note.text()
    assert len(panel.shown) == before + 1
    assert win.sketch.has_part("R1")  # the keys went to the tracer, not to the drawing


def test_joining_the_two_windows_gives_the_outer_loop(qtbot, win):
    panel = show_equations(qtbot, win)
    for row, e in enumerate(panel.shown):
        panel.list.item(row).setSelected(e.law == "KVL")
    qtbot.mouseClick(panel.join_button, Qt.MouseButton.LeftButton)
    joined = panel.shown[-1]
    assert joined.label == "L1 + L2" and "R2" not in joined.parts  # the shared side cancels


def test_the_equations_tab_behind_readings_is_brought_up_to_date_when_it_comes_to_the_front(qtbot, win):
    panel = win.hand.equations
    assert panel.visibleRegion().isEmpty()  # Readings is the front tab on a first start
    win.editor.set_values("R2", {"resistance": 200.0})
    qtbot.waitUntil(lambda: not win.hand.state.pending)
    assert panel.stale  # nothing written out for a panel no one sees
    panel = show_equations(qtbot, win)
    kvl = [e for e in panel.shown if e.law == "KVL"]
    assert len(kvl) == 2 and any("R2" in e.parts for e in kvl)
    # the new value is in: every equation holds for the circuit as it is now (residual ~ 0)
    assert all(abs(e.residual) < 1e-9 * e.size for e in panel.shown)
    assert any("200" in e.numeric for e in panel.shown if "R2" in e.parts)
