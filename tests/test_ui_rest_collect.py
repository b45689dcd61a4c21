"""Full garbage collections wait for a rest in the drawing, and still free what they must.

What a collection frees, and that frozen objects are left alone until unfrozen, is Python's
own behaviour (the ``gc`` module's documentation: ``gc.freeze``, ``gc.unfreeze``); these tests
check the window uses it so that unreachable cycles are not kept for good.
"""
from __future__ import annotations

import gc
import os
import weakref

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402

pytest.importorskip("pytestqt")

from PySide6.QtCore import QPoint, Qt  # noqa: E402
from PySide6.QtTest import QTest  # noqa: E402

from app.ui.heap import RestCollector  # noqa: E402
from ui_support import open_window  # noqa: E402


class Node:
    """An object in a reference cycle: only a cyclic collection frees it."""

    def __init__(self) -> None:
        self.me = self


def frozen_cycle() -> weakref.ref:
    """An unreachable cycle that an earlier rest froze: plain collections do not see it."""
    node = Node()
    gc.freeze()
    ref = weakref.ref(node)
    del node
    gc.collect()
    assert ref() is not None, "a frozen cycle should outlive a plain collection (gc.freeze)"
    return ref


def test_a_rest_frees_cycles_frozen_earlier(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path)
    ref = frozen_cycle()
    win.rest.poke()
    qtbot.waitUntil(lambda: ref() is None, timeout=RestCollector.REST_MS + 5000)


def test_no_rest_while_a_button_is_held(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path)
    ref = frozen_cycle()
    vp = win.view.viewport()
    QTest.mousePress(vp, Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier, QPoint(200, 200))
    qtbot.wait(RestCollector.REST_MS + 500)
    assert ref() is not None, "collected in the middle of a drag"
    QTest.mouseRelease(vp, Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier, QPoint(200, 200))
    qtbot.waitUntil(lambda: ref() is None, timeout=RestCollector.REST_MS + 5000)


def test_edits_and_pointer_moves_start_the_rest_again(qtbot, tmp_path):
    """Each sign of activity restarts the wait (QTimer.start restarts a running timer, Qt's
    documentation); here only that each one reaches the collector, with no clock involved."""
    win = open_window(qtbot, tmp_path)
    win.rest.stop()
    win.editor.place("resistor", 0, 0)
    assert win.rest.pending, "an edit did not start the rest again"
    win.rest.stop()
    QTest.mouseMove(win.view.viewport(), QPoint(150, 120))
    QTest.mouseMove(win.view.viewport(), QPoint(240, 200))
    assert win.rest.pending, "a pointer move over the canvas did not start the rest again"
    win.rest.stop()
    QTest.mouseClick(win.view.viewport(), Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier,
                     QPoint(240, 200))
    assert win.rest.pending, "a click on the canvas did not start the rest again"
