"""Starting the program: the first window, crash recovery, and a window per restored sketch.

``start`` does everything ``run`` does before the event loop: it opens the
recovery store, gives each window an ``Autosaver``, opens the file asked for,
and offers what a crashed or killed session left behind.  A restored sketch
opens as unsaved, proposing its original file for Save.
"""
from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from PySide6.QtWidgets import QApplication

from ..sketch.recovery import Recoverable, RecoveryCopy, RecoveryStore
from .autosave import Autosaver, open_store
from .recovery_dialog import DISCARD, RESTORE, RecoveryAnswer, ask_what_to_recover, when_written

__all__ = ["start", "restore_into", "autosaver_of"]

Ask = Callable[[Recoverable, object], RecoveryAnswer]


def autosaver_of(win) -> Autosaver | None:
    """The window's autosaver, if crash recovery is on."""
    return win.findChild(Autosaver)


def _proposed_path(original: str | None) -> Path | None:
    """The original file as the proposal for Save: only an absolute path to a sketch file."""
    if not original:
        return None
    path = Path(original)
    if not path.is_absolute() or path.suffix.lower() != ".lwsk" or path.is_dir():
        return None
    return path


def restore_into(win, store: RecoveryStore, copy: RecoveryCopy) -> bool:
    """Open ``copy`` in ``win`` as an unsaved sketch; its old copy goes once the window's own is written."""
    try:
        sketch, original = store.restore(copy)
    except ValueError as e:  # RecoveryError, or a path outside the folder
        win.tell("Cannot restore the sketch", f"{copy.name}: {e}")
        return False
    win.set_document(sketch, _proposed_path(original))
    win.stack.resetClean()  # unsaved: nothing of it is in a file yet
    saver = autosaver_of(win)
    if saver is not None and saver.save_now() is not None:
        try:
            store.discard(copy)
        except OSError:
            pass  # offered again next time; nothing is lost
    win.hint(f"Restored {copy.name} as it was at {when_written(copy)}. It is not saved yet.", 15000)
    return True


def _window(make_window: Callable[[], object], store: RecoveryStore | None):
    win = make_window()
    if store is not None:
        Autosaver(win, store)
    return win


def start(make_window: Callable[[], object], path: str | None = None, store: RecoveryStore | None = None,
          ask: Ask = ask_what_to_recover) -> list:
    """Open the windows of a new session; an empty list if ``path`` could not be opened.

    ``store`` defaults to one in the program's recovery folder (see
    ``autosave``), closed when the program quits; a store passed in is the
    caller's to close.  ``ask`` shows the recovery question and returns the answer.
    """
    problem, owned = "", store is None
    if owned:
        store, problem = open_store()
    win = _window(make_window, store)
    if path is not None and not win.open_path(path, ask=False):
        if store is not None:
            store.close()
        return []
    win.show()
    windows = [win]
    if store is None:
        win.hint(problem, 30000)
        return windows
    if owned:  # a normal quit leaves no copy behind
        QApplication.instance().aboutToQuit.connect(store.close)
    found = store.recoverable()
    if not (found.copies or found.damaged):
        return windows
    answer = ask(found, win)
    for damaged in answer.discard_damaged:
        _discard(win, store, damaged)
    free = path is None and not win.modified and not win.sketch.parts and not win.sketch.wires
    for copy, decision in answer.decisions:
        if decision == DISCARD:
            _discard(win, store, copy)
        elif decision == RESTORE:
            target = win if free else _window(make_window, store)
            if restore_into(target, store, copy):
                free = False
                if target is not win:
                    target.show()
                    windows.append(target)
            elif target is not win:
                target.deleteLater()
    return windows


def _discard(win, store: RecoveryStore, copy) -> None:
    try:
        store.discard(copy)
    except (OSError, ValueError) as e:
        win.hint(f"A recovery copy could not be deleted: {e}", 15000)
