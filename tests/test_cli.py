"""The loopwright command on the demo sketches and on bad input.

Physics of the demos is checked against closed forms worked out here, not
against the program's own output.
"""
from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from app.cli import main
from app.sketch.fileio import save_sketch
from app.sketch.model import PlacedPart, Sketch, Wire

DEMOS = sorted((Path(__file__).resolve().parent.parent / "demo_circuits").glob("*.lwsk"))


def run(capsys, *argv: str) -> tuple[int, str, str]:
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_there_are_at_least_four_demos():
    assert len(DEMOS) >= 4


@pytest.mark.parametrize("demo", DEMOS, ids=lambda p: p.name)
def test_every_demo_solves_in_text_and_json(capsys, demo):
    code, out, err = run(capsys, "solve", str(demo))
    assert code == 0, err
    assert "Part" in out and "Current" in out and "Node potentials" in out
    code, out, err = run(capsys, "solve", str(demo), "--json")
    assert code == 0, err
    data = json.loads(out)
    assert {"parts", "nodes", "loops", "warnings"} <= set(data)
    for name, rec in data["parts"].items():
        assert not name.startswith("~")
        assert set(rec) >= {"current", "voltage", "power"}
        # absorbed power = V * I (passive convention, design notes)
        assert rec["power"] == pytest.approx(rec["voltage"] * rec["current"], rel=1e-12, abs=1e-15)
    # Tellegen's theorem (Philips Res. Rep. 7, 1952): absorbed powers sum to zero
    total = sum(r["power"] for r in data["parts"].values())
    scale = sum(abs(r["power"]) for r in data["parts"].values()) or 1.0
    assert abs(total) <= 1e-9 * scale


def test_parallel_packs_match_millman(capsys):
    """Two cells with internal resistance in parallel on a load: Millman's theorem
    V = (E1/r1 + E2/r2) / (1/r1 + 1/r2 + 1/RL) (J. Millman, Proc. IRE 28, 1940)."""
    code, out, _ = run(capsys, "solve", str(DEMOS[0].parent / "rover_parallel_packs.lwsk"), "--json")
    assert code == 0
    data = json.loads(out)
    e1, r1, e2, r2, rl = 12.6, 0.08, 12.2, 0.12, 1.5   # the values the demo was written with
    v = (e1 / r1 + e2 / r2) / (1 / r1 + 1 / r2 + 1 / rl)
    assert data["parts"]["R1"]["voltage"] == pytest.approx(v, rel=1e-12)
    assert data["parts"]["B1"]["current"] == pytest.approx(-(e1 - v) / r1, rel=1e-12)
    assert data["parts"]["B2"]["current"] == pytest.approx(-(e2 - v) / r2, rel=1e-12)




def test_circuit_error_exits_2_and_names_the_parts(capsys, tmp_path):
    f = tmp_path / "short.lwsk"
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 9.0, "internal_resistance": 0.0}))
    s.add_wire(Wire(0, 0, 2, 0))
    s.add_wire(Wire(2, 0, 2, 4))
    s.add_wire(Wire(2, 4, 0, 4))
    save_sketch(s, f)
    code, out, err = run(capsys, "solve", str(f))
    assert code == 2
    assert "B1" in err and "short" in err
    assert "Traceback" not in err


@pytest.mark.parametrize("content", [b"", b"{not json", b"\x00\xff" * 10, b'{"format": "something else"}'])
def test_file_error_exits_1_with_a_message(capsys, tmp_path, content):
    f = tmp_path / "bad.lwsk"
    f.write_bytes(content)
    code, out, err = run(capsys, "solve", str(f))
    assert code == 1
    assert err.startswith("loopwright: ") and "Traceback" not in err


def test_missing_file_exits_1(capsys, tmp_path):
    code, _, err = run(capsys, "solve", str(tmp_path / "nowhere.lwsk"))
    assert code == 1 and "loopwright:" in err


def test_console_script_runs_as_a_module(tmp_path):
    demo = DEMOS[0]
    r = subprocess.run([sys.executable, "-m", "app.cli", "solve", str(demo), "--json"],
                       capture_output=True, text=True, timeout=120)
    assert r.returncode == 0, r.stderr
    assert "parts" in json.loads(r.stdout)


def test_output_cut_short_by_the_reader_ends_quietly():
    # `loopwright solve FILE | head`: the reader closes the pipe early; no traceback, status 0
    demo = DEMOS[0].parent / "greenhouse_heater_strip.lwsk"
    r = subprocess.run(f"'{sys.executable}' -m app.cli solve '{demo}' | head -n 2", shell=True,
                       capture_output=True, text=True, timeout=120)
    assert "Traceback" not in r.stderr
    assert r.stdout.count("\n") == 2


@pytest.mark.parametrize("target", ["out.jpg", "noext", "missing_folder/out.png", "."])
def test_shot_to_a_place_it_cannot_write_says_so_plainly(capsys, tmp_path, target):
    code, out, err = run(capsys, "shot", str(DEMOS[0]), "-o", str(tmp_path / target))
    assert code == 1
    assert err.startswith("loopwright: ") and "Traceback" not in err


def test_a_command_given_wrongly_exits_1_not_2(capsys):
    # 2 is kept for circuits that cannot be solved (README, "Using it")
    with pytest.raises(SystemExit) as stop:
        main(["solve"])
    assert stop.value.code == 1
    assert "required" in capsys.readouterr().err


def test_node_labels_in_solve_are_the_ones_the_checker_reads(capsys):
    # the same n1, n2, … must name the same node in `solve --json` and in `check`
    demo = str(DEMOS[0].parent / "bench_supply_fixture.lwsk")
    code, out, _ = run(capsys, "solve", demo, "--json")
    nodes = json.loads(out)["nodes"]
    labelled = {rec["label"]: rec["potential"] for rec in nodes.values() if rec["label"]}
    assert len(labelled) >= 3
    answers = ", ".join(f"V({label}) = {v!r}" for label, v in labelled.items())
    code, out, err = run(capsys, "check", demo, "--eq", answers)
    assert code == 0, out + err


def test_solve_names_what_each_part_is(capsys, tmp_path):
    """A part's description travels with its row, in the table and in JSON; a part without
    one has none. 12 V over 100 Ω + 200 Ω in series: 40 mA (Ohm's law, by hand)."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, False, {"emf": 12.0}, label="bench supply"))
    s.add_part(PlacedPart("resistor", "R1", 0, 0, 0, False, {"resistance": 100.0}, label="tail lamp"))
    s.add_part(PlacedPart("resistor", "R2", 4, 0, 90, False, {"resistance": 200.0}))
    s.add_wire(Wire(0, 4, 4, 4))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    path = tmp_path / "lamp.lwsk"
    save_sketch(s, path)
    code, out, _ = run(capsys, "solve", str(path))
    assert code == 0
    rows = {line.split()[0]: line for line in out.splitlines() if line.startswith(("B1 ", "R1 ", "R2 "))}
    assert "Description" in out
    assert rows["R1"].split()[1:3] == ["40.0", "mA"] and rows["R1"].endswith("  tail lamp")
    assert rows["B1"].endswith("bench supply") and rows["R2"].endswith("W")
    code, out, _ = run(capsys, "solve", str(path), "--json")
    parts = json.loads(out)["parts"]
    assert parts["R1"]["description"] == "tail lamp" and parts["B1"]["description"] == "bench supply"
    assert "description" not in parts["R2"]
    assert parts["R1"]["current"] == pytest.approx(12.0 / 300.0, rel=1e-12)
