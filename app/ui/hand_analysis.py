"""Checking a hand analysis in the window: Equations and Check panels, current tags, traced loops.

:class:`HandAnalysis` is built once by the main window and re-attached to
each document. It owns the panels' docks, the tag actions (also in the
canvas's context menu), the loop tracer and the band that shows an
equation's loop or junction on the canvas, and it keeps the Equations
selection and the canvas selection in step.
"""
from __future__ import annotations

from shiboken6 import isValid
from PySide6.QtCore import QPoint, Qt
from PySide6.QtWidgets import QDockWidget, QInputDialog, QLineEdit, QMenu

from ..sketch.model import BranchTag
from .analysis_state import AnalysisState
from .check_panel import CheckPanel
from .equations_panel import EquationsPanel
from .highlight import Highlight, junction_point, loop_segments, part_segments
from .items import PartItem
from .tags import TagCommand, TagLayer, suggest_tag_name, tag_name_problem
from .trace import LoopTracer
from .docks import add_dock

__all__ = ["HandAnalysis"]


class HandAnalysis:
    """The hand-analysis side of a :class:`MainWindow` ``win``."""

    def __init__(self, win) -> None:
        self.win = win
        self.state = AnalysisState(win)
        self.state.live = self._live_result
        self.equations = EquationsPanel(self.state)
        self.checks = CheckPanel(self.state)
        self.equations_dock = self._dock("Equations", "equations", self.equations)
        self.check_dock = self._dock("Check", "check", self.checks)
        win.tabifyDockWidget(win.readings_dock, self.equations_dock)
        win.readings_dock.raise_()
        self.equations_dock.visibilityChanged.connect(self._equations_in_view)
        self.ask_tag_name = self._ask_tag_name  # replaced by tests: (suggestion, part) -> name or None
        self.tracer = LoopTracer(win.view, self._point_positions, win)
        self.tracer.progress.connect(lambda m: win.hint(m, 15000))
        self.tracer.finished.connect(self._traced)
        self.tracer.cancelled.connect(lambda: win.hint("Loop tracing stopped.", 4000))
        self.equations.traceRequested.connect(self.start_trace)
        self.equations.highlighted.connect(self._show_equations)
        self.equations.refusal.connect(self._show_refusal)
        self.checks.highlighted.connect(self._show_check)
        self.act_tag = win._action("Tag &Current…", self.tag_selected, "N",
                                   tip="Name the current through the selected part's branch and give it a direction")
        self.act_flip = win._action("&Flip Current Tag", self.flip_selected, "Shift+N",
                                    tip="Count the tagged current the other way")
        self.act_untag = win._action("Remove Current &Tag", self.untag_selected,
                                     tip="Take the tag off the selected part's branch")
        self.act_trace = win._action("T&race a Loop", self.start_trace, "Ctrl+L",
                                     tip="Click parts or corners round a loop, then Enter, to get its KVL")
        win.view.setContextMenuPolicy(Qt.ContextMenuPolicy.CustomContextMenu)
        win.view.customContextMenuRequested.connect(self._context_menu)
        self.state.changed.connect(self._name_readings)
        self.scene = None
        self.band: Highlight | None = None
        self.layer: TagLayer | None = None
        self._syncing = False

    def _dock(self, title: str, name: str, widget) -> QDockWidget:
        return add_dock(self.win, title, name, widget)

    def menu_actions(self) -> list:
        """Actions for the window's menus: the tag actions and the loop tracer."""
        return [self.act_tag, self.act_flip, self.act_untag, None, self.act_trace]

    # -- following the document ------------------------------------------------------------
    def attach(self) -> None:
        """Follow the window's current document (after ``set_document``)."""
        win = self.win
        self.tracer.stop()
        self.scene = win.scene
        self.band = Highlight()
        self.scene.addItem(self.band)
        self.layer = TagLayer(self.scene)
        self.scene.selectionChanged.connect(self._canvas_selection_changed)
        self.equations.clear_own()
        self.checks.set_document(win.sketch, win.stack)
        self.state.follow(win.sketch)

    def document_changed(self) -> None:
        self.state.request()

    def _live_result(self):
        """The window's newest solve if it is of the sketch as it is now, else None."""
        solver = getattr(self.win, "solver", None)
        latest = solver.latest if solver is not None else None
        return latest if latest is not None and latest.generation == solver.generation else None

    def _name_readings(self) -> None:
        """Give the Readings panel each part's current by its branch name (tags included)."""
        a = self.state.analysis
        names: dict[str, str] = {}
        if a is not None:
            for b in a.branches.branches:
                for part, sense in b.parts:
                    names[part] = b.current if sense > 0 else "\u2212" + b.current
        self.win.readings_model.set_branch_names(names)

    # -- tags ---------------------------------------------------------------------------
    def _ask_tag_name(self, suggestion: str, part: str) -> str | None:
        name, ok = QInputDialog.getText(self.win, "Tag current", f"Name of the current through {part}'s branch:",
                                        QLineEdit.EchoMode.Normal, suggestion)
        return name.strip() if ok else None

    def _series(self, part: str) -> list[str]:
        a = self.state.analysis
        if a is None:
            return [part]
        try:
            return list(a.branches.of_part(part).part_names)
        except KeyError:
            return [part]

    def _target(self) -> str | None:
        sel = [n for n in self.win.scene.selected_parts() if self.win.sketch.part(n).kind != "ground"]
        if len(sel) != 1:
            self.win.hint("Select one part (not a ground symbol) to tag the current through it.", 5000)
            return None
        return sel[0]

    def tag_part(self, part: str, name: str | None = None, forward: bool = True) -> bool:
        """Tag the current through ``part``'s branch (asking for the name when None); one undo step."""
        sketch = self.win.sketch
        if self.state.pending:
            self.state.refresh()
        series = self._series(part)
        old = [t for t in sketch.tags if t.part in series]
        if name is None:
            suggestion = old[0].name if old else suggest_tag_name(sketch)
            name = self.ask_tag_name(suggestion, part)
            if name is None:
                return False
        problem = tag_name_problem(name, sketch, part, series)
        if problem:
            self.win.hint("Not accepted: " + problem, 8000)
            return False
        changes = [(t.part, t, None) for t in old if t.part != part]
        changes.append((part, sketch.tag_on(part), BranchTag(name, part, forward)))
        self.win.stack.push(TagCommand(sketch, changes, f"Tag Current {name}", self.win.scene.batch))
        self.state.refresh()
        return True

    def tag_selected(self) -> None:
        part = self._target()
        if part is not None:
            self.tag_part(part)

    def _branch_tag(self, part: str) -> BranchTag | None:
        series = self._series(part)
        return next((t for t in self.win.sketch.tags if t.part in series), None)

    def flip_selected(self) -> None:
        part = self._target()
        tag = self._branch_tag(part) if part else None
        if tag is None:
            if part:
                self.win.hint(f"{part}'s branch has no current tag to flip; tag it first (N).", 5000)
            return
        new = BranchTag(tag.name, tag.part, not tag.forward)
        self.win.stack.push(TagCommand(self.win.sketch, [(tag.part, tag, new)], f"Flip Current {tag.name}",
                                       self.win.scene.batch))
        self.state.refresh()

    def untag_selected(self) -> None:
        part = self._target()
        tag = self._branch_tag(part) if part else None
        if tag is not None:
            self.win.stack.push(TagCommand(self.win.sketch, [(tag.part, tag, None)], f"Remove Current {tag.name}",
                                           self.win.scene.batch))
            self.state.refresh()

    def _context_menu(self, pos: QPoint) -> None:
        if self.tracer.active or self.win.view.mode != "select":
            return
        item = next((i if isinstance(i, PartItem) else getattr(i, "owner", None) for i in self.win.view.items(pos)
                     if isinstance(i, PartItem) or isinstance(getattr(i, "owner", None), PartItem)), None)
        if item is None or item.ghost or item.part.kind == "ground":
            return
        if item.part.name not in self.win.scene.selected_parts():
            self.win.scene.select([item.part.name])
        menu = QMenu(self.win.view)
        has = self._branch_tag(item.part.name) is not None
        menu.addAction(self.act_tag)
        self.act_flip.setEnabled(has)
        self.act_untag.setEnabled(has)
        menu.addAction(self.act_flip)
        menu.addAction(self.act_untag)
        menu.addSeparator()
        menu.addAction(self.act_trace)
        menu.exec(self.win.view.viewport().mapToGlobal(pos))
        self.act_flip.setEnabled(True)
        self.act_untag.setEnabled(True)

    # -- loops of one's own ------------------------------------------------------------------
    def _point_positions(self) -> dict[str, tuple[float, float]]:
        net, sol = self.state.netlist, self.state.solution
        if net is None or sol is None:
            return {}
        return {p: net.circuit.positions[p] for p in sol.points if p in net.circuit.positions}

    def start_trace(self) -> None:
        if self.state.pending:
            self.state.refresh()
        if self.state.analysis is None:
            self.win.hint(self.state.problem or "Solve the circuit first.", 6000)
            return
        self.equations_dock.show()
        self.equations_dock.raise_()
        self.win.view.set_mode("select")
        self.tracer.start()

    def _traced(self, picks: list) -> None:
        if self.equations.add_traced(picks):
            self.win.hint("Your loop's KVL is at the end of the Equations list.", 6000)

    # -- showing on the canvas -----------------------------------------------------------------
    def _show_equations(self, eqs: list) -> None:
        if self.band is None:
            return
        net, sol = self.state.netlist, self.state.solution
        if not eqs or net is None or sol is None:
            self.band.clear()
            return
        segs, thin, rings = [], [], []
        for e in eqs:
            if e.law == "KCL":
                thin += part_segments(net, e.parts)
                rings += [p for p in (junction_point(net, sol, n) for n in e.nodes) if p is not None]
            else:
                segs += loop_segments(net, sol, e.parts)
        label = ", ".join(dict.fromkeys(f"{e.law} {e.label}" for e in eqs))
        self.band.show_segments(segs, label if len(label) < 60 else f"{len(eqs)} equations", thin, rings)
        if not self._syncing:
            self._syncing = True
            try:
                names = [p for e in eqs for p in e.parts if p in self.win.scene.part_items]
                if names:
                    self.win.view.ensureVisible(self.win.scene.part_items[names[0]].sceneBoundingRect())
            finally:
                self._syncing = False

    def _show_check(self, outcome) -> None:
        if outcome is None or not outcome.parts:
            self.band.clear() if self.band else None
            return
        self.equations.select_labels([outcome.label] if outcome.label else [])

    def _show_refusal(self, message: str, parts: tuple) -> None:
        self.win.hint("Not a loop: " + message, 10000)
        net = self.state.netlist
        if self.band is not None and net is not None:
            self.band.show_segments(part_segments(net, parts), "refused")

    def _equations_in_view(self, visible: bool) -> None:
        """The Equations panel came into view: bring it up to date and follow the canvas selection."""
        if visible and self.equations.stale:
            self.equations.refresh()
            self._canvas_selection_changed()

    def _canvas_selection_changed(self) -> None:
        # the scene may already be gone (its C++ side deleted with the window) when a
        # last selection change arrives during teardown
        if self._syncing or self.scene is None or not isValid(self.scene):
            return
        self._syncing = True
        try:
            names = self.scene.selected_parts()
            if names:
                self.equations.select_for_parts(names)
                self._show_equations(self.equations.selected())
        finally:
            self._syncing = False
