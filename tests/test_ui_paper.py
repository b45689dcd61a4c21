"""Parts, wires and highlight bands are painted with the paper (items.OnPaper).

The view keeps one picture of the paper with the drawing on it and repaints only the
places an edit names. Each check here makes a change, then holds what the canvas shows
against the same canvas painted from nothing (``resetCachedContent``): a part deleted,
selected, flagged or highlighted must leave no stale pixels and lose none. The colours
checked are the scheme's own (``theme``), looked for where the change happened.
"""
from __future__ import annotations

import numpy as np
import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QPointF, QRectF  # noqa: E402
from PySide6.QtGui import QColor  # noqa: E402

from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.ui.items import OnPaper  # noqa: E402
from app.ui.theme import DARK, GRID, LIGHT, current_theme  # noqa: E402
from ui_support import canvas_pixels as _pixels, open_window  # noqa: E402


def loop_sketch() -> Sketch:
    """A 9 V cell with two resistors in a ring of wires (R2 on the far side)."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 9.0, "internal_resistance": 0.0}))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, 0, False, {"resistance": 1000.0}))
    s.add_part(PlacedPart("resistor", "R2", 12, 0, 90, False, {"resistance": 2000.0}))
    s.add_wire(Wire(0, 0, 4, 0))
    s.add_wire(Wire(8, 0, 12, 0))
    s.add_wire(Wire(0, 4, 12, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def _stale(win) -> int:
    """Pixels the canvas shows more than a shade apart from a repaint from nothing (the
    paper and every item's kept picture of itself painted afresh)."""
    shown = _pixels(win)
    for item in win.scene.items():
        if isinstance(item, OnPaper):
            item._forget_pictures()
    win.view.resetCachedContent()
    win.view.viewport().repaint()
    return int((np.abs(shown - _pixels(win)).max(axis=2) > 24).sum())


def _colour_near(win, rect: QRectF, colour: QColor, tolerance: int = 40) -> int:
    """How many canvas pixels inside scene ``rect`` are within ``tolerance`` of ``colour``."""
    px = _pixels(win)
    r = win.view.mapFromScene(rect).boundingRect().intersected(win.view.viewport().rect())
    patch = px[r.top():r.bottom() + 1, r.left():r.right() + 1, :3]
    want = np.array([colour.blue(), colour.green(), colour.red()])  # RGB32 is stored B, G, R, A
    return int((np.abs(patch - want).max(axis=2) <= tolerance).sum())


def _solved(qtbot, win) -> None:
    qtbot.waitUntil(lambda: not win.solver.busy)
    win.scene.settle_marks()


def test_a_deleted_part_leaves_the_paper_and_comes_back_with_undo(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop_sketch(), size=(900, 600), centre=(6 * GRID, 2 * GRID))
    _solved(qtbot, win)
    item = win.scene.part_items["R2"]
    body = item.mapRectToScene(item.outline.adjusted(2, 8, -2, -8))  # the symbol's body, clear of the wire ends
    ink = current_theme().ink
    assert _colour_near(win, body, ink) > 20  # R2's symbol in ink
    win.editor.delete(["R2"], [])
    _solved(qtbot, win)
    assert _colour_near(win, body, ink) < 5  # gone from the paper (its wires end short of it)
    assert _stale(win) == 0
    win.stack.undo()
    _solved(qtbot, win)
    assert _colour_near(win, body, ink) > 20
    assert _stale(win) == 0


def test_selecting_and_clearing_a_part_repaints_its_halo(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop_sketch(), size=(900, 600), centre=(6 * GRID, 2 * GRID))
    _solved(qtbot, win)
    item = win.scene.part_items["R1"]
    halo = item.mapRectToScene(item.outline.adjusted(-3, -3, 3, 3))
    select = current_theme().select
    before = _colour_near(win, halo, select)
    win.scene.select(["R1"])
    assert _colour_near(win, halo, select) > before + 10  # the dashed rim in the selection colour
    assert _stale(win) == 0
    win.scene.select([])
    assert _colour_near(win, halo, select) == before
    assert _stale(win) == 0


def test_moves_rotations_and_a_fault_leave_no_stale_paper(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop_sketch(), size=(900, 600), centre=(6 * GRID, 2 * GRID))
    _solved(qtbot, win)
    for step in range(3):
        win.scene.select(["R1"])
        win.editor.nudge(0, 1)  # R1 leaves its wire: its wires follow, the loop opens and closes
        _solved(qtbot, win)
        assert _stale(win) == 0, step
        win.editor.rotate(["R2"])
        _solved(qtbot, win)
        assert _stale(win) == 0, step
    # pictures dropped by Qt's pixmap cache (past its limit) are painted again when next needed
    from PySide6.QtGui import QPixmapCache
    QPixmapCache.clear()
    win.scene.select(["R1"])
    win.editor.nudge(0, -1)
    _solved(qtbot, win)
    assert _stale(win) == 0
    # a short across the cell: the parts the error names are flagged, with a dashed rim
    win.editor.add_wire((0, 0), (0, 4))
    _solved(qtbot, win)
    assert win.scene.part_items["B1"].flagged
    assert _stale(win) == 0
    win.stack.undo()
    _solved(qtbot, win)
    assert not win.scene.part_items["B1"].flagged
    assert _stale(win) == 0


def test_a_highlight_band_lies_under_the_ink_and_goes_when_cleared(qtbot, tmp_path):
    from app.ui.highlight import Highlight
    win = open_window(qtbot, tmp_path, loop_sketch(), size=(900, 600), centre=(6 * GRID, 2 * GRID))
    _solved(qtbot, win)
    band = Highlight()
    win.scene.addItem(band)
    wire = QRectF(QPointF(0, 3.8 * GRID), QPointF(12 * GRID, 4.2 * GRID))
    ink = current_theme().ink
    inked = _colour_near(win, wire, ink)
    band.show_segments([((0, 4), (12, 4))], "test band")
    assert _stale(win) == 0
    assert _colour_near(win, wire, ink, 60) >= inked * 0.9  # the wire still drawn over the band
    band.show_segments([((8, 0), (12, 0))], "another")  # while shown: the old band goes, the new comes
    assert _stale(win) == 0
    band.clear()
    assert _stale(win) == 0


def test_the_ghost_of_a_part_being_placed_paints_itself(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop_sketch(), size=(900, 600), centre=(6 * GRID, 2 * GRID))
    _solved(qtbot, win)
    win.view.set_mode("resistor")
    win.view.cursor_point = (6, 8)
    ghost = win.view._ghost
    if ghost is None:  # the ghost appears with the first pointer or cursor move
        from PySide6.QtCore import Qt
        qtbot.keyClick(win.view, Qt.Key.Key_Down)
        ghost = win.view._ghost
    assert ghost is not None and not ghost.on_paper
    assert _colour_near(win, ghost.sceneBoundingRect(), current_theme().ghost) > 10


def test_a_change_of_scheme_repaints_the_drawing_in_the_new_ink(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, loop_sketch(), size=(900, 600), centre=(6 * GRID, 2 * GRID))
    win.set_scheme("light")
    _solved(qtbot, win)
    item = win.scene.part_items["R1"]
    body = item.mapRectToScene(item.outline.adjusted(8, 2, -8, -2))
    # (the dark paper lies within 25 levels of the light ink: compare closely)
    inked = _colour_near(win, body, LIGHT.ink, 12)
    assert inked > 10
    win.set_scheme("dark")
    _solved(qtbot, win)
    # the symbol in the dark scheme's ink, as much of it as there was of the light one (pictures
    # kept from before would show the light ink on the dark paper, and none of the dark)
    assert _colour_near(win, body, DARK.ink, 12) > inked / 2
    assert _stale(win) == 0
    win.set_scheme("light")


def test_a_picture_file_draws_every_shape_afresh(qtbot, tmp_path, monkeypatch):
    # A PNG is drawn at its own scale with every shape filled and every part painted where
    # it lies; the pictures a view copies in land up to an eighth of a pixel off, which
    # would show here as hundreds of pixels a shade apart.
    from pathlib import Path

    import app.ui.annotations as an
    import app.ui.items as items
    from app.ui.shot import render
    from PySide6.QtGui import QImage
    demo = Path(__file__).resolve().parents[1] / "demo_circuits" / "market_stall_lamps.lwsk"
    render(demo, tmp_path / "shot.png")
    monkeypatch.setattr(items, "copies", lambda painter: False)  # no copying anywhere: all afresh
    draw = an.Stamper.draw
    monkeypatch.setattr(an.Stamper, "draw", lambda self, p, stamps, colours, exact=False:
                        draw(self, p, stamps, colours, True))
    render(demo, tmp_path / "afresh.png")
    assert QImage(str(tmp_path / "shot.png")) == QImage(str(tmp_path / "afresh.png"))
