"""The topology cache keeps ``solve`` a pure function of its circuit.

Not a physics check (those are in test_solver_reference.py and
test_solver_fuzz.py): here the solver is held against itself with an empty
cache. A circuit solved after other circuits of its shape (the same parts,
points and drawing with other values or switch states) must give exactly,
bit for bit, what it gives solved first; and solutions must not share
anything a caller can change.
"""
from __future__ import annotations

import threading

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from test_solver_fuzz import VALUES, circuits

from solver import Circuit, CircuitError, solve
from solver.topocache import CACHE, CACHE_MAX_PARTS


def outcome(steps, ground) -> tuple:
    """Everything a solve reports, as bytes and text, or the refusal (class, message, parts)."""
    c = Circuit()
    try:
        for method, args, kw in steps:
            getattr(c, method)(*args, **kw)
        sol = solve(c, ground=ground)
    except CircuitError as err:
        return (type(err).__name__, err.message, err.parts)
    return (sol.currents.tobytes(), sol.voltages.tobytes(), sol.powers.tobytes(), sol.node_potentials.tobytes(),
            sol.loop_currents.tobytes(), sol.loop_method, sol.nodes, sol.references, sol.islands,
            [(lp.parts, lp.orientation, lp.current.hex(), lp.kind) for lp in sol.loops],
            [(n.kind, n.message, n.parts) for n in sol.notes])


@st.composite
def variant(draw, steps):
    """The same parts and points with new values; now and then a switch turned, a cell made ideal or not."""
    out = []
    for method, args, kw in steps:
        kw = dict(kw)
        if method == "resistor" and draw(st.booleans()):
            args = (*args[:3], draw(VALUES))
        elif method == "current_source" and draw(st.booleans()):
            args = (*args[:3], draw(st.one_of(st.just(0.0), VALUES)))
        elif method == "cell" and draw(st.booleans()):
            kw["emf"] = draw(st.one_of(st.just(0.0), VALUES))
            kw["internal_resistance"] = draw(st.one_of(st.just(0.0), VALUES))
        elif method == "switch" and draw(st.integers(0, 5)) == 0:
            kw["closed"] = not kw["closed"]
        out.append((method, args, kw))
    return out


@st.composite
def circuit_and_variants(draw):
    steps, ground = draw(circuits())
    return steps, ground, draw(st.lists(variant(steps), min_size=1, max_size=4))


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(circuit_and_variants())
def test_a_circuit_solved_after_its_variants_gives_what_it_gives_with_an_empty_cache(case):
    check_against_empty_cache(*case)


@pytest.mark.slow
@settings(max_examples=3000, deadline=None, suppress_health_check=list(HealthCheck))
@given(circuit_and_variants())
def test_many_circuits_solved_after_their_variants(case):
    check_against_empty_cache(*case)


def check_against_empty_cache(steps, ground, variants) -> None:
    CACHE.clear()
    fresh = outcome(steps, ground)
    fresh_variants = []
    for v in variants:
        CACHE.clear()
        fresh_variants.append(outcome(v, ground))
    CACHE.clear()
    for v, expected in zip(variants, fresh_variants):   # each through whatever the last ones left
        assert outcome(v, ground) == expected
    assert outcome(steps, ground) == fresh


def grid(n: int, ohms: float) -> Circuit:
    """An n × n lattice of resistors fed by a cell, drawn (so its loops are the windows)."""
    c = Circuit()
    k = 0
    for y in range(n):
        for x in range(n):
            c.place(f"p{x}_{y}", x, y)
            if x + 1 < n:
                k += 1
                c.resistor(f"R{k}", f"p{x}_{y}", f"p{x + 1}_{y}", ohms + k)
            if y + 1 < n and (x, y) != (0, 0):
                k += 1
                c.resistor(f"R{k}", f"p{x}_{y}", f"p{x}_{y + 1}", ohms + k)
    c.cell("B1", plus="p0_0", minus="p0_1", emf=12.0, internal_resistance=0.5)
    return c


def test_solutions_of_one_shape_share_nothing_a_caller_can_change():
    CACHE.clear()
    first = solve(grid(4, 100.0), ground="p0_1")
    kept = [first.currents.copy(), first.voltages.copy(), first.node_potentials.copy(), first.loop_currents.copy()]
    second = solve(grid(4, 100.0), ground="p0_1")     # the same shape, from the cache
    for arr in (second.currents, second.voltages, second.powers, second.node_potentials, second.loop_currents):
        arr[:] = 7.0
    second.references.append("x")
    second.notes.append(None)
    assert all(np.array_equal(a, b) for a, b in
               zip(kept, [first.currents, first.voltages, first.node_potentials, first.loop_currents]))
    third = solve(grid(4, 100.0), ground="p0_1")
    assert third.currents.tobytes() == kept[0].tobytes() and third.references == [] and third.notes == []


def test_threads_solving_one_shape_get_what_each_gets_alone():
    values = [10.0 ** (k / 4) for k in range(24)]
    CACHE.clear()
    alone = []
    for r in values:
        CACHE.clear()
        sol = solve(grid(5, r), ground="p0_1")
        alone.append(sol.currents.tobytes() + sol.node_potentials.tobytes())
    CACHE.clear()
    got: dict[int, bytes] = {}

    def work(k: int) -> None:
        for _ in range(5):
            sol = solve(grid(5, values[k]), ground="p0_1")
            got[k] = sol.currents.tobytes() + sol.node_potentials.tobytes()

    threads = [threading.Thread(target=work, args=(k,)) for k in range(len(values))]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert [got[k] for k in range(len(values))] == alone


def test_large_circuits_and_signed_zero_positions_are_not_kept():
    CACHE.clear()
    c = Circuit()
    c.cell("B1", plus="n0", minus=f"n{CACHE_MAX_PARTS}", emf=1.0)
    for k in range(CACHE_MAX_PARTS):
        c.resistor(f"R{k}", f"n{k}", f"n{k + 1}", 1.0)
    solve(c)
    assert len(CACHE) == 0
    c = grid(3, 10.0)
    c.place("p0_0", -0.0, 0.0)   # equal to 0.0 but another number: solved afresh each time
    solve(c, ground="p0_1")
    assert len(CACHE) == 0


def test_a_least_resistance_tree_kept_for_its_shape_gives_what_an_empty_cache_gives():
    # A diagonal part crosses the drawing, so there are no windows; the cell's 0.5 ohm against
    # kilohms spreads the resistances over more than three decades, so the loops are those of a
    # least-resistance tree, kept with the shape while a new value leaves the tree as it was.
    def crossed(shift: float, rx: float = 2200.0) -> Circuit:
        c = grid(3, 1000.0 + shift)
        c.resistor("RX", "p0_0", "p2_2", rx)
        return c

    def fresh(c: Circuit):
        CACHE.clear()
        return solve(c, ground="p0_1")

    variants = [crossed(0.0), crossed(7.0), crossed(0.0, 3300.0), crossed(0.0, 0.4), crossed(7.0)]
    expected = [fresh(c) for c in variants]
    assert {s.loop_method for s in expected} == {"fundamental"}
    CACHE.clear()
    for c, want in zip(variants, expected):   # each after the ones before it, through the cache
        got = solve(c, ground="p0_1")
        assert got.currents.tobytes() == want.currents.tobytes()
        assert got.node_potentials.tobytes() == want.node_potentials.tobytes()
        assert [(lp.parts, lp.orientation, lp.current.hex()) for lp in got.loops] == \
            [(lp.parts, lp.orientation, lp.current.hex()) for lp in want.loops]
