"""What bench parts are made of: conductor resistivity, wire gauges, lamps, cell presets.

Pure data and closed forms, free of Qt and of the solver, so the netlist,
the cautions and the window all read the same figures.  Every recalled
value is marked "from memory"; rules of thumb are marked "common practice".
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from .model import PlacedPart

__all__ = [
    "RESISTIVITY", "MATERIALS", "awg_to_mm2", "parse_awg", "cable_resistance",
    "lamp_hot_resistance", "CellPreset", "CELL_PRESETS", "apply_cell_preset",
    "POWER_RATING_CHOICES", "DROP_LIMIT_SAFETY", "DROP_LIMIT_GENERAL",
    "VOLTMETER_INPUT_RESISTANCE",
]

# Resistivity at 20 °C in Ω·mm²/m.
# Copper: IEC 60028, the international standard of annealed copper, 1/58 Ω·mm²/m.
# Aluminium: hard-drawn aluminium for conductors, IEC 60889, 0.028264 Ω·mm²/m
# (= 1/35.38…; 61 % of the copper standard's conductivity) — from memory.
RESISTIVITY: dict[str, float] = {
    "copper": 1.0 / 58.0,
    "aluminium": 0.028264,
}
MATERIALS: tuple[tuple[str, str], ...] = (("copper", "Copper"), ("aluminium", "Aluminium"))

# Usual power ratings of fixed resistors, W (common practice); any other value may be typed.
POWER_RATING_CHOICES: tuple[float, ...] = (0.125, 0.25, 0.5, 1.0, 2.0, 5.0)

# Cable drop limits in % of the supply voltage (common practice in low-voltage DC wiring).
DROP_LIMIT_SAFETY = 3.0
DROP_LIMIT_GENERAL = 10.0

# A digital multimeter's voltage input, Ω (common practice).
VOLTMETER_INPUT_RESISTANCE = 10e6


def awg_to_mm2(gauge: int) -> float:
    """Cross-section in mm² of American Wire Gauge ``gauge`` (0000 is −3, 00 is −1).

    The gauge is defined by its diameter, d = 0.127 mm × 92^((36 − n)/39)
    (ASTM B258): 36 AWG is 0.005 in and 0000 AWG is 0.46 in.
    """
    if isinstance(gauge, bool) or not isinstance(gauge, int) or not -3 <= gauge <= 40:
        raise ValueError("A wire gauge runs from 0000 (4/0) to 40 AWG.")
    d = 0.127 * 92.0 ** ((36 - gauge) / 39)
    return math.pi * d * d / 4.0


_AWG = re.compile(r"(?:awg\s*)?(?P<g>\d{1,2}|0{2,4}|[1-4]/0)(?:\s*awg)?", re.IGNORECASE)


def parse_awg(text: str) -> int:
    """The gauge number written in ``text``: ``12``, ``12 AWG``, ``AWG 12``, ``00``, ``2/0``, ``0000``."""
    m = _AWG.fullmatch(text.strip()) if isinstance(text, str) else None
    if not m:
        raise ValueError(f"'{text}' is not a wire gauge; type one such as 12, 2/0 or 0000.")
    g = m["g"]
    if "/" in g:
        n = 1 - int(g[0])
    elif len(g) > 1 and set(g) == {"0"}:
        n = 1 - len(g)
    else:
        n = int(g)
    if n > 40:
        raise ValueError(f"'{text}' is finer than 40 AWG; give the cross-section in mm² instead.")
    return n


def cable_resistance(length_m: float, cross_section_mm2: float, material: str = "copper",
                     both_conductors: bool = True) -> float:
    """Resistance of a cable run at 20 °C, Ω: ρ·L/A, doubled for out-and-back conductors."""
    if material not in RESISTIVITY:
        raise ValueError(f"Unknown conductor material {material!r}; use copper or aluminium.")
    if not (length_m > 0 and cross_section_mm2 > 0) or not math.isfinite(length_m * cross_section_mm2):
        raise ValueError("A cable run needs a length and a cross-section above zero.")
    conductors = 2 if both_conductors else 1
    return RESISTIVITY[material] * conductors * length_m / cross_section_mm2


def lamp_hot_resistance(rated_voltage: float, rated_power: float) -> float:
    """A filament lamp's resistance at its rated point, R = V²/P, Ω.

    A cold filament is several times lower (tungsten roughly a tenth of its
    hot value, from memory), so the switch-on current is much higher than the
    running current this model gives.
    """
    if not (rated_voltage > 0 and rated_power > 0):
        raise ValueError("A lamp needs a rated voltage and power above zero.")
    return rated_voltage * rated_voltage / rated_power


@dataclass(frozen=True)
class CellPreset:
    """A common cell or battery: nominal EMF (V), internal resistance (Ω), capacity (Ah).

    All figures are typical values from memory for a fresh part at room
    temperature; real parts vary with make, age, charge and drain.
    """

    key: str
    title: str
    emf: float
    internal_resistance: float
    capacity: float


CELL_PRESETS: dict[str, CellPreset] = {p.key: p for p in (
    # typical, from memory
    CellPreset("alkaline", "Alkaline cell, 1.5 V", 1.5, 0.15, 2.5),
    CellPreset("nimh", "NiMH cell, 1.2 V", 1.2, 0.03, 2.0),
    CellPreset("li_ion", "Lithium-ion cell, 3.6 V", 3.6, 0.05, 2.6),
    CellPreset("block_9v", "9 V block (alkaline)", 9.0, 1.7, 0.5),
    CellPreset("lead_acid_12v", "12 V lead-acid, 7 Ah", 12.0, 0.025, 7.0),
    CellPreset("lifepo4_12v", "12 V lithium iron phosphate, 20 Ah", 12.8, 0.02, 20.0),
)}


def apply_cell_preset(part: PlacedPart, key: str) -> PlacedPart:
    """``part`` (a cell) with the preset's EMF, internal resistance and capacity, and the preset named.

    ``"custom"`` only records that the values are the person's own.  Other
    values of the part (maximum current) are kept.
    """
    if part.kind != "cell":
        raise ValueError(f"{part.name} is not a cell; presets are for cells and batteries.")
    choices = dict(part.choices, preset=key)
    if key == "custom":
        return replace(part, choices=choices)
    try:
        p = CELL_PRESETS[key]
    except KeyError:
        raise ValueError(f"There is no cell preset {key!r}.") from None
    values = dict(part.values, emf=p.emf, internal_resistance=p.internal_resistance, capacity=p.capacity)
    return replace(part, values=values, choices=choices)
