"""Generated KVL/KCL equations held against the independent nodal reference and the sign rules.

Outside truth: tests/reference_nodal.py (modified nodal analysis, a different method from the mesh
solver) for every number substituted; the sign conventions of the design notes (a rise round the loop
is positive: I·R against the current, EMF from − to +; currents into a junction positive) checked
part by part against the nodal voltages; and equations written out by hand below.
"""
from __future__ import annotations

import math

import pytest

from app.analysis import (CurrentTag, LoopError, TagError, analyse, equations, kcl_equations, kvl_equations,
                          loop_equation, merged_loop_equation, trace_loop)
from app.analysis.terms import term_value
from reference_nodal import nodal_solve
from solver import Circuit, solve
from test_analysis_circuits import CIRCUITS, evaluate, natural_size, solved, values_from_nodal


def residual(text: str, values: dict[str, float]) -> float:
    left, right = text.split("=")
    return evaluate(left, values) - evaluate(right, values)


@pytest.mark.parametrize("form", ["branch", "mesh"])
@pytest.mark.parametrize("name", list(CIRCUITS))
def test_every_equation_holds_for_the_nodal_solution(name, form):
    # Reference: nodal analysis numbers substituted into the equation text (1e-9 of the circuit's size).
    c, a = solved(name)
    values = values_from_nodal(c, a)
    size = natural_size(c, values)
    eqs = equations(a, form)
    assert len([e for e in eqs if e.law == "KVL"]) == len(a.solution.loops) > 0
    for e in eqs:
        scale = size if e.unit == "V" else max(abs(v) for k, v in values.items() if a.kind.get(k) == "current")
        assert abs(residual(e.text, values)) <= 1e-9 * scale, e.text
        assert abs(e.residual) <= 1e-9 * scale


@pytest.mark.parametrize("name", list(CIRCUITS))
def test_one_kcl_per_junction_incoming_positive(name):
    # Rule (design notes): at a junction incoming currents are positive. The current entering the node
    # through a part comes from the nodal reference: +i at its second terminal, −i at its first.
    c, a = solved(name)
    ref = nodal_solve(c)
    values = values_from_nodal(c, a)
    node_of = a.solution.node_of
    degree = {}
    for p in c.parts:
        if p.kind in ("resistor", "cell", "current_source"):
            for t in (p.a, p.b):
                degree[node_of(t)] = degree.get(node_of(t), 0) + 1
    junctions = {n for n, d in degree.items() if d >= 3}
    kcl = kcl_equations(a)
    assert {e.nodes[0] for e in kcl} == junctions
    for e in kcl:
        node = e.nodes[0]
        for t in e.lhs:
            b = a.branches.named(t.unknowns[0][0])
            inflow = 0.0
            for part, _ in b.parts:
                p = c.part(part)
                if node_of(p.b) == node:
                    inflow += ref.current[part]
                if node_of(p.a) == node:
                    inflow -= ref.current[part]
            assert math.isclose(term_value(t, values), inflow, rel_tol=1e-9, abs_tol=1e-12)


@pytest.mark.parametrize("name", list(CIRCUITS))
def test_kvl_terms_are_the_rises_across_each_part(name):
    # Rule (design notes): I·R positive against the current, EMF positive from − to +, i.e. each part's
    # terms add up to the rise of potential across it in the direction of travel. Potentials: nodal reference.
    c, a = solved(name)
    ref = nodal_solve(c)
    values = values_from_nodal(c, a)
    for e in kvl_equations(a):
        loop = a.solution.loops[e.loop]
        for part, s in loop.parts:
            rise = -s * ref.voltage[part]       # V(exit) − V(entry)
            got = sum(term_value(t, values) for t in e.lhs if t.part == part)
            assert math.isclose(got, rise, rel_tol=1e-9, abs_tol=1e-12), (e.text, part)


def linear(*terms: tuple[float, str | None, str | None]) -> dict:
    """A hand-written equation as (coefficient, current or None, value symbol or None) terms."""
    out = {}
    for k, current, value in terms:
        key = (current, (value,) if value else ())
        out[key] = out.get(key, 0.0) + k
    return out


def single_loop() -> Circuit:
    """A bicycle lamp: B1 (+ at a) through R1 and R2 back to its − terminal, drawn as one clockwise window."""
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=6.0)
    c.resistor("R1", "a", "b", 10.0)
    c.resistor("R2", "b", "g", 20.0)
    for p, xy in {"a": (0, 0), "b": (4, 0), "g": (0, 4)}.items():
        c.place(p, *xy)
    return c


def test_single_loop_matches_hand_written_equations():
    c = single_loop()
    a = analyse(solve(c, ground="g"), c, [CurrentTag("I", "R1", True)])
    (kvl,) = kvl_equations(a)
    # By hand, clockwise a → b → g → a: R1 and R2 along I (−I·R each); B1 from − to + (+B1).
    assert kvl.linear == linear((1, None, "B1"), (-1, "I", "R1"), (-1, "I", "R2"))
    # Mesh form by hand: (R1 + R2)·IL1 = B1.
    (mesh,) = kvl_equations(a, "mesh")
    assert mesh.linear == linear((1, "IL1", "R1"), (1, "IL1", "R2"), (-1, None, "B1"))
    assert kcl_equations(a) == []          # no junction in a single loop


def test_two_windows_match_hand_written_equations():
    c, a = solved("two windows")
    # Drawn: B1 left (+ at top a), R1 a→b top left, R2 b→m middle, R3 b→c top right, B2 right (+ at top c).
    # Tags Ia on R1 (a→b), Ib on R3 (b→c); the solver's windows run clockwise.
    l1, l2 = kvl_equations(a)
    i2 = a.branches.of_part("R2").current       # untagged, written Ia − Ib by KCL at b
    # L1 clockwise: up through B1 (− to +: +B1, against nothing), along Ia through r_B1 and R1, down R2 along I2.
    assert l1.linear == linear((1, None, "B1"), (-1, "Ia", "r_B1"), (-1, "Ia", "R1"), (-1, "Ia", "R2"),
                               (1, "Ib", "R2"))
    assert "(Ia - Ib)*R2" in l1.text
    # L2 clockwise: up R2 against I2, along Ib through R3, down through B2 from + to − (−B2).
    assert l2.linear == linear((1, "Ia", "R2"), (-1, "Ib", "R2"), (-1, "Ib", "R3"), (-1, None, "B2"))
    # KCL at b: Ia comes in, I2 and Ib go out.
    b_eq = next(e for e in kcl_equations(a) if e.nodes == (a.solution.node_of("b"),))
    assert b_eq.linear == linear((1, "Ia", None), (-1, i2, None), (-1, "Ib", None))
    # Mesh form by hand: (r_B1 + R1 + R2)·IL1 − R2·IL2 = B1 and −R2·IL1 + (R2 + R3)·IL2 = −B2.
    m1, m2 = kvl_equations(a, "mesh")
    assert m1.linear == linear((1, "IL1", "r_B1"), (1, "IL1", "R1"), (1, "IL1", "R2"), (-1, "IL2", "R2"),
                               (-1, None, "B1"))
    assert m2.linear == linear((-1, "IL1", "R2"), (1, "IL2", "R2"), (1, "IL2", "R3"), (1, None, "B2"))


def test_current_source_voltage_is_an_unknown_of_its_loop():
    c, a = solved("current source")
    with_source = [e for e in kvl_equations(a) if "I1" in e.parts]
    assert with_source and all("V_I1" in e.text and "unknown voltage" in e.note for e in with_source)
    values = values_from_nodal(c, a)
    for e in equations(a, "mesh"):
        assert abs(residual(e.text, values)) <= 1e-9 * natural_size(c, values)


def test_own_loop_by_parts_points_and_direction():
    c, a = solved("two windows")
    values = values_from_nodal(c, a)
    outer = loop_equation(a, ["B1", "R1", "R3", "B2"], "clockwise")
    # By hand, clockwise round the outside: +B1, −Ia·r_B1, −Ia·R1, −Ib·R3, −B2.
    assert outer.linear == linear((1, None, "B1"), (-1, "Ia", "r_B1"), (-1, "Ia", "R1"), (-1, "Ib", "R3"),
                                  (-1, None, "B2"))
    back = loop_equation(a, ["B1", "R1", "R3", "B2"], "anticlockwise")
    assert back.linear == {k: -v for k, v in outer.linear.items()}
    by_points = loop_equation(a, ["g", "a", "b", "c", "h", "m", "g"])
    assert abs(residual(by_points.text, values)) <= 1e-9 * natural_size(c, values)
    assert merged_loop_equation(a, [0, 1]).linear == outer.linear


@pytest.mark.parametrize("items, reason", [
    (["R1", "R3"], "not closed"),
    (["a", "b", "c"], "not closed"),
    (["a", "b", "m", "b", "a"], "twice"),
    (["R1", "R2", "B1", "R9"], "neither a part nor a point"),
    (["R1", "B2"], "do not touch"),
])
def test_own_loop_refused_with_reason(items, reason):
    c, a = solved("two windows")
    with pytest.raises(LoopError, match=reason):
        trace_loop(a, items)


def test_windows_that_share_no_side_are_refused():
    c = Circuit()   # a three-window ladder: L1 and L3 share no part
    c.cell("B1", plus="t0", minus="b0", emf=1.5)
    for k in range(3):
        c.resistor(f"R{k + 1}", f"t{k}", f"t{k + 1}", 10.0)
        c.resistor(f"R{k + 4}", f"t{k + 1}", f"b{k + 1}", 10.0)
        c.wire(f"W{k}", f"b{k + 1}", f"b{k}")
    for k in range(4):
        c.place(f"t{k}", 4 * k, 0)
        c.place(f"b{k}", 4 * k, 4)
    a = analyse(solve(c, ground="b0"), c)
    assert len(a.solution.loops) == 3
    with pytest.raises(LoopError, match="separate loops|only touch"):
        merged_loop_equation(a, [0, 2])
    merged_loop_equation(a, [0, 1])   # neighbours make one loop


@pytest.mark.parametrize("tags, reason", [
    ([CurrentTag("2x", "R1")], "cannot be a current name"),
    ([CurrentTag("R2", "R1")], "already the name of a part"),
    ([CurrentTag("IL1", "R1")], "kept for the equations"),
    ([CurrentTag("Ia", "R1"), CurrentTag("Ib", "B1")], "both on the branch"),
    ([CurrentTag("Ia", "R1"), CurrentTag("Ia", "R3")], "two different branches"),
    ([CurrentTag("Ia", "R9")], "not a part"),
    ([CurrentTag("Ia", "W0")], "not on any branch"),
])
def test_bad_tags_are_refused(tags, reason):
    c = CIRCUITS["two windows"]()
    with pytest.raises(TagError, match=reason):
        analyse(solve(c, ground="g"), c, tags)


def test_tags_name_and_direct_their_branch_and_auto_names_do_not_clash():
    c, a = solved("current source")   # a part is called I1, so no branch may be
    names = [b.current for b in a.branches.branches]
    assert "I1" not in names and len(set(names)) == len(names)
    c, a = solved("two windows", (CurrentTag("Iback", "R1", False),))
    b = a.branches.named("Iback")
    assert b.sense("R1") == -1
    assert math.isclose(b.value, -nodal_solve(c).current["R1"], rel_tol=1e-9)
