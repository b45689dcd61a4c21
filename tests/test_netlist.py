"""Sketch geometry to circuit: T-junctions, crossings, bends, overlaps, grounds."""
import itertools

import networkx as nx
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app.sketch.model import PlacedPart, Sketch, Wire
from app.sketch.netlist import point_name, to_circuit
from solver import CircuitError, InvalidValueError


def resistor(name, x, y, ohms=100.0, rotation=0):
    return PlacedPart("resistor", name, x, y, rotation, values={"resistance": ohms})


def ground(name, x, y):
    return PlacedPart("ground", name, x, y)


def sketch_of(parts=(), wires=()):
    s = Sketch()
    for p in parts:
        s.add_part(p)
    for w in wires:
        s.add_wire(Wire(*w))
    return s


def node_of(net):
    """Grid point -> node number, contracting the circuit's wire parts (networkx components)."""
    g = nx.Graph()
    g.add_nodes_from(net.circuit.points)
    g.add_nodes_from(net.point_at.values())
    g.add_edges_from((p.a, p.b) for p in net.circuit.parts if p.kind == "wire")
    comp = {name: i for i, cc in enumerate(nx.connected_components(g)) for name in cc}
    return {pt: comp[name] for pt, name in net.point_at.items()}


def reference_nodes(sketch):
    """Independent reading of the drawing rules on the unit grid (networkx components).

    Each grid point a wire passes is a vertex per direction ('h' or 'v'), so
    crossings stay apart; a terminal or a wire end at a point joins both
    directions there (a T-junction or a bend); collinear overlaps share vertices.
    """
    g = nx.Graph()
    stops = {t for p in sketch.parts for t in p.terminals()}
    stops.update(e for w in sketch.wires for e in w.ends)
    for w in sketch.wires:
        o = "h" if w.y1 == w.y2 else "v"
        pts = w.points()
        g.add_nodes_from((p, o) for p in pts)
        g.add_edges_from(((p, o), (q, o)) for p, q in zip(pts, pts[1:]))
    for p in stops:
        g.add_node((p, "t"))
        for o in "hv":
            if g.has_node((p, o)):
                g.add_edge((p, "t"), (p, o))
    comp = {v: i for i, cc in enumerate(nx.connected_components(g)) for v in cc}
    return {p: comp[(p, "t")] for p in stops}


def same_partition(a, b):
    assert a.keys() == b.keys()
    return all((a[p] == a[q]) == (b[p] == b[q]) for p, q in itertools.combinations(a, 2))


def test_t_junction_connects_and_gets_a_dot():
    s = sketch_of(wires=[(0, 0, 8, 0), (4, 0, 4, 4)])
    net = to_circuit(s)
    nodes = node_of(net)
    assert nodes[(0, 0)] == nodes[(8, 0)] == nodes[(4, 4)]
    assert net.junctions == [(4, 0)]
    assert len(net.wire_parts[0]) == 2 and len(net.wire_parts[1]) == 1
    assert sorted(net.open_ends) == [(0, 0), (4, 4), (8, 0)]


def test_part_terminal_on_wire_middle_is_a_t_junction():
    s = sketch_of([resistor("R1", 4, 0, rotation=90)], [(0, 0, 8, 0)])
    net = to_circuit(s)
    assert (4, 0) in net.junctions
    r1 = net.circuit.part("R1")
    assert r1.a == point_name((4, 0)) and r1.b == point_name((4, 4))
    assert node_of(net)[(0, 0)] == node_of(net)[(4, 0)]


def test_crossing_wires_do_not_connect():
    s = sketch_of(wires=[(0, 2, 8, 2), (4, 0, 4, 4)])
    net = to_circuit(s)
    nodes = node_of(net)
    assert nodes[(0, 2)] == nodes[(8, 2)]
    assert nodes[(4, 0)] == nodes[(4, 4)]
    assert nodes[(0, 2)] != nodes[(4, 0)]
    assert (4, 2) not in net.point_at
    assert net.junctions == []


def test_bend_connects_without_a_dot():
    s = sketch_of(wires=[(0, 0, 4, 0), (4, 4, 4, 0)])
    net = to_circuit(s)
    nodes = node_of(net)
    assert nodes[(0, 0)] == nodes[(4, 4)]
    assert (4, 0) in net.point_at
    assert net.junctions == []
    assert net.open_ends == [(0, 0), (4, 4)]


def test_overlapping_collinear_wires_join():
    s = sketch_of(wires=[(0, 0, 6, 0), (9, 0, 3, 0)])
    net = to_circuit(s)
    nodes = node_of(net)
    assert nodes[(0, 0)] == nodes[(9, 0)]
    shared = set(net.wire_parts[0]) & set(net.wire_parts[1])
    assert len(shared) == 1  # the stretch from x=3 to x=6, drawn once
    assert net.junctions == []


def test_wire_parts_run_from_the_wires_first_end():
    s = sketch_of(wires=[(8, 0, 0, 0), (4, 0, 4, 4)])
    net = to_circuit(s)
    first = net.circuit.part(net.wire_parts[0][0])
    assert {first.a, first.b} == {point_name((8, 0)), point_name((4, 0))}


def test_parallel_resistors_share_both_nodes():
    s = sketch_of(
        [resistor("R1", 0, 0, 100.0), resistor("R2", 0, 4, 300.0)],
        [(0, 0, 0, 4), (4, 0, 4, 4)],
    )
    net = to_circuit(s)
    nodes = node_of(net)
    by_name = {v: k for k, v in net.point_at.items()}
    g = nx.MultiGraph()
    for p in net.circuit.parts:
        if p.kind == "resistor":
            g.add_edge(nodes[by_name[p.a]], nodes[by_name[p.b]], weight=p.resistance)
    assert g.number_of_nodes() == 2
    # Two resistors in parallel: R1·R2/(R1+R2) (any circuits textbook); reference: networkx.
    u, v = g.nodes
    assert nx.resistance_distance(g, u, v, weight="weight") == pytest.approx(100 * 300 / 400)
    assert net.junctions == []
    assert net.open_ends == []


def test_every_point_is_placed_where_it_is_drawn():
    s = sketch_of([resistor("R1", 0, 0), ground("GND1", 0, 4)],
                  [(0, 0, 0, 4), (4, 0, 8, 0), (8, 0, 8, 4)])
    net = to_circuit(s)
    positions = net.circuit.positions
    for pt, name in net.point_at.items():
        assert positions[name] == (float(pt[0]), float(pt[1]))
    assert set(net.circuit.points) <= set(positions)


def test_grounds_are_tied_into_one_node():
    s = sketch_of(
        [resistor("R1", 0, 0, rotation=90), resistor("R2", 20, 0, rotation=90),
         ground("GND1", 0, 8), ground("GND2", 20, 8)],
        [(0, 4, 0, 8), (20, 4, 20, 8)],
    )
    net = to_circuit(s)
    assert net.ground == point_name((0, 8))
    tie = net.circuit.part("~gnd1")
    assert tie.kind == "wire"
    assert {tie.a, tie.b} == {point_name((0, 8)), point_name((20, 8))}
    assert node_of(net)[(0, 4)] == node_of(net)[(20, 4)]


def test_grounds_already_wired_together_need_no_tie():
    s = sketch_of([ground("GND1", 0, 0), ground("GND2", 8, 0), ground("GND3", 0, 12)],
                  [(0, 0, 8, 0), (0, 12, 4, 12)])
    net = to_circuit(s)
    ties = [p.name for p in net.circuit.parts if p.name.startswith("~gnd")]
    assert ties == ["~gnd1"]
    nodes = node_of(net)
    assert nodes[(8, 0)] == nodes[(0, 12)] == nodes[(4, 12)]


def test_ground_node_name_and_absent_ground():
    s = sketch_of([resistor("R1", 0, 0), ground("GND1", 4, 0)])
    assert to_circuit(s).ground == point_name((4, 0))
    assert to_circuit(sketch_of([resistor("R1", 0, 0)])).ground is None


def test_ground_touching_nothing_is_an_open_end_not_a_ground():
    net = to_circuit(sketch_of([resistor("R1", 0, 0), ground("GND1", 20, 20)]))
    assert net.ground is None
    assert (20, 20) in net.open_ends


def test_open_ends_and_junctions_found():
    # A resistor with one terminal on a wire's end, the other in the air; a three-way join.
    s = sketch_of([resistor("R1", 0, 0)], [(4, 0, 8, 0), (8, 0, 8, 4), (8, 0, 12, 0)])
    net = to_circuit(s)
    assert net.junctions == [(8, 0)]
    assert net.open_ends == [(0, 0), (8, 4), (12, 0)]


def test_parts_map_to_circuit_calls():
    s = sketch_of([
        PlacedPart("cell", "B1", 0, 0, values={"emf": 12.0, "internal_resistance": 0.1}),
        PlacedPart("current_source", "I1", 0, 4, values={"current": 0.02}),
        PlacedPart("switch", "S1", 0, 8, flags={"closed": False}),
    ])
    c = to_circuit(s).circuit
    b1 = c.part("B1")
    assert (b1.kind, b1.a, b1.b, b1.emf, b1.resistance) == ("cell", "0,0", "4,0", 12.0, 0.1)
    assert c.part("I1").current == 0.02
    assert c.part("S1").closed is False


def test_part_names_cannot_take_wire_names():
    s = sketch_of([resistor("~w0.1", 0, 0)], [(0, 0, 0, 4)])
    with pytest.raises(CircuitError) as info:
        to_circuit(s)
    assert info.value.parts == ("~w0.1",)


def test_invalid_value_propagates_with_the_part():
    s = sketch_of([resistor("R7", 0, 0, ohms=0.0)])
    with pytest.raises(InvalidValueError) as info:
        to_circuit(s)
    assert info.value.parts == ("R7",)


def test_slanted_wire_is_refused():
    s = sketch_of(wires=[(0, 0, 4, 0)])
    s.replace_wire(0, Wire(0, 0, 4, 4))  # replace_wire does not check
    with pytest.raises(CircuitError, match="horizontal or vertical"):
        to_circuit(s)


_coord = st.integers(min_value=0, max_value=6)


@st.composite
def drawings(draw):
    s = Sketch()
    for i in range(draw(st.integers(0, 3))):
        s.add_part(resistor(f"R{i + 1}", draw(_coord), draw(_coord),
                            rotation=draw(st.sampled_from([0, 90, 180, 270]))))
    for _ in range(draw(st.integers(1, 7))):
        x, y, n = draw(_coord), draw(_coord), draw(st.integers(-6, 6).filter(bool))
        s.add_wire(Wire(x, y, x + n, y) if draw(st.booleans()) else Wire(x, y, x, y + n))
    return s


@settings(max_examples=150, deadline=None)
@given(drawings())
def test_connections_match_an_independent_reading(sketch):
    net = to_circuit(sketch)
    ref = reference_nodes(sketch)
    assert same_partition(node_of(net), ref)

    stops = set(ref)
    # Each wire part is a straight, axis-aligned segment between placed points, with no
    # connection point strictly inside it: a clean drawing.
    by_name = {v: k for k, v in net.point_at.items()}
    for part in net.circuit.parts:
        a, b = by_name[part.a], by_name[part.b]
        if part.name.startswith("~w"):
            assert (a[0] == b[0]) != (a[1] == b[1])
            inside = set(Wire(*a, *b).points()[1:-1])
            assert not inside & stops
    # The parts of each wire tile it from its first end to its second.
    for i, w in enumerate(sketch.wires):
        walk = [w.ends[0]]
        for name in net.wire_parts[i]:
            p = net.circuit.part(name)
            a, b = by_name[p.a], by_name[p.b]
            assert walk[-1] in (a, b)
            walk.append(b if walk[-1] == a else a)
        assert walk[-1] == w.ends[1]

    # Dots and open ends, counted as the arms of conductor leaving each point.
    arms = {p: sum(t == p for q in sketch.parts for t in q.terminals()) for p in stops}
    for p in stops:
        for d in ((1, 0), (-1, 0), (0, 1), (0, -1)):
            nxt = (p[0] + d[0], p[1] + d[1])
            if any(p in w.points() and nxt in w.points() for w in sketch.wires):
                arms[p] += 1
    assert net.junctions == sorted(p for p, n in arms.items() if n >= 3)
    assert net.open_ends == sorted(p for p, n in arms.items() if n == 1)
