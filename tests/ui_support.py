"""Opening the window for pytest-qt tests: private settings, no prompts, a sketch on the canvas."""
from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from PySide6.QtCore import QPointF, QSettings, Qt
from PySide6.QtGui import QGuiApplication, QImage
from PySide6.QtWidgets import QApplication

from app.sketch.fileio import save_sketch
from app.sketch.model import Sketch
from app.ui.main_window import MainWindow


def open_window(qtbot, tmp_path: Path, sketch: Sketch | Path | None = None, *, size=None,
                centre=(40.0, 40.0), active: bool = False, name: str = "sketch.lwsk") -> MainWindow:
    """A window with its own settings file that discards on close and fails the test on any message.

    ``sketch`` (a Sketch, or the path of a file to copy) is saved as ``tmp_path / name`` and opened;
    ``size`` (width, height) resizes the window first;
    ``active`` waits until the window is the active one, so shortcut keys reach its actions.
    """
    w = MainWindow(QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat))
    w.ask_to_save = lambda: "discard"
    w.tell = lambda title, message: pytest.fail(message)
    qtbot.addWidget(w)
    if size is not None:
        w.resize(*size)
    w.show()
    if active:
        w.activateWindow()
        for _ in range(100):
            QApplication.processEvents()
            if QApplication.activeWindow() is w:
                break
        assert QApplication.activeWindow() is w
    else:
        qtbot.waitExposed(w)
    if sketch is not None:
        path = tmp_path / name
        if isinstance(sketch, Path):
            path.write_bytes(sketch.read_bytes())
        else:
            save_sketch(sketch, path)
        assert w.open_path(path)
    w.view.resetTransform()
    w.view.centerOn(QPointF(*centre))
    return w


def type_into(qtbot, edit, text: str) -> None:
    """Type ``text`` over a line edit's contents by keys, as a person would, and press Enter."""
    edit.setFocus()
    edit.selectAll()
    qtbot.keyClicks(edit, text)
    qtbot.keyClick(edit, Qt.Key.Key_Return)


def painted_canvas(win: MainWindow) -> QImage:
    """The canvas as last painted, after pending events (the screen's copy of the window, which
    the offscreen platform keeps): a region an edit forgot to repaint still shows its old contents."""
    QApplication.processEvents()
    vp = win.view.viewport()
    shot = QGuiApplication.primaryScreen().grabWindow(win.winId()).toImage()
    at = vp.mapTo(win, vp.rect().topLeft())
    return shot.copy(at.x(), at.y(), vp.width(), vp.height()).convertToFormat(QImage.Format.Format_RGB32)


def canvas_pixels(win: MainWindow) -> np.ndarray:
    """The canvas's last painted pixels (``painted_canvas``) as [y, x, channel] integers (B, G, R, A)."""
    im = painted_canvas(win)
    rows = np.frombuffer(im.constBits(), np.uint8).reshape(im.height(), im.bytesPerLine())
    return rows[:, :4 * im.width()].reshape(im.height(), im.width(), 4).astype(int)
