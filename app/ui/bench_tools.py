"""The window's bench side: the Cautions panel, in-place cautions, meter effects and two tools.

``BenchTools`` is built once by the main window; ``attach`` follows a new
document and ``show_result`` lays each solve's cautions on the canvas, the
Cautions panel and the Readings panel.  "Equivalent at two points" lets the
person click two points on the canvas; "Preferred values" works on the one
selected resistor.
"""
from __future__ import annotations

from PySide6.QtCore import QEvent, QObject, Qt
from PySide6.QtGui import QAction, QPen
from PySide6.QtWidgets import QGraphicsEllipseItem

from solver import CircuitError, solve

from ..assess import Caution, display_reading, equivalent_at, substitutions
from ..sketch.netlist import to_circuit
from .bench_marks import BenchMarks
from .cautions_panel import CautionsPanel
from .items import Z_MARK, to_scene
from .theme import current_theme
from .tools_dialogs import EquivalentDialog, PreferredValuesDialog
from .docks import add_dock

__all__ = ["BenchTools", "meter_effects"]

GridPoint = tuple[int, int]


def meter_effects(cautions: list[Caution], kinds: dict[str, str]) -> dict[str, tuple[str, str]]:
    """Readings-panel (short, full) text per part: each meter against an ideal one, and the part
    whose current the meters shift most.  ``kinds`` maps part names to kinds (an ammeter reads A)."""
    out: dict[str, tuple[str, str]] = {}
    for c in cautions:
        f = c.figures
        if c.kind == "meter_reading" and c.part and "unmetered" in f:
            unit = "A" if kinds.get(c.part) == "ammeter" else "V"
            ideal = display_reading(f["unmetered"], unit)
            shown = display_reading(f["reading"], unit)
            full = f"{c.part} reads {shown}; an ideal meter would read {ideal}."
            if "shift_percent" in f:
                short = f"{f['shift_percent']:+.2g} %" if abs(f["shift_percent"]) >= 5e-3 else "as ideal"
            else:
                short = f"ideal {ideal}"
            out[c.part] = (short, full)
        elif c.kind == "meter_loading" and c.part and f.get("shift_percent", 0.0) >= 0.01:
            out[c.part] = (f"{f['shift_percent']:.2g} % by meters", c.message)
    return out


class _PointPicker(QObject):
    """Catches clicks on the canvas while two points are being picked; Esc stops."""

    def __init__(self, tools: "BenchTools") -> None:
        super().__init__(tools.win)
        self.tools = tools

    def eventFilter(self, obj, event) -> bool:
        t = event.type()
        if t == QEvent.Type.MouseButtonPress and event.button() == Qt.MouseButton.LeftButton:
            view = self.tools.win.view
            self.tools.pick(view.grid_at(event.position().toPoint()))
            return True
        if t in (QEvent.Type.MouseButtonRelease, QEvent.Type.MouseButtonDblClick):
            return True
        if t == QEvent.Type.KeyPress and event.key() == Qt.Key.Key_Escape:
            self.tools.stop_picking("Stopped picking points.")
            return True
        return False


class BenchTools:
    """Cautions panel and marks, meter effects, and the two bench tools, for one window."""

    def __init__(self, win) -> None:
        self.win = win
        self.panel = CautionsPanel()
        self.dock = add_dock(win, "Cautions", "cautions", self.panel)
        self.panel.partsChosen.connect(self._select)
        self.marks: BenchMarks | None = None
        self.cautions: list[Caution] = []
        self.picked: list[GridPoint] = []
        self._rings: list[QGraphicsEllipseItem] = []
        self._picker = _PointPicker(self)
        self.picking = False
        self.dialog = None  # the last dialog opened (kept alive while shown)
        self.act_equivalent = QAction("&Equivalent at Two Points…", win)
        self.act_equivalent.setStatusTip("Click two points of the circuit to see the source and resistance "
                                         "it looks like from there")
        self.act_equivalent.triggered.connect(self.start_picking)
        self.act_preferred = QAction("&Preferred Values…", win)
        self.act_preferred.setStatusTip("The nearest E12, E24 and E96 values for the selected resistor")
        self.act_preferred.triggered.connect(self.preferred_values)

    def build_menu(self, menubar) -> None:
        m = menubar.addMenu("&Bench")
        m.addAction(self.act_equivalent)
        m.addAction(self.act_preferred)
        m.addSeparator()
        m.addAction(self.dock.toggleViewAction())

    # -- following the document and its results ---------------------------------------------------
    def attach(self) -> None:
        """Follow the window's current document (after ``set_document``)."""
        self.stop_picking()
        self.marks = BenchMarks(self.win.scene, self.win.scene.part_items)
        self.show_result(None)

    def show_result(self, result) -> None:
        """Lay the cautions of a ``solve_worker.Result`` (None: nothing solved) on the window."""
        win = self.win
        if result is None or result.error or not result.readings:
            self.cautions = []
            problem = ("Not solved, so no cautions: " + result.error) if result is not None and result.error else ""
        else:
            self.cautions = list(result.assessment)
            problem = ""
        if self.marks is not None:
            self.marks.show(self.cautions)
        self.panel.set_cautions(self.cautions, problem)
        win.readings_model.set_effects(meter_effects(self.cautions, {p.name: p.kind for p in win.sketch.parts}))
        n = sum(1 for c in self.cautions if c.severity != "info")
        self.dock.setWindowTitle(f"Cautions ({n})" if n else "Cautions")

    def _select(self, parts: list[str]) -> None:
        win = self.win
        names = [p for p in parts if p in win.scene.part_items]
        if names:
            win.scene.select(names)
            win.view.ensureVisible(win.scene.part_items[names[0]].sceneBoundingRect())

    # -- equivalent at two points ---------------------------------------------------------------
    def start_picking(self) -> None:
        """Let the person click two points of the circuit on the canvas."""
        if self.picking:
            return
        self.picking = True
        self.picked = []
        vp = self.win.view.viewport()
        vp.installEventFilter(self._picker)
        self.win.view.installEventFilter(self._picker)
        self.win.hint("Click the first point (a terminal or a wire end); Esc stops.", 20000)

    def stop_picking(self, message: str = "") -> None:
        if self.picking:
            self.win.view.viewport().removeEventFilter(self._picker)
            self.win.view.removeEventFilter(self._picker)
        self.picking = False
        self.picked = []
        for ring in self._rings:
            try:
                if ring.scene() is not None:
                    ring.scene().removeItem(ring)
            except RuntimeError:  # its scene went with a closed document
                pass
        self._rings = []
        if message:
            self.win.hint(message, 5000)

    def pick(self, point: GridPoint) -> None:
        """Take ``point`` as the next picked point; after the second, show the equivalent."""
        try:
            netlist = to_circuit(self.win.sketch)
        except CircuitError as e:
            self.stop_picking("Cannot work out an equivalent: " + e.message)
            return
        if point not in netlist.point_at:
            self.win.hint("That is not a terminal or a wire end; click one of those (Esc stops).", 8000)
            return
        if self.picked and point == self.picked[0]:
            self.win.hint("Pick a second, different point (Esc stops).", 8000)
            return
        self.picked.append(point)
        self._ring(point)
        if len(self.picked) < 2:
            self.win.hint("Now click the second point; the first is the + side.", 20000)
            return
        a, b = self.picked
        self.stop_picking()
        self.show_equivalent(a, b)

    def _ring(self, point: GridPoint) -> None:
        ring = QGraphicsEllipseItem(-7, -7, 14, 14)
        ring.setPen(QPen(current_theme().select, 2.0))
        ring.setPos(to_scene(point))
        ring.setZValue(Z_MARK + 1)
        self.win.scene.addItem(ring)
        self._rings.append(ring)

    def show_equivalent(self, a: GridPoint, b: GridPoint) -> EquivalentDialog | None:
        """Work out and show the equivalent seen from ``a`` (+) to ``b``; None if it cannot be had."""
        try:
            netlist = to_circuit(self.win.sketch)
            eq = equivalent_at(netlist, a, b)
        except CircuitError as e:
            self.win.hint("No equivalent: " + e.message, 8000)
            return None
        self.dialog = EquivalentDialog(eq, f"point {a[0]},{a[1]}", f"point {b[0]},{b[1]}", self.win)
        self.dialog.show()
        return self.dialog

    # -- preferred values -------------------------------------------------------------------------
    def preferred_values(self) -> PreferredValuesDialog | None:
        """Open the preferred values of the one selected resistor (None, with a hint, otherwise)."""
        win = self.win
        sel = win.scene.selected_parts()
        if len(sel) != 1 or win.sketch.part(sel[0]).kind != "resistor":
            win.hint("Select one resistor to see its preferred values.", 6000)
            return None
        name = sel[0]
        try:
            netlist = to_circuit(win.sketch)
            sol = solve(netlist.circuit, ground=netlist.ground)
            subs = substitutions(netlist.circuit, name, ground=netlist.ground)
        except CircuitError as e:
            win.hint("No preferred values while the circuit cannot be solved: " + e.message, 8000)
            return None
        present = win.sketch.part(name).value("resistance")
        self.dialog = PreferredValuesDialog(name, present, subs,
                                            (sol.current(name), sol.voltage(name), sol.power(name)), win)
        self.dialog.chosen.connect(lambda v, n=name: self._use_value(n, v))
        self.dialog.show()
        return self.dialog

    def _use_value(self, name: str, value: float) -> None:
        if self.win.sketch.has_part(name):
            self.win.editor.set_values(name, {"resistance": value})
