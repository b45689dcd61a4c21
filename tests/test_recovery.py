"""Recovery copies: written beside nothing of the person's, offered after a crash, gone after a clean close."""
import json
import os
import shutil
import signal
import subprocess
import sys
import textwrap
from datetime import datetime, timezone

import pytest

from app.sketch.fileio import dumps_sketch, save_sketch
from app.sketch.model import PlacedPart, Sketch, Wire
from app.sketch.recovery import (
    COPY_SUFFIX,
    UNTITLED,
    DamagedCopy,
    RecoveryStore,
)

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def boat_sketch(ohms: float = 2.2) -> Sketch:
    """An invented dinghy circuit: a 12 V cell, a bilge pump stand-in and a switch."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 12.6, "internal_resistance": 0.02}))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, values={"resistance": ohms}, label="bilge pump"))
    s.add_part(PlacedPart("switch", "S1", 8, 0, 90, flags={"closed": False}))
    s.add_wire(Wire(0, 4, 8, 4))
    return s


def crash_a_session(folder, documents):
    """Run a session in a child process that autosaves ``documents`` then is killed (SIGKILL)."""
    script = textwrap.dedent(f"""
        import os, signal, sys
        from app.sketch.fileio import loads_sketch
        from app.sketch.recovery import RecoveryStore
        store = RecoveryStore({str(folder)!r})
        for doc, original, text in {documents!r}:
            store.autosave(loads_sketch(text), original, doc)
        print(store.session, flush=True)
        os.kill(os.getpid(), signal.SIGKILL)
    """)
    docs = [(d, o, dumps_sketch(s)) for d, o, s in documents]
    script = script.replace(repr(documents), repr(docs))
    run = subprocess.run([sys.executable, "-c", script], cwd=ROOT, capture_output=True, text=True)
    assert run.returncode == -signal.SIGKILL, run.stderr
    return run.stdout.strip()


def test_copies_of_a_killed_session_are_offered_and_restore_exactly(tmp_path):
    folder = tmp_path / "recovery"
    own = tmp_path / "dinghy.lwsk"
    session = crash_a_session(folder, [("main", str(own), boat_sketch(2.2)),
                                       ("second", None, boat_sketch(4.7))])
    store = RecoveryStore(folder)
    found = store.recoverable()
    assert found.damaged == []
    assert sorted((c.name, c.original_path, c.session) for c in found.copies) == sorted(
        [("dinghy.lwsk", str(own), session), (UNTITLED, None, session)])
    assert [c.saved_at for c in found.copies] == sorted((c.saved_at for c in found.copies), reverse=True)
    assert all(abs((datetime.now(timezone.utc) - c.saved_at).total_seconds()) < 3600 for c in found.copies)
    by_name = {c.name: c for c in found.copies}
    sketch, original = store.restore(by_name["dinghy.lwsk"])
    assert sketch == boat_sketch(2.2) and original == str(own)
    assert store.restore(by_name[UNTITLED]) == (boat_sketch(4.7), None)
    assert not own.exists()  # the person's own file was never written


def test_a_running_sessions_copies_are_not_offered(tmp_path):
    first = RecoveryStore(tmp_path)
    first.autosave(boat_sketch(), None)
    second = RecoveryStore(tmp_path)
    assert second.recoverable().copies == []
    assert first.recoverable().copies == []  # nor its own
    first.close()
    second.close()


def test_a_normal_close_leaves_nothing(tmp_path):
    with RecoveryStore(tmp_path) as store:
        store.autosave(boat_sketch(), tmp_path / "a.lwsk", "one")
        store.autosave(boat_sketch(), None, "two")
        assert len([n for n in os.listdir(tmp_path) if n.endswith(COPY_SUFFIX)]) == 2
    assert os.listdir(tmp_path) == []
    with pytest.raises(ValueError, match="closed"):
        store.autosave(boat_sketch(), None)


def test_forget_removes_one_documents_copy(tmp_path):
    store = RecoveryStore(tmp_path)
    store.autosave(boat_sketch(), None, "one")
    kept = store.autosave(boat_sketch(), None, "two")
    store.forget("one")
    store.forget("never-written")
    copies = [n for n in os.listdir(tmp_path) if n.endswith(COPY_SUFFIX)]
    assert copies == [os.path.basename(kept.path)]
    store.close()


def test_autosave_overwrites_the_same_documents_copy(tmp_path):
    folder = tmp_path / "r"
    store = RecoveryStore(folder)
    store.autosave(boat_sketch(1.0), None)
    copy = store.autosave(boat_sketch(3.3), None, title="pump test")
    assert copy.name == "pump test"
    assert len([n for n in os.listdir(folder) if n.endswith(COPY_SUFFIX)]) == 1
    assert store.restore(copy) == (boat_sketch(3.3), None)
    store.close()


def test_adopt_moves_the_copy_into_the_new_session(tmp_path):
    crash_a_session(tmp_path, [("main", "/somewhere/pump.lwsk", boat_sketch(5.6))])
    store = RecoveryStore(tmp_path)
    (copy,) = store.recoverable().copies
    sketch, original = store.adopt(copy, "restored")
    assert sketch == boat_sketch(5.6) and original == "/somewhere/pump.lwsk"
    assert not os.path.exists(copy.path)
    assert store.recoverable().copies == []
    names = os.listdir(tmp_path)
    assert f"{store.session}.restored{COPY_SUFFIX}" in names
    assert all(n.startswith(store.session) for n in names)  # the ended session's lock was tidied away
    store.close()
    assert os.listdir(tmp_path) == []


def test_discard_removes_a_copy_and_the_ended_sessions_lock(tmp_path):
    session = crash_a_session(tmp_path, [("main", None, boat_sketch())])
    half_written = tmp_path / f".{session}.main{COPY_SUFFIX}.k3x9_q.tmp"  # an autosave killed mid-way
    half_written.write_text('{"format": "loopwr')
    store = RecoveryStore(tmp_path)
    (copy,) = store.recoverable().copies
    assert not half_written.exists()
    assert len(os.listdir(tmp_path)) == 3  # the copy, the ended session's lock, ours
    store.discard(copy)
    assert store.recoverable().copies == []
    assert os.listdir(tmp_path) == [store.session + ".session"]
    store.close()


@pytest.fixture(scope="module")
def killed_folder(tmp_path_factory):
    """A recovery folder left by one killed session: a copy to damage, and a healthy one beside it."""
    folder = tmp_path_factory.mktemp("killed")
    session = crash_a_session(folder, [("main", None, boat_sketch()), ("good", None, boat_sketch(9.1))])
    return folder, session


def _envelope(tmp_path, killed_folder):
    """A fresh copy of ``killed_folder`` in ``tmp_path``: the envelope to damage and where it lies."""
    folder, session = killed_folder
    for name in os.listdir(folder):
        shutil.copy2(folder / name, tmp_path / name)
    path = tmp_path / f"{session}.main{COPY_SUFFIX}"
    return json.loads(path.read_text()), path


DAMAGE = [
    (lambda doc, text: text[: len(text) // 2], "not readable JSON"),
    (lambda doc, text: "\udcff", "not readable JSON"),
    (lambda doc, text: json.dumps([doc]), "not a Loopwright recovery copy"),
    (lambda doc, text: json.dumps(dict(doc, format="other")), "not a Loopwright recovery copy"),
    (lambda doc, text: json.dumps(dict(doc, version=99)), "another Loopwright"),
    (lambda doc, text: json.dumps(dict(doc, saved_at=5)), "the field saved_at"),
    (lambda doc, text: json.dumps(dict(doc, saved_at="yesterday")), "time it was written"),
    (lambda doc, text: json.dumps(dict(doc, original_path=["a"])), "the field original_path"),
    (lambda doc, text: json.dumps({k: v for k, v in doc.items() if k != "sketch"}), "the field sketch"),
    (lambda doc, text: json.dumps(dict(doc, sketch=doc["sketch"][:-40])), "the sketch inside is damaged"),
    (lambda doc, text: json.dumps(dict(doc, sketch=doc["sketch"].replace('"emf": 12.6', '"emf": -1'))),
     "parts[0].values.emf"),
    (lambda doc, text: "[" * 100000, "not readable JSON"),
]


@pytest.mark.parametrize("damage, reason", DAMAGE)
def test_a_damaged_copy_is_skipped_with_a_reason(tmp_path, killed_folder, damage, reason):
    doc, path = _envelope(tmp_path, killed_folder)
    path.write_text(damage(doc, path.read_text()), errors="surrogateescape")
    store = RecoveryStore(tmp_path)
    found = store.recoverable()
    assert [store.restore(c)[0] for c in found.copies] == [boat_sketch(9.1)]
    (bad,) = found.damaged
    assert bad.path == str(path) and reason in bad.reason and "\n" not in bad.reason
    store.discard(bad)
    assert not path.exists()
    store.close()


def test_a_stray_file_with_the_suffix_is_reported_not_opened(tmp_path):
    (tmp_path / "strange name.lwrecover").write_text("{}")
    store = RecoveryStore(tmp_path)
    (bad,) = store.recoverable().damaged
    assert "file name" in bad.reason
    store.close()


def test_nothing_outside_the_folder_is_touched(tmp_path):
    outside = tmp_path / "keep.lwrecover"
    outside.write_text("mine")
    store = RecoveryStore(tmp_path / "store")
    with pytest.raises(ValueError, match="not a recovery copy"):
        store.discard(DamagedCopy(str(outside), "planted"))
    assert outside.read_text() == "mine"
    store.close()


def test_a_copy_is_never_written_over_the_persons_file(tmp_path):
    store = RecoveryStore(tmp_path)
    own = tmp_path / f"{store.session}.main{COPY_SUFFIX}"
    save_sketch(boat_sketch(), own)
    before = own.read_bytes()
    with pytest.raises(ValueError, match="never written over"):
        store.autosave(boat_sketch(1.0), own)
    assert own.read_bytes() == before
    store.close()


def test_bad_document_and_session_ids_are_refused(tmp_path):
    with pytest.raises(ValueError, match="session id"):
        RecoveryStore(tmp_path, session="../x")
    store = RecoveryStore(tmp_path)
    with pytest.raises(ValueError, match="document id"):
        store.autosave(boat_sketch(), None, "../../escape")
    store.close()


def test_a_folder_that_cannot_be_made_is_a_plain_save_error(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("")
    with pytest.raises(OSError) as info:
        RecoveryStore(blocker / "recovery")
    assert "Could not save" in str(info.value) and "\n" not in str(info.value)
