"""The start-up question after a crash: restore or discard each sketch that was not saved.

``RecoveryDialog`` lists the recovery copies left by sessions that ended
without closing (name, when it was written, the file it belongs to) with a
choice for each, and mentions the copies that cannot be read, which may be
discarded.  ``ask_what_to_recover`` shows it and returns the answer.
"""
from __future__ import annotations

from dataclasses import dataclass

from PySide6.QtWidgets import (QCheckBox, QComboBox, QDialog, QDialogButtonBox, QHeaderView, QLabel,
                               QTreeWidget, QTreeWidgetItem, QVBoxLayout, QWidget)

from ..sketch.recovery import DamagedCopy, Recoverable, RecoveryCopy

__all__ = ["RecoveryDialog", "RecoveryAnswer", "ask_what_to_recover", "RESTORE", "DISCARD", "LATER"]

RESTORE, DISCARD, LATER = "restore", "discard", "later"
_CHOICES = [(RESTORE, "Restore"), (DISCARD, "Discard"), (LATER, "Ask again next time")]


@dataclass(frozen=True)
class RecoveryAnswer:
    """What the person chose: a decision per copy, and which damaged copies to delete."""

    decisions: list[tuple[RecoveryCopy, str]]
    discard_damaged: list[DamagedCopy]


def when_written(copy: RecoveryCopy) -> str:
    """The copy's time in local time, e.g. ``2025-03-14 16:05``."""
    return copy.saved_at.astimezone().strftime("%Y-%m-%d %H:%M")


class RecoveryDialog(QDialog):
    """One row per recoverable sketch with Restore / Discard / Ask again next time."""

    def __init__(self, found: Recoverable, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Recover unsaved sketches")
        self.found = found
        lay = QVBoxLayout(self)
        n = len(found.copies)
        if n:
            intro = QLabel(
                f"Loopwright ended last time before {'this sketch was' if n == 1 else f'these {n} sketches were'} "
                "saved. The changes were kept in a recovery copy. Restore opens a sketch as unsaved; "
                "save it to keep it.")
            intro.setWordWrap(True)
            lay.addWidget(intro)
        self.table = QTreeWidget()
        self.table.setRootIsDecorated(False)
        self.table.setHeaderLabels(["Sketch", "Written", "File", "What to do"])
        self.table.header().setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        self.choice_boxes: list[QComboBox] = []
        for copy in found.copies:
            row = QTreeWidgetItem([copy.name, when_written(copy), copy.original_path or "Not saved yet", ""])
            row.setToolTip(2, copy.original_path or "The sketch was never saved to a file.")
            self.table.addTopLevelItem(row)
            box = QComboBox()
            for key, text in _CHOICES:
                box.addItem(text, key)
            box.setAccessibleName(f"What to do with {copy.name}")
            self.table.setItemWidget(row, 3, box)
            self.choice_boxes.append(box)
        self.table.setVisible(n > 0)
        lay.addWidget(self.table)
        self.damaged_box: QCheckBox | None = None
        if found.damaged:
            k = len(found.damaged)
            text = QLabel(f"{k} recovery {'copy' if k == 1 else 'copies'} could not be read:\n"
                          + "\n".join(d.reason for d in found.damaged))
            text.setWordWrap(True)
            lay.addWidget(text)
            self.damaged_box = QCheckBox(f"Delete the unreadable {'copy' if k == 1 else 'copies'}")
            lay.addWidget(self.damaged_box)
        buttons = QDialogButtonBox()
        self.ok_button = buttons.addButton("Continue", QDialogButtonBox.ButtonRole.AcceptRole)
        self.later_button = buttons.addButton("Ask Again Next Time", QDialogButtonBox.ButtonRole.RejectRole)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        lay.addWidget(buttons)
        self.ok_button.setDefault(True)
        self.resize(720, 160 + 28 * n + 40 * bool(found.damaged))

    def choose(self, index: int, decision: str) -> None:
        """Set the choice for the ``index``-th copy (RESTORE, DISCARD or LATER)."""
        box = self.choice_boxes[index]
        box.setCurrentIndex(box.findData(decision))

    def answer(self) -> RecoveryAnswer:
        """The choices as shown (what Continue means)."""
        decisions = [(c, b.currentData()) for c, b in zip(self.found.copies, self.choice_boxes)]
        damaged = list(self.found.damaged) if self.damaged_box is not None and self.damaged_box.isChecked() else []
        return RecoveryAnswer(decisions, damaged)


def ask_what_to_recover(found: Recoverable, parent: QWidget | None = None) -> RecoveryAnswer:
    """Show the dialog (modal) and return the answer; closing it decides nothing."""
    dialog = RecoveryDialog(found, parent)
    try:
        if dialog.exec() == QDialog.DialogCode.Accepted:
            return dialog.answer()
        return RecoveryAnswer([(c, LATER) for c in found.copies], [])
    finally:
        dialog.deleteLater()
