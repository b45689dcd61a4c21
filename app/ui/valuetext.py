"""Value text for editing: the shortest engineering form that reads back exactly."""
from __future__ import annotations

from ..units import format_value, parse_value

__all__ = ["editable_text", "read_value"]


def editable_text(value: float, unit: str) -> str:
    """``value`` written with as few figures as still parse back to the same number."""
    text = format_value(value, unit)
    for digits in range(3, 13):
        text = format_value(value, unit, digits)
        try:
            if abs(parse_value(text, unit) - value) <= 1e-12 * max(abs(value), 1e-300):
                return text
        except ValueError:
            continue
    return text


def read_value(text: str, unit: str, label: str, zero_ok: bool) -> float:
    """Parse a typed value for the field ``label``; ValueError with a plain message if unusable."""
    v = parse_value(text, unit)
    if v < 0:
        raise ValueError(f"{label} cannot be negative; turn the part round instead.")
    if v == 0 and not zero_ok:
        raise ValueError(f"{label} cannot be zero; draw a wire for a zero-ohm connection.")
    return v
