"""A line of text in the status bar that changes without a relayout of the window.

A QLabel asks its parent layout to lay out again whenever its text changes,
and in a status bar that reaches the main window: a layout pass of every
dock after each solve (the summary changes) and after each pointer move (the
grid position). This widget keeps one size, paints its text (elided, the whole
text in the tooltip) and repaints only itself.
"""
from __future__ import annotations

from PySide6.QtCore import QSize, Qt
from PySide6.QtGui import QContextMenuEvent, QGuiApplication, QPainter, QPaintEvent
from PySide6.QtWidgets import QMenu, QSizePolicy, QWidget

__all__ = ["StatusLine"]


class StatusLine(QWidget):
    """Text in the status bar: ``setText`` repaints, never resizes.

    ``room`` is a sample of the widest text expected: the widget asks for its
    width (an empty ``room`` asks for none and takes the space it is given).
    ``fit`` makes it ask for its own text's width, at most half its window's, so a short
    line beside it leaves it room: for a text that changes seldom (a hint, not a summary
    after each solve), as each new width lays the status bar out again.
    """

    def __init__(self, room: str = "", parent: QWidget | None = None, fit: bool = False) -> None:
        super().__init__(parent)
        self._text = ""
        self._room = room
        self._fit = fit
        horizontal = (QSizePolicy.Policy.Maximum if fit else
                      QSizePolicy.Policy.Fixed if room else QSizePolicy.Policy.Ignored)
        self.setSizePolicy(horizontal, QSizePolicy.Policy.Preferred)

    def text(self) -> str:
        return self._text

    def setText(self, text: str) -> None:  # noqa: N802 (QLabel's name, so it reads the same)
        if text != self._text:
            self._text = text
            if self._fit:
                self.updateGeometry()
            self.setToolTip(text if self.fontMetrics().horizontalAdvance(text) > self.width() else "")
            self.update()

    def clear(self) -> None:
        self.setText("")

    def sizeHint(self) -> QSize:  # noqa: N802 (Qt's name)
        fm = self.fontMetrics()
        if self._fit:
            return QSize(min(fm.horizontalAdvance(self._text) + 8, self.window().width() // 2), fm.height() + 4)
        return QSize(fm.horizontalAdvance(self._room) + 8 if self._room else 40, fm.height() + 4)

    def minimumSizeHint(self) -> QSize:  # noqa: N802 (Qt's name)
        return QSize(self.sizeHint().width() if self._room else 0, self.fontMetrics().height() + 4)

    def resizeEvent(self, event) -> None:  # noqa: N802 (Qt's name)
        self.setToolTip(self._text if self.fontMetrics().horizontalAdvance(self._text) > self.width() else "")
        super().resizeEvent(event)

    def paintEvent(self, event: QPaintEvent) -> None:  # noqa: N802 (Qt's name)
        if not self._text:
            return
        p = QPainter(self)
        p.setPen(self.palette().color(self.foregroundRole()))
        r = self.rect().adjusted(2, 0, -2, 0)
        text = self.fontMetrics().elidedText(self._text, Qt.TextElideMode.ElideRight, r.width())
        p.drawText(r, int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter), text)

    def contextMenuEvent(self, event: QContextMenuEvent) -> None:  # noqa: N802 (Qt's name)
        if not self._text:
            return
        menu = QMenu(self)
        menu.addAction("Copy", lambda: QGuiApplication.clipboard().setText(self._text))
        menu.exec(event.globalPos())
