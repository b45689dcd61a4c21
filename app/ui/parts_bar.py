"""The parts palette: a vertical tool bar that keeps every tool in sight.

With the names under the icons a short window (a laptop's 600-700 px) has no room for
all the tools, and Qt hides the last behind the bar's extension button; there the names
go beside the icons instead, which takes about half the height. Every button is as wide as
the widest, so that beside the names the icons stand in one column.
"""
from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtGui import QResizeEvent
from PySide6.QtWidgets import QToolBar, QToolButton, QWidget

__all__ = ["PartsBar"]

UNDER = Qt.ToolButtonStyle.ToolButtonTextUnderIcon
BESIDE = Qt.ToolButtonStyle.ToolButtonTextBesideIcon


class PartsBar(QToolBar):
    """A vertical, fixed tool bar whose buttons show their names under the icons when the
    bar is tall enough for all of them, and beside the icons when it is not."""

    NARROWEST = 86  # px: a button with its name under the icon is no narrower

    def __init__(self, title: str, parent: QWidget | None = None) -> None:
        super().__init__(title, parent)
        self.setOrientation(Qt.Orientation.Vertical)
        self.setMovable(False)
        self.setToolButtonStyle(UNDER)
        self._under_height = 0  # the height all tools take with the names under the icons

    def resizeEvent(self, event: QResizeEvent) -> None:  # noqa: N802 (Qt's name)
        super().resizeEvent(event)
        self.fit()

    def fit(self) -> None:
        """Choose the button style for the bar's present height."""
        if self.toolButtonStyle() == UNDER:
            self._under_height = self.sizeHint().height()
        want = UNDER if self._under_height <= self.height() else BESIDE
        if want != self.toolButtonStyle():
            self.setToolButtonStyle(want)
            self.even_widths()

    def even_widths(self) -> None:
        """Make every tool button as wide as the widest for the present style (the bar's
        layout centres a button narrower than the bar, which leaves the icons out of line)."""
        buttons = [b for b in (self.widgetForAction(a) for a in self.actions()) if isinstance(b, QToolButton)]
        widest = max([self.NARROWEST] + [b.sizeHint().width() for b in buttons])
        for b in buttons:
            b.setMinimumWidth(widest)
