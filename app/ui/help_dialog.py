"""The Help menu: every key and mouse action in one list, and what the program is.

The list of keys is read from the window's own menus each time it is shown,
so it can never disagree with the shortcuts the window really has; the keys
the canvas handles itself (arrows, Tab, Enter, Esc) and the mouse follow.
"""
from __future__ import annotations

import html
from importlib.metadata import PackageNotFoundError, version

from PySide6.QtGui import QKeySequence
from PySide6.QtWidgets import QDialog, QDialogButtonBox, QMainWindow, QMessageBox, QTextBrowser, QVBoxLayout, QWidget

from ..assess import DISCLAIMER

__all__ = ["CANVAS_KEYS", "key_rows", "KeysDialog", "show_about"]

# what the canvas does with keys and the mouse itself (view.CanvasView), beside the menus' shortcuts
CANVAS_KEYS = [
    ("Arrows", "nudge the selection one grid step; while drawing, move the cursor"),
    ("Shift+Arrows", "the same, four grid steps"),
    ("Alt+Arrows, Alt+drag", "move the selection off what it touches (a plain move keeps every "
                             "connection, adding a wire where parts touched directly)"),
    ("Enter", "place the part or a wire corner at the cursor; with one part selected, edit its value"),
    ("Esc", "end the wire being drawn, or put the tool down"),
    ("Tab, Shift+Tab", "select the next or the previous part"),
    ("Click, drag", "select a part or wire, move the selection; drag on empty paper to select a box"),
    ("Ctrl+Click, Shift+Click", "add a part to the selection or take it out"),
    ("Double-click", "edit a part's value in place"),
    ("Right click", "while drawing: end the wire or put the tool down"),
    ("Ctrl+Wheel", "zoom in or out"),
    ("Middle-button drag", "pan the drawing"),
    ("Drop a .lwsk file", "open it (asking first about unsaved work)"),
]


def key_rows(win: QMainWindow) -> list[tuple[str, list[tuple[str, str]]]]:
    """(menu title, [(keys, action text)]) for every menu action with a shortcut, in menu order,
    then the canvas's own keys and mouse actions."""
    out = []
    for top in win.menuBar().actions():
        menu = top.menu()
        if menu is None:
            continue
        rows = []
        for a in menu.actions():
            text = a.text().replace("&", "")
            # a keyboard's own New, Copy... keys are left out: they name themselves
            keys = ", ".join(s for s in (k.toString(QKeySequence.SequenceFormat.NativeText) for k in a.shortcuts())
                             if "+" in s or s.lower() != text.rstrip("…").lower())
            if keys and not a.isSeparator():
                rows.append((keys, text))
        if rows:
            out.append((top.text().replace("&", ""), rows))
    out.append(("On the canvas", list(CANVAS_KEYS)))
    return out


class KeysDialog(QDialog):
    """Keys and mouse: a table per menu, the canvas's own keys last."""

    def __init__(self, win: QMainWindow) -> None:
        super().__init__(win)
        self.setWindowTitle("Keys and Mouse")
        self.resize(560, 620)
        self.text = QTextBrowser()
        parts = []
        for title, rows in key_rows(win):
            cells = "".join(f"<tr><td style='padding-right:18px'><b>{html.escape(k)}</b></td>"
                            f"<td>{html.escape(t)}</td></tr>" for k, t in rows)
            parts.append(f"<h3>{html.escape(title)}</h3><table>{cells}</table>")
        self.text.setHtml("".join(parts))
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        buttons.rejected.connect(self.reject)
        lay = QVBoxLayout(self)
        lay.addWidget(self.text)
        lay.addWidget(buttons)


def _version() -> str:
    try:
        return version("loopwright")
    except PackageNotFoundError:  # run from a source tree that was not installed
        return "(not installed)"


def show_about(parent: QWidget) -> None:
    """What the program is, its version, and the caution that goes with its results."""
    QMessageBox.about(
        parent, "About Loopwright",
        f"<p><b>Loopwright</b> {html.escape(_version())}</p>"
        "<p>Sketch a DC circuit on the grid; it is solved by mesh currents while you draw, and every "
        "current, drop, potential and power is written on the drawing.</p>"
        f"<p><i>{html.escape(DISCLAIMER)}</i></p>")
