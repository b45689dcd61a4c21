"""The kinds of part a sketch can hold: terminals, values and designators.

Every two-terminal part spans four grid steps: its first terminal at the
part's origin, its second four steps along its axis (before rotation and
mirroring). A ground symbol has one terminal at its origin.
"""
from __future__ import annotations

from dataclasses import dataclass

__all__ = ["ValueField", "KindSpec", "KINDS", "kind_spec"]


@dataclass(frozen=True)
class ValueField:
    """One editable value of a part kind (SI base unit, default, limits)."""

    key: str
    label: str
    unit: str
    default: float
    zero_ok: bool = True


@dataclass(frozen=True)
class KindSpec:
    """What a part kind is: its designator prefix, terminals and values."""

    kind: str
    title: str
    prefix: str
    terminals: tuple[tuple[int, int], ...]
    fields: tuple[ValueField, ...] = ()
    flags: tuple[str, ...] = ()  # boolean properties, e.g. ("closed",)


SPAN = 4

KINDS: dict[str, KindSpec] = {
    "resistor": KindSpec(
        "resistor", "Resistor", "R", ((0, 0), (SPAN, 0)),
        (ValueField("resistance", "Resistance", "Ω", 1000.0, zero_ok=False),),
    ),
    "cell": KindSpec(
        # first terminal is plus, second is minus
        "cell", "Cell or battery", "B", ((0, 0), (SPAN, 0)),
        (ValueField("emf", "EMF", "V", 9.0),
         ValueField("internal_resistance", "Internal resistance", "Ω", 0.0)),
    ),
    "current_source": KindSpec(
        "current_source", "Current source", "I", ((0, 0), (SPAN, 0)),
        (ValueField("current", "Current", "A", 0.01),),
    ),
    "switch": KindSpec(
        "switch", "Switch", "S", ((0, 0), (SPAN, 0)), (), ("closed",),
    ),
    "ground": KindSpec("ground", "Ground", "", ((0, 0),)),
}


def kind_spec(kind: str) -> KindSpec:
    """The spec of ``kind``; raises KeyError with a plain message if unknown."""
    try:
        return KINDS[kind]
    except KeyError:
        raise KeyError(f"unknown part kind {kind!r}") from None
