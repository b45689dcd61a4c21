"""Cautions and meter readings held against hand calculations and the standards they cite."""
from __future__ import annotations

import pytest

from app.assess import DISCLAIMER, assess, display_reading, read_meters
from app.sketch.model import PlacedPart, Sketch, Wire
from test_bench_parts import part, series_loop, solved


def cautions(s: Sketch, **kw):
    net, sol = solved(s)
    return assess(s, net, sol, **kw)


def kinds(cs, part_name=None):
    return {c.kind for c in cs if part_name is None or c.part == part_name}


def one(cs, kind, part_name=None):
    found = [c for c in cs if c.kind == kind and (part_name is None or c.part == part_name)]
    assert len(found) == 1, [c.kind for c in cs]
    return found[0]


def divider(top: float, bottom: float, emf: float = 1.0, meter: PlacedPart | None = None) -> Sketch:
    """B1 across R1 (top) over R2 (bottom); ``meter`` across R2, from (8,0) to (8,4)."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": emf}))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, values={"resistance": top}))
    s.add_part(PlacedPart("resistor", "R2", 4, 0, 90, values={"resistance": bottom}))
    s.add_wire(Wire(0, 4, 4, 4))
    if meter is not None:
        s.add_part(PlacedPart(meter.kind, meter.name, 8, 0, 90, values=meter.values, flags=meter.flags))
        s.add_wire(Wire(4, 0, 8, 0))
        s.add_wire(Wire(4, 4, 8, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


# -- meters ---------------------------------------------------------------------------------
def test_ten_megohm_voltmeter_on_a_megohm_divider_reads_ten_twentyfirsts():
    # Worked by hand: R2 ∥ Rm = 1 MΩ·10 MΩ / 11 MΩ = 10/11 MΩ; the divider then gives
    # (10/11) / (1 + 10/11) = 10/21 ≈ 0.476 of the supply, against 1/2 unmetered.
    s = divider(1e6, 1e6, emf=1.0, meter=part("voltmeter", "PV1"))
    net, sol = solved(s)
    report = read_meters(s, sol)
    (r,) = report.readings
    assert r.value == pytest.approx(10 / 21, rel=1e-12)
    assert r.unmetered == pytest.approx(0.5, rel=1e-12)
    assert r.shift_fraction == pytest.approx((10 / 21 - 0.5) / 0.5, rel=1e-9)
    assert r.display == "476.2 mV"
    c = one(assess(s, net, sol), "meter_reading", "PV1")
    assert c.figures["reading"] == pytest.approx(10 / 21) and "voltmeter_in_series" not in kinds(assess(s, net, sol))


def test_ammeter_burden_shifts_the_current_it_reads():
    # Ohm's law by hand: 9 V over 8 Ω + 1 Ω burden = 1 A; without the burden 9/8 A
    s = series_loop({"emf": 9.0}, part("ammeter", "PA1", burden=1.0), part("resistor", "R1", resistance=8.0))
    _, sol = solved(s)
    (r,) = read_meters(s, sol).readings
    assert (r.value, r.unmetered) == (pytest.approx(1.0), pytest.approx(9 / 8))
    assert r.display == "1.000 A"
    report = read_meters(s, sol)
    assert report.most_shifted in ("B1", "R1")  # the loop current, hence every part's, drops by 1/9
    assert report.most_shifted_fraction == pytest.approx((9 / 8 - 1) / (9 / 8))


def test_voltmeter_in_series_is_called_out():
    # bench mistake: the meter in the loop carries the loop's whole current, E / (Rm + R)
    s = series_loop({"emf": 9.0}, part("voltmeter", "PV1"), part("resistor", "R1", resistance=100.0))
    cs = cautions(s)
    c = one(cs, "voltmeter_in_series", "PV1")
    assert set(c.others) == {"B1", "R1"}
    assert c.figures["current"] == pytest.approx(9.0 / (10e6 + 100.0), rel=1e-12)


def test_voltmeter_across_a_lone_cell_is_not_in_series():
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 1.5, "internal_resistance": 0.1}))
    s.add_part(PlacedPart("voltmeter", "PV1", 4, 0, 90))
    s.add_wire(Wire(0, 0, 4, 0))
    s.add_wire(Wire(0, 4, 4, 4))
    assert "voltmeter_in_series" not in kinds(cautions(s))


def test_ammeter_straight_across_a_cell_is_a_danger():
    # short-circuit current of a cell, E / r (Ohm's law)
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 9.0, "internal_resistance": 0.5}))
    s.add_part(PlacedPart("ammeter", "PA1", 4, 0, 90))
    s.add_wire(Wire(0, 0, 4, 0))
    s.add_wire(Wire(0, 4, 4, 4))
    cs = cautions(s)
    c = one(cs, "ammeter_across_source", "PA1")
    assert c.severity == "danger" and c.others == ("B1",)
    assert c.figures["current"] == pytest.approx(18.0)
    assert "cell_shorted" in kinds(cs, "B1")
    assert cs[0].severity == "danger"


def test_ammeter_across_a_resistor_shorts_it():
    s = divider(100.0, 100.0, emf=10.0, meter=part("ammeter", "PA1"))
    c = one(cautions(s), "ammeter_across_part", "PA1")
    assert c.others == ("R2",)
    assert c.figures["current"] == pytest.approx(0.1)  # 10 V / 100 Ω: R2 shorted (Ohm's law)


def test_ammeter_in_series_raises_no_mistake():
    s = series_loop({"emf": 9.0}, part("ammeter", "PA1"), part("resistor", "R1", resistance=9.0))
    assert not kinds(cautions(s)) & {"ammeter_across_source", "ammeter_across_part", "ammeter_bypassed"}


@pytest.mark.parametrize("value, unit, shown", [
    (12.146, "V", "12.15 V"), (-0.8432, "A", "-843.2 mA"), (1e-15, "A", "0.000 µA"),
    (-1e-15, "A", "0.000 µA"), (0.9999999, "V", "1.000 V"), (1234.6, "V", "1.235 kV"), (0.99997, "V", "1.000 V"),
    (4.7e-5, "A", "47.00 µA"),
])
def test_display_reading_is_four_digits_auto_ranging(value, unit, shown):
    assert display_reading(value, unit) == shown


# -- voltage hazard ------------------------------------------------------------------------------
def test_sixty_volt_caution_fires_at_60_1_and_not_at_59_9():
    # IEC 61010-1 §6.3.1: above 60 V DC is hazardous live
    hot = cautions(series_loop({"emf": 60.1}, part("resistor", "R1", resistance=1000.0)))
    assert {"B1", "R1"} <= {c.part for c in hot if c.kind == "hazardous_voltage"}
    assert one(hot, "hazardous_potential").figures["voltage"] == pytest.approx(60.1)
    cool = cautions(series_loop({"emf": 59.9}, part("resistor", "R1", resistance=1000.0)))
    assert not kinds(cool) & {"hazardous_voltage", "hazardous_potential"}


def two_forty_volt_cells(ground_between: bool) -> Sketch:
    """B1 over B2 (40 V each) feeding R1 over R2; optionally the middle joined and grounded."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 40.0}))
    s.add_part(PlacedPart("cell", "B2", 0, 4, 90, values={"emf": 40.0}))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, 90, values={"resistance": 1e3}))
    s.add_part(PlacedPart("resistor", "R2", 4, 4, 90, values={"resistance": 1e3}))
    s.add_wire(Wire(0, 0, 4, 0))
    s.add_wire(Wire(0, 8, 4, 8))
    if ground_between:
        s.add_wire(Wire(0, 4, 4, 4))
        s.add_part(PlacedPart("ground", "GND1", 0, 4))
    return s


def test_two_safe_cells_in_series_without_ground_make_a_hazard_between_points():
    cs = cautions(two_forty_volt_cells(ground_between=False))
    assert "hazardous_voltage" not in kinds(cs)  # 40 V across each part
    assert one(cs, "hazardous_potential").figures["voltage"] == pytest.approx(80.0)  # KVL: 40 + 40


def test_split_supply_of_forty_volts_each_side_of_ground_is_a_hazard_rail_to_rail():
    # KVL: +40 V and -40 V about ground are 80 V apart, above 60 V DC (IEC 61010-1 §6.3.1),
    # although no point is more than 40 V from ground and no part has more than 40 V across it
    cs = cautions(two_forty_volt_cells(ground_between=True))
    assert "hazardous_voltage" not in kinds(cs)
    assert one(cs, "hazardous_potential").figures["voltage"] == pytest.approx(80.0)


def test_a_hazard_names_its_points_as_the_solve_report_and_the_equations_do():
    # the 80 V between the rails of two 40 V cells (KVL); the caution's points carry the labels
    # the report's node table gives them, so a person finds them in the equations too
    import re
    from app.report import solution_table
    s = two_forty_volt_cells(ground_between=False)
    net, sol = solved(s)
    c = one(assess(s, net, sol), "hazardous_potential")
    named = re.findall(r"(n\d+) \(grid (-?\d+,-?\d+)\)", c.message)
    assert len(named) == 2
    assert abs(sol.potential(named[0][1]) - sol.potential(named[1][1])) == pytest.approx(80.0)
    table = solution_table(sol)
    for label, pt in named:
        node = sol.node_of(pt)
        assert re.search(rf"^{re.escape(node)}\s+{label}\s", table, re.M), (node, label)


# -- cells ----------------------------------------------------------------------------------------
def test_cell_into_a_near_short_is_flagged_and_a_real_load_is_not():
    shorted = cautions(series_loop({"emf": 12.0, "internal_resistance": 0.05},
                                   part("resistor", "R1", resistance=0.001)))
    c = one(shorted, "cell_shorted", "B1")
    assert c.figures["current"] == pytest.approx(12.0 / 0.051)  # Ohm's law, E / (R + r)
    # Joule's law: the heat inside the cell is I² r = (E / (R + r))² r, about 2.77 kW here
    assert c.figures["internal_heat"] == pytest.approx((12.0 / 0.051) ** 2 * 0.05)
    assert "2.77 kW turns to heat inside it" in c.message
    loaded = cautions(series_loop({"emf": 12.0, "internal_resistance": 0.05},
                                  part("resistor", "R1", resistance=1.0)))
    assert "cell_shorted" not in kinds(loaded)


def test_cell_beyond_its_maximum_current():
    cs = cautions(series_loop({"emf": 12.0, "max_current": 0.5}, part("resistor", "R1", resistance=10.0)))
    c = one(cs, "cell_overcurrent", "B1")
    assert c.figures["ratio"] == pytest.approx(1.2 / 0.5)  # 12 V / 10 Ω = 1.2 A (Ohm's law)


def test_cell_runtime_is_capacity_over_current():
    # rough constant-current estimate t = C / I: 2.5 Ah at 9 V / 90 Ω = 0.1 A lasts 25 h
    cs = cautions(series_loop({"emf": 9.0, "capacity": 2.5}, part("resistor", "R1", resistance=90.0)))
    c = one(cs, "cell_runtime", "B1")
    assert c.figures["hours"] == pytest.approx(25.0) and "rough" in c.message


def test_weaker_cell_in_parallel_is_being_charged():
    # two cells back to back through their internal resistances: I = (E1 − E2) / (r1 + r2)
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 12.0, "internal_resistance": 0.1}))
    s.add_part(PlacedPart("cell", "B2", 4, 0, 90, values={"emf": 11.0, "internal_resistance": 0.1}))
    s.add_wire(Wire(0, 0, 4, 0))
    s.add_wire(Wire(0, 4, 4, 4))
    c = one(cautions(s), "cell_charging", "B2")
    assert c.figures["current"] == pytest.approx(5.0)


# -- ratings --------------------------------------------------------------------------------------
@pytest.mark.parametrize("rating, kind", [(0.0, None), (2.5, None), (1.5, "resistor_hot"),
                                          (1.0, "resistor_hot"), (0.5, "resistor_overload")])
def test_resistor_half_rating_warning_and_overload(rating, kind):
    # 10 V across 100 Ω dissipates V²/R = 1 W (Joule); warn above half the rating (common practice)
    cs = cautions(series_loop({"emf": 10.0}, part("resistor", "R1", resistance=100.0, power_rating=rating)))
    found = kinds(cs, "R1") & {"resistor_hot", "resistor_overload"}
    assert found == ({kind} if kind else set())


def test_fuse_above_its_rating_with_margin():
    cs = cautions(series_loop({"emf": 12.0}, part("fuse", "F1", rating=1.0), part("resistor", "R1", resistance=10.0)))
    c = one(cs, "fuse_over", "F1")
    assert c.figures["current"] == pytest.approx(1.2) and c.figures["margin"] == pytest.approx(-0.2)
    ok = cautions(series_loop({"emf": 12.0}, part("fuse", "F1", rating=2.0), part("resistor", "R1", resistance=10.0)))
    assert "fuse_over" not in kinds(ok)


def test_blown_fuse_is_reported():
    cs = cautions(series_loop({"emf": 12.0}, part("fuse", "F1", blown=True), part("resistor", "R1", resistance=1.0)))
    assert "fuse_blown" in kinds(cs, "F1") and "fuse_over" not in kinds(cs)


@pytest.mark.parametrize("limit, severity", [(10.0, "warning"), (15.0, "info")])
def test_cable_drop_in_volts_and_percent_against_its_limit(limit, severity):
    # IEC 60028 copper: 2 × 10 m / 58 / 2.5 mm² = 0.1379 Ω; into 1 Ω from an ideal 12 V source
    # the drop is 12·Rc/(1 + Rc), 12.1 % of the supply (Ohm's law)
    rc = 2 * 10 / 58 / 2.5
    s = series_loop({"emf": 12.0}, part("cable", "W1", length=10, cross_section=2.5, drop_limit=limit),
                    part("resistor", "R1", resistance=1.0))
    c = one(cautions(s), "cable_drop", "W1")
    assert c.figures["drop"] == pytest.approx(12.0 * rc / (1 + rc))
    assert c.figures["percent"] == pytest.approx(100 * rc / (1 + rc))
    assert c.severity == severity


def test_cable_drop_limit_defaults_to_three_percent():
    # common practice: 3 % for circuits that matter to safety
    assert PlacedPart("cable", "W1", 0, 0).value("drop_limit") == 3.0


@pytest.mark.parametrize("emf, fraction, severity", [(12.0, 1.0, "info"), (6.0, 0.25, "info"),
                                                     (13.2, 1.21, "warning")])
def test_lamp_power_against_its_rating(emf, fraction, severity):
    # fixed hot resistance: P/P_rated = (V/V_rated)² (Ohm's and Joule's laws)
    c = one(cautions(series_loop({"emf": emf}, part("lamp", "H1", rated_voltage=12, rated_power=5))),
            "lamp_power", "H1")
    assert c.figures["fraction"] == pytest.approx(fraction) and c.severity == severity
    assert "cold filament" in c.message


def test_every_figure_is_finite_and_the_disclaimer_says_what_it_must():
    s = series_loop({"emf": 12.0, "capacity": 1.0, "max_current": 0.1},
                    part("fuse", "F1", rating=0.5), part("ammeter", "PA1", burden=0.2),
                    part("cable", "W1"), part("lamp", "H1"), part("voltmeter", "PV1"))
    for c in cautions(s):
        assert all(v == v and abs(v) != float("inf") for v in c.figures.values())
        assert c.severity in ("danger", "warning", "info") and c.message
    for words in ("idealised linear DC model", "no substitute for measurement", "local codes",
                  "licensed practice"):
        assert words in DISCLAIMER


def test_meters_can_be_skipped():
    s = divider(1e6, 1e6, meter=part("voltmeter", "PV1"))
    assert "meter_reading" not in kinds(cautions(s, meters=False))


def test_solve_json_carries_the_demo_cautions_with_part_and_figures(capsys):
    import json
    from pathlib import Path

    from app.cli import main
    demo = Path(__file__).resolve().parents[1] / "demo_circuits" / "market_stall_lamps.lwsk"
    assert main(["solve", str(demo), "--json"]) == 0
    warnings = json.loads(capsys.readouterr().out)["warnings"]
    drop = next(w for w in warnings if w["kind"] == "cable_drop")
    assert drop["part"] == "W1" and drop["severity"] == "warning" and drop["parts"] == ["W1"]
    # by hand from the demo's values: IEC 60028 copper 2 × 8 m / 58 / 0.75 mm², lamps of
    # 12²/10 = 14.4 Ω in parallel with each other and the 10 MΩ meter, pack 12.8 V with 0.02 Ω
    rc = 16 / 58 / 0.75
    load = 1 / (2 / 14.4 + 1 / 10e6)
    i = 12.8 / (0.02 + rc + load)
    assert drop["figures"]["drop"] == pytest.approx(i * rc, rel=1e-9)
    assert drop["figures"]["percent"] == pytest.approx(100 * i * rc / (12.8 - 0.02 * i), rel=1e-9)
