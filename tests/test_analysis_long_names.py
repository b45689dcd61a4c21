"""The checker on circuits whose part names are longer than two characters (R10, R11, …).

The ladder's values are invented. Each loop equation the program writes is
first held against the independent nodal analysis of tests/reference_nodal.py
(it must hold for those numbers), then typed into the checker, which must
accept it and name its loop, and must refuse it with one sign turned round.
"""
from __future__ import annotations

from app.analysis import analyse, check_equation, equations
from solver import Circuit, solve
from test_analysis_circuits import evaluate, natural_size, values_from_nodal


def ladder(rungs: int = 6) -> Circuit:
    """A cell feeding a ladder of series and shunt resistors named R10 upwards."""
    c = Circuit()
    c.cell("B10", plus="t0", minus="g", emf=12.0, internal_resistance=0.2)
    for k in range(rungs):
        c.resistor(f"R{10 + 2 * k}", f"t{k}", f"t{k + 1}", 100.0 + 10 * k)
        c.resistor(f"R{11 + 2 * k}", f"t{k + 1}", "g", 470.0 + 33 * k)
    return c


def test_loop_equations_of_long_names_are_checked():
    c = ladder()
    a = analyse(solve(c, ground="g"), c)
    values = values_from_nodal(c, a)   # reference: independent nodal analysis
    kvl = [e for e in equations(a) if e.law == "KVL"]
    assert len(kvl) == 6
    for e in kvl:
        left, right = e.text.split(" = ")
        assert abs(evaluate(left, values) - evaluate(right, values)) <= 1e-9 * natural_size(c, values), e.text
        r = check_equation(a, e.text)
        assert r.ok and r.label == e.label, r.report()
        wrong = e.text.replace(" - ", " + ", 1)
        assert not check_equation(a, wrong).ok
