"""Errors raised for circuits that cannot be solved, in plain words.

Every error carries ``.parts``: the names of the parts involved, so that a
drawing can mark them.
"""
from __future__ import annotations

from collections.abc import Iterable

__all__ = [
    "CircuitError",
    "InvalidValueError",
    "DuplicateNameError",
    "SelfConnectedError",
    "UnknownPartError",
    "ShortedCellError",
    "IdealCellLoopError",
    "CurrentSourceCutError",
    "IllConditionedError",
]


class CircuitError(ValueError):
    """A circuit that cannot be solved as drawn; ``str()`` is the message."""

    def __init__(self, message: str, parts: Iterable[str] = ()) -> None:
        super().__init__(message)
        self.message = message
        self.parts: tuple[str, ...] = tuple(dict.fromkeys(parts))

    def __str__(self) -> str:
        return self.message


class InvalidValueError(CircuitError):
    """A value that is negative, zero where that is not allowed, NaN or infinite."""


class DuplicateNameError(CircuitError):
    """Two parts with the same name."""


class SelfConnectedError(CircuitError):
    """A part with both terminals on the same point."""


class UnknownPartError(CircuitError, KeyError):
    """A part or point name that the circuit does not have."""

    def __str__(self) -> str:  # KeyError would add quotes
        return self.message


class ShortedCellError(CircuitError):
    """An ideal cell (no internal resistance) shorted by wires or closed switches."""


class IdealCellLoopError(CircuitError):
    """A loop made only of ideal cells (and wires): unbounded or undefined current."""


class CurrentSourceCutError(CircuitError):
    """Current sources that leave a section with no return path or in conflicting series."""


class IllConditionedError(CircuitError):
    """The equations are too ill-conditioned for the results to be trusted."""
