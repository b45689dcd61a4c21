"""Cautions on a solved sketch: what could hurt someone or something, in plain words.

From the sketch (ratings), its netlist (connections) and the solution
(currents, drops), :func:`assess` lists hazardous voltages, shorted or
overdriven cells, parts beyond their ratings, fuses that will blow, cable
drop, lamp brightness, bench mistakes with meters, meter readings and cell
runtimes.  Each :class:`Caution` has a stable ``kind``, a ``severity``
(``danger``, ``warning`` or ``info``), the part it concerns and its figures.
Sources of the limits: IEC 61010-1 §6.3.1 for 60 V DC; "common practice"
for the half-rating rule and the cable drop limits.
"""
from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass, field

import numpy as np

from solver import Solution

from ..analysis.branches import node_labels
from ..sketch.bench_parts import lamp_hot_resistance
from ..sketch.model import PlacedPart, Sketch
from ..sketch.netlist import Netlist
from ..units import format_value
from .meters import METER_KINDS, display_reading, read_meters
from .topology import is_source, parallel_parts, series_partners

__all__ = [
    "Caution", "assess", "DISCLAIMER", "HAZARD_VOLTAGE", "RESISTOR_DERATING", "SHORTED_FRACTION",
    "SEVERITIES",
]

DISCLAIMER = ("Results come from an idealised linear DC model: they are no substitute for measurement. "
              "Mains and high-energy work follows local codes and licensed practice.")

# IEC 61010-1 §6.3.1: above 60 V DC a part counts as hazardous live in normal conditions.
HAZARD_VOLTAGE = 60.0
# Keep a resistor's dissipation at or under half its rating (common practice).
RESISTOR_DERATING = 0.5
# A delivering cell whose terminal voltage is under this share of its EMF is treated as shorted
# (the load across it is under a ninth of its internal resistance).
SHORTED_FRACTION = 0.1
SEVERITIES = ("danger", "warning", "info")
_NOISE = 1e-9  # relative: below this share of a scale a figure counts as zero
_CURRENT_FLOOR = 1e-12  # A: a cell delivering less is idle
_OVER_HAZARD = HAZARD_VOLTAGE * (1 + _NOISE)  # V: a voltage beyond this is over the hazard limit


@dataclass(frozen=True)
class Caution:
    """One thing to tell the person about a solved sketch.

    ``part`` is the sketch part it concerns (None for a caution about points);
    ``others`` further parts involved, ``points`` circuit point names involved
    (grid points via ``Netlist.point_at``); ``figures`` the numbers behind the
    message, in SI base units (percentages as %, hours as h), always finite.
    """

    kind: str
    severity: str
    part: str | None
    message: str
    figures: dict[str, float] = field(default_factory=dict)
    others: tuple[str, ...] = ()
    points: tuple[str, ...] = ()

    @property
    def parts(self) -> tuple[str, ...]:
        """Every part involved, the concerned one first."""
        return ((self.part,) if self.part else ()) + self.others


def _v(x: float, unit: str) -> str:
    return format_value(x, unit)


def _pct(fraction: float) -> str:
    return f"{100.0 * fraction:.0f} %"


def _over_hazard(v: float) -> bool:
    return abs(v) > _OVER_HAZARD


def _hazards(parts: list[PlacedPart], sol: Solution, net: Netlist) -> Iterator[Caution]:
    names = sol.parts  # in the order of sol.voltages
    over = {names[k] for k in np.flatnonzero(np.abs(sol.voltages) > _OVER_HAZARD)}
    for p in parts:
        if p.name not in over:
            continue
        v = sol.voltage(p.name)
        yield Caution("hazardous_voltage", "danger", p.name,
                      f"{p.name} has {_v(abs(v), 'V')} across it, above {HAZARD_VOLTAGE:g} V DC: "
                      "hazardous live (IEC 61010-1). Do not touch; work on it dead.",
                      {"voltage": v, "limit": HAZARD_VOLTAGE})
    # With every potential within half the limit no point is beyond it, nor two points that far apart.
    if 2.0 * float(np.abs(sol.node_potentials).max(initial=0.0)) <= _OVER_HAZARD:
        return
    labels = node_labels(sol)

    def named(pt: str) -> str:
        """A point by its node's label (n1, n2… as in the equations and the solve report) and grid place."""
        label = labels.get(sol.node_of(pt))
        return f"{label} (grid {pt})" if label else f"at grid {pt}"

    for island in sol.islands:
        points = sorted(island)
        pots = {pt: sol.potential(pt) for pt in points}
        hi, lo = max(points, key=pots.get), min(points, key=pots.get)
        grounded = net.ground in island
        if grounded:
            far = max(points, key=lambda pt: abs(pots[pt]))
            if _over_hazard(pots[far]):
                yield Caution("hazardous_potential", "danger", None,
                              f"Point {named(far)} is {_v(pots[far], 'V')} from ground, beyond {HAZARD_VOLTAGE:g} V DC: "
                              "hazardous live (IEC 61010-1).",
                              {"voltage": pots[far], "limit": HAZARD_VOLTAGE}, points=(far,))
        # Between the highest and the lowest point, unless that is the point-to-ground caution
        # again: a split supply of ±40 V about ground is 80 V rail to rail.
        split = pots[hi] > 0 > pots[lo]
        if not grounded or split:
            if _over_hazard(pots[hi] - pots[lo]):
                yield Caution("hazardous_potential", "danger", None,
                              f"Points {named(hi)} and {named(lo)} are {_v(pots[hi] - pots[lo], 'V')} apart, beyond "
                              f"{HAZARD_VOLTAGE:g} V DC: hazardous live (IEC 61010-1).",
                              {"voltage": pots[hi] - pots[lo], "limit": HAZARD_VOLTAGE}, points=(hi, lo))


def _cells(p: PlacedPart, sol: Solution, scale: float) -> Iterator[Caution]:
    i, v, emf = sol.current(p.name), sol.voltage(p.name), p.value("emf")
    delivered = -i  # passive convention: a delivering cell's current runs minus to plus
    tiny = max(_NOISE * scale, _CURRENT_FLOOR)
    if delivered > tiny and emf > 0 and v <= SHORTED_FRACTION * emf:
        heat = delivered * delivered * p.value("internal_resistance")  # Joule heat in the cell, I² r
        inside = f"; {_v(heat, 'W')} turns to heat inside it" if heat > 0 else ""
        yield Caution("cell_shorted", "danger", p.name,
                      f"{p.name} is shorted or nearly so: {_v(delivered, 'A')} with only {_v(v, 'V')} "
                      f"left of its {_v(emf, 'V')}{inside}. A shorted cell heats fast and can burn or burst.",
                      {"current": delivered, "voltage": v, "emf": emf, "internal_heat": heat})
    limit = p.value("max_current")
    if limit > 0 and abs(i) > limit:
        yield Caution("cell_overcurrent", "danger", p.name,
                      f"{p.name} {'delivers' if delivered > 0 else 'takes'} {_v(abs(i), 'A')}, "
                      f"{abs(i) / limit:.1f} times its maximum of {_v(limit, 'A')}.",
                      {"current": abs(i), "max_current": limit, "ratio": abs(i) / limit})
    if delivered < -tiny and emf > 0:
        yield Caution("cell_charging", "info", p.name,
                      f"{p.name} is being charged by the rest of the circuit at {_v(-delivered, 'A')}.",
                      {"current": -delivered})
    capacity = p.value("capacity")
    if capacity > 0 and delivered > tiny:
        hours = capacity / delivered
        yield Caution("cell_runtime", "info", p.name,
                      f"{p.name} would last about {hours:.3g} h at {_v(delivered, 'A')} from {capacity:g} Ah "
                      "(a rough constant-current estimate: real capacity falls at high drain and in the cold).",
                      {"hours": hours, "current": delivered, "capacity": capacity})


def _resistor(p: PlacedPart, sol: Solution) -> Caution | None:
    """The caution on a resistor run at over half its rating, if any.

    One caution at most, so a plain function rather than a generator like the
    others: it runs for every resistor, and most carry no rating.
    """
    rating = p.value("power_rating")
    if rating <= 0:
        return None
    power = abs(sol.power(p.name))
    if power <= RESISTOR_DERATING * rating:
        return None
    figures = {"power": power, "power_rating": rating, "fraction": power / rating}
    if power > rating:
        return Caution("resistor_overload", "danger", p.name,
                       f"{p.name} dissipates {_v(power, 'W')}, beyond its {_v(rating, 'W')} rating: "
                       "it will overheat; use a larger rating or a different value.", figures)
    return Caution("resistor_hot", "warning", p.name,
                   f"{p.name} dissipates {_v(power, 'W')}, {_pct(power / rating)} of its {_v(rating, 'W')} "
                   "rating; keep it at half or under (common practice).", figures)


def _fuse(p: PlacedPart, sol: Solution) -> Iterator[Caution]:
    rating = p.value("rating")
    if p.flag("blown"):
        yield Caution("fuse_blown", "info", p.name,
                      f"{p.name} is treated as blown (open): nothing flows through it.", {"rating": rating})
        return
    i = abs(sol.current(p.name))
    if i > rating:
        yield Caution("fuse_over", "warning", p.name,
                      f"{p.name} carries {_v(i, 'A')}, {_v(i - rating, 'A')} ({_pct(i / rating - 1)}) above its "
                      f"{_v(rating, 'A')} rating: it will blow, the sooner the further over.",
                      {"current": i, "rating": rating, "margin": rating - i, "load_fraction": i / rating})


def _lamp(p: PlacedPart, sol: Solution) -> Iterator[Caution]:
    rated = p.value("rated_power")
    power = abs(sol.power(p.name))
    hot = lamp_hot_resistance(p.value("rated_voltage"), rated)
    over = power > rated * (1 + _NOISE)
    tail = (" It runs above its rating: brighter, hotter and short-lived." if over else "")
    yield Caution("lamp_power", "warning" if over else "info", p.name,
                  f"{p.name} runs at {_pct(power / rated)} of its rated power ({_v(power, 'W')} of "
                  f"{_v(rated, 'W')}), modelled at its hot resistance {_v(hot, 'Ω')}; a cold filament is "
                  f"lower, so the switch-on current is higher.{tail}",
                  {"power": power, "rated_power": rated, "fraction": power / rated,
                   "hot_resistance": hot, "voltage": abs(sol.voltage(p.name))})


def _supply(net: Netlist, sol: Solution) -> dict[str, float]:
    """Each point's island supply voltage: the largest potential difference in its island."""
    out: dict[str, float] = {}
    for island in sol.islands:
        pots = [sol.potential(pt) for pt in island]
        span = max(pots) - min(pots)
        out.update(dict.fromkeys(island, span))
    return out


def _cable(p: PlacedPart, sol: Solution, net: Netlist, supply: dict[str, float]) -> Iterator[Caution]:
    drop = abs(sol.voltage(p.name))
    limit = p.value("drop_limit")
    source_v = supply.get(net.point_at[p.terminal_points[0]], 0.0)
    figures = {"drop": drop, "current": abs(sol.current(p.name)), "drop_limit": limit}
    if source_v <= 0:
        yield Caution("cable_drop", "info", p.name, f"{p.name} drops {_v(drop, 'V')}.", figures)
        return
    pct = 100.0 * drop / source_v
    figures.update(percent=pct, supply_voltage=source_v)
    over = pct > limit
    tail = (f", above its {limit:g} % limit: use a larger cross-section or a shorter run" if over else "")
    yield Caution("cable_drop", "warning" if over else "info", p.name,
                  f"{p.name} drops {_v(drop, 'V')}, {pct:.1f} % of the {_v(source_v, 'V')} supply{tail}.",
                  figures)


def _ammeter(p: PlacedPart, sol: Solution, net: Netlist, kinds: dict[str, str]) -> Iterator[Caution]:
    shorted, across = parallel_parts(net.circuit, p.name)
    i = abs(sol.current(p.name))
    if shorted:
        yield Caution("ammeter_bypassed", "warning", p.name,
                      f"{p.name} is bridged by a wire, so it reads next to nothing; an ammeter goes in "
                      "series, in place of a link.", {"current": i})
        return
    sources = [n for n in across if is_source(net.circuit.part(n))]
    if sources:
        yield Caution("ammeter_across_source", "danger", p.name,
                      f"{p.name} is connected straight across {', '.join(sources)}: it shorts the source "
                      f"({_v(i, 'A')}), which can blow the meter's fuse, damage the meter or burn the "
                      "cell. An ammeter goes in series with the load.", {"current": i},
                      others=tuple(sources))
        return
    loads = [n for n in across if kinds.get(n) != "voltmeter"]  # a voltmeter across it reads its burden
    if loads:
        yield Caution("ammeter_across_part", "warning", p.name,
                      f"{p.name} is connected across {', '.join(loads)} and shorts it; an ammeter goes in "
                      "series with the part whose current you want.", {"current": i}, others=tuple(loads))


def _voltmeter(p: PlacedPart, sol: Solution, net: Netlist) -> Iterator[Caution]:
    partners = series_partners(net.circuit, p.name)
    if not partners:
        return
    i = abs(sol.current(p.name))
    sources = [n for n in partners if is_source(net.circuit.part(n))]
    whom = f"the loop through {', '.join(sources)}" if sources else ", ".join(partners)
    yield Caution("voltmeter_in_series", "warning", p.name,
                  f"{p.name} is in series with {', '.join(partners)}: it carries the whole current of "
                  f"{whom} ({_v(i, 'A')}), so it starves the circuit and reads the drop across its own "
                  "input. A voltmeter goes across the part it measures (ignore this if you mean to read "
                  "an open output).", {"current": i}, others=tuple(partners))


def _meter_readings(sketch: Sketch, sol: Solution) -> Iterator[Caution]:
    report = read_meters(sketch, sol)
    for r in report.readings:
        figures = {"reading": r.value}
        if r.unmetered is not None:
            figures.update(unmetered=r.unmetered, shift=r.shift)
            if r.shift_fraction is not None:
                figures["shift_percent"] = 100.0 * r.shift_fraction
            what = (f"; unmetered it would be {display_reading(r.unmetered, r.unit)}"
                    + (f" ({100.0 * r.shift_fraction:+.2g} %)" if r.shift_fraction is not None else ""))
        else:
            what = ""
        yield Caution("meter_reading", "info", r.part, f"{r.part} reads {r.display}{what}.", figures)
    if report.most_shifted and report.most_shifted_fraction > 1e-6:
        yield Caution("meter_loading", "info", report.most_shifted,
                      f"The meters change the current in {report.most_shifted} by "
                      f"{100.0 * report.most_shifted_fraction:.2g} % from the unmetered circuit "
                      "(the largest change of any part).",
                      {"shift_percent": 100.0 * report.most_shifted_fraction})
    if report.problem:
        yield Caution("meter_reading", "info", None, report.problem)


def assess(sketch: Sketch, netlist: Netlist, solution: Solution, *, meters: bool = True) -> list[Caution]:
    """Every caution for ``sketch`` as solved in ``solution`` (from ``netlist``), most severe first.

    ``meters=False`` skips the meter readings, which solve the circuit once
    more with the meters made ideal.
    """
    scale = float(abs(solution.currents).max(initial=0.0))
    parts = sketch.parts
    kinds = {p.name: p.kind for p in parts}
    present = set(kinds.values())
    supply = _supply(netlist, solution) if "cable" in present else {}
    out = list(_hazards(parts, solution, netlist))
    for p in parts:
        if p.kind == "resistor":
            caution = _resistor(p, solution)
            if caution is not None:
                out.append(caution)
        elif p.kind == "cell":
            out += _cells(p, solution, scale)
        elif p.kind == "fuse":
            out += _fuse(p, solution)
        elif p.kind == "lamp":
            out += _lamp(p, solution)
        elif p.kind == "cable":
            out += _cable(p, solution, netlist, supply)
        elif p.kind == "ammeter":
            out += _ammeter(p, solution, netlist, kinds)
        elif p.kind == "voltmeter":
            out += _voltmeter(p, solution, netlist)
    if meters and not present.isdisjoint(METER_KINDS):
        out += _meter_readings(sketch, solution)
    return sorted(out, key=lambda c: SEVERITIES.index(c.severity))
