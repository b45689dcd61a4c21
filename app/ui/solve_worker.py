"""Live solving: sketch → netlist → solution → what the canvas and panels show.

Small sketches are solved at once, inside the edit. For large ones the GUI
thread only takes a snapshot of the parts and wires (they are immutable, so
copying the lists is enough: the document itself is not shared across
threads); the worker thread turns it into a netlist and solves it. At most
one solve runs at a time, and a result that an edit has overtaken is
dropped and the newest state solved instead.
"""
from __future__ import annotations

import math
import threading
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass, field, replace

from PySide6.QtCore import QObject, Signal

from solver import CircuitError, Solution, solve

from ..assess import Caution
from ..assess.return_path import explained
from ..sketch.model import Sketch
from ..sketch.netlist import Netlist, to_circuit
from ..sketch.windows import loop_windows
from .bench_results import assess_result
from .heap import settle
from ..units import format_value

__all__ = ["Result", "LiveSolver", "solve_sketch"]

GridPoint = tuple[int, int]


@dataclass
class Result:
    """Everything the window shows about one state of the sketch."""

    generation: int
    junctions: list[GridPoint] = field(default_factory=list)
    open_ends: list[GridPoint] = field(default_factory=list)
    readings: dict[str, tuple[float, float, float]] = field(default_factory=dict)  # I, V, P
    potentials: list[tuple[GridPoint, float]] = field(default_factory=list)
    loops: list[tuple[tuple[float, float], str, float, bool]] = field(default_factory=list)
    loop_outlines: list[list[tuple[float, float]]] = field(default_factory=list)  # corners, per loop
    error: str = ""
    error_parts: tuple[str, ...] = ()
    error_wires: tuple[int, ...] = ()  # indices of the sketch's wires named by the error (a short, say)
    notes: list[str] = field(default_factory=list)
    cautions: list[str] = field(default_factory=list)
    summary: str = ""
    assessment: list[Caution] = field(default_factory=list)  # app.assess cautions, most severe first
    netlist: Netlist | None = None    # what was solved, for the hand-analysis panels to reuse
    solution: Solution | None = None

    @property
    def solved(self) -> bool:
        return not self.error and bool(self.readings)


def _grid(name: str) -> GridPoint:
    x, y = name.split(",")
    return int(x), int(y)


def _from_netlist(generation: int, netlist: Netlist, sketch: Sketch | None = None) -> Result:
    res = Result(generation, junctions=list(netlist.junctions), open_ends=list(netlist.open_ends),
                 netlist=netlist)
    circuit = netlist.circuit
    names = [p.name for p in circuit.parts if not p.name.startswith("~")]
    if not names:
        res.summary = "Nothing to solve yet: place a cell or a current source and the parts it drives."
        return res
    try:
        sol = solve(circuit, ground=netlist.ground)
    except CircuitError as e:
        kinds = {p.name: p.kind for p in sketch.parts} if sketch is not None else {}
        message, parts = explained(e, circuit, kinds)
        res.error = message
        res.error_parts = tuple(p for p in parts if not p.startswith("~"))
        named = set(parts)
        res.error_wires = tuple(i for i, pieces in netlist.wire_parts.items() if named.intersection(pieces))
        res.summary = "Not solved: " + message
        return res
    res.solution = sol
    # whole arrays at once: per-name lookups cost more than the solve on large sketches
    shown = set(names)
    res.readings = {n: r for n, r in zip(sol.parts, zip(sol.currents.tolist(), sol.voltages.tolist(),
                                                        sol.powers.tolist())) if n in shown}
    refs = set(sol.references or ())
    if sol.ground:
        refs.add(sol.node_of(sol.ground))
    junctions = set(netlist.junctions)
    grid_of = {name: p for p, name in netlist.point_at.items()}
    for node, points in sol.nodes.items():
        if node in refs:
            continue
        v = sol.potential(points[0])
        if len(points) == 1:   # most nodes of a sketch drawn without wires: nothing to choose from
            p = points[0]
            res.potentials.append((grid_of.get(p) or _grid(p), v))
            continue
        grid = [grid_of.get(p) or _grid(p) for p in points]
        at = min(grid, key=lambda g: (g not in junctions, g[1], g[0]))
        res.potentials.append((at, v))
    loops = sol.loops
    for loop, (c, outline) in zip(loops, loop_windows(loops, circuit)):
        if c is not None and math.isfinite(loop.current):
            res.loops.append((c, loop.name, loop.current, loop.orientation != "anticlockwise"))
            res.loop_outlines.append(outline)
    res.notes = [n.message for n in sol.notes]
    if sketch is not None:
        res.assessment = assess_result(sketch, netlist, sol)
        # the status line carries the worst hazard in one sentence (app/assess decides what is hazardous)
        hazards = [c.figures["voltage"] for c in res.assessment if c.kind.startswith("hazardous")]
        if hazards:
            worst = max(abs(v) for v in hazards)
            res.cautions.append(
                f"Caution: {format_value(worst, 'V')} in this circuit is above 60 V DC, hazardous live "
                "(IEC 61010-1); follow local codes and licensed practice.")
    n_loops = len(sol.loops)
    res.summary = (f"Solved by mesh currents: {n_loops} loop{'s' if n_loops != 1 else ''}, "
                   f"{len(sol.nodes)} node{'s' if len(sol.nodes) != 1 else ''}.")
    return res


_RECENT: list[tuple[list, list, Result]] = []  # (parts, wires, result) of the last solves, newest first
_RECENT_KEPT = 4
_RECENT_LOCK = threading.Lock()  # the worker thread and the window's both solve


def solve_sketch(sketch: Sketch, generation: int = 0) -> Result:
    """Solve ``sketch`` now and describe the result (never raises for a bad circuit).

    The result follows from the parts and wires alone (a pure function of the drawing), so a
    drawing among the last ``_RECENT_KEPT`` solved (a change taken back, an undo, a part
    dragged back over where it was) gives that solve's result again, under ``generation``.
    Parts and wires are immutable values: comparing the lists is an identity check for every
    part an edit left alone.
    """
    parts, wires = sketch.parts, sketch.wires
    with _RECENT_LOCK:
        for k, (p, w, kept) in enumerate(_RECENT):
            if p == parts and w == wires:
                _RECENT.insert(0, _RECENT.pop(k))
                return replace(kept, generation=generation)
    result = _solved(sketch, generation)
    with _RECENT_LOCK:
        _RECENT.insert(0, (parts, wires, result))
        del _RECENT[_RECENT_KEPT:]
    return result


def _solved(sketch: Sketch, generation: int) -> Result:
    try:
        netlist = to_circuit(sketch)
    except CircuitError as e:
        return Result(generation, error=e.message, error_parts=tuple(e.parts), summary="Not solved: " + e.message)
    return _guarded(generation, netlist, sketch)


def _guarded(generation: int, netlist: Netlist, sketch: Sketch | None = None) -> Result:
    try:
        return _from_netlist(generation, netlist, sketch)
    except Exception as e:  # a fault of ours: say so in words, never a traceback
        msg = f"the solver stopped unexpectedly ({type(e).__name__}); please report this sketch."
        return Result(generation, junctions=list(netlist.junctions), open_ends=list(netlist.open_ends),
                      error=msg, summary="Not solved: " + msg)


class _Bridge(QObject):
    done = Signal(object)


class LiveSolver(QObject):
    """Re-solves the sketch on request and emits ``resultReady(Result)`` for the newest state."""

    resultReady = Signal(object)

    def __init__(self, sketch: Sketch, threaded_from: int = 400, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.sketch = sketch
        self.threaded_from = threaded_from
        self.generation = 0
        self.latest: Result | None = None
        self._busy = False
        self._pending = False
        self._settled = False
        self._pool: ThreadPoolExecutor | None = None
        self._bridge = _Bridge()
        self._bridge.done.connect(self._on_done)

    def request(self) -> None:
        """The sketch changed: solve it (now, or as soon as the running solve ends)."""
        self.generation += 1
        if len(self.sketch.parts) < self.threaded_from:
            self._publish(solve_sketch(self.sketch, self.generation))
            return
        if self._busy:
            self._pending = True
            return
        self._start()

    @property
    def busy(self) -> bool:
        return self._busy or self._pending

    def _start(self) -> None:
        if self._pool is None:
            self._pool = ThreadPoolExecutor(max_workers=1, thread_name_prefix="loopwright-solve")
        self._busy = True
        self._pool.submit(self._work, self.generation, self.sketch.drawing())  # edits go on meanwhile

    def _work(self, gen: int, sketch: Sketch) -> None:
        """On the worker thread: netlist, solve and cautions of a snapshot; always answers."""
        try:
            result = solve_sketch(sketch, gen)
        except Exception as e:  # a fault of ours: say so in words, and never leave the solver busy
            msg = f"the circuit could not be read ({type(e).__name__}); please report this sketch."
            result = Result(gen, error=msg, summary="Not solved: " + msg)
        self._bridge.done.emit(result)

    def _on_done(self, result: Result) -> None:
        self._busy = False
        if self._pending or result.generation != self.generation:
            self._pending = False
            self._start()
            return
        self._publish(result)

    def _publish(self, result: Result) -> None:
        self.latest = result
        self.resultReady.emit(result)
        if not self._settled:  # the document and its first solution are on the window: freeze them
            self._settled = True
            settle(len(self.sketch.parts))

    def shutdown(self) -> None:
        """Stop the worker thread (results still running are dropped)."""
        if self._pool is not None:
            self._pool.shutdown(wait=True, cancel_futures=True)
            self._pool = None
