"""Reading and writing values the way people type them at a bench.

``parse_value`` reads a number with an optional SI prefix and unit symbol
(``4.7k``, ``10 mA``, ``4.7 kohm``) or in the resistor code of IEC 60062,
where the prefix letter (or ``R`` for no prefix) stands in for the decimal
point (``4k7``, ``470R``, ``R47``, ``2M2``, ``2u2``).  ``format_value``
writes a value in engineering notation: a mantissa from 1 to 999 and an SI
prefix that steps by 10³ (SI Brochure, 9th ed., BIPM 2019, table 7).
"""
from __future__ import annotations

import math
import re

__all__ = ["parse_value", "format_value", "PREFIXES"]

# SI prefix letter -> power of ten.  "u" and "µ" are both micro; "K" is
# accepted for kilo as the IEC 60062 code writes it (4K7).
PREFIXES: dict[str, int] = {
    "p": -12, "n": -9, "u": -6, "µ": -6, "m": -3,
    "k": 3, "K": 3, "M": 6, "G": 9, "T": 12,
}
_OUT_PREFIX = {-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}

# Unit symbol -> the spellings accepted after a number (compared case-insensitively).
_UNIT_SPELLINGS: dict[str, tuple[str, ...]] = {
    "Ω": ("\u03a9", "\u2126", "ohms", "ohm"),  # Greek capital omega, ohm sign
    "V": ("V", "volts", "volt"),
    "A": ("A", "amperes", "ampere", "amps", "amp"),
    "W": ("W", "watts", "watt"),
}
_MAX_LENGTH = 64

_PREFIX_CLASS = "pnumkKMGT"
_PLAIN = re.compile(
    r"(?P<sign>[+-]?)(?P<num>\d+(?:\.\d*)?|\.\d+)(?:[eE](?P<exp>[+-]?\d+))?"
    rf"\s*(?P<prefix>[{_PREFIX_CLASS}]?)"
)
_CODE = re.compile(rf"(?P<sign>[+-]?)(?P<int>\d*)(?P<letter>[{_PREFIX_CLASS}R])(?P<frac>\d*)")
_NOT_FINITE = re.compile(r"[+-]?(nan|inf|infinity)", re.IGNORECASE)


def _split_unit(text: str, unit: str) -> str:
    """``text`` without its trailing unit spelling; complain about a different unit."""
    lowered = text.casefold()
    wanted = _UNIT_SPELLINGS.get(unit, (unit,)) if unit else ()
    for spelling in sorted(wanted, key=len, reverse=True):
        if lowered.endswith(spelling.casefold()):
            return text[: len(text) - len(spelling)].rstrip()
    for symbol, spellings in _UNIT_SPELLINGS.items():
        for spelling in sorted(spellings, key=len, reverse=True):
            if lowered.endswith(spelling.casefold()) and len(text) > len(spelling):
                if unit:
                    raise ValueError(
                        f"'{text}' is in {symbol}, but this value is in {unit}."
                    )
                return text[: len(text) - len(spelling)].rstrip()
    return text


def _to_float(text: str, sign: str, digits: str, exponent: int) -> float:
    value = float(f"{sign}{digits}e{exponent}")
    if math.isinf(value):
        raise ValueError(f"'{text}' is too large to be a value.")
    if value == 0 and any(c in "123456789" for c in digits):
        raise ValueError(f"'{text}' is too small to be a value; use 0 if you mean zero.")
    return value


def parse_value(text: str, unit: str = "") -> float:
    """The value written in ``text``, in SI base units.

    ``unit`` is the unit the value is meant in (``"Ω"``, ``"V"``, ``"A"``…);
    a trailing spelling of it is allowed and a different unit is refused.
    With no ``unit`` any known unit symbol may follow.  Raises ``ValueError``
    with a message in plain words when the text is not a finite value.
    """
    if not isinstance(text, str):
        raise ValueError("A value must be typed as text, such as 4.7k.")
    s = text.strip().replace("μ", "µ")  # Greek mu typed for the micro sign
    if not s:
        raise ValueError("No value given; type a number such as 4.7k or 4k7.")
    if len(s) > _MAX_LENGTH:
        raise ValueError(f"The value is too long; keep it under {_MAX_LENGTH} characters.")
    s = _split_unit(s, unit)
    if not s:
        raise ValueError(f"'{text.strip()}' has a unit but no number.")
    if _NOT_FINITE.fullmatch(s):
        raise ValueError(f"'{text.strip()}' is not a finite number; type a value such as 4.7k.")
    s = s.replace("µ", "u")

    m = _PLAIN.fullmatch(s)
    if m:
        exponent = int(m["exp"] or 0) + PREFIXES.get(m["prefix"], 0)
        return _to_float(text.strip(), m["sign"], m["num"], exponent)
    m = _CODE.fullmatch(s)
    if m and (m["int"] or m["frac"]) and (m["frac"] or m["letter"] == "R"):
        exponent = 0 if m["letter"] == "R" else PREFIXES[m["letter"]]
        return _to_float(text.strip(), m["sign"], f"{m['int'] or '0'}.{m['frac'] or '0'}", exponent)
    raise ValueError(_explain(text.strip()))


def _explain(s: str) -> str:
    """A plain message for text that is not a value."""
    if "," in s:
        return f"'{s}' has a comma; write the decimal point as '.' or use the code 4k7."
    letters = [c for c in s if c.isalpha()]
    if not any(c.isdigit() for c in s):
        return f"'{s}' is not a number; type a value such as 4.7k, 4k7 or 10m."
    if sum(c in PREFIXES or c == "R" for c in letters) > 1:
        return f"'{s}' has more than one prefix letter; use one, as in 4.7k or 4k7."
    unknown = [c for c in letters if c not in PREFIXES and c not in "Re"]
    if unknown:
        return (f"'{s}' has the letter '{unknown[0]}', which is not a prefix; "
                "prefixes are p n u m k M G T.")
    return f"'{s}' is not a value; type it as 4.7k, 4k7, 470R or 10m."


def format_value(value: float, unit: str, digits: int = 3) -> str:
    """``value`` in engineering notation with ``digits`` significant figures.

    ``4.70 kΩ``, ``-12.0 mA``, ``0 V``.  Beyond the prefixes p…T the
    exponent is written out (``1.00e-15 A``).  NaN becomes ``— <unit>`` and
    infinities ``∞ <unit>``, so no raw ``nan`` or ``inf`` reaches a person.
    """
    if not isinstance(digits, int) or isinstance(digits, bool) or not 1 <= digits <= 15:
        raise ValueError("The number of significant figures must be a whole number from 1 to 15.")
    try:
        v = float(value)
    except (TypeError, ValueError):
        v = math.nan
    tail = f" {unit}" if unit else ""
    if math.isnan(v):
        return f"—{tail}"
    if math.isinf(v):
        return f"{'-' if v < 0 else ''}∞{tail}"
    if v == 0:
        return f"0{tail}"
    sign = "-" if v < 0 else ""
    mantissa, exp_text = f"{abs(v):.{digits - 1}e}".split("e")
    exponent = int(exp_text)
    figures = mantissa.replace(".", "")
    eng = exponent - exponent % 3
    if eng not in _OUT_PREFIX:
        return f"{sign}{mantissa}e{exponent}{tail}"
    whole = exponent - eng + 1  # digits before the decimal point: 1, 2 or 3
    if whole >= len(figures):
        number = figures + "0" * (whole - len(figures))
    else:
        number = f"{figures[:whole]}.{figures[whole:]}"
    prefix = _OUT_PREFIX[eng]
    if prefix or unit:
        return f"{sign}{number} {prefix}{unit}"
    return f"{sign}{number}"
