"""Recovery copies of a window's unsaved sketch, written while the person works.

One ``RecoveryStore`` serves the whole program (see ``app.sketch.recovery``);
each window gets an ``Autosaver`` that writes its sketch's copy when there are
unsaved changes: a few seconds after the last edit, and at least every 30
seconds while edits keep coming.  Saving, undoing back to the saved state,
replacing the sketch or closing the window forgets the copy.  The folder and
the intervals can be set by environment variables (used by the tests):

- ``LOOPWRIGHT_RECOVERY_DIR``: the folder (default: ``recovery`` in the
  per-user data folder Qt names, ``QStandardPaths.AppDataLocation``);
- ``LOOPWRIGHT_AUTOSAVE_SECONDS`` and ``LOOPWRIGHT_AUTOSAVE_IDLE_SECONDS``:
  the two intervals, in seconds.
"""
from __future__ import annotations

import itertools
import math
import os
from pathlib import Path

from PySide6.QtCore import QObject, QStandardPaths, QTimer

from ..sketch.atomic import SaveError
from ..sketch.fileio import SketchFileError
from ..sketch.recovery import RecoveryCopy, RecoveryStore

__all__ = ["Autosaver", "recovery_folder", "open_store", "EVERY_SECONDS", "IDLE_SECONDS"]

EVERY_SECONDS = 30.0   # the longest a change waits for its copy while edits keep coming
IDLE_SECONDS = 3.0     # quiet time after an edit before its copy is written
_documents = itertools.count(1)


def _seconds(variable: str, default: float) -> float:
    """A positive number of seconds from the environment, or ``default`` if unset or unusable."""
    try:
        value = float(os.environ.get(variable, ""))
    except ValueError:
        return default
    return value if math.isfinite(value) and value > 0 else default


def recovery_folder() -> Path | None:
    """Where recovery copies are kept: ``LOOPWRIGHT_RECOVERY_DIR`` or ``<AppData>/recovery``.

    None when the system names no per-user data folder.  Call after the
    QApplication has its organisation and application names.
    """
    chosen = os.environ.get("LOOPWRIGHT_RECOVERY_DIR")
    if chosen:
        return Path(chosen)
    base = QStandardPaths.writableLocation(QStandardPaths.StandardLocation.AppDataLocation)
    return Path(base) / "recovery" if base else None


def open_store(folder: Path | None = None) -> tuple[RecoveryStore | None, str]:
    """The program's recovery store, or None and a plain reason when its folder cannot be used."""
    folder = folder if folder is not None else recovery_folder()
    if folder is None:
        return None, "Crash recovery is off: the system names no folder for this program's data."
    try:
        return RecoveryStore(folder), ""
    except SaveError as e:
        return None, f"Crash recovery is off: the folder {folder} cannot be used ({e.reason})."


class Autosaver(QObject):
    """Keeps the recovery copy of ``win``'s sketch up to date while it has unsaved changes.

    ``win`` is a ``MainWindow``: its ``stack``, ``sketch``, ``path`` and
    ``modified``, and its ``documentReplaced`` and ``closed`` signals are used.
    ``every`` and ``idle`` are in seconds (default from the environment, see
    the module's notes).
    """

    def __init__(self, win, store: RecoveryStore, document: str | None = None,
                 every: float | None = None, idle: float | None = None) -> None:
        super().__init__(win)
        self.win = win
        self.store = store
        self.document = document or f"w{next(_documents)}"
        self.last_error = ""
        self._stack = None
        self._pending = False
        self._every = QTimer(self)
        self._every.setInterval(round(1000 * (every or _seconds("LOOPWRIGHT_AUTOSAVE_SECONDS", EVERY_SECONDS))))
        self._every.timeout.connect(self._tick)
        self._idle = QTimer(self)
        self._idle.setSingleShot(True)
        self._idle.setInterval(round(1000 * (idle or _seconds("LOOPWRIGHT_AUTOSAVE_IDLE_SECONDS", IDLE_SECONDS))))
        self._idle.timeout.connect(self._tick)
        win.documentReplaced.connect(self._replaced)
        win.closed.connect(self.forget)
        self._replaced()

    def _replaced(self) -> None:
        """A new sketch in the window: whatever the old one had was saved or thrown away."""
        if self._stack is not None:
            self._stack.indexChanged.disconnect(self._edited)
            self._stack.cleanChanged.disconnect(self._clean_changed)
        self.forget()
        self._stack = self.win.stack
        self._stack.indexChanged.connect(self._edited)
        self._stack.cleanChanged.connect(self._clean_changed)

    def _edited(self) -> None:
        self._pending = True
        self._idle.start()
        if not self._every.isActive():
            self._every.start()

    def _clean_changed(self, clean: bool) -> None:
        if clean:  # saved, or undone back to what is on disk
            self.forget()
        else:
            self._edited()

    def _tick(self) -> None:
        if self._pending:
            self.save_now()

    def save_now(self) -> RecoveryCopy | None:
        """Write the copy now if the sketch has unsaved changes; problems go to the status line."""
        if not self.win.modified:
            self.forget()
            return None
        path = self.win.path
        try:
            copy = self.store.autosave(self.win.sketch, path, self.document, path.name if path else None)
        except (SaveError, SketchFileError, ValueError) as e:
            self.last_error = f"The recovery copy could not be written: {e}"
            self.win.hint(self.last_error, 15000)
            return None
        self._pending = False
        self.last_error = ""
        return copy

    def forget(self) -> None:
        """Remove this window's copy (saved, thrown away or closed) and stop the timers."""
        self._pending = False
        self._idle.stop()
        self._every.stop()
        try:
            self.store.forget(self.document)
        except OSError as e:
            self.win.hint(f"An old recovery copy could not be removed: {e.strerror or e}", 10000)
