"""Preferred resistor values (IEC 60063 E12, E24, E96) and what fitting one would change.

The tables are the mantissas of one decade as IEC 60063 lists them (values
from memory).  E96 follows round(100·10^(i/96)) throughout; E12 and E24 keep
their historic values, which differ from the rounded geometric series at
2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2.
"""
from __future__ import annotations

import bisect
import math
from dataclasses import dataclass, replace

from solver import Circuit, CircuitError, solve
from solver.circuit import RESISTOR

from .rebuild import rebuild

__all__ = ["SERIES", "E12", "E24", "E96", "neighbours", "closest", "Substitution", "substitutions"]

E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
E24 = (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
       3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1)
E96 = tuple(v / 100 for v in (
    100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143,
    147, 150, 154, 158, 162, 165, 169, 174, 178, 182, 187, 191, 196, 200, 205, 210,
    215, 221, 226, 232, 237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309,
    316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453,
    464, 475, 487, 499, 511, 523, 536, 549, 562, 576, 590, 604, 619, 634, 649, 665,
    681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976))
SERIES: dict[str, tuple[float, ...]] = {"E12": E12, "E24": E24, "E96": E96}
_SAME = 1e-9  # relative: a value this close to a preferred one is that value


def _table(series: str) -> tuple[float, ...]:
    try:
        return SERIES[series]
    except KeyError:
        raise ValueError(f"Unknown series {series!r}; use one of {', '.join(SERIES)}.") from None


def neighbours(value: float, series: str) -> tuple[float, float]:
    """The preferred values just below and just above ``value`` (both equal to it if it is one)."""
    if not (isinstance(value, (int, float)) and math.isfinite(value) and value > 0):
        raise ValueError("A preferred value needs a finite resistance above zero.")
    table = _table(series)
    decade = math.floor(math.log10(value))
    scale = 10.0 ** decade
    m = value / scale
    if m < 1.0:  # log10 rounding at a decade's edge
        scale /= 10.0
        m = value / scale
    k = bisect.bisect_left(table, m * (1 - _SAME))
    if k < len(table) and abs(table[k] - m) <= _SAME * m:
        v = table[k] * scale
        return v, v
    below = table[k - 1] * scale if k > 0 else table[-1] * scale / 10.0
    above = table[k] * scale if k < len(table) else table[0] * scale * 10.0
    return below, above


def closest(value: float, series: str) -> float:
    """The preferred value nearest to ``value`` by ratio (the geometric sense of the series)."""
    below, above = neighbours(value, series)
    return below if value / below <= above / value else above


@dataclass(frozen=True)
class Substitution:
    """A resistor changed to a preferred ``value``: its own new current, drop and power,
    and the other part whose current changes most (relative)."""

    series: str
    value: float
    deviation: float  # value / present − 1
    current: float
    voltage: float
    power: float
    most_changed: str | None
    most_changed_fraction: float


def substitutions(circuit: Circuit, name: str, series: tuple[str, ...] = ("E12", "E24", "E96"),
                  ground: str | None = None) -> list[Substitution]:
    """For resistor ``name``: each series' neighbouring preferred values and what each changes.

    Each candidate is solved by the mesh solver; parts whose names start with
    ``~`` (wire pieces) are not reported.  Raises CircuitError for a part that
    is not a resistor.
    """
    part = circuit.part(name)
    if part.kind != RESISTOR:
        raise CircuitError(f"{name} is not a resistor; preferred values are for resistors.", [name])
    base = solve(circuit, ground=ground)
    scale = max((abs(base.current(n)) for n in base.parts), default=0.0)
    out = []
    for s in series:
        for v in dict.fromkeys(neighbours(part.resistance, s)):
            changed = rebuild(circuit, lambda p, v=v: replace(p, resistance=v) if p.name == name else p)
            sol = solve(changed, ground=ground)
            worst, frac = None, 0.0
            for n in base.parts:
                before = base.current(n)
                if n == name or n.startswith("~") or abs(before) <= 1e-9 * scale:
                    continue
                f = abs(sol.current(n) - before) / abs(before)
                if f > frac:
                    worst, frac = n, f
            out.append(Substitution(s, v, v / part.resistance - 1.0, sol.current(name),
                                    sol.voltage(name), sol.power(name), worst, frac))
    return out
