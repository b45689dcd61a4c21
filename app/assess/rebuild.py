"""A changed copy of a circuit, built with the solver's own builder methods.

The equivalent, the preferred-value substitutions and nothing else need it:
they ask "what if this part were different" without touching the original.
"""
from __future__ import annotations

from collections.abc import Callable

from solver import Circuit, Part
from solver.circuit import CELL, CURRENT_SOURCE, RESISTOR, SWITCH, WIRE

__all__ = ["rebuild"]


def _add(c: Circuit, p: Part) -> None:
    if p.kind == RESISTOR:
        c.resistor(p.name, p.a, p.b, p.resistance)
    elif p.kind == CELL:
        c.cell(p.name, plus=p.a, minus=p.b, emf=p.emf, internal_resistance=p.resistance)
    elif p.kind == CURRENT_SOURCE:
        c.current_source(p.name, p.a, p.b, p.current)
    elif p.kind == WIRE:
        c.wire(p.name, p.a, p.b)
    elif p.kind == SWITCH:
        c.switch(p.name, p.a, p.b, closed=p.closed)
    else:
        raise ValueError(f"unknown circuit part kind {p.kind!r}")


def rebuild(circuit: Circuit, change: Callable[[Part], Part | None] = lambda p: p,
            keep_positions: bool = True) -> Circuit:
    """A new circuit with every part passed through ``change`` (None leaves the part out)."""
    c = Circuit()
    for p in circuit.parts:
        q = change(p)
        if q is not None:
            _add(c, q)
    if keep_positions:
        for point, (x, y) in circuit.positions.items():
            c.place(point, x, y)
    return c
