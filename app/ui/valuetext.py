"""Value text: the value line beside a part, and values as typed and shown for editing.

Most values take SI prefixes (``4.7k``); a cross-section in mm² and a
percentage do not (``ValueField.prefixed``), so those are written and read
as plain numbers: 0.75 mm², never "750 mmm²".
"""
from __future__ import annotations

import math
import re

from solver.circuit import MAX_VALUE, MIN_RESISTANCE

from ..sketch.kinds import ValueField, kind_spec
from ..sketch.model import PlacedPart
from ..units import format_value, parse_value

__all__ = ["editable_text", "read_value", "field_text", "field_edit_text", "read_field", "value_line"]


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
    return _checked(v, unit, label, zero_ok)


def _checked(v: float, unit: str, label: str, zero_ok: bool) -> float:
    if v < 0:
        tail = "; turn the part round instead" if unit in ("V", "A") else ""
        raise ValueError(f"{label} cannot be negative{tail}.")
    if v == 0 and not zero_ok:
        tail = "; draw a wire for a zero-ohm connection" if unit == "Ω" else ""
        raise ValueError(f"{label} cannot be zero{tail}.")
    if v > MAX_VALUE:
        raise ValueError(f"{label} is beyond any real part (more than {format_value(MAX_VALUE, unit)}).")
    if unit == "Ω" and 0 < v < MIN_RESISTANCE:
        raise ValueError(f"{label} is below any real part (less than {format_value(MIN_RESISTANCE, unit)}); "
                         "draw a wire instead.")
    return v


def _plain(value: float, digits: int = 3) -> str:
    """A plain number with ``digits`` significant figures and no trailing zeros (0.75, 2.5, 120)."""
    if not math.isfinite(value):
        return "—"
    text = f"{value:.{digits}g}"
    if "e" in text:
        text = f"{value:.{max(digits - 1 - int(math.floor(math.log10(abs(value)))), 0)}f}"
    return text


def field_text(value: float, f: ValueField) -> str:
    """``value`` of field ``f`` as shown on the drawing: ``4.70 kΩ``, ``0.75 mm²``, ``3 %``."""
    if f.prefixed:
        return format_value(value, f.unit)
    return f"{_plain(value)} {f.unit}"


def field_edit_text(value: float, f: ValueField) -> str:
    """``value`` of field ``f`` as put in an edit box (reads back exactly)."""
    if f.prefixed:
        return editable_text(value, f.unit)
    for digits in range(3, 16):
        text = _plain(value, digits)
        if float(text) == value:
            return text
    return repr(value)


_UNIT_SPELLINGS = {"mm²": ("mm²", "mm2", "mm^2", "sq mm", "sqmm"), "%": ("%", "percent")}
_NUMBER = re.compile(r"[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?")


def read_field(text: str, f: ValueField) -> float:
    """Parse ``text`` typed for field ``f``; ValueError with a plain message if it is unusable."""
    if f.prefixed:
        return read_value(text, f.unit, f.label, f.zero_ok)
    s = text.strip() if isinstance(text, str) else ""
    low = s.lower()
    for spelling in _UNIT_SPELLINGS.get(f.unit, (f.unit,)):
        if low.endswith(spelling):
            s = s[: len(s) - len(spelling)].strip()
            break
    if not _NUMBER.fullmatch(s):
        raise ValueError(f"'{text.strip()}' is not a number of {f.unit}; type one such as 2.5 "
                         f"(no k or m prefix for {f.unit}).")
    v = float(s)
    if not math.isfinite(v):
        raise ValueError(f"'{text.strip()}' is too large a number.")
    return _checked(v, f.unit, f.label, f.zero_ok)


def value_line(part: PlacedPart) -> str:
    """The value line printed beside a part (``4.70 kΩ``, ``9.00 V  r 0.50 Ω``, ``8.00 m  0.75 mm²``).

    Values that mean "none" when zero (a fuse's resistance, an ideal
    ammeter's burden) are left out, and states are written as words.
    """
    kind = part.kind
    if kind == "switch":
        return "closed" if part.flag("closed") else "open"
    spec = kind_spec(kind)
    fields = {f.key: f for f in spec.fields}
    if kind == "cell":
        bits = [field_text(part.value("emf"), fields["emf"])]
        r = part.value("internal_resistance")
        if r:
            bits.append("r " + format_value(r, "Ω"))
        return "  ".join(bits)
    if kind == "ammeter":
        burden = part.value("burden")
        return "r " + format_value(burden, "Ω") if burden else ""
    if kind == "voltmeter":
        return "ideal" if part.flag("ideal") else format_value(part.value("input_resistance"), "Ω")
    if kind == "fuse":
        bits = [field_text(part.value("rating"), fields["rating"])]
        if part.value("resistance"):
            bits.append("r " + format_value(part.value("resistance"), "Ω"))
        if part.flag("blown"):
            bits.append("blown")
        return "  ".join(bits)
    bits = [field_text(part.value(f.key), f) for f in spec.fields]
    if kind == "cable":
        if part.choice("material") != "copper":
            bits.append("Al" if part.choice("material") == "aluminium" else part.choice("material"))
        if not part.flag("both_conductors"):
            bits.append("one way")
    return "  ".join(bits)
