"""Writing a file so that a crash, a kill or a full disk never leaves it half written.

The bytes go to a temporary file in the target's own folder, are flushed and
fsynced, and only then take the target's name in one ``os.replace`` (an atomic
rename on POSIX and on NTFS); the folder is then fsynced where the system
allows, so the rename itself survives a power cut.  At every moment the target
is the complete old file or the complete new one.  The previous version can be
kept beside the target as ``<name>.bak`` (see :func:`backup_path`), made by the
same temporary-file-and-rename step before the target is replaced.  Every
failure is a :class:`SaveError` in plain words, with the old file untouched.
"""
from __future__ import annotations

import contextlib
import errno
import os
import shutil
import stat
import tempfile

__all__ = ["SaveError", "write_atomically", "backup_path", "BACKUP_SUFFIX"]

BACKUP_SUFFIX = ".bak"

_REASONS = {
    errno.ENOSPC: "the disk is full",
    errno.EDQUOT: "the disk quota is used up",
    errno.EROFS: "the disk or folder is read-only",
    errno.EACCES: "there is no permission to write in that folder",
    errno.EPERM: "there is no permission to write in that folder",
    errno.ENOENT: "the folder does not exist (any more)",
    errno.ENOTDIR: "part of the path is not a folder",
    errno.EISDIR: "the name is taken by a folder",
    errno.ENAMETOOLONG: "the file name is too long",
    errno.EIO: "the disk reported an input/output error",
}


class SaveError(OSError):
    """A file that could not be written; ``str()`` is one plain sentence for the person.

    ``path`` is the file that was being saved; ``errno`` and ``strerror``
    come from the system error underneath, ``reason`` is it in plain words.
    """

    def __init__(self, path: str, cause: OSError) -> None:
        super().__init__(cause.errno, cause.strerror)
        self.path = path
        self.reason = _REASONS.get(cause.errno) or cause.strerror or str(cause) or "unknown error"
        self.message = (f"Could not save {os.path.basename(path) or path}: {self.reason}. "
                        "The file on disk was left as it was.")

    def __str__(self) -> str:
        return self.message


def backup_path(path: str | os.PathLike[str]) -> str:
    """Where the previous version of ``path`` is kept: the same name with ``.bak`` added."""
    return os.fspath(path) + BACKUP_SUFFIX


def _sync_folder(folder: str) -> None:
    """Make a rename durable where the system allows syncing a folder (POSIX)."""
    with contextlib.suppress(OSError, AttributeError):
        fd = os.open(folder, os.O_RDONLY)
        try:
            os.fsync(fd)
        finally:
            os.close(fd)


def _temporary(folder: str, base: str) -> tuple[int, str]:
    return tempfile.mkstemp(prefix=f".{base}.", suffix=".tmp", dir=folder)


def _keep_backup(target: str, folder: str) -> None:
    """Give the current ``target`` the backup name too, without touching ``target`` itself.

    A hard link costs nothing and is exact; where links are refused (FAT,
    some network shares) the bytes are copied and fsynced instead.  Either way
    the backup appears by one rename, so a damaged backup is never left.
    """
    backup = backup_path(target)
    fd, tmp = _temporary(folder, os.path.basename(backup))
    os.close(fd)
    try:
        try:
            os.unlink(tmp)
            os.link(target, tmp, follow_symlinks=True)
        except OSError:
            with open(target, "rb") as src, open(tmp, "wb") as dst:
                shutil.copyfileobj(src, dst)
                dst.flush()
                os.fsync(dst.fileno())
            shutil.copymode(target, tmp)
        os.replace(tmp, backup)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise


def write_atomically(path: str | os.PathLike[str], data: bytes, *, backup: bool = False) -> str:
    """Write ``data`` to ``path`` so a reader sees the old file or the whole new one; returns the path written.

    A symbolic link is followed (the file it points to is replaced, the link
    stays).  An existing file keeps its permission bits; a new one gets
    0o644.  With ``backup``, an existing file is first kept as
    :func:`backup_path`.  Raises :class:`SaveError` (an ``OSError``) for any
    failure, with the old file and its backup as they were.
    """
    target = os.path.realpath(os.fspath(path))
    folder = os.path.dirname(target)
    tmp = ""
    try:
        try:
            mode = stat.S_IMODE(os.stat(target).st_mode)
            exists = True
        except FileNotFoundError:
            mode, exists = 0o644, False
        fd, tmp = _temporary(folder, os.path.basename(target))
        with os.fdopen(fd, "wb") as f:
            f.write(data)
            f.flush()
            os.fsync(f.fileno())
        os.chmod(tmp, mode)
        if backup and exists:
            _keep_backup(target, folder)
        os.replace(tmp, target)
        tmp = ""
    except OSError as e:
        raise SaveError(target, e) from e
    finally:
        if tmp:
            with contextlib.suppress(OSError):
                os.unlink(tmp)
    _sync_folder(folder)
    return target
