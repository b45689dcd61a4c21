"""The circuit: named points joined by parts, with optional grid positions.

A ``Circuit`` is plain data. It checks each value as it is added, so a bad
value is refused with a message naming the part; topology is checked when the
circuit is solved. ``Circuit._shape_key`` names its topology without its
values, so a solve can reuse what an earlier solve of the same shape found
(see :mod:`solver.topocache`).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import (
    DuplicateNameError,
    InvalidValueError,
    SelfConnectedError,
    UnknownPartError,
)

__all__ = ["Circuit", "Part", "RESISTOR", "CELL", "CURRENT_SOURCE", "WIRE", "SWITCH", "MAX_VALUE", "MIN_RESISTANCE"]

MAX_VALUE = 1e18        # largest magnitude of any value, SI units: results stay far from overflow
MIN_RESISTANCE = 1e-12  # smallest non-zero resistance, ohms (1 pΩ; the range asked for starts at 1 µΩ)

RESISTOR = "resistor"
CELL = "cell"
CURRENT_SOURCE = "current_source"
WIRE = "wire"
SWITCH = "switch"


@dataclass(frozen=True)
class Part:
    """One two-terminal part.

    ``a`` and ``b`` are the terminals in the order the part was written (for
    a cell: plus, minus). ``resistance`` is the series resistance of the
    branch (internal resistance for a cell, 0 for wires and switches),
    ``emf`` the EMF of a cell, ``current`` the set current of a source and
    ``closed`` the state of a switch.
    """

    name: str
    kind: str
    a: str
    b: str
    resistance: float = 0.0
    emf: float = 0.0
    current: float = 0.0
    closed: bool = True

    @property
    def is_conductor(self) -> bool:
        """True for a zero-ohm connection (wire or closed switch), merged into a node."""
        return self.kind == WIRE or (self.kind == SWITCH and self.closed)

    @property
    def is_branch(self) -> bool:
        """True for a part that is a branch of the mesh equations."""
        return self.kind in (RESISTOR, CELL, CURRENT_SOURCE)


def _check_value(name: str, what: str, value: float, *, zero_ok: bool, turn_hint: bool = False) -> float:
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InvalidValueError(f"{name}: the {what} {value!r} is not a number.", [name]) from None
    # Every value a real part has passes this one comparison (NaN fails it); the rest are sorted out below.
    if (MIN_RESISTANCE if what[-10:] == "resistance" else 1e-300) <= v <= MAX_VALUE:
        return v
    if math.isnan(v):
        raise InvalidValueError(f"{name}: the {what} is not a number (NaN).", [name])
    if math.isinf(v):
        raise InvalidValueError(f"{name}: the {what} is infinite; give a finite value.", [name])
    if abs(v) > MAX_VALUE:
        raise InvalidValueError(
            f"{name}: the {what} ({v:g}) is beyond any real part (more than {MAX_VALUE:g} in SI units).",
            [name])
    if v < 0:
        hint = " Give a positive value and turn the part round instead." if turn_hint else ""
        raise InvalidValueError(f"{name}: the {what} cannot be negative ({v:g}).{hint}", [name])
    if abs(v) < 1e-300:
        v = 0.0  # a subnormal value is zero for any real part
    if 0 < v < MIN_RESISTANCE and what.endswith("resistance"):
        raise InvalidValueError(
            f"{name}: the {what} ({v:g} Ω) is below any real part (less than {MIN_RESISTANCE:g} Ω); "
            "use a wire, or an ideal cell, instead.", [name])
    if v == 0 and not zero_ok:
        raise InvalidValueError(
            f"{name}: the {what} is zero; a zero-ohm connection is a wire.", [name]
        )
    return v


_new_part = object.__new__


def _twice(name: str) -> DuplicateNameError:
    return DuplicateNameError(f"Two parts are named {name}; each part needs its own name.", [name])


def _make_part(name: str, kind: str, a: str, b: str, resistance: float = 0.0, emf: float = 0.0,
               current: float = 0.0, closed: bool = True) -> Part:
    """``Part(...)`` without the frozen dataclass's per-field ``object.__setattr__`` calls (a quarter of the cost)."""
    part = _new_part(Part)
    part.__dict__.update(name=name, kind=kind, a=a, b=b, resistance=resistance, emf=emf, current=current,
                         closed=closed)
    return part


class Circuit:
    """Named points joined by two-terminal parts.

    Example
    -------
    >>> c = Circuit()
    >>> c.cell("B1", plus="a", minus="g", emf=9.0, internal_resistance=0.5)
    >>> c.resistor("R1", "a", "g", 100.0)
    >>> len(c.parts)
    2
    """

    def __init__(self) -> None:
        self._parts: dict[str, Part] = {}
        self._positions: dict[str, tuple[float, float]] = {}
        self._signed_zero = False   # a coordinate is -0.0, which == 0.0 but is not the same number

    # -- building -----------------------------------------------------------
    def _add(self, name: str, kind: str, a: str, b: str, resistance: float = 0.0, emf: float = 0.0,
             current: float = 0.0, closed: bool = True) -> None:
        if not (isinstance(name, str) and name.strip()):
            raise InvalidValueError("Every part needs a name.", [])
        if not (isinstance(a, str) and a and isinstance(b, str) and b):
            raise InvalidValueError(f"{name}: terminal names must be non-empty text.", [name])
        if name in self._parts:
            raise _twice(name)
        if a == b:
            raise SelfConnectedError(f"{name} has both terminals on the same point {a}.", [name])
        self._parts[name] = _make_part(name, kind, a, b, resistance, emf, current, closed)

    def _adopt(self, part: Part) -> None:
        """Add ``part`` as another circuit made and checked it: parts are immutable values, so
        a netlist built again after an edit takes those of the parts the edit left alone
        from the netlist before (``app.sketch.netlist``)."""
        if part.name in self._parts:
            raise _twice(part.name)
        self._parts[part.name] = part

    def _place_checked(self, positions: dict[str, tuple[float, float]]) -> None:
        """Place every point of ``positions`` (name: (x, y) floats, finite, with no -0.0), as
        ``place`` does once checked: the netlist keeps the positions of its last drawings."""
        self._positions.update(positions)

    def resistor(self, name: str, a: str, b: str, resistance: float) -> None:
        """Add a resistor of ``resistance`` ohms between ``a`` and ``b``."""
        self._add(name, RESISTOR, a, b, _check_value(name, "resistance", resistance, zero_ok=False))

    def cell(self, name: str, plus: str, minus: str, emf: float,
             internal_resistance: float = 0.0) -> None:
        """Add a cell or battery: EMF in volts, internal resistance in ohms (0 = ideal)."""
        e = _check_value(name, "EMF", emf, zero_ok=True, turn_hint=True)
        r = _check_value(name, "internal resistance", internal_resistance, zero_ok=True)
        self._add(name, CELL, plus, minus, r, e)

    def current_source(self, name: str, a: str, b: str, current: float) -> None:
        """Add an ideal current source driving ``current`` amperes through itself from a to b."""
        self._add(name, CURRENT_SOURCE, a, b, current=_check_value(name, "current", current, zero_ok=True,
                                                                   turn_hint=True))

    def wire(self, name: str, a: str, b: str) -> None:
        """Add a zero-ohm wire; its ends become one node."""
        self._add(name, WIRE, a, b)

    def switch(self, name: str, a: str, b: str, closed: bool = True) -> None:
        """Add a switch: closed it is a zero-ohm connection, open it is no branch."""
        if not isinstance(closed, bool):
            raise InvalidValueError(f"{name}: a switch is either closed or open.", [name])
        self._add(name, SWITCH, a, b, closed=closed)

    def place(self, point: str, x: float, y: float) -> None:
        """Give ``point`` a grid position (x to the right, y downwards, as on screen)."""
        try:
            fx, fy = float(x), float(y)
        except (TypeError, ValueError):
            raise InvalidValueError(f"The position of point {point} is not a pair of numbers.", []) from None
        if not (math.isfinite(fx) and math.isfinite(fy)):
            raise InvalidValueError(f"The position of point {point} is not finite.", [])
        if not (fx and fy) and any(c == 0.0 and math.copysign(1.0, c) < 0 for c in (fx, fy)):
            self._signed_zero = True
        self._positions[point] = (fx, fy)

    # -- reading ------------------------------------------------------------
    @property
    def parts(self) -> list[Part]:
        """The parts in the order they were added."""
        return list(self._parts.values())

    def part(self, name: str) -> Part:
        """The part called ``name``."""
        try:
            return self._parts[name]
        except KeyError:
            raise UnknownPartError(f"There is no part named {name}.", []) from None

    @property
    def points(self) -> list[str]:
        """Every point named by a part, in order of first use."""
        seen: dict[str, None] = {}
        for p in self._parts.values():
            seen.setdefault(p.a)
            seen.setdefault(p.b)
        return list(seen)

    @property
    def positions(self) -> dict[str, tuple[float, float]]:
        """Grid positions of the points that were placed."""
        return dict(self._positions)

    def _shape_key(self) -> tuple | None:
        """Everything but the values: each part's (kind, name, terminals, switch state) in order, and the positions.

        Two circuits with equal keys have the same topology, names and
        drawing, so they differ at most in resistances, EMFs and currents.
        None when a position has a -0.0, which would compare equal to 0.0.
        """
        if self._signed_zero:
            return None
        return (tuple([(p.kind, p.name, p.a, p.b, p.closed) for p in self._parts.values()]),
                tuple(self._positions.items()))

    def __len__(self) -> int:
        return len(self._parts)

    def __contains__(self, name: object) -> bool:
        return name in self._parts
