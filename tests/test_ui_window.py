"""The window around the canvas: Readings selection both ways, title, layers, pictures."""
from __future__ import annotations

from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QItemSelectionModel, QPointF, Qt  # noqa: E402
from PySide6.QtGui import QImage  # noqa: E402

from app.sketch.fileio import save_sketch  # noqa: E402
from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.shot import render  # noqa: E402
from ui_support import open_window  # noqa: E402


def one_loop() -> Sketch:
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0}))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 100.0}))
    s.add_part(PlacedPart("resistor", "R2", 4, 0, 90, False, {"resistance": 200.0}))
    s.add_wire(Wire(0, 4, 4, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


@pytest.fixture
def win(qtbot, tmp_path):
    return open_window(qtbot, tmp_path, one_loop(), name="loop.lwsk")


def test_selecting_on_the_canvas_selects_the_row_and_the_reverse(qtbot, win):
    vp = win.view.viewport()
    qtbot.mouseClick(vp, Qt.MouseButton.LeftButton, pos=win.view.mapFromScene(QPointF(40, 0)))
    rows = {i.row() for i in win.readings.selectionModel().selectedRows()}
    assert rows == {win.readings_model.row_of("R1")}
    index = win.readings_model.index(win.readings_model.row_of("R2"), 0)
    win.readings.selectionModel().select(index, QItemSelectionModel.SelectionFlag.ClearAndSelect
                                         | QItemSelectionModel.SelectionFlag.Rows)
    assert win.scene.selected_parts() == ["R2"]
    assert win.part_panel.name == "R2"


def test_title_shows_the_file_and_an_unsaved_mark(qtbot, win):
    assert win.windowTitle().startswith("loop.lwsk")
    assert not win.isWindowModified()
    win.scene.select(["R1"])
    qtbot.keyClick(win.view, Qt.Key.Key_Down)
    assert win.isWindowModified()
    qtbot.keyClick(win.view, Qt.Key.Key_Z, Qt.KeyboardModifier.ControlModifier)
    assert not win.isWindowModified()


def test_each_annotation_layer_can_be_hidden(qtbot, win):
    mark = win.scene.part_items["R1"].current_mark
    assert mark.isVisible()
    win.layer_actions["currents"].trigger()
    assert not mark.isVisible()
    assert win.scene.part_items["R1"].drop_mark.isVisible()
    win.layer_actions["currents"].trigger()
    assert mark.isVisible()


def test_shot_writes_png_and_svg(qtbot, tmp_path):
    path = tmp_path / "loop.lwsk"
    save_sketch(one_loop(), path)
    render(path, tmp_path / "loop.png")
    image = QImage(str(tmp_path / "loop.png"))
    assert not image.isNull() and image.width() > 100
    render(path, tmp_path / "loop.svg")
    text = Path(tmp_path / "loop.svg").read_text(encoding="utf-8")
    assert "<svg" in text and "40.0 mA" in text  # 12 V across 300 Ω (Ohm's law)
    with pytest.raises(ValueError, match="svg or .pdf"):
        render(path, tmp_path / "loop.bmp")


def test_a_window_of_laptop_height_keeps_its_size_when_a_part_is_selected(qtbot, tmp_path):
    """The side panels share one column; selecting a part shows its value rows. On a 768-pixel
    screen (a common laptop, from memory) a 700-pixel window must keep its size and the canvas
    must not move under the pointer: the panels that can scroll do, the part's values show whole."""
    from PySide6.QtWidgets import QApplication

    win = open_window(qtbot, tmp_path, one_loop(), size=(1100, 700))
    QApplication.processEvents()
    before = win.view.mapToScene(win.view.viewport().rect().center())
    win.scene.select(["R1"])
    QApplication.processEvents()
    assert win.height() == 700
    assert win.minimumSizeHint().height() <= 700
    assert win.view.mapToScene(win.view.viewport().rect().center()) == before
    panel = win.part_dock.widget()
    assert panel is win.part_panel and panel.height() >= panel.minimumSizeHint().height()


def test_selecting_a_part_of_any_kind_leaves_the_canvas_its_width_and_place(qtbot, tmp_path):
    """The part panel's rows differ by kind (a cell's capacity, a cable's cross-section): the
    side column must not widen for the longest of them, or the canvas narrows and the
    drawing moves under the pointer between a press and a drag."""
    from PySide6.QtWidgets import QApplication

    from app.sketch.kinds import KINDS

    s = Sketch()
    names = []
    for k, kind in enumerate(KINDS):
        name = s.next_name(kind)
        s.add_part(PlacedPart(kind, name, 6 * k, 0))
        names.append(name)
    win = open_window(qtbot, tmp_path, s, size=(1100, 700))
    QApplication.processEvents()
    vp = win.view.viewport()
    width, before = vp.width(), win.view.mapToScene(vp.rect().center())
    for name in names:
        win.scene.select([name])
        QApplication.processEvents()
        assert vp.width() == width, f"selecting {name} narrowed the canvas"
        assert win.view.mapToScene(vp.rect().center()) == before, f"selecting {name} moved the drawing"


def test_the_help_lists_every_shortcut_of_the_menus_and_the_canvas_keys(qtbot, win):
    from PySide6.QtGui import QKeySequence

    from app.ui.help_dialog import CANVAS_KEYS, KeysDialog, key_rows

    titles = [a.text().replace("&", "") for a in win.menuBar().actions()]
    assert titles[-1] == "Help"
    rows = dict(key_rows(win))
    undo = win.act_undo.shortcut().toString(QKeySequence.SequenceFormat.NativeText)
    assert any(undo in keys and what == "Undo" for keys, what in rows["Edit"])
    assert ("W", "Wire") in rows["Draw"]
    assert rows["On the canvas"] == CANVAS_KEYS
    shortcuts = {a.text().replace("&", "") for m in win.menuBar().actions() if m.menu()
                 for a in m.menu().actions() if a.shortcuts()}
    listed = {what for section in rows.values() for _, what in section}
    assert shortcuts <= listed
    dialog = KeysDialog(win)
    assert "Tab, Shift+Tab" in dialog.text.toPlainText()


def test_a_sketch_file_dropped_on_the_canvas_opens_and_other_drops_are_refused(qtbot, win, tmp_path):
    from PySide6.QtCore import QMimeData, QPoint, QUrl
    from PySide6.QtGui import QDragEnterEvent, QDropEvent
    from PySide6.QtWidgets import QApplication

    other = Sketch()
    other.add_part(PlacedPart("resistor", "R7", 0, 0, 0, False, {"resistance": 47.0}))
    path = tmp_path / "dropped.lwsk"
    save_sketch(other, path)
    vp = win.view.viewport()
    at = QPoint(vp.width() // 2, vp.height() // 2)

    def drag(urls: list[QUrl]) -> tuple[bool, bool]:
        mime = QMimeData()
        mime.setUrls(urls)
        enter = QDragEnterEvent(at, Qt.DropAction.CopyAction, mime, Qt.MouseButton.LeftButton,
                                Qt.KeyboardModifier.NoModifier)
        QApplication.sendEvent(vp, enter)
        drop = QDropEvent(QPointF(at), Qt.DropAction.CopyAction, mime, Qt.MouseButton.LeftButton,
                          Qt.KeyboardModifier.NoModifier)
        QApplication.sendEvent(vp, drop)
        return enter.isAccepted(), drop.isAccepted()

    text = tmp_path / "notes.txt"
    text.write_text("not a sketch")
    assert drag([QUrl.fromLocalFile(str(text))]) == (False, False)
    assert [p.name for p in win.sketch.parts] == [p.name for p in one_loop().parts]
    assert drag([QUrl.fromLocalFile(str(path))]) == (True, True)
    assert [p.name for p in win.sketch.parts] == ["R7"] and win.path == path.resolve()


def test_no_potential_tag_hides_the_plus_or_minus_of_a_drop(qtbot, tmp_path):
    """The + and − beside the terminals say which end is higher: on the bench fixture the
    7.71 V tag at the R1-R2 junction hung over R1's −. The signs are read from what each drop
    mark draws (its strokes), the tags' boxes from the tags."""
    from app.ui.annotations import DropMark

    fixture = Path(__file__).resolve().parent.parent / "demo_circuits" / "bench_supply_fixture.lwsk"
    win = open_window(qtbot, tmp_path, fixture)
    scene = win.scene
    qtbot.waitUntil(lambda: scene.solved and any(t.isVisible() for t in scene._tags))
    scene.settle_marks()
    from PySide6.QtCore import QRectF

    strokes = [QRectF(line.p1(), line.p2()).normalized().adjusted(-0.7, -0.7, 0.7, 0.7)  # the pen's width
               for item in scene.part_items.values() for mark in (item.drop_mark,)
               if isinstance(mark, DropMark) and mark.isVisible() for line in mark.figure()[2]]
    assert len(strokes) >= 12  # three strokes a part (a + and a −), four resistors and the cell
    for tag in (t for t in scene._tags if t.isVisible()):
        box = tag.rect_at(tag._corner).translated(tag.pos())
        assert not any(box.intersects(s) for s in strokes), f"the {tag.text} tag hides a + or −"


def test_every_tool_of_the_palette_is_in_sight_in_a_short_window_and_a_tall_one(qtbot, tmp_path):
    """At 600 px high the names under the icons do not all fit, and Qt would hide the last
    tools behind the bar's extension button: the names go beside the icons there."""
    from PySide6.QtWidgets import QApplication

    win = open_window(qtbot, tmp_path, one_loop(), size=(1024, 900))
    bar = win.palette_bar
    tools = [a for a in bar.actions() if not a.isSeparator()]
    for height, style in ((900, Qt.ToolButtonStyle.ToolButtonTextUnderIcon),
                          (600, Qt.ToolButtonStyle.ToolButtonTextBesideIcon),
                          (900, Qt.ToolButtonStyle.ToolButtonTextUnderIcon)):
        win.resize(1024, height)
        for _ in range(5):
            QApplication.processEvents()
        assert bar.toolButtonStyle() == style, height
        shown = [a.text() for a in tools if bar.widgetForAction(a).isVisible()]
        assert shown == [a.text() for a in tools], height
        assert all(bar.rect().contains(bar.widgetForAction(a).geometry()) for a in tools), height
        # one column of icons: every button has the same left edge and width (a narrower one
        # is centred by the bar's layout, its icon out of line with the others')
        edges = {(bar.widgetForAction(a).x(), bar.widgetForAction(a).width()) for a in tools}
        assert len(edges) == 1, (height, edges)


def test_the_status_hint_takes_the_room_it_needs_and_gives_it_back(qtbot, tmp_path):
    """A 1024 px window shows the select tool's hint whole beside the solve summary; once the
    hint passes, the summary has the bar to itself; a long hint takes at most half the window."""
    from PySide6.QtWidgets import QApplication

    win = open_window(qtbot, tmp_path, size=(1024, 700))
    win.hint("Drag or arrows move (Alt: off what it touches); Tab: next part.")
    QApplication.processEvents()
    hint = win.hint_text
    assert hint.fontMetrics().horizontalAdvance(hint.text()) <= hint.width() - 4
    assert hint.toolTip() == ""  # nothing cut off, so no tooltip needed
    win.hint("a refusal " * 40)
    QApplication.processEvents()
    assert hint.width() <= win.width() // 2 and hint.toolTip() == hint.text()
    win.hint_text.clear()
    QApplication.processEvents()
    assert win.status_text.width() > 0.7 * win.statusBar().width()
