"""Recovery copies: sketches with unsaved changes, kept where a crash cannot take them.

While a sketch has unsaved changes the window writes a recovery copy of it
every so often into a folder of its own (the per-user data folder; this
module takes it as a plain path and knows nothing of Qt).  A copy is one JSON
envelope holding the sketch's ``.lwsk`` text with the original file's path,
the time and the session that wrote it, written atomically like any save and
never over the person's own file.

Each running program is one *session*: it holds an exclusive lock on a small
``<session>.session`` file for as long as it runs, and the system drops that
lock when the process ends, however it ends.  Copies of a session whose lock
nobody holds were left by a crash or a kill, and are offered for restoring;
copies of a running session (another window of the program) never are.  A
normal close removes the session's copies and its lock file, so a clean exit
leaves nothing behind.
"""
from __future__ import annotations

import contextlib
import json
import os
import re
import secrets
import time
from dataclasses import dataclass
from datetime import datetime, timezone
from typing import Any

from .atomic import SaveError, write_atomically
from .fileio import MAX_BYTES, SketchFileError, dumps_sketch, loads_sketch
from .model import Sketch

try:  # POSIX
    import fcntl
except ImportError:  # pragma: no cover - Windows
    fcntl = None  # type: ignore[assignment]
try:  # Windows
    import msvcrt
except ImportError:
    msvcrt = None  # type: ignore[assignment]

__all__ = ["RecoveryStore", "RecoveryCopy", "DamagedCopy", "Recoverable", "RecoveryError",
           "COPY_SUFFIX", "UNTITLED"]

COPY_SUFFIX = ".lwrecover"
LOCK_SUFFIX = ".session"
FORMAT_TAG = "loopwright-recovery"
VERSION = 1
UNTITLED = "Untitled sketch"
MAX_COPY_BYTES = 2 * MAX_BYTES + 65536   # the sketch text is escaped once inside the envelope
_ID = re.compile(r"[A-Za-z0-9_-]{1,40}")
_COPY_NAME = re.compile(rf"({_ID.pattern})\.({_ID.pattern}){re.escape(COPY_SUFFIX)}")
_TEMPORARY = re.compile(rf"\.({_ID.pattern})\.{_ID.pattern}{re.escape(COPY_SUFFIX)}\..*\.tmp")  # see atomic.py
_FIELDS = {"format": str, "version": int, "session": str, "document": str, "saved_at": str,
           "original_path": (str, type(None)), "title": str, "sketch": str}


class RecoveryError(ValueError):
    """A recovery copy that cannot be read; ``str()`` is one plain sentence."""


@dataclass(frozen=True)
class RecoveryCopy:
    """One recoverable sketch: what to show the person, and where it is kept.

    ``name`` is the title the window gave (normally the file name) or
    ``UNTITLED``; ``saved_at`` is an aware UTC time; ``original_path`` the
    file the sketch was opened from or last saved to, None for a new sketch.
    """

    name: str
    saved_at: datetime
    original_path: str | None
    session: str
    document: str
    path: str


@dataclass(frozen=True)
class DamagedCopy:
    """A file in the recovery folder that cannot be restored, and why (plain words)."""

    path: str
    reason: str


@dataclass(frozen=True)
class Recoverable:
    """What a crash left: copies to offer (newest first) and damaged ones to mention or discard."""

    copies: list[RecoveryCopy]
    damaged: list[DamagedCopy]


# -- session locks ----------------------------------------------------------------
def _try_lock(fd: int) -> bool:
    """Take an exclusive lock on ``fd`` without waiting; False if another process holds it."""
    try:
        if fcntl is not None:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        elif msvcrt is not None:  # pragma: no cover - Windows
            msvcrt.locking(fd, msvcrt.LK_NBLCK, 1)
        return True
    except OSError:
        return False


def _session_alive(lock_path: str, remove_if_ended: bool = False) -> bool:
    """True while the session owning ``lock_path`` runs (its lock is held).

    With ``remove_if_ended`` the lock file of an ended session is removed
    while its lock is held here, so a session starting under that file at
    the same moment notices (see ``RecoveryStore._lock``).
    """
    try:
        fd = os.open(lock_path, os.O_RDWR)
    except OSError:
        return False  # no lock file: the session ended
    try:
        if not _try_lock(fd):
            return True
        if remove_if_ended:
            with contextlib.suppress(FileNotFoundError):
                os.unlink(lock_path)
        return False
    finally:
        os.close(fd)  # drops a lock taken here


# -- reading a copy -----------------------------------------------------------------
def _read(path: str) -> tuple[dict[str, Any], Sketch]:
    """The envelope and sketch of the copy at ``path``; RecoveryError with the reason."""
    try:
        with open(path, "rb") as f:
            data = f.read(MAX_COPY_BYTES + 1)
    except OSError as e:
        raise RecoveryError(f"it could not be read ({e.strerror or e})") from None
    if len(data) > MAX_COPY_BYTES:
        raise RecoveryError("it is too large to be a recovery copy")
    try:
        doc = json.loads(data.decode("utf-8"))
    except (UnicodeDecodeError, ValueError, RecursionError):
        raise RecoveryError("it is damaged (not readable JSON text)") from None
    if not isinstance(doc, dict) or doc.get("format") != FORMAT_TAG:
        raise RecoveryError("it is not a Loopwright recovery copy")
    if doc.get("version") != VERSION:
        raise RecoveryError(f"it was written by another Loopwright (recovery format {doc.get('version')!r})")
    for key, kind in _FIELDS.items():
        if not isinstance(doc.get(key), kind):
            raise RecoveryError(f"it is damaged (the field {key} is missing or wrong)")
    try:
        when = datetime.fromisoformat(doc["saved_at"])
    except ValueError:
        raise RecoveryError("it is damaged (the time it was written is unreadable)") from None
    doc["saved_at"] = when if when.tzinfo else when.replace(tzinfo=timezone.utc)
    try:
        sketch = loads_sketch(doc["sketch"])
    except SketchFileError as e:
        raise RecoveryError(f"the sketch inside is damaged ({e})") from None
    return doc, sketch


def _copy(doc: dict[str, Any], path: str) -> RecoveryCopy:
    return RecoveryCopy(doc["title"] or UNTITLED, doc["saved_at"], doc["original_path"],
                        doc["session"], doc["document"], path)


# -- the store -------------------------------------------------------------------------
class RecoveryStore:
    """Recovery copies of one running session, in ``folder`` (created if missing).

    ``document`` names one open sketch within the session (a window with
    several sketches gives each its own), letters, digits, ``_`` and ``-``.
    Raises SaveError if the folder cannot be made or written.
    """

    def __init__(self, folder: str | os.PathLike[str], session: str | None = None) -> None:
        self.folder = os.path.realpath(os.fspath(folder))
        self.session = session or secrets.token_hex(8)
        if not _ID.fullmatch(self.session):
            raise ValueError(f"a session id is 1 to 40 letters, digits, _ or -, not {self.session!r}")
        self._lock_fd: int | None = None
        try:
            os.makedirs(self.folder, mode=0o700, exist_ok=True)
            self._lock()
        except OSError as e:
            raise SaveError(os.path.join(self.folder, "recovery"), e) from e

    def _lock(self) -> None:
        """Create and hold this session's lock file.

        Retried for a moment when another process is looking at it, and when
        a tidy-up removed the file between opening and locking it.
        """
        path = self._lock_path(self.session)
        for _ in range(200):
            fd = os.open(path, os.O_RDWR | os.O_CREAT, 0o600)
            if not _try_lock(fd):
                os.close(fd)
                time.sleep(0.01)
                continue
            try:
                same = os.path.samestat(os.fstat(fd), os.stat(path))
            except FileNotFoundError:
                same = False
            if same:
                self._lock_fd = fd
                return
            os.close(fd)
        raise OSError(0, f"the recovery session {self.session} is already in use")

    def _lock_path(self, session: str) -> str:
        return os.path.join(self.folder, session + LOCK_SUFFIX)

    def _copy_path(self, document: str) -> str:
        if not isinstance(document, str) or not _ID.fullmatch(document):
            raise ValueError(f"a document id is 1 to 40 letters, digits, _ or -, not {document!r}")
        return os.path.join(self.folder, f"{self.session}.{document}{COPY_SUFFIX}")

    # -- while running ------------------------------------------------------------------
    def autosave(self, sketch: Sketch, original_path: str | os.PathLike[str] | None = None,
                 document: str = "main", title: str | None = None) -> RecoveryCopy:
        """Write (or overwrite) the recovery copy of ``document``; returns what it holds.

        ``title`` is what a later start shows (default: the original file's
        name, or ``UNTITLED``).  Raises SketchFileError if the sketch holds
        something no file can, SaveError if the copy cannot be written, and
        ValueError if the copy would land on the person's own file.
        """
        if self._lock_fd is None:
            raise ValueError("the recovery store is closed")
        path = self._copy_path(document)
        original = os.path.abspath(os.fspath(original_path)) if original_path is not None else None
        if original is not None and os.path.realpath(original) == os.path.realpath(path):
            raise ValueError("a recovery copy is never written over the sketch's own file")
        when = datetime.now(timezone.utc)
        name = title if title is not None else (os.path.basename(original) if original else UNTITLED)
        doc = {"format": FORMAT_TAG, "version": VERSION, "session": self.session,
               "document": document, "saved_at": when.isoformat(timespec="milliseconds"),
               "original_path": original, "title": name, "sketch": dumps_sketch(sketch)}
        write_atomically(path, json.dumps(doc, ensure_ascii=False, indent=1).encode("utf-8"))
        return RecoveryCopy(name or UNTITLED, when, original, self.session, document, path)

    def forget(self, document: str = "main") -> None:
        """Remove ``document``'s copy: it was saved, or closed with its changes thrown away."""
        with contextlib.suppress(FileNotFoundError):
            os.unlink(self._copy_path(document))

    def close(self) -> None:
        """A normal close: remove every copy of this session and its lock file."""
        for name in os.listdir(self.folder):
            m = _COPY_NAME.fullmatch(name)
            if m and m.group(1) == self.session:
                with contextlib.suppress(FileNotFoundError):
                    os.unlink(os.path.join(self.folder, name))
        if self._lock_fd is not None:
            with contextlib.suppress(FileNotFoundError):
                os.unlink(self._lock_path(self.session))
            os.close(self._lock_fd)
            self._lock_fd = None

    # -- after a crash ------------------------------------------------------------------
    def recoverable(self) -> Recoverable:
        """Copies left by sessions that ended without closing (newest first), and damaged ones.

        Copies of this session and of other running sessions are left out.
        Lock files of ended sessions with no copies left are tidied away.
        """
        copies: list[RecoveryCopy] = []
        damaged: list[DamagedCopy] = []
        alive: dict[str, bool] = {}
        for name in sorted(os.listdir(self.folder)):
            path = os.path.join(self.folder, name)
            m = _COPY_NAME.fullmatch(name)
            if m is None:
                if name.endswith(COPY_SUFFIX):
                    damaged.append(DamagedCopy(path, "its file name is not one Loopwright writes"))
                continue
            session = m.group(1)
            if session == self.session:
                continue
            if session not in alive:
                alive[session] = _session_alive(self._lock_path(session))
            if alive[session]:
                continue
            try:
                doc, _ = _read(path)
            except RecoveryError as e:
                damaged.append(DamagedCopy(path, f"{name}: {e}"))
                continue
            copies.append(_copy(doc, path))
        self._sweep()
        copies.sort(key=lambda c: c.saved_at, reverse=True)
        return Recoverable(copies, damaged)

    def restore(self, copy: RecoveryCopy) -> tuple[Sketch, str | None]:
        """The sketch held by ``copy`` and its original path; RecoveryError if it cannot be read.

        The copy stays until :meth:`discard` (or :meth:`adopt`), so a crash
        while restoring loses nothing.
        """
        doc, sketch = _read(self._own(copy.path))
        return sketch, doc["original_path"]

    def adopt(self, copy: RecoveryCopy, document: str = "main") -> tuple[Sketch, str | None]:
        """Restore ``copy`` as this session's ``document``: first copied into this session, then discarded.

        At every moment one of the two copies exists.
        """
        doc, sketch = _read(self._own(copy.path))
        self.autosave(sketch, doc["original_path"], document, doc["title"])
        self.discard(copy)
        return sketch, doc["original_path"]

    def discard(self, copy: RecoveryCopy | DamagedCopy) -> None:
        """Delete a recoverable or damaged copy for good."""
        with contextlib.suppress(FileNotFoundError):
            os.unlink(self._own(copy.path))
        self._sweep()

    def _own(self, path: str) -> str:
        """``path`` if it is a file directly in the recovery folder; nothing else is ever touched."""
        full = os.path.realpath(path)
        if os.path.dirname(full) != self.folder or not os.path.basename(full).endswith(COPY_SUFFIX):
            raise ValueError(f"{path} is not a recovery copy of this folder")
        return full

    def _sweep(self) -> None:
        """Remove lock files of ended sessions that have no copies left, and their half-written copies."""
        names = os.listdir(self.folder)
        with_copies = {m.group(1) for m in map(_COPY_NAME.fullmatch, names) if m}
        ended: dict[str, bool] = {}
        for name in names:
            m = _TEMPORARY.fullmatch(name)
            if m and m.group(1) != self.session:
                session = m.group(1)
                if session not in ended:
                    ended[session] = not _session_alive(self._lock_path(session))
                if ended[session]:
                    with contextlib.suppress(FileNotFoundError):
                        os.unlink(os.path.join(self.folder, name))
        for name in names:
            session = name[: -len(LOCK_SUFFIX)]
            if name.endswith(LOCK_SUFFIX) and session != self.session and session not in with_copies:
                _session_alive(os.path.join(self.folder, name), remove_if_ended=True)

    def __enter__(self) -> "RecoveryStore":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()
