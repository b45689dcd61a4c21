"""The desktop window: a Qt canvas that views the sketch and writes the solution back onto it.

Only this package imports Qt (PySide6).
"""
import sys as _sys


def _shield_none() -> None:
    """Work around a reference-count bug of PySide6 6.12 on Python < 3.12.

    Qt methods that return a null pointer as ``None`` (``parentItem()``,
    ``focusWidget()``, ``itemAt()``…) give back ``None`` without a new
    reference (``True``/``False`` were seen to suffer the same), so each call lowers the count; once it reaches zero the
    interpreter aborts. From Python 3.12 on ``None`` is immortal and this is
    not needed; before that we give ``None`` a large reserve of references
    (a singleton is never freed, so the reserve costs nothing).
    """
    if _sys.version_info >= (3, 12) or _sys.implementation.name != "cpython":
        return
    import ctypes
    for singleton in (None, True, False):  # bools were seen to leak the same way
        ctypes.c_ssize_t.from_address(id(singleton)).value += 1 << 40


_shield_none()
