"""The window's side panels: docks whose contents may scroll when the column is short."""
from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QAbstractScrollArea, QDockWidget, QFrame, QMainWindow, QScrollArea, QWidget

__all__ = ["add_dock"]


def add_dock(win: QMainWindow, title: str, name: str, content: QWidget, scroll: bool = True) -> QDockWidget:
    """Put ``content`` in a dock titled ``title`` (object name ``name``, which the saved window
    state goes by) on the right of ``win``; with ``scroll``, in a scroll area of its height.

    The docks share one column, and their contents' minimum heights added up to more than a
    laptop screen: the window grew taller when a part was selected (its panel shows more
    rows), which moved the canvas under the pointer. Panels that can wait for a scroll (the
    check, the equations, the cautions) take one; the part's values stay whole. A scroll
    area keeps its content's width, so nothing is cut off at the side.
    """
    dock = QDockWidget(title, win)
    dock.setObjectName(name)
    if scroll and not isinstance(content, QAbstractScrollArea):
        area = QScrollArea()
        area.setWidgetResizable(True)
        area.setFrameShape(QFrame.Shape.NoFrame)
        area.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        area.setMinimumWidth(content.minimumSizeHint().width() + area.verticalScrollBar().sizeHint().width())
        area.setWidget(content)
        content = area
    dock.setWidget(content)
    win.addDockWidget(Qt.DockWidgetArea.RightDockWidgetArea, dock)
    return dock
