"""Loopwright's DC solver: mesh-current analysis of a circuit of named parts.

>>> from solver import Circuit, solve
>>> c = Circuit()
>>> c.cell("B1", plus="a", minus="g", emf=9.0)
>>> c.resistor("R1", "a", "g", 100.0)
>>> round(solve(c, ground="g").current("R1"), 6)
0.09
"""
from .circuit import Circuit, Part
from .errors import (
    CircuitError,
    CurrentSourceCutError,
    DuplicateNameError,
    IdealCellLoopError,
    IllConditionedError,
    InvalidValueError,
    SelfConnectedError,
    ShortedCellError,
    UnknownPartError,
)

__all__ = [
    "Circuit", "Part", "solve", "Solution", "Loop", "Note",
    "CircuitError", "CurrentSourceCutError", "DuplicateNameError", "IdealCellLoopError",
    "IllConditionedError", "InvalidValueError", "SelfConnectedError", "ShortedCellError",
    "UnknownPartError",
]

from .mesh import solve  # noqa: E402
from .solution import Loop, Note, Solution  # noqa: E402
