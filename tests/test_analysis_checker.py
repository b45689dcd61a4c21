"""The checker: right equations accepted in every honest spelling, wrong ones answered term by term.

Truth here is the circuit laws themselves: the correct equations fed in are written out by hand
(or are the generated ones, already held against the nodal reference in test_analysis_equations),
and each wrong one is made wrong on purpose in one known term, which the checker must name.
"""
from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app.analysis import check_equation, check_values, equations
from app.analysis.cli_support import check_equation_text, equations_text
from reference_nodal import nodal_solve
from test_analysis_circuits import CIRCUITS, solved


def sides(text: str) -> tuple[str, str]:
    left, right = text.split("=")
    return left.strip(), right.strip()


@pytest.mark.parametrize("form", ["branch", "mesh"])
@pytest.mark.parametrize("name", list(CIRCUITS))
def test_every_correct_equation_accepted_both_ways_and_scaled(name, form):
    c, a = solved(name)
    for e in equations(a, form):
        if e.law == "source":
            continue
        left, right = sides(e.text)
        for text in (e.text, f"{right} = {left}", f"-3*({left}) = -3*({right})", f"({left})/2 = ({right})/2"):
            r = check_equation(a, text)
            assert r.ok, (text, r.report())
            assert r.law == e.law


@pytest.mark.parametrize("name", ["two windows", "bridge"])
def test_the_solvers_loop_is_named(name):
    c, a = solved(name)
    for e in equations(a):
        if e.law == "KVL":
            assert check_equation(a, e.text).label == e.label


def test_written_with_a_combination_of_tags_and_outer_loop():
    c, a = solved("two windows")
    # R2's branch is untagged; by KCL at b its current is Ia − Ib, as a person writes it.
    assert check_equation(a, "B1 - Ia*r_B1 - Ia*R1 - (Ia - Ib)*R2 = 0").ok
    # The outer loop is no solver window but a simple cycle of the circuit.
    r = check_equation(a, "B1 = Ia*(r_B1 + R1) + Ib*R3 + B2")
    assert r.ok and "R3" in r.label
    # Numbers with SI prefixes in place of part values.
    assert check_equation(a, "9 - 0.5*Ia - 100*Ia - 0.22k*(Ia - Ib) = 0").ok


GOOD = "B1 - Ia*r_B1 - Ia*R1 - (Ia - Ib)*R2 = 0"


@pytest.mark.parametrize("text, kind, part", [
    ("B1 - Ia*r_B1 - Ia*R1 + (Ia - Ib)*R2 = 0", "sign", "R2"),          # flipped sign
    ("B1 + Ia*r_B1 - Ia*R1 - (Ia - Ib)*R2 = 0", "sign", "B1"),          # internal resistance's sign
    ("-B1 - Ia*r_B1 - Ia*R1 - (Ia - Ib)*R2 = 0", "sign", "B1"),         # EMF taken + to −
    ("B1 - Ia*r_B1 - (Ia - Ib)*R2 = 0", "missing", "R1"),               # missing term
    ("B1 - Ia*r_B1 - Ia*R3 - (Ia - Ib)*R2 = 0", "wrong resistor", "R1"),  # wrong resistor
    ("B1 - Ia*r_B1 - Ia*R1 - Ib*R2 = 0", "wrong current", "R2"),        # a current of another branch
    ("B1 - Ia*r_B1 - Ia*R1 - (Ia - Ib)*R2 - Ib*R3 = 0", "extra", "R3"),  # extra term
])
def test_wrong_kvl_names_the_wrong_term(text, kind, part):
    c, a = solved("two windows")
    assert check_equation(a, GOOD).ok
    r = check_equation(a, text)
    assert not r.ok and r.label == "L1"
    assert [(f.kind, f.part) for f in r.findings] == [(kind, part)], r.report()
    assert part in r.findings[0].message


def test_wrong_kcl_names_the_wrong_current():
    c, a = solved("two windows")
    i2 = a.branches.of_part("R2").current
    assert check_equation(a, f"Ia = {i2} + Ib").ok
    r = check_equation(a, f"Ia = {i2} - Ib")
    assert not r.ok and [(f.kind, f.part) for f in r.findings] == [("sign", "R3")]
    r = check_equation(a, f"Ia = {i2}")
    assert not r.ok and [f.kind for f in r.findings] == ["missing"] and "Ib" in r.findings[0].message


def test_current_source_loop_needs_its_voltage():
    c, a = solved("current source")
    kvl = [e for e in equations(a) if e.law == "KVL" and "I1" in e.parts][0]
    assert check_equation(a, kvl.text).ok
    without = kvl.text.replace("V_I1", "0")
    r = check_equation(a, without)
    assert not r.ok and any(f.kind == "missing" and f.part == "I1" for f in r.findings), r.report()
    # The source's name stands for its current, so KCL may use it directly.
    for e in equations(a):
        if e.law == "KCL":
            b = a.branches.of_part("I1")
            assert check_equation(a, e.text.replace(b.current, f"({b.sense('I1')}*I1)")).ok


@pytest.mark.parametrize("text, words, column", [
    ("Ia*Ib = 0", "not linear", 3),
    ("B1 - Q*R1 = 0", "no part or current called Q", 5),
    ("__import__('os').system('ls') = 0", "not allowed", 0),
    ("B1 - Ia*R1 = 0 = 0", "one = sign", 15),
    ("B1 - Ia*(R1 = 0", "cannot be read", None),
    ("Ia/R1 = 0", "plain number", 3),
    ("B1 - S1 = 0", None, None),
    ("", "Type an equation", None),
])
def test_bad_text_gets_a_message_with_its_place(text, words, column):
    c, a = solved("two windows")
    r = check_equation(a, text)
    assert not r.ok and r.message
    if words:
        assert words in r.message
    if column is not None:
        assert r.column == column


def test_numeric_answers():
    c, a = solved("two windows")
    ref = nodal_solve(c, ground="g")   # reference: independent nodal analysis
    ia = ref.current["R1"]
    n_b = a.branches.label(a.solution.node_of("b"))
    ok = check_values(a, {"Ia": ia * 1.005, f"V({n_b})": ref.potential["b"], "V(R3)": ref.voltage["R3"]})
    assert ok.ok, ok.report()
    bad = check_values(a, {"Ia": ia * 1.2, "Ib": -ref.current["R3"], "Ix": 1.0, "I(R2)": "12.3m"})
    assert not bad.ok
    by = {i.name: i for i in bad.items}
    assert not by["Ia"].ok and "expected" in by["Ia"].message and by["Ia"].expected == pytest.approx(ia)
    assert not by["Ib"].ok and "sign" in by["Ib"].message
    assert not by["Ix"].ok and "no current called Ix" in by["Ix"].message
    assert by["I(R2)"].got == pytest.approx(0.0123)
    assert check_values(a, {"Ia": ia * 1.02}, tol=0.05).ok


def test_cli_support():
    c, a = solved("two windows")
    text = equations_text(a.solution, c, ())
    assert "KVL around loop L1" in text and "KCL at junction" in text and "Mesh-current form" in text
    assert "\\left(" in equations_text(a.solution, c, (), latex=True)
    ok, msg = check_equation_text(a.solution, c, "B1 - I1*r_B1 - I1*R1 - I2*R2 = 0")
    assert ok, msg
    ok, msg = check_equation_text(a.solution, c, "B1 - I1*R1 + (")
    assert not ok and "^" in msg


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=80))
def test_fuzz_arbitrary_text_never_raises(text):
    c, a = FUZZ
    r = check_equation(a, text)
    assert isinstance(r.message, str) and r.message


ALPHABET = list("IaIbR1R2R3B1r_()+-*/=. 0123456789kmu") + ["Ia", "Ib", "R1", "R2", "B1", "r_B1", "IL1", "**", "=="]


@settings(max_examples=300, deadline=None)
@given(st.lists(st.sampled_from(ALPHABET), max_size=30).map("".join))
def test_fuzz_near_equations_never_raise(text):
    c, a = FUZZ
    r = check_equation(a, text)
    assert isinstance(r.message, str) and r.message


FUZZ = solved("two windows")
