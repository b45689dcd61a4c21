"""The kept layout of a drawing: a netlist built from it equals one built afresh, and stale parts never leak."""
from dataclasses import replace

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app.sketch import netlist as netlist_module
from app.sketch.model import PlacedPart, Sketch, Wire
from app.sketch.netlist import to_circuit
from app.sketch.windows import forget_kept
from app.ui import solve_worker
from app.ui.solve_worker import solve_sketch
from solver import CircuitError
from test_netlist import sketch_of


def bench() -> Sketch:
    """A cell feeding a resistor, a switch, an ammeter, a fuse and a voltmeter, wired with T-junctions and two grounds."""
    return sketch_of(
        [PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 12.0, "internal_resistance": 0.5}),
         PlacedPart("resistor", "R1", 0, 4, 0, values={"resistance": 100.0}),
         PlacedPart("switch", "S1", 4, 4, 0),
         PlacedPart("ammeter", "PA1", 8, 4, 0, values={"burden": 0.0}),
         PlacedPart("fuse", "F1", 12, 4, 90),
         PlacedPart("voltmeter", "PV1", 16, 4, 90),
         PlacedPart("ground", "GND1", 0, 8),
         PlacedPart("ground", "GND2", 12, 8)],
        [(0, 0, 12, 0), (12, 0, 12, 4), (16, 4, 16, 8), (12, 8, 16, 8), (0, 4, 0, 8)],
    )


def fresh(sketch: Sketch):
    """``to_circuit`` with no layout and no circuit part kept."""
    netlist_module._LAYOUTS = ()
    netlist_module._MADE = {}
    return to_circuit(sketch)


def same(a, b) -> None:
    assert a.circuit.parts == b.circuit.parts
    assert list(a.circuit.positions.items()) == list(b.circuit.positions.items())
    assert (a.ground, a.point_at, a.wire_parts, a.junctions, a.open_ends) == \
        (b.ground, b.point_at, b.wire_parts, b.junctions, b.open_ends)


value_edits = st.lists(st.tuples(
    st.sampled_from(["R1", "B1", "PA1", "F1", "PV1", "S1"]),
    st.sampled_from(["resistance", "emf", "internal_resistance", "burden", "input_resistance", "closed",
                     "blown", "ideal", "rename"]),
    st.sampled_from([0.0, 1.0, 4.7, 100.0, 2.2e3, 1e7])), min_size=1, max_size=8)


def apply(s: Sketch, name: str, key: str, value: float) -> None:
    if not s.has_part(name):
        return
    p = s.part(name)
    if key == "rename":
        s.replace_part(name, replace(p, name=name + "x"))
    elif key in ("closed", "blown", "ideal"):
        s.replace_part(name, replace(p, flags=dict(p.flags, **{key: not p.flag(key)})))
    else:
        s.replace_part(name, replace(p, values=dict(p.values, **{key: value})))


@settings(max_examples=60, deadline=None)
@given(value_edits)
def test_value_edits_on_a_kept_layout_give_the_fresh_netlist(edits):
    s = bench()
    to_circuit(s)
    for name, key, value in edits:
        apply(s, name, key, value)
        try:
            kept = to_circuit(s)
        except CircuitError as e:   # a bad value is refused the same way with or without the layout
            with pytest.raises(CircuitError) as again:
                fresh(s)
            assert (again.value.message, again.value.parts) == (e.message, e.parts)
            continue
        same(kept, fresh(s))


@pytest.mark.parametrize("change", ["move", "rotate", "wire"])
def test_a_changed_drawing_gets_its_own_layout(change):
    s = bench()
    before = to_circuit(s)
    if change == "move":
        s.update_part("R1", y=5)
    elif change == "rotate":
        s.update_part("PV1", rotation=270)
    else:
        s.add_wire(Wire(4, 4, 4, 0))
    after = to_circuit(s)
    same(after, fresh(s))
    assert (after.point_at, after.junctions, after.open_ends) != (before.point_at, before.junctions, before.open_ends)


def test_parts_an_edit_left_alone_keep_their_circuit_parts_and_the_edited_one_is_made_again():
    s = bench()
    before = {p.name: p for p in to_circuit(s).circuit.parts}
    apply(s, "R1", "resistance", 4.7)
    s.replace_part("PV1", replace(s.part("PV1"), x=20))  # moved: its terminals lie elsewhere
    after = {p.name: p for p in to_circuit(s).circuit.parts}
    assert after["B1"] is before["B1"] and after["F1"] is before["F1"]
    assert after["R1"].resistance == 4.7 and before["R1"].resistance == 100.0
    assert after["PV1"].a != before["PV1"].a
    assert after == {p.name: p for p in fresh(s).circuit.parts}


def test_a_thrown_switch_on_a_kept_layout_is_solved_as_thrown():
    # A cell of EMF E and internal resistance r across R: I = E / (R + r) (Ohm's law); with the switch
    # open the loop is broken and no current flows.
    s = sketch_of([PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 12.0, "internal_resistance": 0.5}),
                   PlacedPart("switch", "S1", 0, 4, 0),
                   PlacedPart("resistor", "R1", 4, 0, 90, values={"resistance": 99.5})],
                  [(0, 0, 4, 0)])
    closed = solve_sketch(s)
    assert closed.readings["R1"][0] == pytest.approx(12.0 / 100.0, rel=1e-12)
    s.update_part("S1", flags={"closed": False})
    opened = solve_sketch(s)
    assert opened.readings["R1"][0] == 0.0
    assert opened.netlist.circuit.part("S1").closed is False
    same(opened.netlist, fresh(s))


def test_float_coordinates_never_take_the_layout_of_equal_integers():
    # 4.0 == 4, but the points are named from the numbers as given
    ints = sketch_of([PlacedPart("resistor", "R1", 4, 0, 0)], [(0, 0, 4, 0)])
    floats = sketch_of([PlacedPart("resistor", "R1", 4.0, 0, 0)], [(0, 0, 4, 0)])
    to_circuit(ints)
    same(to_circuit(floats), fresh(floats))
    assert "4.0,0" in to_circuit(floats).point_at.values()


def test_a_reserved_name_is_refused_on_a_kept_layout():
    s = bench()
    to_circuit(s)
    s.replace_part("R1", replace(s.part("R1"), name="~R1"))
    with pytest.raises(CircuitError, match="starts with '~'"):
        to_circuit(s)


def test_netlists_of_one_layout_share_no_container():
    s = bench()
    a = to_circuit(s)
    a.point_at.clear()
    a.wire_parts[0].append("changed")
    a.junctions.append((99, 99))
    a.open_ends.clear()
    same(to_circuit(s), fresh(s))


def test_loop_marks_after_a_value_edit_are_those_worked_out_afresh():
    s = sketch_of([PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 12.0}),
                   PlacedPart("resistor", "R1", 4, 0, 90, values={"resistance": 100.0}),
                   PlacedPart("resistor", "R2", 8, 0, 90, values={"resistance": 200.0})],
                  [(0, 0, 8, 0), (0, 4, 8, 4)])
    solve_sketch(s)
    s.update_part("R2", values={"resistance": 300.0})
    kept = solve_sketch(s)
    forget_kept()
    solve_worker._RECENT.clear()  # a recent drawing's result would come back whole, windows and all
    netlist_module._LAYOUTS = ()
    again = solve_sketch(s)
    assert len(kept.loops) == 2
    assert (kept.loops, kept.loop_outlines) == (again.loops, again.loop_outlines)
    s.update_part("R2", x=12)   # a moved part: new windows
    s.replace_wire(0, Wire(0, 0, 12, 0))
    s.replace_wire(1, Wire(0, 4, 12, 4))
    moved = solve_sketch(s)
    assert [c for c, *_ in moved.loops] != [c for c, *_ in kept.loops]
    # moved back: the windows of the solve before last come back, as worked out afresh
    s.update_part("R2", x=8)
    s.replace_wire(0, Wire(0, 0, 8, 0))
    s.replace_wire(1, Wire(0, 4, 8, 4))
    back = solve_sketch(s)
    forget_kept()
    solve_worker._RECENT.clear()  # a recent drawing's result would come back whole, windows and all
    netlist_module._LAYOUTS = ()
    afresh = solve_sketch(s)
    assert (back.loops, back.loop_outlines) == (afresh.loops, afresh.loop_outlines) == (kept.loops, kept.loop_outlines)
