"""Bench parts in the sketch: meters, fuses, lamps, cable runs, ratings, presets, file version 2.

Physics is held against published figures and closed forms named beside
each check, never against the program's own output.
"""
from __future__ import annotations

import json
import math

import pytest

from app.sketch.bench_parts import (
    CELL_PRESETS,
    RESISTIVITY,
    apply_cell_preset,
    awg_to_mm2,
    cable_resistance,
    lamp_hot_resistance,
    parse_awg,
)
from app.sketch.fileio import VERSION, SketchFileError, dumps_sketch, loads_sketch
from app.sketch.kinds import KINDS
from app.sketch.model import PlacedPart, Sketch, Wire
from app.sketch.netlist import to_circuit
from solver import CircuitError, solve


def series_loop(cell: dict, *parts: PlacedPart) -> Sketch:
    """A cell B1 (plus at the top left) feeding ``parts`` in series along the top, closed by a wire.

    Each part is given as a PlacedPart whose position is ignored: the k-th
    runs from (4k, 0) to (4k + 4, 0).  Ground at the cell's minus.
    """
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values=cell))
    for k, p in enumerate(parts):
        s.add_part(PlacedPart(p.kind, p.name, 4 * k, 0, 0, False, p.values, p.flags, p.label, p.choices))
    n = 4 * len(parts)
    s.add_wire(Wire(n, 0, n, 4))
    s.add_wire(Wire(n, 4, 0, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def solved(s: Sketch):
    net = to_circuit(s)
    return net, solve(net.circuit, ground=net.ground)


def part(kind: str, name: str, **values) -> PlacedPart:
    flags = {k: v for k, v in values.items() if isinstance(v, bool)}
    choices = {k: v for k, v in values.items() if isinstance(v, str)}
    nums = {k: float(v) for k, v in values.items() if not isinstance(v, (bool, str))}
    return PlacedPart(kind, name, 0, 0, values=nums, flags=flags, choices=choices)


# -- designators --------------------------------------------------------------------
def test_designators_follow_the_design_notes():
    # design notes: PA ammeter, PV voltmeter, F fuse, H lamp, W cable run (IEC-style letter codes)
    assert {k: KINDS[k].prefix for k in ("ammeter", "voltmeter", "fuse", "lamp", "cable")} == {
        "ammeter": "PA", "voltmeter": "PV", "fuse": "F", "lamp": "H", "cable": "W"}
    s = Sketch()
    s.add_part(PlacedPart("ammeter", "PA1", 0, 0))
    assert s.next_name("ammeter") == "PA2" and s.next_name("cable") == "W1"


# -- cable runs -----------------------------------------------------------------------
def test_ten_metre_two_conductor_run_of_2_5_mm2_copper_is_0_138_ohm():
    # IEC 60028: annealed copper 1/58 Ω·mm²/m at 20 °C; 2 × 10 m / 58 / 2.5 = 0.1379 Ω (issue 5: 0.138 Ω)
    assert cable_resistance(10.0, 2.5, "copper", both_conductors=True) == pytest.approx(0.138, abs=5e-4)
    assert cable_resistance(10.0, 2.5, "copper", both_conductors=False) == pytest.approx(10 / 58 / 2.5)


def test_aluminium_is_about_61_percent_conductive():
    # IEC 60889 hard-drawn aluminium 0.028264 Ω·mm²/m, i.e. 61 % IACS (from memory)
    assert RESISTIVITY["copper"] / RESISTIVITY["aluminium"] == pytest.approx(0.61, abs=0.005)


def test_cable_run_in_a_circuit_carries_ohms_law_current():
    s = series_loop({"emf": 12.0}, part("cable", "W1", length=10, cross_section=2.5),
                    part("resistor", "R1", resistance=1.0))
    _, sol = solved(s)
    r_cable = 2 * 10 / 58 / 2.5  # IEC 60028 copper, out and back
    assert sol.current("W1") == pytest.approx(12.0 / (1.0 + r_cable), rel=1e-12)  # Ohm's law
    assert sol.voltage("W1") == pytest.approx(12.0 * r_cable / (1.0 + r_cable), rel=1e-12)


@pytest.mark.parametrize("gauge, inches", [(36, 0.005), (-3, 0.46)])
def test_awg_formula_meets_its_defining_diameters(gauge, inches):
    # ASTM B258 defines the gauge by 36 AWG = 0.0050 in and 0000 AWG = 0.4600 in
    d = math.sqrt(4 * awg_to_mm2(gauge) / math.pi)
    assert d == pytest.approx(inches * 25.4, rel=1e-12)


@pytest.mark.parametrize("gauge, mm2", [(10, 5.26), (12, 3.31), (14, 2.08), (18, 0.823), (0, 53.5)])
def test_awg_cross_sections_match_the_usual_table(gauge, mm2):
    # the AWG table's cross-sections (from memory)
    assert awg_to_mm2(gauge) == pytest.approx(mm2, rel=0.005)


@pytest.mark.parametrize("text, n", [("12", 12), ("12 AWG", 12), ("awg 8", 8), ("0", 0), ("00", -1),
                                     ("000", -2), ("0000", -3), ("4/0", -3), ("2/0", -1), ("1/0", 0)])
def test_awg_entry_is_read(text, n):
    assert parse_awg(text) == n


@pytest.mark.parametrize("text", ["", "12.5", "00000", "5/0", "41", "AWG", "twelve"])
def test_bad_awg_entry_is_refused_in_plain_words(text):
    with pytest.raises(ValueError, match="gauge|finer"):
        parse_awg(text)


# -- lamps, meters, fuses -----------------------------------------------------------------
def test_lamp_hot_resistance_is_v_squared_over_p():
    # P = V²/R at the rated point (Joule's law with Ohm's law)
    assert lamp_hot_resistance(12.0, 5.0) == pytest.approx(28.8)
    s = series_loop({"emf": 12.0}, part("lamp", "H1", rated_voltage=12.0, rated_power=5.0))
    _, sol = solved(s)
    assert sol.power("H1") == pytest.approx(5.0, rel=1e-12)      # at its rated voltage it takes its rating
    assert sol.current("H1") == pytest.approx(5.0 / 12.0, rel=1e-12)


def test_zero_burden_ammeter_reads_the_loop_current_by_its_own_name():
    s = series_loop({"emf": 9.0, "internal_resistance": 0.5}, part("ammeter", "PA1"),
                    part("resistor", "R1", resistance=8.5))
    net, sol = solved(s)
    assert net.circuit.part("PA1").is_conductor
    assert sol.current("PA1") == pytest.approx(9.0 / 9.0, rel=1e-12)  # Ohm's law, E / (R + r)


def test_ammeter_burden_is_in_series():
    s = series_loop({"emf": 9.0}, part("ammeter", "PA1", burden=1.0), part("resistor", "R1", resistance=8.0))
    _, sol = solved(s)
    assert sol.current("PA1") == pytest.approx(1.0, rel=1e-12) and sol.voltage("PA1") == pytest.approx(1.0)


def test_ideal_voltmeter_is_open_and_reads_the_whole_emf_in_series():
    s = series_loop({"emf": 9.0}, part("voltmeter", "PV1", ideal=True), part("resistor", "R1", resistance=100.0))
    _, sol = solved(s)
    assert sol.current("R1") == 0.0 and sol.voltage("PV1") == pytest.approx(9.0)  # KVL with no current


def test_voltmeter_defaults_to_ten_megohm():
    # common practice: a digital multimeter's voltage input is about 10 MΩ
    assert PlacedPart("voltmeter", "PV1", 0, 0).value("input_resistance") == 10e6
    assert PlacedPart("voltmeter", "PV1", 0, 0).flag("ideal") is False


def test_blown_fuse_opens_the_circuit_downstream():
    s = series_loop({"emf": 12.0}, part("fuse", "F1", rating=1.0), part("resistor", "R1", resistance=10.0))
    _, sol = solved(s)
    assert PlacedPart("fuse", "F1", 0, 0).flag("blown") is False  # a new fuse is whole
    assert sol.current("R1") == pytest.approx(1.2)                 # Ohm's law
    blown = s.part("F1")
    s.replace_part("F1", PlacedPart(blown.kind, blown.name, blown.x, blown.y, values=blown.values,
                                    flags={"blown": True}))
    _, sol = solved(s)
    assert sol.current("R1") == 0.0 and sol.current("F1") == 0.0
    assert sol.voltage("F1") == pytest.approx(12.0)  # the whole EMF stands across the open fuse (KVL)


def test_a_bad_lamp_rating_is_a_plain_circuit_error():
    s = series_loop({"emf": 12.0}, PlacedPart("lamp", "H1", 0, 0, values={"rated_power": 0.0}))
    with pytest.raises(CircuitError, match="H1"):
        to_circuit(s)


# -- ratings and presets -------------------------------------------------------------------
def test_ratings_default_to_not_given():
    r = PlacedPart("resistor", "R1", 0, 0)
    b = PlacedPart("cell", "B1", 0, 0)
    assert (r.value("power_rating"), b.value("capacity"), b.value("max_current")) == (0.0, 0.0, 0.0)
    assert r.value("tolerance") == 5.0 and b.choice("preset") == "custom"


def test_cell_preset_fills_emf_resistance_and_capacity_and_can_be_overridden():
    b = PlacedPart("cell", "B1", 0, 0, values={"max_current": 2.0})
    li = apply_cell_preset(b, "li_ion")
    p = CELL_PRESETS["li_ion"]
    assert (li.value("emf"), li.value("internal_resistance"), li.value("capacity")) == (
        p.emf, p.internal_resistance, p.capacity)
    assert li.value("max_current") == 2.0 and li.choice("preset") == "li_ion"
    assert apply_cell_preset(li, "custom").value("emf") == p.emf  # custom keeps the person's values
    with pytest.raises(ValueError, match="no cell preset"):
        apply_cell_preset(b, "plutonium")


def test_presets_cover_the_common_cells():
    # nominal EMFs (from memory): alkaline 1.5 V, NiMH 1.2 V, Li-ion 3.6 V, 9 V block,
    # 12 V lead-acid, 12.8 V for four LiFePO4 cells of 3.2 V
    emf = {k: p.emf for k, p in CELL_PRESETS.items()}
    assert emf == {"alkaline": 1.5, "nimh": 1.2, "li_ion": 3.6, "block_9v": 9.0,
                   "lead_acid_12v": 12.0, "lifepo4_12v": 4 * 3.2}


# -- the file, version 2 ------------------------------------------------------------------------
def bench_sketch() -> Sketch:
    return series_loop(
        {"emf": 12.8, "internal_resistance": 0.02, "capacity": 20.0},
        part("fuse", "F1", rating=3.0, blown=True),
        part("ammeter", "PA1", burden=0.1),
        part("cable", "W1", length=8, cross_section=0.75, material="aluminium", both_conductors=False),
        part("lamp", "H1", rated_voltage=12, rated_power=10),
        part("voltmeter", "PV1", input_resistance=1e6, ideal=True),
        part("resistor", "R1", resistance=47, power_rating=0.25, tolerance=1),
    )


def test_bench_parts_round_trip_byte_for_byte():
    s = bench_sketch()
    text = dumps_sketch(s)
    again = loads_sketch(text)
    assert again == s and dumps_sketch(again) == text
    assert json.loads(text)["version"] == VERSION
    assert again.part("W1").choice("material") == "aluminium" and again.part("F1").flag("blown")


def test_version_1_file_still_opens():
    v1 = {"format": "loopwright-sketch", "version": 1, "parts": [
        {"kind": "cell", "name": "B1", "x": 0, "y": 0, "rotation": 90, "mirror": False,
         "values": {"emf": 12.0, "internal_resistance": 0.05}, "flags": {}, "label": "bench bank"},
        {"kind": "switch", "name": "S1", "x": 0, "y": 0, "rotation": 0, "mirror": False,
         "values": {}, "flags": {}, "label": ""},
        {"kind": "resistor", "name": "R1", "x": 4, "y": 0, "rotation": 90, "mirror": False,
         "values": {"resistance": 4700.0}, "flags": {}, "label": ""}],
        "wires": [{"x1": 0, "y1": 4, "x2": 4, "y2": 4}]}
    s = loads_sketch(json.dumps(v1))
    assert s.part("S1").flag("closed") is True          # v1: a missing flag is true
    assert s.part("R1").value("power_rating") == 0.0    # no rating was ever given
    assert s.part("B1").label == "bench bank"
    _, sol = solved(s)
    assert sol.current("R1") == pytest.approx(12.0 / 4700.05)  # Ohm's law
    assert json.loads(dumps_sketch(s))["version"] == VERSION  # upgraded step by step


def _doc():
    return json.loads(dumps_sketch(bench_sketch()))


@pytest.mark.parametrize("where, value, message", [
    ((3, "choices", "material"), "gold", "parts[3].choices.material: must be one of copper, aluminium"),
    ((3, "choices", "material"), 1, "parts[3].choices.material: must be one of"),
    ((3, "choices", "colour"), "red", "parts[3].choices.colour: unknown field"),
    ((0, "choices", "preset"), "nuclear", "parts[0].choices.preset: must be one of custom, alkaline"),
    ((6, "choices"), {"material": "copper"}, "parts[6].choices.material: unknown field"),
    ((1, "flags", "blown"), "yes", "parts[1].flags.blown: must be true or false"),
    ((1, "values", "rating"), 0.0, "parts[1].values.rating: must be a finite number > 0"),
    ((3, "values", "cross_section"), -1.0, "parts[3].values.cross_section: must be a finite number > 0"),
    ((0, "values", "capacity"), -2.0, "parts[0].values.capacity: must be a finite number ≥ 0"),
    ((6, "values", "power_rating"), "1/4", "parts[6].values.power_rating: must be a finite number ≥ 0"),
    ((5, "values", "input_resistance"), 0, "parts[5].values.input_resistance: must be a finite number > 0"),
    ((2, "values", "burden"), -0.1, "parts[2].values.burden: must be a finite number ≥ 0"),
    ((4, "values", "rated_power"), 0, "parts[4].values.rated_power: must be a finite number > 0"),
])
def test_bad_bench_fields_are_named(where, value, message):
    doc = _doc()
    target = doc["parts"][where[0]]
    for k in where[1:-1]:
        target = target.setdefault(k, {})
    target[where[-1]] = value
    with pytest.raises(SketchFileError) as info:
        loads_sketch(json.dumps(doc))
    assert str(info.value).startswith(message)


def test_schema_choices_match_the_program():
    from pathlib import Path
    schema = json.loads((Path(__file__).parents[1] / "assets" / "lwsk.schema.json").read_text("utf-8"))
    rules = {r["if"]["properties"]["kind"]["const"]: r["then"]["properties"]
             for r in schema["$defs"]["part"]["allOf"]}
    for kind, spec in KINDS.items():
        want = {c.key: list(c.keys) for c in spec.choices}
        got = {k: v["enum"] for k, v in rules[kind]["choices"]["properties"].items()}
        assert got == want
    assert schema["properties"]["version"]["const"] == VERSION
