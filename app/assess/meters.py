"""What the meters in a sketch read, and how much their presence shifts the circuit.

A real ammeter has a burden resistance and a real voltmeter draws current
through its input resistance, so a metered circuit is not the circuit
unmetered.  The unmetered circuit is the same sketch with every meter ideal
(ammeter 0 Ω, voltmeter open), solved again.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, replace

from solver import CircuitError, Solution, solve

from ..sketch.model import Sketch
from ..sketch.netlist import to_circuit

__all__ = ["MeterReading", "MeterReport", "METER_KINDS", "read_meters", "idealised", "display_reading"]

METER_KINDS = ("ammeter", "voltmeter")
_RANGES = ((3, "k"), (0, ""), (-3, "m"), (-6, "µ"))


def display_reading(value: float, unit: str) -> str:
    """``value`` as a four-digit auto-ranging meter shows it: ``12.15 V``, ``-843.2 mA``, ``0.000 µA``.

    Readings below the lowest range's last digit show as zero, as on the
    instrument; the sign is kept (a meter shows ``-`` with its leads reversed).
    """
    if not math.isfinite(value):
        return f"OL {unit}"
    k = next((i for i, (exp, _) in enumerate(_RANGES) if abs(value) >= 10.0 ** exp), len(_RANGES) - 1)
    text = _digits(value / 10.0 ** _RANGES[k][0])
    if abs(float(text)) >= 1000.0 and k > 0:  # rounding carried into the next range up
        k -= 1
        text = _digits(value / 10.0 ** _RANGES[k][0])
    prefix = _RANGES[k][1]
    if float(text) == 0.0:
        text = text.lstrip("-")
    return f"{text} {prefix}{unit}"


def _digits(x: float) -> str:
    """``x`` (under 1000 in size, or any size on the top range) to four significant digits."""
    whole = len(str(int(abs(x)))) if abs(x) >= 1.0 else 1
    return f"{x:.{max(0, 4 - whole)}f}"


@dataclass(frozen=True)
class MeterReading:
    """One meter's reading: ``value`` in A or V from its + input to its common, as displayed.

    ``unmetered`` is the same quantity with every meter ideal (None if that
    circuit cannot be solved); ``shift`` = value − unmetered and
    ``shift_fraction`` = shift / |unmetered| (None when unmetered is zero).
    """

    part: str
    quantity: str  # "current" or "voltage"
    value: float
    display: str
    unmetered: float | None
    shift: float | None
    shift_fraction: float | None

    @property
    def unit(self) -> str:
        return "A" if self.quantity == "current" else "V"


@dataclass(frozen=True)
class MeterReport:
    """The readings, and the part whose current the meters shift most (relative to unmetered)."""

    readings: list[MeterReading]
    most_shifted: str | None = None
    most_shifted_fraction: float = 0.0
    problem: str = ""  # why the unmetered circuit could not be solved, if it could not


def idealised(sketch: Sketch) -> Sketch:
    """A copy of ``sketch`` with every ammeter at zero burden and every voltmeter ideal (open)."""
    out = Sketch()
    for p in sketch.parts:
        if p.kind == "ammeter":
            p = replace(p, values=dict(p.values, burden=0.0))
        elif p.kind == "voltmeter":
            p = replace(p, flags=dict(p.flags, ideal=True))
        out.add_part(p)
    for w in sketch.wires:
        out.add_wire(w)
    return out


def _read(sol: Solution, kind: str, name: str) -> float:
    return sol.current(name) if kind == "ammeter" else sol.voltage(name)


def read_meters(sketch: Sketch, solution: Solution) -> MeterReport:
    """Every meter's reading in ``solution`` (the sketch as drawn) against the unmetered circuit."""
    meters = [p for p in sketch.parts if p.kind in METER_KINDS]
    if not meters:
        return MeterReport([])
    problem = ""
    try:
        net = to_circuit(idealised(sketch))
        bare: Solution | None = solve(net.circuit, ground=net.ground)
    except CircuitError as e:
        bare, problem = None, f"Without the meters' own resistance the circuit cannot be solved: {e}"
    readings = []
    for m in meters:
        value = _read(solution, m.kind, m.name)
        unit = "A" if m.kind == "ammeter" else "V"
        ideal = _read(bare, m.kind, m.name) if bare is not None else None
        shift = value - ideal if ideal is not None else None
        frac = shift / abs(ideal) if ideal and shift is not None else None
        readings.append(MeterReading(m.name, "current" if unit == "A" else "voltage", value,
                                     display_reading(value, unit), ideal, shift, frac))
    worst, worst_frac = None, 0.0
    if bare is not None:
        metered = {p.name for p in meters}
        scale = max((abs(bare.current(n)) for n in bare.parts), default=0.0)
        for name in bare.parts:
            if name.startswith("~") or name in metered:
                continue
            before, after = bare.current(name), solution.current(name)
            if abs(before) <= 1e-9 * scale:
                continue
            frac = abs(after - before) / abs(before)
            if frac > worst_frac:
                worst, worst_frac = name, frac
    return MeterReport(readings, worst, worst_frac, problem)
