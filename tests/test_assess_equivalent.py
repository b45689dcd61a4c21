"""Thevenin/Norton equivalents against a hand-derived bridge, networkx, and the engine with a swept load."""
from __future__ import annotations

import networkx as nx
import numpy as np
import pytest

from app.assess import equivalent, equivalent_at
from app.sketch.model import PlacedPart, Sketch, Wire
from app.sketch.netlist import to_circuit
from solver import Circuit, CircuitError, solve

E, R1, R2, R3, R4, RS = 10.0, 100.0, 200.0, 300.0, 400.0, 0.0


def bridge(r_cell: float = RS) -> Circuit:
    """E across top t and bottom g; left arm R1 (t–x) over R2 (x–g), right arm R3 (t–y) over R4 (y–g)."""
    c = Circuit()
    c.cell("B1", plus="t", minus="g", emf=E, internal_resistance=r_cell)
    c.resistor("R1", "t", "x", R1)
    c.resistor("R2", "x", "g", R2)
    c.resistor("R3", "t", "y", R3)
    c.resistor("R4", "y", "g", R4)
    return c


def test_bridge_matches_the_hand_derived_equivalent():
    # by hand (voltage dividers; ideal source shorted for R): V = E·(R2/(R1+R2) − R4/(R3+R4)),
    # R = R1∥R2 + R3∥R4
    eq = equivalent(bridge(), "x", "y")
    v = E * (R2 / (R1 + R2) - R4 / (R3 + R4))
    r = R1 * R2 / (R1 + R2) + R3 * R4 / (R3 + R4)
    assert eq.open_voltage == pytest.approx(v, rel=1e-12)
    assert eq.resistance == pytest.approx(r, rel=1e-12)
    assert eq.short_current == pytest.approx(v / r, rel=1e-12)
    assert eq.max_power_load == pytest.approx(r) and eq.max_power == pytest.approx(v * v / (4 * r))


def test_internal_resistance_matches_networkx_resistance_distance():
    # reference library: networkx resistance_distance on the network with the source zeroed
    g = nx.Graph()
    g.add_weighted_edges_from([("t", "g", 25.0), ("t", "x", R1), ("x", "g", R2), ("t", "y", R3), ("y", "g", R4)])
    eq = equivalent(bridge(r_cell=25.0), "x", "y")
    assert eq.resistance == pytest.approx(nx.resistance_distance(g, "x", "y", weight="weight"), rel=1e-10)


def test_norton_current_is_what_a_wire_across_the_points_carries():
    eq = equivalent(bridge(r_cell=25.0), "x", "y")
    c = bridge(r_cell=25.0)
    c.wire("short", "x", "y")
    assert solve(c).current("short") == pytest.approx(eq.short_current, rel=1e-10)


def test_swept_load_peaks_at_the_internal_resistance():
    # Jacobi's law: the load drawing most power equals the internal resistance, P = V²/4R;
    # and by Thevenin's theorem the load current is V/(R + RL) for every load
    eq = equivalent(bridge(r_cell=25.0), "x", "y")
    loads = eq.resistance * np.logspace(-1, 1, 81)
    powers = []
    for rl in loads:
        c = bridge(r_cell=25.0)
        c.resistor("RL", "x", "y", float(rl))
        sol = solve(c)
        assert sol.current("RL") == pytest.approx(eq.open_voltage / (eq.resistance + rl), rel=1e-10)
        powers.append(sol.power("RL"))
    best = int(np.argmax(powers))
    assert best == 40  # the middle of the sweep, RL = R
    assert powers[best] == pytest.approx(eq.max_power, rel=1e-10)


def test_network_without_a_source_is_a_resistance_only():
    # networkx documentation example for resistance_distance: nodes 1 and 3 give 0.625 Ω
    c = Circuit()
    for k, (u, v) in enumerate([(1, 2), (1, 3), (1, 4), (3, 4), (3, 5), (4, 5)]):
        c.resistor(f"R{k}", str(u), str(v), 1.0)
    eq = equivalent(c, "1", "3")
    assert eq.resistance == pytest.approx(0.625, rel=1e-12)
    assert eq.open_voltage == 0.0 and eq.short_current == 0.0
    assert not eq.has_source and eq.max_power_load is None and eq.max_power is None


def test_current_source_into_a_resistor_is_its_own_norton_equivalent():
    c = Circuit()
    c.current_source("I1", "g", "a", 0.02)
    c.resistor("R1", "a", "g", 470.0)
    eq = equivalent(c, "a", "g")
    assert eq.short_current == pytest.approx(0.02) and eq.resistance == pytest.approx(470.0)


def test_ideal_cell_between_the_points_has_no_norton_form():
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=5.0)
    c.resistor("R1", "a", "g", 10.0)
    eq = equivalent(c, "a", "g")
    assert (eq.open_voltage, eq.resistance, eq.short_current, eq.max_power) == (5.0, 0.0, None, None)


@pytest.mark.parametrize("a, b, words", [("a", "nowhere", "no point"), ("a", "a2", "joined by wires"),
                                         ("a", "p", "No path")])
def test_impossible_equivalents_are_refused_in_plain_words(a, b, words):
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=5.0, internal_resistance=1.0)
    c.resistor("R1", "a", "g", 10.0)
    c.wire("W", "a", "a2")
    c.resistor("R9", "p", "q", 10.0)
    with pytest.raises(CircuitError, match=words):
        equivalent(c, a, b)


def test_equivalent_at_grid_points_of_a_sketch():
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 12.0, "internal_resistance": 0.5}))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, values={"resistance": 4.5}))
    s.add_wire(Wire(0, 4, 4, 4))
    net = to_circuit(s)
    eq = equivalent_at(net, (4, 0), (4, 4))
    assert eq.open_voltage == pytest.approx(12.0) and eq.resistance == pytest.approx(5.0)  # series r + R
    with pytest.raises(CircuitError, match="Pick two points"):
        equivalent_at(net, (2, 0), (4, 4))
