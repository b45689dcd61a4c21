"""The Equations panel: KVL per loop and KCL per junction of the solved circuit.

Each equation is shown with symbols and with the solved numbers and its
residual, in branch-current or mesh-current form. Selecting equations asks
the window to show their loop or junction on the canvas (``highlighted``);
the window selects the equations of the parts selected on the canvas with
:meth:`EquationsPanel.select_for_parts`. Loops of one's own — traced on the
canvas, or several windows joined — are added at the end with their KVL, or
their refusal is shown in words.
"""
from __future__ import annotations

from collections.abc import Iterable, Sequence

from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QGuiApplication
from PySide6.QtWidgets import (QAbstractItemView, QButtonGroup, QComboBox, QHBoxLayout, QLabel, QListWidget,
                               QListWidgetItem, QPushButton, QRadioButton, QVBoxLayout, QWidget)

from ..analysis import Equation, LoopError, equations, loop_equation, merged_loop_equation
from .analysis_state import AnalysisState, guarded
from .theme import style_refusal

__all__ = ["EquationsPanel", "DIRECTIONS"]

DIRECTIONS = {"clockwise": "Clockwise", "anticlockwise": "Anticlockwise", "as given": "In the order clicked"}


def _show_problem(panel: "EquationsPanel", message: str) -> None:
    panel.note.setText(message)


class EquationsPanel(QWidget):
    """The list of equations with its form toggle, loop tools and copy buttons."""

    highlighted = Signal(object)       # list of Equation now selected (may be empty)
    traceRequested = Signal()
    refusal = Signal(str, tuple)       # a loop refused: the reason and the parts involved

    def __init__(self, state: AnalysisState, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.state = state
        self.form = "branch"
        self.shown: list[Equation] = []
        self.own: list[tuple[str, object]] = []   # ("trace", (picks, direction)) or ("join", loops)
        self.stale = False  # a newer analysis came while the panel was out of view
        self._syncing = False

        self.branch_button = QRadioButton("Branch currents")
        self.mesh_button = QRadioButton("Mesh currents")
        self.branch_button.setChecked(True)
        self.branch_button.setToolTip("Terms in the branch currents, one per part (as written by hand)")
        self.mesh_button.setToolTip("Rows of the loop-resistance matrix: self and mutual resistances × loop currents")
        group = QButtonGroup(self)
        group.addButton(self.branch_button)
        group.addButton(self.mesh_button)
        self.branch_button.toggled.connect(lambda on: self.set_form("branch" if on else "mesh"))
        top = QHBoxLayout()
        top.addWidget(self.branch_button)
        top.addWidget(self.mesh_button)
        top.addStretch(1)

        self.currents = QLabel()
        self.currents.setWordWrap(True)
        self.currents.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.list = QListWidget()
        self.list.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection)
        self.list.setWordWrap(True)
        self.list.setAlternatingRowColors(True)
        self.list.itemSelectionChanged.connect(self._selection_changed)
        self.note = QLabel()
        self.note.setWordWrap(True)
        style_refusal(self.note)

        self.trace_button = QPushButton("Trace a Loop")
        self.trace_button.setToolTip("Click parts or corners round a loop on the canvas, then press Enter")
        self.trace_button.clicked.connect(self.traceRequested.emit)
        self.direction = QComboBox()
        for key, text in DIRECTIONS.items():
            self.direction.addItem(text, key)
        self.direction.setToolTip("Which way your traced loop goes round")
        self.join_button = QPushButton("Join Loops")
        self.join_button.setToolTip("Select two or more loop equations, then join their windows into one larger loop")
        self.join_button.clicked.connect(self.join_selected)
        loops = QHBoxLayout()
        loops.addWidget(self.trace_button)
        loops.addWidget(self.direction)
        loops.addWidget(self.join_button)

        self.copy_text_button = QPushButton("Copy as Text")
        self.copy_latex_button = QPushButton("Copy as LaTeX")
        self.copy_text_button.clicked.connect(lambda: self.copy(latex=False))
        self.copy_latex_button.clicked.connect(lambda: self.copy(latex=True))
        copy = QHBoxLayout()
        copy.addStretch(1)
        copy.addWidget(self.copy_text_button)
        copy.addWidget(self.copy_latex_button)

        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addLayout(top)
        lay.addWidget(self.currents)
        lay.addWidget(self.list, 1)
        lay.addWidget(self.note)
        lay.addLayout(loops)
        lay.addLayout(copy)
        state.changed.connect(self._analysis_changed)

    # -- filling ---------------------------------------------------------------------
    def set_form(self, form: str) -> None:
        """Show the branch-current (``"branch"``) or mesh-current (``"mesh"``) form."""
        if form != self.form:
            self.form = form
            (self.branch_button if form == "branch" else self.mesh_button).setChecked(True)
            self.refresh()

    def _analysis_changed(self) -> None:
        """Rebuild now if the panel is on screen, else once it comes into view (``stale``):
        writing out every equation of a few hundred parts takes longer than a frame, and
        a panel tabbed away should not hold up drawing after each edit."""
        if self.visibleRegion().isEmpty():
            self.stale = True
        else:
            self.refresh()

    @guarded(_show_problem)
    def refresh(self) -> None:
        """Rebuild the list from the newest analysis, keeping the selection by label where possible."""
        self.stale = False
        keep = {e.label for e in self.selected()}
        self._syncing = True
        try:
            self.list.clear()
            self.shown = []
            self.note.clear()
            a = self.state.analysis
            if a is None:
                self.currents.setText(self.state.problem)
                return
            self.currents.setText(self._currents_text())
            self.shown = list(equations(a, self.form))
            notes = []
            for kind, what in self.own:
                try:
                    if kind == "trace":
                        picks, direction = what
                        self.shown.append(loop_equation(a, picks, direction, self.form))
                    else:
                        self.shown.append(merged_loop_equation(a, what, self.form))
                except LoopError as exc:
                    notes.append(exc.message)
            if notes:
                self.note.setText("Your loop no longer fits the drawing: " + notes[-1])
            for e in self.shown:
                self.list.addItem(self._item(e))
            for row, e in enumerate(self.shown):
                if e.label in keep:
                    self.list.item(row).setSelected(True)
        finally:
            self._syncing = False
        self._selection_changed()

    def _currents_text(self) -> str:
        a = self.state.analysis
        if self.form == "mesh":
            return "Loop currents: " + ", ".join(f"{name} round {loop.name}" for name, loop
                                                 in zip(a.loop_current, a.solution.loops))
        bits = []
        for b in a.branches.branches:
            names = ", ".join(p for p in b.part_names if not p.startswith("~"))
            bits.append(f"{b.current}{'' if b.tagged else ' (auto)'}: {names}")
        return "Currents — " + " · ".join(bits)

    @staticmethod
    def _item(e: Equation) -> QListWidgetItem:
        lines = [e.title, "    " + e.text, "    " + e.numeric]
        if e.note:
            lines.append("    " + e.note)
        item = QListWidgetItem("\n".join(lines))
        item.setToolTip(e.latex)
        return item

    # -- selection ---------------------------------------------------------------------
    def selected(self) -> list[Equation]:
        rows = sorted(self.list.row(i) for i in self.list.selectedItems())
        return [self.shown[r] for r in rows if r < len(self.shown)]

    def _selection_changed(self) -> None:
        if not self._syncing:
            self.highlighted.emit(self.selected())

    def select_for_parts(self, parts: Iterable[str]) -> None:
        """Select the equations whose loop or junction includes any of ``parts`` (without echoing back)."""
        chosen = set(parts)
        self._syncing = True
        try:
            self.list.clearSelection()
            first = None
            for row, e in enumerate(self.shown):
                if chosen & set(e.parts):
                    self.list.item(row).setSelected(True)
                    first = first if first is not None else row
            if first is not None:
                self.list.scrollToItem(self.list.item(first))
        finally:
            self._syncing = False

    def select_labels(self, labels: Sequence[str]) -> None:
        """Select the equations with these labels (and show them on the canvas)."""
        if self.stale:
            self.refresh()
        for row, e in enumerate(self.shown):
            self.list.item(row).setSelected(e.label in labels)

    # -- loops of one's own --------------------------------------------------------------
    @guarded(_show_problem)
    def add_traced(self, picks: list[str]) -> bool:
        """The KVL of a loop traced through ``picks`` (parts or points), or the reason it is refused."""
        a = self.state.analysis
        if a is None:
            self.note.setText(self.state.problem or "The circuit is not solved yet.")
            return False
        direction = self.direction.currentData()
        try:
            loop_equation(a, picks, direction, self.form)
        except LoopError as exc:
            self.note.setText("Not a loop: " + exc.message)
            self.refusal.emit(exc.message, tuple(exc.parts))
            return False
        self.own.append(("trace", (list(picks), direction)))
        self.refresh()
        self._select_last()
        return True

    @guarded(_show_problem)
    def join_selected(self) -> bool:
        """Join the windows of the selected loop equations into one larger loop."""
        loops = sorted({e.loop for e in self.selected() if e.law == "KVL" and e.loop is not None})
        if len(loops) < 2:
            self.note.setText("Select two or more of the circuit's loop equations (L1, L2, …) to join.")
            return False
        try:
            merged_loop_equation(self.state.analysis, loops, self.form)
        except LoopError as exc:
            self.note.setText("Those loops do not join: " + exc.message)
            self.refusal.emit(exc.message, tuple(exc.parts))
            return False
        self.own.append(("join", loops))
        self.refresh()
        self._select_last()
        return True

    def clear_own(self) -> None:
        """Forget the loops of one's own (a new sketch)."""
        self.own = []

    def _select_last(self) -> None:
        if self.list.count():
            self.list.setCurrentRow(self.list.count() - 1)
            self.list.scrollToBottom()

    # -- copying ------------------------------------------------------------------------
    def copy(self, latex: bool = False) -> str:
        """Copy the selected equations (all when none is selected) as plain text or LaTeX; returns the text."""
        eqs = self.selected() or self.shown
        if latex:
            text = "\n".join(f"{e.latex} \\quad \\text{{({e.title})}}" for e in eqs)
        else:
            text = "\n".join(f"{e.title}\n  {e.text}\n  {e.numeric}" for e in eqs)
        QGuiApplication.clipboard().setText(text)
        return text
