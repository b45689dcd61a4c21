"""Circuits for the hand-analysis tests (all values invented), and independent substitution.

``values_from_nodal`` gives every name an equation may use its number from the
independent modified nodal analysis in tests/reference_nodal.py (a different
method from the mesh solver), so substituting into a generated equation checks
it against something the program did not compute. Loop currents exist only in
the mesh method, so they are read from the solution; the test below holds them
against the nodal branch currents first.
"""
from __future__ import annotations

import ast
import math

import pytest

from app.analysis import Analysis, CurrentTag, analyse
from reference_nodal import nodal_solve
from solver import Circuit, solve


def two_windows() -> Circuit:
    """A workshop charger feeding a lamp string: B1 | R1, R2 shared, R3, B2 (two windows side by side)."""
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=9.0, internal_resistance=0.5)
    c.resistor("R1", "a", "b", 100.0)
    c.resistor("R2", "b", "m", 220.0)
    c.wire("W0", "m", "g")
    c.resistor("R3", "b", "c", 330.0)
    c.cell("B2", plus="c", minus="h", emf=3.0)
    c.wire("W1", "h", "m")
    for p, xy in {"a": (0, 0), "b": (4, 0), "c": (8, 0), "g": (0, 4), "m": (4, 4), "h": (8, 4)}.items():
        c.place(p, *xy)
    return c


def bridge() -> Circuit:
    """A strain-gauge bridge: B1 across a diamond of four arms with R5 between the mid points."""
    c = Circuit()
    c.cell("B1", plus="top", minus="bot", emf=12.0, internal_resistance=1.0)
    c.resistor("R1", "top", "l", 120.0)
    c.resistor("R2", "l", "bot", 150.0)
    c.resistor("R3", "top", "r", 100.0)
    c.resistor("R4", "r", "bot", 470.0)
    c.resistor("R5", "l", "r", 330.0)
    return c


def with_source() -> Circuit:
    """A sensor loop: B1 with R1 and R2, and a 4 mA current source I1 pushing through R3 into R2's node."""
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=5.0)
    c.resistor("R1", "a", "b", 1000.0)
    c.resistor("R2", "b", "g", 2200.0)
    c.resistor("R3", "b", "c", 470.0)
    c.current_source("I1", "g", "c", 0.004)
    for p, xy in {"a": (0, 0), "b": (4, 0), "c": (8, 0), "g": (0, 4)}.items():
        c.place(p, *xy)
    return c


CIRCUITS = {"two windows": two_windows, "bridge": bridge, "current source": with_source}
TAGS = {"two windows": (CurrentTag("Ia", "R1", True), CurrentTag("Ib", "R3", True)),
        "bridge": (CurrentTag("Ix", "R5", True),),
        "current source": ()}


def solved(name: str, tags=None) -> tuple[Circuit, Analysis]:
    c = CIRCUITS[name]()
    return c, analyse(solve(c, ground=c.parts[0].b), c, TAGS[name] if tags is None else tags)


def values_from_nodal(c: Circuit, a: Analysis) -> dict[str, float]:
    """Every name's number, from the nodal reference (loop currents from the solution)."""
    ref = nodal_solve(c)
    v: dict[str, float] = {}
    for p in c.parts:
        if p.kind == "resistor":
            v[p.name] = p.resistance
        elif p.kind == "cell":
            v[p.name] = p.emf
            v[f"r_{p.name}"] = p.resistance
        elif p.kind == "current_source":
            v[p.name] = p.current
            v[f"V_{p.name}"] = ref.voltage[p.name]
    for b in a.branches.branches:
        part, sense = b.parts[0]
        v[b.current] = sense * ref.current[part]
    for k, loop in enumerate(a.solution.loops):
        v[f"IL{k + 1}"] = loop.current
    return v


def evaluate(side: str, values: dict[str, float]) -> float:
    """Evaluate one side of a *generated* equation (our own ASCII output, names and + - * only).

    The tree is walked here, names looked up in ``values``; nothing is executed.
    """
    def walk(n: ast.AST) -> float:
        if isinstance(n, ast.Expression):
            return walk(n.body)
        if isinstance(n, ast.Name):
            return values[n.id]
        if isinstance(n, ast.Constant):
            return float(n.value)
        if isinstance(n, ast.UnaryOp) and isinstance(n.op, ast.USub):
            return -walk(n.operand)
        if isinstance(n, ast.BinOp):
            x, y = walk(n.left), walk(n.right)
            return {ast.Add: x + y, ast.Sub: x - y, ast.Mult: x * y}[type(n.op)]
        raise AssertionError(f"unexpected {ast.dump(n)}")
    return walk(ast.parse(side.strip(), mode="eval"))


def natural_size(c: Circuit, values: dict[str, float]) -> float:
    """Sum of every EMF, source voltage and |I|·R in the circuit: the yardstick for residuals."""
    ref = nodal_solve(c)
    return (sum(abs(p.emf) for p in c.parts) + sum(abs(ref.voltage[p.name]) for p in c.parts
            if p.kind == "current_source")
            + sum(abs(ref.current[p.name]) * p.resistance for p in c.parts)) or 1.0


@pytest.mark.parametrize("name", list(CIRCUITS))
def test_loop_currents_rebuild_the_nodal_branch_currents(name):
    # Reference: independent nodal analysis (tests/reference_nodal.py). Each part's current is the signed
    # sum of the loop currents through it, so the loop currents used for mesh-form substitution are sound.
    c, a = solved(name)
    ref = nodal_solve(c)
    for p in c.parts:
        if p.kind in ("resistor", "cell"):
            total = sum(s * loop.current for loop in a.solution.loops for q, s in loop.parts if q == p.name)
            assert math.isclose(total, ref.current[p.name], rel_tol=1e-9, abs_tol=1e-12)
