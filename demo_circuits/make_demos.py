"""Writes the bundled demo sketches (run: python demo_circuits/make_demos.py).

The scenarios are invented for the demos; the values are plausible, not
measured.
"""
from __future__ import annotations

from pathlib import Path

from app.sketch.fileio import save_sketch
from app.sketch.kinds import SPAN
from app.sketch.model import PlacedPart, Sketch, Wire

HERE = Path(__file__).resolve().parent


def _part(s: Sketch, kind: str, name: str, x: int, y: int, rot: int = 0, label: str = "", **values) -> None:
    flags = {k: v for k, v in values.items() if isinstance(v, bool)}
    choices = {k: v for k, v in values.items() if isinstance(v, str)}
    vals = {k: float(v) for k, v in values.items() if not isinstance(v, (bool, str))}
    s.add_part(PlacedPart(kind, name, x, y, rot, False, vals, flags, label, choices))


def _wire(s: Sketch, x1: int, y1: int, x2: int, y2: int) -> None:
    s.add_wire(Wire(x1, y1, x2, y2))


_DIRECTION = {(1, 0): 0, (0, 1): 90, (-1, 0): 180, (0, -1): 270}


def _run(s: Sketch, kind: str, name: str, a: tuple[int, int], b: tuple[int, int], label: str = "",
         **values) -> None:
    """A two-terminal part from grid point ``a`` (its first terminal) towards ``b``, centred, wired to both."""
    (x1, y1), (x2, y2) = a, b
    length = abs(x2 - x1) + abs(y2 - y1)
    dx, dy = (x2 > x1) - (x2 < x1), (y2 > y1) - (y2 < y1)
    gap = (length - SPAN) // 2
    start = (x1 + dx * gap, y1 + dy * gap)
    end = (start[0] + dx * SPAN, start[1] + dy * SPAN)
    if gap:
        _wire(s, x1, y1, *start)
    _part(s, kind, name, start[0], start[1], _DIRECTION[(dx, dy)], label, **values)
    if end != (x2, y2):
        _wire(s, *end, x2, y2)


def bench_supply_fixture() -> Sketch:
    """A bench supply feeding a two-stage divider on a test fixture: two windows."""
    s = Sketch()
    _run(s, "cell", "B1", (0, 0), (0, 8), "bench supply", emf=12.0, internal_resistance=0.05)
    _run(s, "resistor", "R1", (0, 0), (8, 0), "feed", resistance=47.0)
    _run(s, "resistor", "R2", (8, 0), (8, 8), "divider low", resistance=100.0)
    _run(s, "resistor", "R3", (8, 0), (16, 0), "stage 2 feed", resistance=220.0)
    _run(s, "resistor", "R4", (16, 0), (16, 8), "fixture load", resistance=330.0)
    _wire(s, 0, 8, 8, 8)
    _wire(s, 8, 8, 16, 8)
    _part(s, "ground", "GND1", 0, 8)
    return s


def sensor_current_loop() -> Sketch:
    """A 24 V loop supply, a 12 mA transmitter, and a receiver shunt with an indicator across it."""
    s = Sketch()
    _run(s, "cell", "B1", (0, 0), (0, 8), "loop supply", emf=24.0, internal_resistance=0.5)
    _run(s, "resistor", "R1", (0, 0), (8, 0), "field cable", resistance=15.0)
    _run(s, "current_source", "I1", (8, 0), (16, 0), "transmitter", current=0.012)
    _run(s, "resistor", "R2", (16, 0), (16, 8), "receiver shunt", resistance=250.0)
    _wire(s, 16, 0, 24, 0)
    _run(s, "resistor", "R3", (24, 0), (24, 8), "indicator", resistance=2200.0)
    _wire(s, 24, 8, 16, 8)
    _wire(s, 16, 8, 0, 8)
    _part(s, "ground", "GND1", 0, 8)
    return s


def rover_parallel_packs() -> Sketch:
    """Two garden-rover battery packs of unequal charge in parallel, driving the motor."""
    s = Sketch()
    _run(s, "cell", "B1", (0, 0), (0, 8), "pack A", emf=12.6, internal_resistance=0.08)
    _run(s, "cell", "B2", (8, 0), (8, 8), "pack B", emf=12.2, internal_resistance=0.12)
    _wire(s, 0, 0, 8, 0)
    _run(s, "switch", "S1", (8, 0), (16, 0), "main switch", closed=True)
    _run(s, "resistor", "R1", (16, 0), (16, 8), "drive motor", resistance=1.5)
    _wire(s, 0, 8, 16, 8)
    _part(s, "ground", "GND1", 0, 8)
    return s


def greenhouse_heater_strip(bays: int = 20) -> Sketch:
    """A 24 V feed along a greenhouse bench: cable resistance both ways, a heater at each bay."""
    s = Sketch()
    _run(s, "cell", "B1", (0, 0), (0, 8), "24 V feed", emf=24.0, internal_resistance=0.02)
    for k in range(bays):
        x = 8 * k
        _run(s, "resistor", f"R{3 * k + 1}", (x, 0), (x + 8, 0), "", resistance=0.04)        # feed conductor
        _run(s, "resistor", f"R{3 * k + 2}", (x + 8, 0), (x + 8, 8), f"bay {k + 1} heater", resistance=12.0)
        _run(s, "resistor", f"R{3 * k + 3}", (x, 8), (x + 8, 8), "", resistance=0.04)        # return conductor
    end = 8 * bays
    _run(s, "switch", "S1", (end, 0), (end + 8, 0), "end-of-line test", closed=False)
    _run(s, "resistor", f"R{3 * bays + 1}", (end + 8, 0), (end + 8, 8), "test load", resistance=100.0)
    _wire(s, end, 8, end + 8, 8)
    _part(s, "ground", "GND1", 0, 8)
    return s


def market_stall_lamps() -> Sketch:
    """A night-market stall's lamp string off a 12.8 V pack: fuse, meter, a thin cable run, two lamps.

    The 0.75 mm² run is too thin for a 3 % drop, and the lamps run a little
    above their 12 V rating on the pack's higher voltage: both show as cautions.
    """
    s = Sketch()
    _run(s, "cell", "B1", (0, 0), (0, 8), "stall pack", emf=12.8, internal_resistance=0.02, capacity=20.0,
         max_current=10.0, preset="lifepo4_12v")
    _run(s, "fuse", "F1", (0, 0), (8, 0), "pack fuse", rating=3.0)
    _run(s, "ammeter", "PA1", (8, 0), (16, 0), "clamp meter", burden=0.0)
    _run(s, "cable", "W1", (16, 0), (24, 0), "8 m to the awning, out and back", length=8.0,
         cross_section=0.75, drop_limit=3.0, material="copper", both_conductors=True)
    _run(s, "lamp", "H1", (24, 0), (24, 8), "awning lamp", rated_voltage=12.0, rated_power=10.0)
    _wire(s, 24, 0, 40, 0)
    _run(s, "lamp", "H2", (32, 0), (32, 8), "counter lamp", rated_voltage=12.0, rated_power=10.0)
    _run(s, "voltmeter", "PV1", (40, 0), (40, 8), "pocket meter", input_resistance=10e6)
    _wire(s, 0, 8, 40, 8)
    _part(s, "ground", "GND1", 0, 8)
    return s


DEMOS = {
    "bench_supply_fixture.lwsk": bench_supply_fixture,
    "sensor_current_loop.lwsk": sensor_current_loop,
    "rover_parallel_packs.lwsk": rover_parallel_packs,
    "greenhouse_heater_strip.lwsk": greenhouse_heater_strip,
    "market_stall_lamps.lwsk": market_stall_lamps,
}


def main() -> None:
    for name, make in DEMOS.items():
        save_sketch(make(), HERE / name, backup=False)  # no .bak beside the demos
        print("wrote", name)


if __name__ == "__main__":
    main()
