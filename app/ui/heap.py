"""Keep Python's cycle collector off the path from an edit to the drawing.

A sketch of a few thousand parts holds some hundred thousand long-lived
objects (items, parts, undo steps). Every edit allocates a netlist and a
solution that outlive the young generations, so every few edits the
collector walks the whole heap: a pause of tens of milliseconds in the
middle of an edit. Once a document is loaded and shown, ``settle`` collects
what is garbage and moves everything alive into the collector's permanent
generation (``gc.freeze``, Python 3.7+), so later collections walk only what
edits made since. Freeing by reference counting still works for frozen
objects; only cycles among them wait for the next ``settle`` or rest (below),
which first thaws them. Small documents are only thawed: their heap is small, and a full
collection on every load would cost more than the pauses it saves.

``RestCollector`` runs ``refreeze`` whenever the drawing rests (no edit and no pointer
activity on the canvas for ``REST_MS``, no button held), whatever the document's size, as
nobody waits for it then: frozen cycles are freed within a session, not only when the next
document is opened, and what a long session's edits left in the oldest generation is frozen
too, so the automatic collections between rests stay small.
"""
from __future__ import annotations

import gc

from PySide6.QtCore import QObject, Qt, QTimer
from PySide6.QtGui import QGuiApplication

__all__ = ["settle", "refreeze", "SETTLE_FROM", "RestCollector"]

SETTLE_FROM = 100  # parts; below this the heap is small and a full collection costs more than it saves


def refreeze() -> None:
    """Thaw everything, collect the garbage once, and freeze what is alive."""
    gc.unfreeze()
    gc.collect()
    gc.freeze()


def settle(parts: int) -> None:
    """After loading a document of ``parts`` parts: thaw what earlier documents froze, and for a
    large one ``refreeze``."""
    if parts >= SETTLE_FROM:
        refreeze()
    else:
        gc.unfreeze()


class RestCollector(QObject):
    """Runs ``refreeze`` once activity has stopped for ``REST_MS``.

    Call ``poke`` on every sign of activity (an edit, a pointer move or press). The
    collection waits while a mouse button is held, so a drag paused in mid-air is not taken
    for a rest.
    """

    REST_MS = 1500

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(self.REST_MS)
        self._timer.timeout.connect(self._rest)

    def poke(self, *_args: object) -> None:
        """Activity: put the collection off until ``REST_MS`` from now."""
        self._timer.start()

    @property
    def pending(self) -> bool:
        """Whether a collection is due at the end of the current rest."""
        return self._timer.isActive()

    def stop(self) -> None:
        """No collection pending (the window has closed)."""
        self._timer.stop()

    def _rest(self) -> None:
        if QGuiApplication.mouseButtons() != Qt.MouseButton.NoButton:
            self._timer.start()
            return
        refreeze()
