"""A save killed at any moment leaves the complete old file or the complete new one, never a mix.

A child process saves two versions of a large sketch over one target, one
after the other, as fast as it can; it is killed with SIGKILL after a random
wait.  Every time, the target (and its backup, if any) must be byte for byte
one of the two versions, and must load.
"""
import os
import random
import signal
import subprocess
import sys
import textwrap

import pytest

from app.sketch.fileio import backup_path, dumps_sketch, load_sketch, loads_sketch, save_sketch
from app.sketch.model import PlacedPart, Sketch, Wire

pytestmark = pytest.mark.skipif(os.name != "posix", reason="SIGKILL is POSIX")

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))

SAVER = textwrap.dedent("""
    import sys
    from app.sketch.fileio import loads_sketch, save_sketch
    target, *versions = sys.argv[1:]
    sketches = [loads_sketch(open(v, "rb").read()) for v in versions]
    sys.stdin.readline()  # started ahead of time; saving begins on the word
    print("saving", flush=True)
    n = 1  # the target holds version 0: begin with the other one
    while True:
        save_sketch(sketches[n % 2], target)
        n += 1
""")


def yard_lighting(lamps: int, ohms: float) -> Sketch:
    """An invented boatyard lighting string: one cell feeding many lamp stand-ins on a long bus."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 24.0, "internal_resistance": 0.01},
                          label="yard supply"))
    for k in range(lamps):
        s.add_part(PlacedPart("resistor", f"R{k + 1}", 4 * k, 4, 90,
                              values={"resistance": ohms + k * 1e-3}, label=f"pontoon lamp {k + 1}"))
        s.add_wire(Wire(4 * k, 4, 4 * k + 4, 4))
        s.add_wire(Wire(4 * k, 8, 4 * k + 4, 8))
    return s


@pytest.fixture(scope="module")
def versions(tmp_path_factory):
    folder = tmp_path_factory.mktemp("versions")
    texts = [dumps_sketch(yard_lighting(600, 48.0)), dumps_sketch(yard_lighting(600, 96.0))]
    paths = []
    for k, text in enumerate(texts):
        p = folder / f"v{k}.lwsk"
        p.write_text(text, encoding="utf-8")
        paths.append(str(p))
    return [t.encode("utf-8") for t in texts], paths


def _start(target, paths):
    return subprocess.Popen([sys.executable, "-c", SAVER, str(target), *paths], cwd=ROOT,
                            stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.PIPE)


def kill_while_saving(tmp_path, versions, kills: int, seed: int) -> dict[str, int]:
    """Kill ``kills`` saving children at random moments; check the file each time; count what was found.

    The next child is started (and reads its sketches) while the current one
    saves, so the run is not dominated by start-up time.
    """
    data, paths = versions
    rng = random.Random(seed)
    target = tmp_path / "yard.lwsk"
    save_sketch(load_sketch(paths[0]), target)
    found = {"old": 0, "new": 0}
    waiting = _start(target, paths)
    for k in range(kills):
        child, waiting = waiting, (_start(target, paths) if k + 1 < kills else None)
        try:
            child.stdin.write(b"go\n")
            child.stdin.flush()
            assert child.stdout.readline() == b"saving\n", child.stderr.read().decode()
            try:
                child.wait(rng.uniform(0.0, 0.04))
            except subprocess.TimeoutExpired:
                pass
        finally:
            child.send_signal(signal.SIGKILL)
            child.wait()
            for stream in (child.stdin, child.stdout, child.stderr):
                stream.close()
        assert child.returncode == -signal.SIGKILL, f"the saver stopped by itself (kill {k}, seed {seed})"
        now = target.read_bytes()
        assert now in data, f"kill {k} (seed {seed}) left a file that is neither version ({len(now)} bytes)"
        found["old" if now == data[0] else "new"] += 1
        backup = backup_path(target)
        if os.path.exists(backup):
            with open(backup, "rb") as f:
                assert f.read() in data, f"kill {k} (seed {seed}) left a damaged backup"
    for version in data:  # each version found is one of these exact texts; both load
        assert loads_sketch(version).parts
    return found


def test_killed_saves_leave_a_whole_file(tmp_path, versions):
    seed = random.randrange(2**32)
    kill_while_saving(tmp_path, versions, kills=30, seed=seed)  # checks the file after every kill


@pytest.mark.slow
def test_killed_saves_leave_a_whole_file_many_times(tmp_path, versions):
    seed = random.randrange(2**32)
    found = kill_while_saving(tmp_path, versions, kills=400, seed=seed)
    assert found["old"] and found["new"], f"kills never landed between saves: {found} (seed {seed})"
