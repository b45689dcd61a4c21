"""What keeps a current source's current from flowing: the open parts named beside the solver's message.

The expected names are read off each small circuit by hand: which open parts lie
between the source's two ends with nothing else joining them.
"""
from __future__ import annotations

import pytest

from app.assess.return_path import opens_in_the_way
from app.sketch.model import PlacedPart, Sketch, Wire
from app.ui.solve_worker import solve_sketch
from solver import Circuit


def test_the_one_open_switch_between_the_ends_is_named_and_one_elsewhere_is_not():
    c = Circuit()
    c.current_source("I1", "a", "g", 0.01)
    c.switch("S1", "a", "b", closed=False)
    c.resistor("R1", "b", "g", 100.0)
    c.switch("S2", "b", "c", closed=False)   # leads to a dead end: closing it gives no path
    c.resistor("R2", "c", "d", 100.0)
    assert opens_in_the_way(c, "I1") == ["S1"]


def test_two_open_switches_in_series_are_both_named_and_none_when_no_switch_would_help():
    c = Circuit()
    c.current_source("I1", "a", "g", 0.01)
    c.switch("S1", "a", "b", closed=False)
    c.switch("S2", "b", "c", closed=False)
    c.resistor("R1", "c", "g", 100.0)
    assert sorted(opens_in_the_way(c, "I1")) == ["S1", "S2"]
    bare = Circuit()
    bare.current_source("I1", "a", "g", 0.01)
    bare.switch("S1", "a", "b", closed=False)
    bare.resistor("R1", "b", "c", 100.0)     # c joins nothing: no path with S1 closed either
    assert opens_in_the_way(bare, "I1") == []


def test_a_drawn_source_behind_a_blown_fuse_says_so_and_marks_the_fuse():
    # I1 upright at x = 0 (first terminal at the top), F1 along the top, R1 upright at x = 4
    s = Sketch()
    s.add_part(PlacedPart("current_source", "I1", 0, 0, 90, False, {"current": 0.02}))
    s.add_part(PlacedPart("fuse", "F1", 0, 0, 0, False, flags={"blown": True}))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, 90, False, {"resistance": 470.0}))
    s.add_wire(Wire(0, 4, 4, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    result = solve_sketch(s)
    assert "I1 has no return path" in result.error
    assert "F1 is blown" in result.error
    assert set(result.error_parts) == {"I1", "F1"}
    # the same drawing with a good fuse solves: all 20 mA through R1 (KCL at the source)
    s.replace_part("F1", PlacedPart("fuse", "F1", 0, 0, 0, False))
    assert abs(solve_sketch(s).readings["R1"][0]) == pytest.approx(0.02, rel=1e-12)
