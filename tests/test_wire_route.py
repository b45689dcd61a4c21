"""Which bend a drawn wire takes (``route_clear``): never along a part or through a terminal when the other bend is clear.

The expected routes are worked out by hand on the grid for each sketch.
"""
from __future__ import annotations

from app.sketch.model import PlacedPart, Sketch
from app.ui.edits import route, route_clear


def legs(wires) -> list[tuple[int, int, int, int]]:
    return [(w.x1, w.y1, w.x2, w.y2) for w in wires]


def sketch_of(*parts: PlacedPart) -> Sketch:
    s = Sketch()
    for p in parts:
        s.add_part(p)
    return s


def test_the_bend_asked_for_is_kept_on_an_empty_sheet_and_a_straight_route_has_no_other():
    s = Sketch()
    assert legs(route_clear(s, (0, 0), (4, 3), True)) == [(0, 0, 4, 0), (4, 0, 4, 3)]
    assert legs(route_clear(s, (0, 0), (4, 3), False)) == [(0, 0, 0, 3), (0, 3, 4, 3)]
    r = sketch_of(PlacedPart("resistor", "R1", 0, 0))  # body (0, 0)-(4, 0): a straight wire over it stays
    assert legs(route_clear(r, (-2, 0), (6, 0), True)) == legs(route((-2, 0), (6, 0)))


def test_a_bend_along_a_part_body_gives_way_to_the_other():
    s = sketch_of(PlacedPart("resistor", "R1", 0, 0))  # terminals (0, 0) and (4, 0)
    assert legs(route_clear(s, (0, 0), (6, 3), True)) == [(0, 0, 0, 3), (0, 3, 6, 3)]
    upright = sketch_of(PlacedPart("resistor", "R1", 0, 0, 90))  # (0, 0) and (0, 4)
    assert legs(route_clear(upright, (0, 0), (3, 6), False)) == [(0, 0, 3, 0), (3, 0, 3, 6)]


def test_a_bend_through_another_terminal_gives_way_and_a_tie_keeps_the_bend_asked_for():
    # R1's terminal (4, 0) is the corner of the across-first bend from (0, 0) to (4, 3)
    s = sketch_of(PlacedPart("resistor", "R1", 4, 0))
    assert legs(route_clear(s, (0, 0), (4, 3), True)) == [(0, 0, 0, 3), (0, 3, 4, 3)]
    # with R2's terminal (0, 3) on the other bend's corner, both bends join one terminal: as asked
    both = sketch_of(PlacedPart("resistor", "R1", 4, 0), PlacedPart("resistor", "R2", -4, 3))
    assert legs(route_clear(both, (0, 0), (4, 3), True)) == [(0, 0, 4, 0), (4, 0, 4, 3)]
