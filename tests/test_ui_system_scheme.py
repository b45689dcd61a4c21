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


def light_platform_window(qtbot, tmp_path):
    """(the application, a copy of the platform's palette, a window on the fixture); skips on a dark platform."""
    app = QApplication.instance()
    platform = QPalette(app.palette())
    if platform.color(QPalette.ColorRole.Window).lightness() < 128:
        pytest.skip("the test platform's own palette is dark")
    return app, platform, open_window(qtbot, tmp_path, FIXTURE)


def test_a_system_palette_change_recolours_the_canvas(qtbot, tmp_path):
    app, light, win = light_platform_window(qtbot, tmp_path)
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


def _contrast(a: QColor, b: QColor) -> float:
    """WCAG 2.1 contrast ratio (its definitions of relative luminance and contrast ratio)."""
    def luminance(c: QColor) -> float:
        lin = [x / 12.92 if x <= 0.04045 else ((x + 0.055) / 1.055) ** 2.4 for x in (c.redF(), c.greenF(), c.blueF())]
        return 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2]
    hi, lo = sorted((luminance(a), luminance(b)), reverse=True)
    return (hi + 0.05) / (lo + 0.05)


def test_a_scheme_other_than_the_systems_recolours_the_panels_too_and_system_puts_them_back(qtbot, tmp_path):
    app, platform, win = light_platform_window(qtbot, tmp_path)
    try:
        win.set_scheme("light")  # the system's own scheme: its palette stays
        assert app.palette() == platform
        win.set_scheme("dark")
        assert app.palette().color(QPalette.ColorRole.Window).lightness() < 128
        qtbot.waitUntil(lambda: win.readings.palette().color(QPalette.ColorRole.Base).lightness() < 128)
        pal = win.readings.palette()
        assert current_theme() is DARK and paper_at_corner(win) == DARK.paper
        assert pal.color(QPalette.ColorRole.Window).lightness() < 128
        assert pal.color(QPalette.ColorRole.Base).lightness() < 128
        # WCAG 2.1 success criterion 1.4.3: text at least 4.5:1 against what it is drawn on
        R = QPalette.ColorRole
        for text, ground in ((R.Text, R.Base), (R.Text, R.AlternateBase), (R.WindowText, R.Window),
                             (R.ButtonText, R.Button), (R.HighlightedText, R.Highlight),
                             (R.ToolTipText, R.ToolTipBase), (R.PlaceholderText, R.Base)):
            assert _contrast(pal.color(text), pal.color(ground)) >= 4.5, (text, ground)
        win.set_scheme("system")
        assert app.palette() == platform and current_theme() is LIGHT
    finally:
        win.set_scheme("system")
