"""Circuits the solver must refuse, or solve with a note, in plain words naming the parts.

A refusal is a ``CircuitError`` (never a traceback, never NaN) whose ``.parts``
are the parts to mark on the drawing and whose message names them and says
what is wrong.
"""
from __future__ import annotations

import math

import pytest

from solver import (
    Circuit,
    CircuitError,
    CurrentSourceCutError,
    DuplicateNameError,
    IdealCellLoopError,
    InvalidValueError,
    SelfConnectedError,
    ShortedCellError,
    UnknownPartError,
    solve,
)


def refusal(build, ground: str | None = "g") -> CircuitError:
    """The CircuitError raised while building or solving; fails if the circuit is accepted."""
    c = Circuit()
    with pytest.raises(CircuitError) as info:
        build(c)
        solve(c, ground=ground)
    err = info.value
    message = str(err)
    assert message.strip() and "Traceback" not in message and "nan" not in message.split()
    for name in err.parts:
        assert name in message, f"{name} is marked but not named in: {message}"
    return err


def has_words(message: str, *words: str) -> bool:
    low = message.lower()
    return all(w.lower() in low for w in words)


# -- shorts and loops of ideal cells --------------------------------------------

def test_ideal_cell_shorted_by_wire():
    def build(c):
        c.cell("B1", plus="a", minus="g", emf=9.0)
        c.resistor("R1", "a", "g", 47.0)
        c.wire("W1", "a", "g")
    err = refusal(build)
    assert isinstance(err, ShortedCellError)
    assert set(err.parts) == {"B1", "W1"}
    assert has_words(str(err), "short")


def test_ideal_cell_shorted_by_closed_switch_through_wires():
    def build(c):
        c.cell("B1", plus="a", minus="g", emf=12.0)
        c.wire("W1", "a", "m")
        c.switch("S1", "m", "n", closed=True)
        c.wire("W2", "n", "g")
        c.resistor("R1", "a", "g", 100.0)
    err = refusal(build)
    assert isinstance(err, ShortedCellError)
    assert set(err.parts) == {"B1", "W1", "S1", "W2"}
    assert has_words(str(err), "short")


def test_open_switch_does_not_short_the_cell():
    # Ohm's law: only R1 loads the cell
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=12.0)
    c.switch("S1", "a", "g", closed=False)
    c.resistor("R1", "a", "g", 100.0)
    sol = solve(c, ground="g")
    assert sol.current("S1") == 0.0
    assert sol.current("R1") == pytest.approx(0.12, rel=1e-12)


def test_cell_with_internal_resistance_shorted_is_solved_with_a_caution():
    # Ohm's law: a shorted cell drives E / r through its own internal resistance
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=12.0, internal_resistance=0.05)
    c.wire("W1", "a", "g")
    sol = solve(c, ground="g")
    assert sol.current("B1") == pytest.approx(-240.0, rel=1e-12)
    assert sol.current("W1") == pytest.approx(240.0, rel=1e-12)
    cautions = [n for n in sol.notes if "B1" in n.parts]
    assert cautions and has_words(cautions[0].message, "short", "B1")


def test_ideal_cells_in_parallel_with_different_emfs():
    def build(c):
        c.cell("B1", plus="a", minus="g", emf=9.0)
        c.cell("B2", plus="a", minus="g", emf=12.0)
        c.resistor("R1", "a", "g", 10.0)
    err = refusal(build)
    assert isinstance(err, IdealCellLoopError)
    assert set(err.parts) == {"B1", "B2"}
    assert has_words(str(err), "ideal")


def test_loop_of_three_ideal_cells_that_do_not_balance():
    def build(c):
        c.cell("B1", plus="a", minus="b", emf=1.5)
        c.cell("B2", plus="b", minus="g", emf=1.5)
        c.cell("B3", plus="a", minus="g", emf=1.2)
        c.resistor("R1", "a", "g", 10.0)
    err = refusal(build)
    assert isinstance(err, IdealCellLoopError)
    assert set(err.parts) == {"B1", "B2", "B3"}
    assert has_words(str(err), "ideal", "loop")


# -- current sources ---------------------------------------------------------

def test_current_sources_in_series_with_different_currents():
    def build(c):
        c.current_source("I1", "g", "m", 0.010)
        c.current_source("I2", "m", "b", 0.020)
        c.resistor("R1", "b", "g", 220.0)
    err = refusal(build)
    assert isinstance(err, CurrentSourceCutError)
    assert set(err.parts) == {"I1", "I2"}
    assert has_words(str(err), "series", "current source")


def test_current_source_with_no_return_path():
    def build(c):
        c.cell("B1", plus="a", minus="g", emf=5.0)
        c.resistor("R1", "a", "g", 1000.0)
        c.current_source("I1", "a", "x", 0.001)
        c.resistor("R2", "x", "y", 1000.0)
    err = refusal(build)
    assert isinstance(err, CurrentSourceCutError)
    assert err.parts == ("I1",)
    assert has_words(str(err), "I1", "return")


def test_current_source_between_islands():
    def build(c):
        c.resistor("R1", "a", "g", 10.0)
        c.resistor("R2", "p", "q", 10.0)
        c.current_source("I1", "a", "p", 0.5)
    err = refusal(build)
    assert isinstance(err, CurrentSourceCutError)
    assert "I1" in err.parts


# -- bad values and names ------------------------------------------------------

@pytest.mark.parametrize("add,words", [
    (lambda c: c.resistor("R1", "a", "g", -10.0), ["R1", "negative"]),
    (lambda c: c.resistor("R1", "a", "g", 0.0), ["R1", "zero"]),
    (lambda c: c.resistor("R1", "a", "g", float("nan")), ["R1", "not a number"]),
    (lambda c: c.resistor("R1", "a", "g", float("inf")), ["R1", "infinite"]),
    (lambda c: c.resistor("R1", "a", "g", "ten"), ["R1", "not a number"]),
    (lambda c: c.cell("R1", plus="a", minus="g", emf=float("nan")), ["R1", "EMF"]),
    (lambda c: c.cell("R1", plus="a", minus="g", emf=float("-inf")), ["R1", "EMF"]),
    (lambda c: c.cell("R1", plus="a", minus="g", emf=9.0, internal_resistance=-0.1), ["R1", "internal resistance"]),
    (lambda c: c.cell("R1", plus="a", minus="g", emf=9.0, internal_resistance=float("nan")), ["R1", "internal resistance"]),
    (lambda c: c.current_source("R1", "a", "g", float("nan")), ["R1", "current"]),
    (lambda c: c.current_source("R1", "a", "g", float("inf")), ["R1", "current"]),
    (lambda c: c.resistor("R1", "a", "g", 1e300), ["R1", "resistance"]),
    (lambda c: c.resistor("R1", "a", "g", 1e-300), ["R1", "resistance"]),
])
def test_bad_values_are_refused(add, words):
    def build(c):
        c.cell("B9", plus="a", minus="g", emf=9.0, internal_resistance=1.0)
        add(c)
    err = refusal(build)
    assert isinstance(err, InvalidValueError)
    assert err.parts == ("R1",)
    assert has_words(str(err), *words)


def test_duplicate_names_are_refused():
    def build(c):
        c.cell("B1", plus="a", minus="g", emf=9.0)
        c.resistor("R1", "a", "g", 100.0)
        c.resistor("R1", "a", "g", 220.0)
    err = refusal(build)
    assert isinstance(err, DuplicateNameError)
    assert err.parts == ("R1",)
    assert has_words(str(err), "R1", "name")


@pytest.mark.parametrize("add", [
    lambda c: c.resistor("R1", "a", "a", 100.0),
    lambda c: c.wire("R1", "a", "a"),
    lambda c: c.cell("R1", plus="a", minus="a", emf=1.5),
])
def test_part_connected_to_itself_is_refused(add):
    def build(c):
        c.cell("B1", plus="a", minus="g", emf=9.0, internal_resistance=1.0)
        add(c)
    err = refusal(build)
    assert isinstance(err, SelfConnectedError)
    assert err.parts == ("R1",)
    assert has_words(str(err), "R1", "same point")


def test_unknown_ground_and_unknown_names():
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=9.0)
    c.resistor("R1", "a", "g", 100.0)
    with pytest.raises(CircuitError) as info:
        solve(c, ground="zz")
    assert "zz" in str(info.value)
    sol = solve(c, ground="g")
    for read in (sol.current, sol.voltage, sol.power):
        with pytest.raises(UnknownPartError) as info:
            read("R7")
        assert "R7" in str(info.value)
    with pytest.raises(UnknownPartError):
        sol.potential("nowhere")


# -- solved, with a note -----------------------------------------------------------

def test_dangling_part_carries_no_current_and_is_reported_open():
    # Ohm's law for the closed loop; the dangling resistor's far end sits at its neighbour's potential
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=9.0)
    c.resistor("R1", "a", "g", 100.0)
    c.resistor("R2", "a", "x", 470.0)     # x goes nowhere
    c.cell("B2", plus="y", minus="a", emf=1.5)  # nor does y
    sol = solve(c, ground="g")
    assert sol.current("R2") == 0.0 and sol.current("B2") == 0.0
    assert sol.current("R1") == pytest.approx(0.09, rel=1e-12)
    assert sol.potential("x") == pytest.approx(9.0, rel=1e-12)
    assert sol.potential("y") == pytest.approx(10.5, rel=1e-12)
    for name in ("R2", "B2"):
        notes = [n for n in sol.notes if name in n.parts]
        assert notes, f"no note about dangling {name}"
        assert has_words(notes[0].message, name, "open")
    assert not any("R1" in n.parts for n in sol.notes)


def test_no_ground_gives_each_island_its_own_reference_with_a_note():
    # two separate circuits, each a divider (Ohm's law); without a ground each is measured from a point of its own
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=9.0)
    c.resistor("R1", "a", "m", 100.0)
    c.resistor("R2", "m", "g", 200.0)
    c.cell("B2", plus="p", minus="q", emf=24.0)
    c.resistor("R3", "p", "r", 300.0)
    c.resistor("R4", "r", "q", 100.0)
    sol = solve(c)
    for island in (("a", "m", "g"), ("p", "r", "q")):
        assert min(abs(sol.potential(pt)) for pt in island) == 0.0, f"no 0 V point in {island}"
    assert sol.potential("m") - sol.potential("g") == pytest.approx(6.0, rel=1e-12)
    assert sol.potential("r") - sol.potential("q") == pytest.approx(6.0, rel=1e-12)
    notes = [n.message for n in sol.notes]
    assert any(has_words(m, "ground") for m in notes), notes
    assert all(math.isfinite(sol.potential(p)) for p in c.points)


def test_ground_in_one_island_notes_the_other():
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=9.0)
    c.resistor("R1", "a", "g", 100.0)
    c.cell("B2", plus="p", minus="q", emf=24.0)
    c.resistor("R3", "p", "q", 300.0)
    sol = solve(c, ground="g")
    assert sol.potential("g") == 0.0 and sol.potential("a") == pytest.approx(9.0)
    assert any(has_words(n.message, "ground") for n in sol.notes)


def test_single_island_with_ground_has_no_reference_note():
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=9.0)
    c.resistor("R1", "a", "g", 100.0)
    sol = solve(c, ground="g")
    assert not any(has_words(n.message, "ground") for n in sol.notes)


def test_opposed_series_current_sources_are_called_opposed():
    # KCL at the junction between them: 10 mA in from each side has nowhere to go
    c = Circuit()
    c.current_source("I1", "a", "b", 0.01)
    c.current_source("I2", "c", "b", 0.01)
    c.resistor("R1", "c", "a", 1.0)
    with pytest.raises(CurrentSourceCutError) as err:
        solve(c)
    assert set(err.value.parts) == {"I1", "I2"}
    assert "against each other" in str(err.value) and "10 mA" in str(err.value)


def test_a_cell_shorted_by_internal_wire_pieces_does_not_name_them():
    # the netlist's wire pieces are named "~w…" and are never shown to a person
    c = Circuit()
    c.cell("B1", plus="a", minus="b", emf=9.0)
    c.wire("~w0.1", "a", "x")
    c.wire("~w1.1", "x", "b")
    with pytest.raises(ShortedCellError) as err:
        solve(c)
    assert "~" not in str(err.value) and "by wires" in str(err.value)
