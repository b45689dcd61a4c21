"""``loopwright equations`` and ``loopwright check``: saved tags name the currents, exit status 3 when wrong."""
from __future__ import annotations

from pathlib import Path

import pytest

from app.cli import EXIT_CIRCUIT, EXIT_FILE, EXIT_OK, EXIT_WRONG, main
from app.sketch.fileio import dumps_sketch, save_sketch
from app.sketch.model import BranchTag, SavedCheck

FIXTURE = Path(__file__).resolve().parent.parent / "demo_circuits" / "bench_supply_fixture.lwsk"

# The fixture by hand (series and parallel resistances, Ohm's law): B1 12 V with 0.05 Ω inside feeds R1 47 Ω,
# then R2 100 Ω in parallel with R3 + R4 = 220 + 330 Ω.
R_PAR = 100 * 550 / 650
I_FEED = 12 / (0.05 + 47 + R_PAR)          # 91.14 mA
I_R2 = I_FEED * 550 / 650                   # current divider


def run(capsys, *argv: str) -> tuple[int, str, str]:
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture
def tagged(tmp_path):
    """The fixture with Ia on R1 (B1's branch, counted from R1's first terminal) and Ib on R2."""
    from app.sketch.fileio import load_sketch
    s = load_sketch(FIXTURE)
    s.set_tag("R1", BranchTag("Ia", "R1", True))
    s.set_tag("R2", BranchTag("Ib", "R2", True))
    path = tmp_path / "tagged.lwsk"
    save_sketch(s, path)
    return path, s


def test_equations_use_the_saved_tags_and_show_residuals(capsys, tagged):
    path, _ = tagged
    code, out, err = run(capsys, "equations", str(path))
    assert code == EXIT_OK, err
    assert "Ia" in out and "Ib" in out and "KCL at junction" in out and "residual" in out
    assert "Mesh-current form" not in out
    code, out, _ = run(capsys, "equations", str(path), "--mesh")
    assert code == EXIT_OK and "Mesh-current form" in out and "IL1" in out
    code, out, _ = run(capsys, "equations", str(path), "--latex")
    assert code == EXIT_OK and "\\quad" in out and out.count("=") >= 4


def test_a_correct_hand_equation_passes_and_a_wrong_one_exits_3(capsys, tagged):
    path, _ = tagged
    # Around the right-hand window by hand: the drop across R2 equals the drops across R3 and R4, whose
    # branch carries Ia - Ib (KCL), whatever way the person writes it round.
    code, out, _ = run(capsys, "check", str(path), "--eq", "Ib*R2 = (Ia - Ib)*R3 + (Ia - Ib)*R4")
    assert code == EXIT_OK, out
    assert out.splitlines()[1].startswith("Correct")
    code, out, _ = run(capsys, "check", str(path), "--eq", "Ib*R2 = (Ia - Ib)*R3 - (Ia - Ib)*R4")
    assert code == EXIT_WRONG
    assert "wrong sign" in out and "R4" in out and "^" in out


def test_numeric_answers_against_a_hand_calculation(capsys, tagged):
    path, _ = tagged
    good = f"Ia = {I_FEED * 1e3:.2f}m, Ib = {I_R2 * 1e3:.2f}m"
    code, out, _ = run(capsys, "check", str(path), "--eq", good)
    assert code == EXIT_OK, out
    code, out, _ = run(capsys, "check", str(path), "--eq", f"Ia = {I_FEED * 1.05 * 1e3:.2f}m")
    assert code == EXIT_WRONG and "5% off" in out
    code, _, _ = run(capsys, "check", str(path), "--eq", f"Ia = {I_FEED * 1.05 * 1e3:.2f}m", "--tolerance", "10%")
    assert code == EXIT_OK


def test_saved_checks_are_run_when_no_equation_is_given(capsys, tagged, tmp_path):
    _, s = tagged
    s.add_check(SavedCheck("Ia - Ib - I1 = 0"))  # top right junction: Ia in; Ib and R3-R4's current out
    s.add_check(SavedCheck("Ia = 1m", "values"))
    path = tmp_path / "reviewed.lwsk"
    save_sketch(s, path)
    code, out, _ = run(capsys, "check", str(path))
    assert code == EXIT_WRONG
    assert "Correct: KCL" in out and "Ia = 1.00 mA: expected" in out


def test_file_and_circuit_problems_keep_exit_1_and_2(capsys, tmp_path, tagged):
    code, _, err = run(capsys, "check", str(tmp_path / "missing.lwsk"), "--eq", "B1 = 0")
    assert code == EXIT_FILE and "loopwright:" in err
    _, s = tagged
    s.set_tag("R3", BranchTag("Ic", "R3"))
    s.set_tag("R4", BranchTag("Id", "R4"))  # R3 and R4 are in series: one branch, two tags
    path = tmp_path / "twotags.lwsk"
    path.write_text(dumps_sketch(s), "utf-8")
    code, _, err = run(capsys, "equations", str(path))
    assert code == EXIT_CIRCUIT and "Ic" in err and "Id" in err
    code, _, err = run(capsys, "check", str(path), "--eq", "B1 = 0")
    assert code == EXIT_CIRCUIT
    code, _, err = run(capsys, "check", str(FIXTURE))
    assert code == EXIT_FILE and "nothing to check" in err


def test_text_that_is_no_equation_is_wrong_with_a_message(capsys, tagged):
    path, _ = tagged
    for text in ("B1 - Ia*", "__import__('os').system('true') = 0", "Ia*Ib = 0", "R9*Ia = 0"):
        code, out, _ = run(capsys, "check", str(path), "--eq", text)
        assert code == EXIT_WRONG, text
        assert "Traceback" not in out and len(out.splitlines()) >= 2


def test_an_answer_for_a_current_the_circuit_does_not_have_is_called_unknown(capsys, tagged):
    path, _ = tagged
    code, out, _ = run(capsys, "check", str(path), "--eq", "Ix = 3")
    assert code == 3
    assert "not in this circuit" in out and "off by more than" not in out
