"""The kinds of part a sketch can hold: terminals, values, flags, choices and designators.

Every two-terminal part spans four grid steps: its first terminal at the
part's origin, its second four steps along its axis (before rotation and
mirroring). A ground symbol has one terminal at its origin.  Designators are
the IEC-style letter codes of the design notes (R, B, I, S, F, H, PA, PV, W).
"""
from __future__ import annotations

from dataclasses import dataclass

from .bench_parts import (
    CELL_PRESETS,
    DROP_LIMIT_SAFETY,
    MATERIALS,
    VOLTMETER_INPUT_RESISTANCE,
)

__all__ = ["ValueField", "ChoiceField", "KindSpec", "KINDS", "kind_spec", "FLAG_LABELS"]


@dataclass(frozen=True)
class ValueField:
    """One editable value of a part kind (unit, default, limits).

    Values are in SI base units, with three exceptions kept in the trade's
    own units: capacity in Ah, cross-section in mm², percentages in %.
    A value whose default is 0 and whose ``zero_ok`` is True often means
    "not given" (a resistor's power rating, a cell's capacity).  ``prefixed``
    is False for units that take no SI prefix (mm², %): show and read those
    as plain numbers.
    """

    key: str
    label: str
    unit: str
    default: float
    zero_ok: bool = True
    prefixed: bool = True


@dataclass(frozen=True)
class ChoiceField:
    """One property picked from a fixed list: ``options`` are ``(key, label)`` pairs."""

    key: str
    label: str
    options: tuple[tuple[str, str], ...]
    default: str

    @property
    def keys(self) -> tuple[str, ...]:
        return tuple(k for k, _ in self.options)


@dataclass(frozen=True)
class KindSpec:
    """What a part kind is: its designator prefix, terminals, values, flags and choices.

    ``fields`` are the values written beside the part on the drawing;
    ``ratings`` are further values that only the cautions use (a resistor's
    power rating, a cell's capacity, a cable's drop limit), edited in the part
    panel.  ``flags`` are on/off properties, true unless named in
    ``flags_off`` (a fuse is not blown until someone says so).
    """

    kind: str
    title: str
    prefix: str
    terminals: tuple[tuple[int, int], ...]
    fields: tuple[ValueField, ...] = ()
    flags: tuple[str, ...] = ()  # boolean properties, e.g. ("closed",)
    flags_off: tuple[str, ...] = ()  # the flags whose default is False
    choices: tuple[ChoiceField, ...] = ()
    ratings: tuple[ValueField, ...] = ()

    @property
    def value_fields(self) -> tuple[ValueField, ...]:
        """Every number a part of this kind holds: ``fields`` then ``ratings``."""
        return self.fields + self.ratings

    def flag_default(self, key: str) -> bool:
        """The value of flag ``key`` when a part does not set it."""
        return key not in self.flags_off

    def choice_field(self, key: str) -> ChoiceField:
        for c in self.choices:
            if c.key == key:
                return c
        raise KeyError(key)


SPAN = 4
TWO = ((0, 0), (SPAN, 0))

FLAG_LABELS: dict[str, str] = {
    "closed": "Closed",
    "blown": "Blown (open)",
    "ideal": "Ideal meter (draws no current)",
    "both_conductors": "Both conductors (out and back)",
}

KINDS: dict[str, KindSpec] = {
    "resistor": KindSpec(
        "resistor", "Resistor", "R", TWO,
        (ValueField("resistance", "Resistance", "Ω", 1000.0, zero_ok=False),),
        ratings=(ValueField("power_rating", "Power rating (0 = not given)", "W", 0.0),
                 ValueField("tolerance", "Tolerance", "%", 5.0, prefixed=False)),
    ),
    "cell": KindSpec(
        # first terminal is plus, second is minus
        "cell", "Cell or battery", "B", TWO,
        (ValueField("emf", "EMF", "V", 9.0),
         ValueField("internal_resistance", "Internal resistance", "Ω", 0.0)),
        ratings=(ValueField("capacity", "Capacity (0 = not given)", "Ah", 0.0),
                 ValueField("max_current", "Maximum current (0 = not given)", "A", 0.0)),
        choices=(ChoiceField("preset", "Preset",
                             (("custom", "Custom"),) + tuple((p.key, p.title) for p in CELL_PRESETS.values()),
                             "custom"),),
    ),
    "current_source": KindSpec(
        "current_source", "Current source", "I", TWO,
        (ValueField("current", "Current", "A", 0.01),),
    ),
    "switch": KindSpec(
        "switch", "Switch", "S", TWO, (), ("closed",),
    ),
    "ammeter": KindSpec(
        # first terminal is the meter's + input, second its common
        "ammeter", "Ammeter", "PA", TWO,
        (ValueField("burden", "Burden resistance (0 = ideal)", "Ω", 0.0),),
    ),
    "voltmeter": KindSpec(
        # first terminal is the meter's + input, second its common
        "voltmeter", "Voltmeter", "PV", TWO,
        (ValueField("input_resistance", "Input resistance", "Ω", VOLTMETER_INPUT_RESISTANCE,
                    zero_ok=False),),
        ("ideal",), flags_off=("ideal",),
    ),
    "fuse": KindSpec(
        "fuse", "Fuse", "F", TWO,
        (ValueField("rating", "Rated current", "A", 1.0, zero_ok=False),
         ValueField("resistance", "Resistance (0 = none)", "Ω", 0.0)),
        ("blown",), flags_off=("blown",),
    ),
    "lamp": KindSpec(
        "lamp", "Lamp", "H", TWO,
        (ValueField("rated_voltage", "Rated voltage", "V", 12.0, zero_ok=False),
         ValueField("rated_power", "Rated power", "W", 5.0, zero_ok=False)),
    ),
    "cable": KindSpec(
        "cable", "Cable run", "W", TWO,
        (ValueField("length", "Length", "m", 10.0, zero_ok=False),
         ValueField("cross_section", "Cross-section", "mm²", 2.5, zero_ok=False, prefixed=False)),
        ("both_conductors",),
        choices=(ChoiceField("material", "Conductor", MATERIALS, "copper"),),
        ratings=(ValueField("drop_limit", "Drop limit", "%", DROP_LIMIT_SAFETY, zero_ok=False,
                            prefixed=False),),
    ),
    "ground": KindSpec("ground", "Ground", "", ((0, 0),)),
}


def kind_spec(kind: str) -> KindSpec:
    """The spec of ``kind``; raises KeyError with a plain message if unknown."""
    try:
        return KINDS[kind]
    except KeyError:
        raise KeyError(f"unknown part kind {kind!r}") from None
