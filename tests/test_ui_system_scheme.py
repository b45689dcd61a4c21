"""The canvas follows the system's light or dark palette while the program runs (scheme "system")."""
from __future__ import annotations

from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QPoint  # noqa: E402
from PySide6.QtGui import QColor, QPalette  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

from app.ui.theme import DARK, LIGHT, current_theme  # noqa: E402
from ui_support import open_window  # noqa: E402

FIXTURE = Path(__file__).resolve().parent.parent / "demo_circuits" / "bench_supply_fixture.lwsk"


def _dark_palette(base: QPalette) -> QPalette:
    pal = QPalette(base)
    for role, colour in ((QPalette.ColorRole.Window, "#202124"), (QPalette.ColorRole.Base, "#1b1c1e"),
                         (QPalette.ColorRole.WindowText, "#e8e8e8"), (QPalette.ColorRole.Text, "#e8e8e8")):
        pal.setColor(role, QColor(colour))
    return pal


def paper_at_corner(win) -> QColor:
    """The canvas colour at the viewport's top-left corner (grid dots are 20 px apart, none at (2, 2))."""
    win.view.viewport().repaint()
    return win.view.viewport().grab().toImage().pixelColor(QPoint(2, 2))


def test_a_system_palette_change_recolours_the_canvas(qtbot, tmp_path):
    app = QApplication.instance()
    light = QPalette(app.palette())
    if light.color(QPalette.ColorRole.Window).lightness() < 128:
        pytest.skip("the test platform's own palette is dark")
    win = open_window(qtbot, tmp_path, FIXTURE)
    assert win._scheme == "system" and current_theme() is LIGHT
    assert paper_at_corner(win) == LIGHT.paper
    try:
        app.setPalette(_dark_palette(light))
        qtbot.waitUntil(lambda: current_theme() is DARK)
        assert paper_at_corner(win) == DARK.paper
    finally:
        app.setPalette(light)
    qtbot.waitUntil(lambda: current_theme() is LIGHT)
    assert paper_at_corner(win) == LIGHT.paper


def test_a_chosen_scheme_stays_when_the_system_palette_changes(qtbot, tmp_path):
    app = QApplication.instance()
    light = QPalette(app.palette())
    win = open_window(qtbot, tmp_path, FIXTURE)
    win.set_scheme("light")
    try:
        app.setPalette(_dark_palette(light))
        QApplication.processEvents()
        assert current_theme() is LIGHT
    finally:
        app.setPalette(light)
        win.set_scheme("system")


def test_refusals_take_the_schemes_fault_colour(qtbot, tmp_path):
    # the refusal labels carry their own style (one on the window slows every widget's painting)
    from PySide6.QtWidgets import QLabel
    from app.ui.theme import REFUSAL
    win = open_window(qtbot, tmp_path, FIXTURE)
    try:
        for scheme, theme in (("dark", DARK), ("light", LIGHT)):
            win.set_scheme(scheme)
            labels = win.findChildren(QLabel, REFUSAL)
            assert labels
            for label in labels:
                label.setText("refused")
                label.ensurePolished()
                assert label.palette().color(label.foregroundRole()) == theme.fault
    finally:
        win.set_scheme("system")
