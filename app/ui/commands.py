"""The undo step: one ``Edit`` of the sketch as a QUndoCommand.

Steps that share a ``merge_key`` (the moves of one drag) merge into one, and
a step that ends where it began is dropped from the stack.
"""
from __future__ import annotations

from collections.abc import Callable
from contextlib import AbstractContextManager, nullcontext

from PySide6.QtGui import QUndoCommand

from ..sketch.model import Sketch
from .edits import Edit, apply_edit, compose, revert_edit

__all__ = ["SketchCommand"]

_MERGE_ID = 0x4C57  # any constant shared by mergeable steps


class SketchCommand(QUndoCommand):
    """Apply an ``Edit`` on redo and revert it on undo, as one batch of model changes."""

    def __init__(self, sketch: Sketch, edit: Edit, text: str,
                 batch: Callable[[], AbstractContextManager] | None = None,
                 merge_key: object = None) -> None:
        super().__init__(text)
        self.sketch = sketch
        self.edit = edit
        self.merge_key = merge_key
        self._batch = batch or nullcontext

    def redo(self) -> None:
        with self._batch():
            apply_edit(self.sketch, self.edit)

    def undo(self) -> None:
        with self._batch():
            revert_edit(self.sketch, self.edit)

    def id(self) -> int:
        return _MERGE_ID if self.merge_key is not None else -1

    def mergeWith(self, other: QUndoCommand) -> bool:
        if not isinstance(other, SketchCommand) or other.merge_key != self.merge_key:
            return False
        self.edit = compose(self.edit, other.edit)
        if self.edit.is_empty():
            self.setObsolete(True)
        return True
