"""Saving keeps the old file whole on any failure, keeps the previous version as a backup, and says why in plain words."""
import errno
import os
import stat

import pytest

from app.sketch import atomic
from app.sketch.atomic import SaveError, backup_path, write_atomically
from app.sketch.fileio import dumps_sketch, load_sketch, save_sketch
from app.sketch.model import PlacedPart, Sketch


def trailer_sketch(ohms: float) -> Sketch:
    """An invented trailer light circuit: a 12 V cell and one lamp stand-in."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 12.0}))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, values={"resistance": ohms}, label="tail lamp"))
    return s


def test_previous_version_is_kept_beside_the_file(tmp_path):
    path = tmp_path / "trailer.lwsk"
    save_sketch(trailer_sketch(10.0), path)
    assert not os.path.exists(backup_path(path))  # nothing to keep on a first save
    save_sketch(trailer_sketch(20.0), path)
    save_sketch(trailer_sketch(30.0), path)
    assert backup_path(path) == str(path) + ".bak"
    assert load_sketch(backup_path(path)) == trailer_sketch(20.0)
    assert load_sketch(path) == trailer_sketch(30.0)
    assert sorted(os.listdir(tmp_path)) == ["trailer.lwsk", "trailer.lwsk.bak"]


def test_no_backup_when_asked_not_to(tmp_path):
    path = tmp_path / "trailer.lwsk"
    save_sketch(trailer_sketch(10.0), path, backup=False)
    save_sketch(trailer_sketch(20.0), path, backup=False)
    assert os.listdir(tmp_path) == ["trailer.lwsk"]


def test_backup_is_copied_where_hard_links_are_refused(tmp_path, monkeypatch):
    path = tmp_path / "trailer.lwsk"
    save_sketch(trailer_sketch(10.0), path)

    def no_links(*args, **kwargs):
        raise OSError(errno.EPERM, "links not supported on this disk")

    monkeypatch.setattr(atomic.os, "link", no_links)
    save_sketch(trailer_sketch(20.0), path)
    assert load_sketch(backup_path(path)) == trailer_sketch(10.0)
    assert load_sketch(path) == trailer_sketch(20.0)
    assert sorted(os.listdir(tmp_path)) == ["trailer.lwsk", "trailer.lwsk.bak"]


def _fail_at(monkeypatch, module_attr, code, *, after=0):
    """Make ``module.attr`` raise OSError(code) from its (after+1)-th call on."""
    owner, name = module_attr
    real = getattr(owner, name)
    calls = {"n": 0}

    def failing(*args, **kwargs):
        calls["n"] += 1
        if calls["n"] > after:
            raise OSError(code, os.strerror(code))
        return real(*args, **kwargs)

    monkeypatch.setattr(owner, name, failing)


FAILURES = [
    # (what fails, errno, plain words expected in the message)
    ((atomic.tempfile, "mkstemp"), errno.EROFS, "read-only"),
    ((atomic.tempfile, "mkstemp"), errno.EACCES, "no permission"),
    ((atomic.os, "fsync"), errno.ENOSPC, "the disk is full"),
    ((atomic.os, "fsync"), errno.EDQUOT, "quota"),
    ((atomic.os, "fsync"), errno.EIO, "input/output error"),
    ((atomic.os, "chmod"), errno.EPERM, "no permission"),
    ((atomic.os, "replace"), errno.ENOSPC, "the disk is full"),
]


@pytest.mark.parametrize("where, code, words", FAILURES)
def test_a_failed_save_leaves_the_old_file_and_backup_alone(tmp_path, monkeypatch, where, code, words):
    path = tmp_path / "trailer.lwsk"
    save_sketch(trailer_sketch(10.0), path)
    save_sketch(trailer_sketch(20.0), path)
    before = {n: (tmp_path / n).read_bytes() for n in os.listdir(tmp_path)}
    _fail_at(monkeypatch, where, code)
    with pytest.raises(SaveError) as info:
        save_sketch(trailer_sketch(30.0), path)
    monkeypatch.undo()
    err = info.value
    assert isinstance(err, OSError) and err.errno == code
    assert words in str(err) and "trailer.lwsk" in str(err) and "\n" not in str(err)
    assert str(err).endswith("The file on disk was left as it was.")
    after = {n: (tmp_path / n).read_bytes() for n in os.listdir(tmp_path)}
    assert after == before  # no temporary file left, nothing changed


def test_failure_after_the_backup_still_leaves_the_old_file(tmp_path, monkeypatch):
    path = tmp_path / "trailer.lwsk"
    save_sketch(trailer_sketch(10.0), path)
    old = path.read_bytes()
    _fail_at(monkeypatch, (atomic.os, "replace"), errno.ENOSPC, after=1)  # the backup's rename works
    with pytest.raises(SaveError, match="disk is full"):
        save_sketch(trailer_sketch(30.0), path)
    monkeypatch.undo()
    assert path.read_bytes() == old
    assert sorted(os.listdir(tmp_path)) == ["trailer.lwsk", "trailer.lwsk.bak"]
    assert (tmp_path / "trailer.lwsk.bak").read_bytes() == old


def test_a_folder_that_is_gone(tmp_path):
    with pytest.raises(SaveError) as info:
        save_sketch(trailer_sketch(10.0), tmp_path / "removed" / "trailer.lwsk")
    assert "the folder does not exist" in str(info.value)
    assert info.value.errno == errno.ENOENT


def test_a_name_taken_by_a_folder(tmp_path):
    (tmp_path / "trailer.lwsk").mkdir()
    with pytest.raises(SaveError) as info:
        save_sketch(trailer_sketch(10.0), tmp_path / "trailer.lwsk")
    assert "folder" in str(info.value)
    assert os.listdir(tmp_path) == ["trailer.lwsk"]


@pytest.mark.skipif(os.name != "posix" or os.geteuid() == 0, reason="root may write anywhere")
def test_a_read_only_folder(tmp_path):
    folder = tmp_path / "locked"
    folder.mkdir()
    path = folder / "trailer.lwsk"
    save_sketch(trailer_sketch(10.0), path)
    old = path.read_bytes()
    folder.chmod(0o555)
    try:
        with pytest.raises(SaveError, match="permission"):
            save_sketch(trailer_sketch(20.0), path)
    finally:
        folder.chmod(0o755)
    assert path.read_bytes() == old and os.listdir(folder) == ["trailer.lwsk"]


@pytest.mark.skipif(not hasattr(os, "symlink"), reason="needs symbolic links")
def test_a_link_is_followed_not_replaced(tmp_path):
    real = tmp_path / "real.lwsk"
    link = tmp_path / "link.lwsk"
    save_sketch(trailer_sketch(10.0), real)
    link.symlink_to(real)
    save_sketch(trailer_sketch(20.0), link)
    assert link.is_symlink()
    assert load_sketch(real) == trailer_sketch(20.0)
    assert load_sketch(str(real) + ".bak") == trailer_sketch(10.0)


@pytest.mark.skipif(os.name != "posix", reason="folders can be fsynced on POSIX only")
def test_the_file_and_its_folder_are_synced(tmp_path, monkeypatch):
    synced = []
    real = os.fsync

    def recording(fd):
        synced.append(stat.S_ISDIR(os.fstat(fd).st_mode))
        real(fd)

    monkeypatch.setattr(atomic.os, "fsync", recording)
    write_atomically(tmp_path / "a.lwsk", b"first")
    assert synced == [False, True]  # the data, then the folder after the rename


def test_written_bytes_are_exact(tmp_path):
    path = tmp_path / "trailer.lwsk"
    assert write_atomically(path, b"x") == str(path)
    text = dumps_sketch(trailer_sketch(10.0)).encode()
    write_atomically(path, text, backup=True)
    assert path.read_bytes() == text and (tmp_path / "trailer.lwsk.bak").read_bytes() == b"x"
