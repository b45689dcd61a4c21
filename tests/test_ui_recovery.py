"""The window's side of crash recovery: autosave copies, the restore question, failed saves."""
from __future__ import annotations

import os
import signal
import subprocess
import sys
import textwrap
from datetime import datetime, timezone
from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QSettings, Qt, QTimer  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

from app.sketch.fileio import dumps_sketch, load_sketch, save_sketch  # noqa: E402
from app.sketch.model import PlacedPart, Sketch, Wire  # noqa: E402
from app.sketch.recovery import COPY_SUFFIX, RecoveryCopy, RecoveryStore  # noqa: E402
from app.ui.autosave import Autosaver  # noqa: E402
from app.ui.main_window import MainWindow  # noqa: E402
from app.ui.recovery_dialog import DISCARD, LATER, RESTORE, RecoveryDialog  # noqa: E402
from app.ui.session import autosaver_of, start  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]


def trailer_lights(lamp_power: float = 21.0) -> Sketch:
    """A trailer's tail light run from a tow battery (an invented demo scene)."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.6, "internal_resistance": 0.02}))
    s.add_part(PlacedPart("lamp", "H1", 0, 0, 0, False, {"rated_voltage": 12.0, "rated_power": lamp_power}))
    s.add_wire(Wire(4, 0, 4, 4))
    s.add_wire(Wire(0, 4, 4, 4))
    return s


def copies(folder: Path) -> list[str]:
    return sorted(n for n in os.listdir(folder) if n.endswith(COPY_SUFFIX))


def crash_a_session(folder: Path, documents: list[tuple[str, str | None, Sketch]]) -> None:
    """A child process autosaves ``documents`` (id, original path, sketch) and is killed (SIGKILL)."""
    docs = [(d, o, dumps_sketch(s)) for d, o, s in documents]
    script = textwrap.dedent(f"""
        import os, signal
        from app.sketch.fileio import loads_sketch
        from app.sketch.recovery import RecoveryStore
        store = RecoveryStore({str(folder)!r})
        for doc, original, text in {docs!r}:
            store.autosave(loads_sketch(text), original, doc)
        os.kill(os.getpid(), signal.SIGKILL)
    """)
    run = subprocess.run([sys.executable, "-c", script], cwd=ROOT, capture_output=True, text=True)
    assert run.returncode == -signal.SIGKILL, run.stderr


@pytest.fixture
def folder(tmp_path):
    return tmp_path / "recovery"


@pytest.fixture
def make_window(qtbot, tmp_path):
    made = []

    def make():
        w = MainWindow(QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat))
        w.ask_to_save = lambda: "discard"
        w.tell = lambda title, message: pytest.fail(message)
        qtbot.addWidget(w)
        made.append(w)
        return w
    yield make
    for w in made:  # closed while the store is open, as the program quits
        w.close()


@pytest.fixture
def store(folder):
    s = RecoveryStore(folder)
    yield s
    s.close()


@pytest.fixture
def win(make_window, store, tmp_path):
    w = make_window()
    Autosaver(w, store, "main", every=0.2, idle=0.05)
    path = tmp_path / "trailer.lwsk"
    save_sketch(trailer_lights(), path)
    assert w.open_path(path)
    return w


def test_an_edit_is_copied_soon_and_the_copy_holds_the_edit(qtbot, win, store, folder, tmp_path):
    own = (tmp_path / "trailer.lwsk").read_bytes()
    assert copies(folder) == []
    win.editor.set_values("H1", {"rated_power": 5.0})
    qtbot.waitUntil(lambda: copies(folder) != [], timeout=5000)
    (name,) = copies(folder)
    written = RecoveryCopy("", datetime.now(timezone.utc), None, store.session, "main", str(folder / name))
    sketch, original = store.restore(written)
    assert sketch == win.sketch and sketch != trailer_lights()
    assert original == str(tmp_path / "trailer.lwsk")
    assert (tmp_path / "trailer.lwsk").read_bytes() == own  # the person's file is not touched


def test_no_copy_without_unsaved_changes_and_none_after_saving_or_undoing(qtbot, win, folder):
    saver = autosaver_of(win)
    assert saver.save_now() is None and copies(folder) == []
    win.editor.set_values("H1", {"rated_power": 5.0})
    assert saver.save_now() is not None and len(copies(folder)) == 1
    win.stack.undo()  # back to what is on disk
    assert copies(folder) == []
    win.stack.redo()
    assert saver.save_now() is not None
    assert win.save()
    assert copies(folder) == []
    qtbot.wait(150)  # the timers that were running write nothing now
    assert copies(folder) == []


def test_copies_keep_coming_while_edits_do(qtbot, make_window, store, folder):
    w = make_window()
    Autosaver(w, store, "steady", every=0.1, idle=60)  # only the regular timer can write
    w.editor.place("resistor", 0, 0)
    qtbot.waitUntil(lambda: copies(folder) != [], timeout=5000)
    first = os.stat(os.path.join(folder, copies(folder)[0])).st_mtime_ns
    w.editor.place("resistor", 0, 8)
    qtbot.waitUntil(lambda: os.stat(os.path.join(folder, copies(folder)[0])).st_mtime_ns != first, timeout=5000)


def test_new_sketch_after_discarding_and_closing_leave_no_copy(qtbot, win, folder):
    win.editor.set_values("H1", {"rated_power": 5.0})
    autosaver_of(win).save_now()
    win.new_sketch()  # the person said Discard
    assert copies(folder) == []
    win.editor.place("resistor", 0, 0)
    autosaver_of(win).save_now()
    assert len(copies(folder)) == 1
    win.close()
    assert copies(folder) == []


def test_a_failed_save_says_why_in_plain_words_and_keeps_everything(qtbot, win, folder, tmp_path):
    told = []
    win.tell = lambda title, message: told.append(message)
    win.editor.set_values("H1", {"rated_power": 5.0})
    autosaver_of(win).save_now()
    target = tmp_path / "gone" / "trailer.lwsk"
    assert not win.save_to(target)
    assert told == ["Could not save trailer.lwsk: the folder does not exist (any more). "
                    "The file on disk was left as it was."]
    assert win.modified and win.isWindowModified()
    assert win.path == tmp_path / "trailer.lwsk"
    assert len(copies(folder)) == 1  # the recovery copy stays until a save succeeds
    assert load_sketch(tmp_path / "trailer.lwsk") == trailer_lights()


def answer_dialog(qtbot, choose, discard_damaged: bool = False, seen: list | None = None) -> None:
    """Answer the recovery dialog when it shows: ``choose(name, file)`` for each row, then Continue."""
    def answer():
        dialog = QApplication.activeModalWidget()
        assert isinstance(dialog, RecoveryDialog)
        rows = [(dialog.table.topLevelItem(i).text(0), dialog.table.topLevelItem(i).text(2))
                for i in range(dialog.table.topLevelItemCount())]
        if seen is not None:
            seen.extend(rows)
        for i, row in enumerate(rows):
            dialog.choose(i, choose(*row))
        if discard_damaged:
            dialog.damaged_box.setChecked(True)
        qtbot.mouseClick(dialog.ok_button, Qt.MouseButton.LeftButton)
    QTimer.singleShot(0, answer)


def test_start_offers_each_copy_and_restores_it_unsaved_with_its_file(qtbot, make_window, folder, tmp_path):
    own = tmp_path / "trailer.lwsk"
    save_sketch(trailer_lights(), own)
    crash_a_session(folder, [("w1", str(own), trailer_lights(5.0)), ("w2", None, trailer_lights(10.0))])
    (folder / "dead.w1.lwrecover").write_text("{ not a copy")
    store = RecoveryStore(folder)
    seen: list = []
    answer_dialog(qtbot, lambda name, file: RESTORE if file == str(own) else DISCARD, True, seen)
    try:
        (win,) = start(make_window, store=store)
        assert sorted(seen) == sorted([("trailer.lwsk", str(own)), ("Untitled sketch", "Not saved yet")])
        assert win.sketch == trailer_lights(5.0)
        assert win.modified and win.isWindowModified() and win.windowTitle().startswith("trailer.lwsk[*]")
        assert win.path == own  # Save proposes the file it came from
        # only the window's own copy is left: the other was discarded, the damaged one deleted
        assert len(copies(folder)) == 1 and copies(folder)[0].startswith(store.session)
        assert win.save()
        assert load_sketch(own) == trailer_lights(5.0)
        assert copies(folder) == []
    finally:
        store.close()


def test_ask_again_next_time_keeps_the_copies(qtbot, make_window, folder):
    crash_a_session(folder, [("w1", None, trailer_lights(5.0))])
    first = RecoveryStore(folder)
    answer_dialog(qtbot, lambda name, file: LATER)
    (win,) = start(make_window, store=first)
    assert win.sketch == Sketch() and not win.modified
    first.close()
    later = RecoveryStore(folder)
    try:
        (copy,) = later.recoverable().copies
        assert later.restore(copy)[0] == trailer_lights(5.0)
    finally:
        later.close()


def test_restoring_two_sketches_opens_two_windows(qtbot, make_window, folder):
    crash_a_session(folder, [("w1", None, trailer_lights(5.0)), ("w2", None, trailer_lights(10.0))])
    store = RecoveryStore(folder)
    answer_dialog(qtbot, lambda name, file: RESTORE)
    try:
        windows = start(make_window, store=store)
        assert sorted(w.sketch.snapshot() for w in windows) == sorted(
            [trailer_lights(5.0).snapshot(), trailer_lights(10.0).snapshot()])
        assert all(w.modified for w in windows)
        assert len(copies(folder)) == 2 and all(n.startswith(store.session) for n in copies(folder))
    finally:
        store.close()


def test_a_copy_pointing_at_something_that_is_no_sketch_file_is_restored_without_a_path(qtbot, make_window,
                                                                                       folder, tmp_path):
    crash_a_session(folder, [("w1", str(tmp_path / "notes.txt"), trailer_lights(5.0))])
    store = RecoveryStore(folder)
    answer_dialog(qtbot, lambda name, file: RESTORE)
    try:
        (win,) = start(make_window, store=store)
        assert win.sketch == trailer_lights(5.0) and win.path is None  # Save will ask where
    finally:
        store.close()


def test_the_app_killed_after_an_edit_gives_the_edit_back(qtbot, make_window, tmp_path):
    """Start the program in a child, edit, wait for the recovery copy, SIGKILL it; restart and restore."""
    home = tmp_path / "home"
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen", HOME=str(home), XDG_DATA_HOME=str(home / "data"),
               XDG_CONFIG_HOME=str(home / "config"), XDG_CACHE_HOME=str(home / "cache"),
               XDG_RUNTIME_DIR=str(tmp_path / "run"), LOOPWRIGHT_AUTOSAVE_IDLE_SECONDS="0.1")
    env.pop("LOOPWRIGHT_RECOVERY_DIR", None)  # the default folder, under the temporary data home
    os.makedirs(tmp_path / "run", mode=0o700)
    own = tmp_path / "trailer.lwsk"
    save_sketch(trailer_lights(), own)
    script = textwrap.dedent(f"""
        import os, signal, sys
        from PySide6.QtCore import QTimer
        from PySide6.QtWidgets import QApplication
        from app.sketch.fileio import dumps_sketch
        from app.ui import main_window
        app = QApplication(sys.argv[:1])

        def edit():
            (win,) = [w for w in app.topLevelWidgets() if isinstance(w, main_window.MainWindow)]
            win.editor.set_values("H1", {{"rated_power": 5.0}})
            name = win.editor.place("resistor", 4, 4)
            win.editor.add_wire((8, 4), (8, 0))
            win.editor.move([name], [], 0, 2)
            win.stack.undo()
            print(dumps_sketch(win.sketch), end="", flush=True)
            wait()

        def wait():
            found = [os.path.join(d, n) for d, _, names in os.walk(os.environ["XDG_DATA_HOME"])
                     for n in names if n.endswith(".lwrecover")]
            if found:
                os.kill(os.getpid(), signal.SIGKILL)
            QTimer.singleShot(20, wait)

        QTimer.singleShot(0, edit)
        main_window.run({str(own)!r})
    """)
    run = subprocess.run([sys.executable, "-c", script], cwd=ROOT, env=env, capture_output=True, text=True,
                         timeout=120)
    assert run.returncode == -signal.SIGKILL, run.stderr
    edited = run.stdout
    (folder,) = {Path(d) for d, _, names in os.walk(home / "data") for n in names if n.endswith(COPY_SUFFIX)}
    assert folder.name == "recovery"
    assert load_sketch(own) == trailer_lights()  # the person's file is as it was saved
    store = RecoveryStore(folder)
    seen: list = []
    answer_dialog(qtbot, lambda name, file: RESTORE, seen=seen)
    try:
        (win,) = start(make_window, store=store)
        assert seen == [("trailer.lwsk", str(own))]
        assert dumps_sketch(win.sketch) == edited
        assert win.sketch != trailer_lights() and win.modified and win.path == own
    finally:
        store.close()


def test_an_unusable_recovery_folder_turns_recovery_off_and_says_so(qtbot, make_window, tmp_path, monkeypatch):
    blocker = tmp_path / "a file"
    blocker.write_text("not a folder")
    monkeypatch.setenv("LOOPWRIGHT_RECOVERY_DIR", str(blocker / "recovery"))
    (win,) = start(make_window)
    assert autosaver_of(win) is None
    assert win.hint_text.text() == (f"Crash recovery is off: the folder {blocker / 'recovery'} cannot be used "
                                    "(part of the path is not a folder).")
    win.editor.place("resistor", 0, 0)  # the window works on without copies
    assert win.modified
