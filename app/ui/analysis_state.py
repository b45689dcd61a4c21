"""The hand-analysis view of the sketch: its circuit solved and analysed with the person's tags.

The Equations and Check panels read one :class:`AnalysisState`. It follows
the scene's ``documentChanged`` with a short delay (so a drag costs one
analysis, not one per step) and never lets an exception reach the window:
a circuit that cannot be solved or a tag that does not fit becomes
``problem`` (words) and ``problem_parts`` (to mark on the canvas).
"""
from __future__ import annotations

import functools
from collections.abc import Callable
from typing import Any

from PySide6.QtCore import QObject, QTimer, Signal

from solver import CircuitError, Solution, solve

from ..analysis import Analysis, CurrentTag, TagError, analyse
from ..sketch.model import Sketch
from ..sketch.netlist import Netlist, to_circuit

__all__ = ["AnalysisState", "guarded", "MAX_PARTS", "tags_of"]

MAX_PARTS = 400  # larger sketches are left to the command line
DELAY_MS = 80


def tags_of(sketch: Sketch) -> list[CurrentTag]:
    """The sketch's saved tags as the analysis reads them."""
    return [CurrentTag(t.name, t.part, t.forward) for t in sketch.tags]


def guarded(fallback: Callable[[Any, str], None]):
    """Run the method; on any unexpected exception call ``fallback(self, message)`` instead of raising."""
    def wrap(method):
        @functools.wraps(method)
        def inner(self, *args, **kwargs):
            try:
                return method(self, *args, **kwargs)
            except Exception as exc:  # a fault of ours: say so in words, never a traceback
                fallback(self, f"This could not be worked out ({type(exc).__name__}); please report the sketch.")
                return None
        return inner
    return wrap


class AnalysisState(QObject):
    """``analysis`` (or None with ``problem``) for the sketch as it is now; ``changed`` after each update."""

    changed = Signal()

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.sketch: Sketch | None = None
        self.netlist: Netlist | None = None
        self.solution: Solution | None = None
        self.analysis: Analysis | None = None
        self.problem = ""
        self.problem_parts: tuple[str, ...] = ()
        # The live solver's result for the sketch as it is now, or None: reused rather than solved again.
        self.live: Callable[[], Any] = lambda: None
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(DELAY_MS)
        self._timer.timeout.connect(self.refresh)

    def follow(self, sketch: Sketch) -> None:
        """Analyse ``sketch`` from now on."""
        self.sketch = sketch
        self.refresh()

    def request(self) -> None:
        """The sketch changed: analyse it again shortly."""
        self._timer.start()

    @property
    def pending(self) -> bool:
        return self._timer.isActive()

    def refresh(self) -> None:
        """Analyse now and announce it."""
        self._timer.stop()
        self.netlist = self.solution = self.analysis = None
        self.problem, self.problem_parts = "", ()
        try:
            self._analyse()
        except Exception as exc:  # never a traceback in the window
            self.analysis = None
            self.problem = f"The equations could not be worked out ({type(exc).__name__}); please report the sketch."
        self.changed.emit()

    def _analyse(self) -> None:
        sketch = self.sketch
        if sketch is None or not any(p.kind != "ground" for p in sketch.parts):
            self.problem = "Nothing drawn yet: the equations appear once the circuit is solved."
            return
        if len(sketch.parts) > MAX_PARTS:
            self.problem = (f"The sketch has more than {MAX_PARTS} parts; use loopwright equations FILE "
                            "for its equations.")
            return
        current = self.live()
        if current is not None and current.netlist is not None and (current.solution or current.error):
            if current.solution is None:
                self.problem = "Not solved, so no equations yet: " + current.error
                self.problem_parts = current.error_parts
                return
            self.netlist, self.solution = current.netlist, current.solution
        else:
            try:
                self.netlist = to_circuit(sketch)
                self.solution = solve(self.netlist.circuit, ground=self.netlist.ground)
            except CircuitError as exc:
                self.problem = "Not solved, so no equations yet: " + exc.message
                self.problem_parts = tuple(p for p in exc.parts if not p.startswith("~"))
                return
        try:
            self.analysis = analyse(self.solution, self.netlist.circuit, tags_of(sketch))
        except TagError as exc:
            self.problem = "A current tag does not fit: " + exc.message
            self.problem_parts = exc.parts
