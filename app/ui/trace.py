"""Tracing a loop of one's own on the canvas.

While tracing, clicks on the canvas pick parts (a click on a part) or points
(a click on a corner or junction of the drawing) in order round the loop;
Backspace takes back the last pick, Enter finishes, Esc or a right click
gives up. The tracer sits on the canvas as an event filter, so the drawing
tools stay as they are.
"""
from __future__ import annotations

from PySide6.QtCore import QEvent, QObject, Qt, Signal
from PySide6.QtGui import QKeyEvent, QMouseEvent

from .highlight import Highlight
from .items import PartItem

__all__ = ["LoopTracer"]


class LoopTracer(QObject):
    """Collects the picks of a traced loop; ``finished(list)`` on Enter, ``progress(str)`` as it goes."""

    finished = Signal(list)
    progress = Signal(str)
    cancelled = Signal()

    def __init__(self, view, points_of, parent: QObject | None = None) -> None:
        """``points_of()`` gives the circuit's point names and positions (grid) now, or {} when unsolved."""
        super().__init__(parent)
        self.view = view
        self.points_of = points_of
        self.picks: list[str] = []
        self.active = False
        self._band: Highlight | None = None

    def start(self) -> None:
        """Begin a new loop."""
        self.picks = []
        self.active = True
        self.view.viewport().installEventFilter(self)
        self.view.installEventFilter(self)
        self.view.setFocus()
        self._show()
        self.progress.emit("Tracing a loop: click its parts or corners in order; Backspace takes back, "
                           "Enter finishes, Esc stops.")

    def stop(self) -> None:
        if not self.active:
            return
        self.active = False
        self.view.viewport().removeEventFilter(self)
        self.view.removeEventFilter(self)
        if self._band is not None and self._band.scene() is not None:
            self._band.scene().removeItem(self._band)
        self._band = None

    def pick(self, name: str) -> None:
        """Add a part or point name to the loop (as a click does)."""
        if self.picks and self.picks[-1] == name:
            return
        self.picks.append(name)
        self._show()
        self.progress.emit("Loop so far: " + " → ".join(self.picks) + "   (Enter finishes)")

    def finish(self) -> None:
        picks = list(self.picks)
        self.stop()
        self.finished.emit(picks)

    def _show(self) -> None:
        scene = self.view.scene()
        if scene is None:
            return
        if self._band is None or self._band.scene() is not scene:
            self._band = Highlight(dashed=True)
            scene.addItem(self._band)
        pos = self.points_of()
        segs, rings = [], []
        for name in self.picks:
            item = scene.part_items.get(name) if hasattr(scene, "part_items") else None
            if item is not None:
                t = item.part.terminals()
                if len(t) >= 2:
                    segs.append((t[0], t[1]))
            elif name in pos:
                rings.append(pos[name])
        self._band.show_segments(segs, "", (), rings)

    def _at(self, event: QMouseEvent) -> str | None:
        at = event.position().toPoint()
        for item in self.view.items(at):
            owner = item if isinstance(item, PartItem) else getattr(item, "owner", None)
            if isinstance(owner, PartItem) and not owner.ghost and owner.part.kind != "ground":
                return owner.part.name
        x, y = self.view.snap(self.view.mapToScene(at))
        name = f"{x},{y}"
        return name if name in self.points_of() else None

    def eventFilter(self, watched: QObject, event: QEvent) -> bool:
        if not self.active:
            return False
        kind = event.type()
        if kind == QEvent.Type.MouseButtonPress and isinstance(event, QMouseEvent):
            if event.button() == Qt.MouseButton.RightButton:
                self.stop()
                self.cancelled.emit()
                return True
            name = self._at(event)
            if name is None:
                self.progress.emit("Click a part, or a corner or junction of the drawing.")
            else:
                self.pick(name)
            return True
        if kind in (QEvent.Type.MouseButtonRelease, QEvent.Type.MouseButtonDblClick, QEvent.Type.MouseMove):
            return kind != QEvent.Type.MouseMove
        keys = (Qt.Key.Key_Return, Qt.Key.Key_Enter, Qt.Key.Key_Escape, Qt.Key.Key_Backspace)
        if kind == QEvent.Type.ShortcutOverride and isinstance(event, QKeyEvent) and event.key() in keys:
            event.accept()  # these keys belong to the tracer, not to Delete or the tools
            return True
        if kind == QEvent.Type.KeyPress and isinstance(event, QKeyEvent):
            key = event.key()
            if key in (Qt.Key.Key_Return, Qt.Key.Key_Enter):
                self.finish()
            elif key == Qt.Key.Key_Escape:
                self.stop()
                self.cancelled.emit()
            elif key == Qt.Key.Key_Backspace:
                if self.picks:
                    self.picks.pop()
                    self._show()
            else:
                return False
            return True
        return False
