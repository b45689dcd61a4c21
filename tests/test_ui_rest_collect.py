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


def test_an_edit_puts_the_rest_off(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path)
    ref = frozen_cycle()
    win.rest.poke()
    qtbot.wait(RestCollector.REST_MS // 2)
    win.editor.place("resistor", 0, 0)  # an edit: the rest starts again from here
    qtbot.wait(RestCollector.REST_MS * 3 // 4)
    assert ref() is not None, "collected less than a rest after an edit"
    qtbot.waitUntil(lambda: ref() is None, timeout=RestCollector.REST_MS + 5000)
