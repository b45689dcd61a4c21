"""The cautions of a solved sketch, worked out next to the solve (on the worker thread for large ones).

``assess_result`` never raises: a fault of ours becomes a caution in words.
"""
from __future__ import annotations

from solver import Solution

from ..assess import Caution, assess
from ..sketch.model import Sketch
from ..sketch.netlist import Netlist

__all__ = ["assess_result"]


def assess_result(sketch: Sketch, netlist: Netlist, solution: Solution) -> list[Caution]:
    """``app.assess.assess`` for one solved state, most severe first; never raises."""
    try:
        return assess(sketch, netlist, solution)
    except Exception as e:  # a fault of ours: say so in words, never a traceback
        return [Caution("assessment_failed", "info", None,
                        f"The cautions for this circuit could not be worked out ({type(e).__name__}); "
                        "please report this sketch.")]
