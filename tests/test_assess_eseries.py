"""Preferred values against IEC 60063 (tables from memory) and substitutions against Ohm's law."""
from __future__ import annotations

import pytest

from app.assess import SERIES, closest, neighbours, substitutions
from solver import Circuit, CircuitError


def test_series_have_their_sizes_and_nest():
    # IEC 60063: E12 has 12 values per decade, E24 24, E96 96; E12 is every other E24 value
    assert [len(SERIES[s]) for s in ("E12", "E24", "E96")] == [12, 24, 96]
    assert SERIES["E12"] == SERIES["E24"][::2]


def test_e96_is_the_rounded_geometric_series():
    # IEC 60063: E96 values are 10^(i/96) to three significant figures (no exceptions)
    assert SERIES["E96"] == tuple(round(100 * 10 ** (i / 96)) / 100 for i in range(96))


def test_e24_keeps_its_historic_values():
    # IEC 60063, from memory: E24 differs from round(10·10^(i/24)) at 2.7 3.0 3.3 3.6 3.9 4.3 4.7 and 8.2
    geometric = [round(10 * 10 ** (i / 24)) / 10 for i in range(24)]
    differ = [v for v, g in zip(SERIES["E24"], geometric) if v != g]
    assert differ == [2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2]


@pytest.mark.parametrize("series, value", [("E12", 4.7), ("E12", 8.2), ("E24", 5.1), ("E24", 9.1),
                                           ("E96", 4.99), ("E96", 1.02), ("E96", 9.76)])
def test_well_known_values_are_present(series, value):
    # IEC 60063 spot values, from memory
    assert value in SERIES[series]


@pytest.mark.parametrize("value, series, below, above", [
    (4700.0, "E12", 4700.0, 4700.0), (4800.0, "E12", 4700.0, 5600.0), (9.5, "E24", 9.1, 10.0),
    (0.105, "E12", 0.1, 0.12), (1e6, "E96", 1e6, 1e6), (980.0, "E96", 976.0, 1000.0),
])
def test_neighbours_bracket_the_value(value, series, below, above):
    b, a = neighbours(value, series)
    assert b == pytest.approx(below) and a == pytest.approx(above)


def test_closest_is_by_ratio():
    assert closest(5100.0, "E12") == pytest.approx(4700.0)  # 5100/4700 = 1.085 < 5600/5100 = 1.098
    assert closest(5200.0, "E12") == pytest.approx(5600.0)


@pytest.mark.parametrize("bad", [0.0, -1.0, float("nan"), float("inf")])
def test_bad_values_are_refused(bad):
    with pytest.raises(ValueError, match="finite resistance above zero"):
        neighbours(bad, "E12")


def test_substitutions_change_the_circuit_by_ohms_law():
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=10.0)
    c.resistor("R1", "a", "b", 4800.0)
    c.resistor("R2", "b", "g", 200.0)
    subs = substitutions(c, "R1", series=("E12",))
    assert [s.value for s in subs] == [pytest.approx(4700.0), pytest.approx(5600.0)]
    for s in subs:
        i = 10.0 / (s.value + 200.0)  # Ohm's law, series loop
        assert s.current == pytest.approx(i, rel=1e-12) and s.power == pytest.approx(i * i * s.value)
        assert s.deviation == pytest.approx(s.value / 4800.0 - 1)
        assert s.most_changed in ("B1", "R2")
        assert s.most_changed_fraction == pytest.approx(abs(i / (10.0 / 5000.0) - 1), rel=1e-9)


def test_substitutions_are_for_resistors_only():
    c = Circuit()
    c.cell("B1", plus="a", minus="g", emf=10.0)
    c.resistor("R1", "a", "g", 100.0)
    with pytest.raises(CircuitError, match="not a resistor"):
        substitutions(c, "B1")
