"""The Check panel: a person's own equations and answers held against the circuit.

Type an equation (``B1 - I1*R2 - I2*R5 = 0``) or answers
(``I1 = 12.3m, V(n2) = 4.1``) and press Check. The verdict says whether it
is valid, which loop or junction it matches, and each wrong, missing or
extra term or wrong sign, with a caret under its place in the text. Each
check is kept in the sketch (undoably) and re-evaluated whenever the
circuit changes, so a reviewer reopening the file sees what was checked.
"""
from __future__ import annotations

import html
import unicodedata

from PySide6.QtCore import Signal
from PySide6.QtGui import QUndoCommand
from PySide6.QtWidgets import (QAbstractItemView, QDoubleSpinBox, QHBoxLayout, QLabel, QLineEdit, QListWidget,
                               QListWidgetItem, QPushButton, QTextBrowser, QVBoxLayout, QWidget)

from ..analysis import CheckOutcome, guess_kind, run_check
from ..sketch.fileio import CHECK_MAX
from ..sketch.model import SavedCheck, Sketch
from .analysis_state import AnalysisState, guarded

__all__ = ["CheckPanel", "AddCheckCommand", "RemoveCheckCommand", "outcome_html"]


class AddCheckCommand(QUndoCommand):
    """Keep a typed check in the sketch."""

    def __init__(self, sketch: Sketch, check: SavedCheck) -> None:
        super().__init__(f"Check {check.text[:30]}")
        self.sketch, self.check = sketch, check

    def redo(self) -> None:
        self.sketch.add_check(self.check)

    def undo(self) -> None:
        self.sketch.remove_check(len(self.sketch.checks) - 1)


class RemoveCheckCommand(QUndoCommand):
    """Drop a kept check (undo puts it back in its place)."""

    def __init__(self, sketch: Sketch, index: int) -> None:
        super().__init__("Remove Check")
        self.sketch, self.index = sketch, index
        self.check = sketch.checks[index]

    def redo(self) -> None:
        self.sketch.remove_check(self.index)

    def undo(self) -> None:
        self.sketch.add_check(self.check, self.index)


def outcome_html(text: str, outcome: CheckOutcome) -> str:
    """The verdict as HTML: a word and a sign (not colour alone), then each detail with a caret under its place."""
    word = "Valid" if outcome.ok else "Not valid"
    sign = "✔" if outcome.ok else "✘"
    out = [f"<p><b>{sign} {word}.</b> {html.escape(outcome.summary)}</p>"]
    shown_caret = False
    for line, col in outcome.lines:
        out.append(f"<p style='margin-left:8px'>• {html.escape(line)}</p>")
        if col is not None:
            out.append(_caret(text, col))
            shown_caret = shown_caret or col == outcome.column
    if outcome.column is not None and not shown_caret:
        out.append(_caret(text, outcome.column))
    return "".join(out)


def _caret(text: str, col: int) -> str:
    return (f"<pre style='margin-left:16px'>{html.escape(text)}\n"
            f"{' ' * max(0, min(col, len(text)))}^</pre>")


def _clean(text: str) -> str:
    """One line of text fit to keep in a file: control characters become spaces, length capped."""
    text = "".join(" " if unicodedata.category(c) in ("Cc", "Cs") else c for c in text).strip()
    return text[:CHECK_MAX]


def _problem(panel: "CheckPanel", message: str) -> None:
    panel.result.setHtml(f"<p><b>✘ Not checked.</b> {html.escape(message)}</p>")


class CheckPanel(QWidget):
    """Typing line, Check button, tolerance, the verdict, and the list of kept checks."""

    highlighted = Signal(object)  # CheckOutcome whose loop or junction to show, or None

    def __init__(self, state: AnalysisState, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.state = state
        self.sketch: Sketch | None = None
        self.stack = None
        self.outcomes: list[CheckOutcome] = []
        self.last: CheckOutcome | None = None

        self.entry = QLineEdit()
        self.entry.setPlaceholderText("B1 - I1*R1 - I2*R2 = 0   or   I1 = 12.3m, V(n2) = 4.1")
        self.entry.setMaxLength(CHECK_MAX)
        self.entry.setClearButtonEnabled(True)
        self.entry.returnPressed.connect(self.check_typed)
        self.check_button = QPushButton("Check")
        self.check_button.setDefault(True)
        self.check_button.clicked.connect(self.check_typed)
        self.tolerance = QDoubleSpinBox()
        self.tolerance.setRange(0.01, 50.0)
        self.tolerance.setDecimals(2)
        self.tolerance.setValue(1.0)
        self.tolerance.setSuffix(" %")
        self.tolerance.setToolTip("How far a numeric answer may be from the solved value")
        row = QHBoxLayout()
        row.addWidget(self.entry, 1)
        row.addWidget(self.check_button)
        tol = QHBoxLayout()
        tol.addWidget(QLabel("Answers within"))
        tol.addWidget(self.tolerance)
        tol.addStretch(1)
        self.result = QTextBrowser()
        self.result.setOpenLinks(False)
        self.result.setMinimumHeight(90)
        self.kept = QListWidget()
        self.kept.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.kept.setWordWrap(True)
        self.kept.currentRowChanged.connect(self._kept_selected)
        self.remove_button = QPushButton("Remove Check")
        self.remove_button.clicked.connect(self.remove_selected)
        bottom = QHBoxLayout()
        bottom.addWidget(QLabel("Checks kept with the sketch:"))
        bottom.addStretch(1)
        bottom.addWidget(self.remove_button)

        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addLayout(row)
        lay.addLayout(tol)
        lay.addWidget(self.result, 2)
        lay.addLayout(bottom)
        lay.addWidget(self.kept, 1)
        state.changed.connect(self.refresh)

    def set_document(self, sketch: Sketch, stack) -> None:
        """Keep checks in ``sketch`` through ``stack`` (the window's undo stack)."""
        self.sketch, self.stack = sketch, stack
        self.result.clear()
        self.last = None

    # -- checking -----------------------------------------------------------------------
    def evaluate(self, text: str, kind: str | None = None, tolerance: float | None = None) -> CheckOutcome:
        """The verdict on ``text`` for the circuit as it is now (never raises)."""
        tol = tolerance if tolerance is not None else self.tolerance.value() / 100.0
        a = self.state.analysis
        if a is None:
            return CheckOutcome(False, kind or guess_kind(text), self.state.problem or "The circuit is not solved yet.")
        try:
            return run_check(a, text, kind, tol)
        except Exception as exc:  # a fault of ours: say so in words, never a traceback
            return CheckOutcome(False, kind or "equation",
                                f"This could not be checked ({type(exc).__name__}); please report the sketch.")

    @guarded(_problem)
    def check_typed(self) -> CheckOutcome | None:
        """Check what is typed, show the verdict, point at the first problem and keep the check."""
        text = _clean(self.entry.text())
        if not text:
            self.result.setHtml("<p>Type an equation or answers first.</p>")
            return None
        if self.state.pending:
            self.state.refresh()
        kind = guess_kind(text)
        tol = self.tolerance.value() / 100.0
        outcome = self.evaluate(text, kind, tol)
        self.last = outcome
        self.result.setHtml(outcome_html(text, outcome))
        col = next((c for _, c in outcome.lines if c is not None), outcome.column)
        if col is not None and text == self.entry.text():
            self.entry.setCursorPosition(min(col, len(text)))
        self.highlighted.emit(outcome)
        check = SavedCheck(text, kind, tol if kind == "values" else 0.01)
        if self.sketch is not None and check not in self.sketch.checks:
            if self.stack is not None:
                self.stack.push(AddCheckCommand(self.sketch, check))
            else:
                self.sketch.add_check(check)
        if self.sketch is not None:
            self.refresh()
            self.kept.blockSignals(True)
            self.kept.setCurrentRow(self.sketch.checks.index(check))
            self.kept.blockSignals(False)
        return outcome

    @guarded(_problem)
    def refresh(self) -> None:
        """Re-evaluate every kept check against the circuit as it is now."""
        row = self.kept.currentRow()
        self.kept.blockSignals(True)
        try:
            self.kept.clear()
            self.outcomes = []
            for c in (self.sketch.checks if self.sketch is not None else []):
                o = self.evaluate(c.text, c.kind, c.tolerance)
                self.outcomes.append(o)
                mark = "✔ valid" if o.ok else "✘ not valid"
                where = f" — {o.label}" if o.ok and o.label else ""
                item = QListWidgetItem(f"{mark}{where}:  {c.text}")
                item.setToolTip(o.summary)
                self.kept.addItem(item)
            if 0 <= row < self.kept.count():
                self.kept.setCurrentRow(row)
        finally:
            self.kept.blockSignals(False)

    def _kept_selected(self, row: int) -> None:
        if self.sketch is None or not 0 <= row < len(self.outcomes):
            return
        check = self.sketch.checks[row]
        self.result.setHtml(outcome_html(check.text, self.outcomes[row]))
        self.highlighted.emit(self.outcomes[row])

    def remove_selected(self) -> None:
        row = self.kept.currentRow()
        if self.sketch is not None and 0 <= row < len(self.sketch.checks):
            cmd = RemoveCheckCommand(self.sketch, row)
            if self.stack is not None:
                self.stack.push(cmd)
            else:
                cmd.redo()

    @property
    def verdict_text(self) -> str:
        """The verdict shown, as plain text."""
        return self.result.toPlainText()
