"""Thevenin and Norton equivalents seen at two points, and the load that draws most power.

Any linear two-terminal network is, seen from two points, an EMF in series
with a resistance (Thevenin, 1883) or a current source in parallel with it
(Norton, 1926).  The EMF is the open-circuit voltage; the resistance is what
a test current sees with every source set to zero (cells become their
internal resistance, current sources open); the short-circuit current is
their ratio.  A load equal to the internal resistance draws the most power,
V²/4R (Jacobi's law).  Everything is computed by the mesh solver itself.
"""
from __future__ import annotations

from dataclasses import dataclass

from solver import Circuit, CircuitError, Part, solve
from solver.circuit import CELL, CURRENT_SOURCE, RESISTOR, WIRE
from solver.errors import CurrentSourceCutError

from ..sketch.netlist import Netlist
from .rebuild import rebuild

__all__ = ["Equivalent", "equivalent", "equivalent_at"]

_TEST = "~test"


@dataclass(frozen=True)
class Equivalent:
    """The network seen from point ``a`` (taken as plus) to point ``b``.

    ``open_voltage`` V(a) − V(b) with nothing attached (Thevenin EMF), V;
    ``resistance`` the internal resistance, Ω (0 when an ideal cell sits
    directly between the points); ``short_current`` the current a short from
    a to b would carry (Norton current), A, or None when ``resistance`` is 0.
    ``has_source`` is False when no source drives the points (resistance only).
    """

    a: str
    b: str
    open_voltage: float
    resistance: float
    has_source: bool

    @property
    def short_current(self) -> float | None:
        return self.open_voltage / self.resistance if self.resistance > 0 else None

    @property
    def max_power_load(self) -> float | None:
        """The load resistance that draws the most power (= internal resistance), Ω."""
        return self.resistance if self.resistance > 0 and self.has_source else None

    @property
    def max_power(self) -> float | None:
        """The power such a load draws, V²/4R, W."""
        if self.max_power_load is None:
            return None
        return self.open_voltage ** 2 / (4.0 * self.resistance)


def _zeroed(p: Part) -> Part | None:
    """A part with its source set to zero: a cell is its internal resistance, a current source is open."""
    if p.kind == CELL:
        if p.resistance > 0:
            return Part(p.name, RESISTOR, p.a, p.b, resistance=p.resistance)
        return Part(p.name, WIRE, p.a, p.b)
    if p.kind == CURRENT_SOURCE:
        return None
    return p


def equivalent(circuit: Circuit, a: str, b: str) -> Equivalent:
    """The Thevenin/Norton equivalent of ``circuit`` between its points ``a`` and ``b``.

    Raises ``CircuitError`` in plain words when a point is unknown, the
    points are one node, no path joins them, or the circuit cannot be solved.
    """
    for pt in (a, b):
        if pt not in circuit.points:
            raise CircuitError(f"There is no point {pt} in the circuit; pick a terminal or a wire end.")
    sol = solve(circuit)
    if sol.node_of(a) == sol.node_of(b):
        raise CircuitError(f"Points {a} and {b} are joined by wires: there is nothing between them.")
    v_open = sol.potential(a) - sol.potential(b)
    has_source = any(p.kind in (CELL, CURRENT_SOURCE) and (p.emf or p.current) for p in circuit.parts)

    test = rebuild(circuit, _zeroed, keep_positions=False)
    test.current_source(_TEST, b, a, 1.0)  # 1 A pushed into a, back out of b
    try:
        tsol = solve(test)
    except CurrentSourceCutError:
        raise CircuitError(f"No path joins points {a} and {b}, so they have no equivalent; "
                           "the voltage between separate pieces of a circuit is not defined.") from None
    if tsol.node_of(a) == tsol.node_of(b):
        resistance = 0.0  # an ideal cell directly between the points
    else:
        resistance = tsol.potential(a) - tsol.potential(b)
    return Equivalent(a, b, v_open, max(resistance, 0.0), has_source)


def equivalent_at(netlist: Netlist, p: tuple[int, int], q: tuple[int, int]) -> Equivalent:
    """The equivalent between two grid points of a sketch (terminals or wire ends), p as plus."""
    try:
        a, b = netlist.point_at[p], netlist.point_at[q]
    except KeyError:
        raise CircuitError("Pick two points where a part's terminal or a wire end lies.") from None
    return equivalent(netlist.circuit, a, b)
