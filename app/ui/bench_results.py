"""The cautions of a solved sketch, worked out next to the solve (on the worker thread for large ones).

``assess_result`` never raises: a fault of ours becomes a caution in words.
``detached`` copies the sketch's parts and wires so a worker thread reads a
state that later edits on the window's thread cannot change under it.
"""
from __future__ import annotations

from solver import Solution

from ..assess import Caution, assess
from ..sketch.model import Sketch
from ..sketch.netlist import Netlist

__all__ = ["assess_result", "detached"]


def detached(sketch: Sketch) -> Sketch:
    """A copy of ``sketch``'s parts and wires (parts and wires are immutable, so they are shared)."""
    out = Sketch()
    for p in sketch.parts:
        out.add_part(p)
    for w in sketch.wires:
        out.add_wire(w)
    return out


def assess_result(sketch: Sketch, netlist: Netlist, solution: Solution) -> list[Caution]:
    """``app.assess.assess`` for one solved state, most severe first; never raises."""
    try:
        return assess(sketch, netlist, solution)
    except Exception as e:  # a fault of ours: say so in words, never a traceback
        return [Caution("assessment_failed", "info", None,
                        f"The cautions for this circuit could not be worked out ({type(e).__name__}); "
                        "please report this sketch.")]
