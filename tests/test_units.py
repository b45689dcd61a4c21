"""Typed values: SI prefixes, unit symbols, the IEC 60062 code, engineering notation."""
import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app.units import format_value, parse_value

# SI prefixes and their powers of ten: SI Brochure, 9th ed. (BIPM 2019), table 7 (from memory).
SI_PREFIX_CASES = [
    ("1p", 1e-12), ("1n", 1e-9), ("1u", 1e-6), ("1µ", 1e-6), ("1μ", 1e-6), ("1m", 1e-3),
    ("1k", 1e3), ("1M", 1e6), ("1G", 1e9), ("1T", 1e12),
    ("4.7k", 4.7e3), ("10m", 10e-3), ("0.5", 0.5), (".5", 0.5), ("-12", -12.0),
    ("1e3", 1e3), ("2.2E-6", 2.2e-6), ("  33k  ", 33e3),
]


@pytest.mark.parametrize("text, expected", SI_PREFIX_CASES)
def test_si_prefixes(text, expected):
    assert parse_value(text) == pytest.approx(expected, rel=1e-15)


# IEC 60062 letter-and-digit code: the multiplier letter R (×1), K/k (×10³), M (×10⁶),
# G (×10⁹), T (×10¹²) -- and p, n, µ, m for small values -- takes the place of the
# decimal point (IEC 60062, clause on the resistance and capacitance code; from memory).
IEC_60062_CASES = [
    ("4k7", 4.7e3), ("4K7", 4.7e3), ("470R", 470.0), ("R47", 0.47), ("2M2", 2.2e6),
    ("1R0", 1.0), ("4R7", 4.7), ("68K", 68e3), ("1G5", 1.5e9), ("2T2", 2.2e12),
    ("2u2", 2.2e-6), ("4n7", 4.7e-9), ("6p8", 6.8e-12), ("µ47", 0.47e-6), ("4m7", 4.7e-3),
]


@pytest.mark.parametrize("text, expected", IEC_60062_CASES)
def test_iec_60062_code(text, expected):
    assert parse_value(text) == pytest.approx(expected, rel=1e-15)


@pytest.mark.parametrize("text, unit, expected", [
    ("4.7kΩ", "Ω", 4.7e3), ("4.7 kohm", "Ω", 4.7e3), ("4.7 kOhms", "Ω", 4.7e3),
    ("4k7Ω", "Ω", 4.7e3), ("100 \u2126", "Ω", 100.0),  # the ohm sign, not the Greek letter
    ("12V", "V", 12.0), ("12 volts", "V", 12.0), ("10mA", "A", 0.01), ("10 mA", "", 0.01),
    ("2.5 W", "W", 2.5), ("1.5", "V", 1.5),
])
def test_trailing_unit(text, unit, expected):
    assert parse_value(text, unit) == pytest.approx(expected, rel=1e-15)


@pytest.mark.parametrize("text, unit, words", [
    ("abc", "", "not a number"),
    ("", "", "No value"),
    ("   ", "Ω", "No value"),
    ("4k7k", "", "more than one prefix"),
    ("1e999", "", "too large"),
    ("1T e400", "", "not a value"),
    ("1e999k", "", "too large"),
    ("1e-999", "", "too small"),
    ("nan", "", "not a finite number"),
    ("NaN V", "V", "not a finite number"),
    ("inf", "", "not a finite number"),
    ("-Infinity", "", "not a finite number"),
    ("4,7k", "", "comma"),
    ("3x", "", "letter 'x'"),
    ("12V", "Ω", "in V"),
    ("kΩ", "Ω", "not a number"),
    ("Ω", "Ω", "no number"),
    ("R", "", "not a number"),
    ("1" * 80, "", "too long"),
])
def test_nonsense_is_refused_in_plain_words(text, unit, words):
    with pytest.raises(ValueError) as info:
        parse_value(text, unit)
    assert words in str(info.value)
    assert "Traceback" not in str(info.value)


def test_non_text_is_refused():
    with pytest.raises(ValueError, match="text"):
        parse_value(4.7)  # type: ignore[arg-type]


@pytest.mark.parametrize("value, unit, expected", [
    # Engineering notation, 3 significant figures (design notes, trade conventions).
    (4700.0, "Ω", "4.70 kΩ"),
    (-0.012, "A", "-12.0 mA"),
    (0.0, "V", "0 V"),
    (-0.0, "V", "0 V"),
    (470.0, "Ω", "470 Ω"),
    (2.2e6, "Ω", "2.20 MΩ"),
    (1.5e-7, "A", "150 nA"),
    (3.3e-6, "A", "3.30 µA"),
    (999.6, "V", "1.00 kV"),  # rounding carries into the next prefix
    (12.0, "", "12.0"),
    (4700.0, "", "4.70 k"),
])
def test_format_engineering_notation(value, unit, expected):
    assert format_value(value, unit) == expected


@pytest.mark.parametrize("value", [1e-15, 2.5e-300, 1e15, 7.7e250, 5e-324])
def test_format_outside_prefix_range_still_reads_back(value):
    text = format_value(value, "A")
    assert "e" in text
    assert parse_value(text, "A") == pytest.approx(value, rel=5e-3)


@pytest.mark.parametrize("value", [math.nan, math.inf, -math.inf, "junk", None])
def test_format_never_shows_nan_or_inf_words(value):
    text = format_value(value, "V")  # type: ignore[arg-type]
    assert "nan" not in text.lower() and "inf" not in text.lower()
    assert text.endswith(" V")


@pytest.mark.parametrize("digits", [0, 16, 2.5, True])
def test_format_digits_checked(digits):
    with pytest.raises(ValueError, match="significant figures"):
        format_value(1.0, "V", digits)  # type: ignore[arg-type]


@settings(max_examples=300, deadline=None)
@given(
    value=st.floats(min_value=-1e300, max_value=1e300, allow_nan=False, allow_infinity=False),
    digits=st.integers(min_value=1, max_value=15),
    unit=st.sampled_from(["Ω", "V", "A", "W", ""]),
)
def test_format_then_parse_round_trip(value, digits, unit):
    """Formatting then parsing gives the value rounded to ``digits`` significant figures.

    Reference: Python's own ``'.{n}e'`` formatting (correctly rounded decimal conversion).
    """
    back = parse_value(format_value(value, unit, digits), unit)
    rounded = float(f"{value:.{digits - 1}e}")
    assert back == rounded or (back == 0 and rounded == 0)
    assert abs(back - value) <= 0.5 * 10 ** (1 - digits) * abs(value) * (1 + 1e-12)
