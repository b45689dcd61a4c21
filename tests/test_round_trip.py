"""Round trips over sketches of every part kind: save then load gives an equal sketch, load then save the same bytes.

The generator reads the kinds from ``KINDS`` (fields, ratings, flags and
choices), so a new kind is covered the day it is added.  A file rewritten by
another tool (other whitespace, other key order, optional fields left out)
loads to the same sketch and is saved back in the one canonical text.
"""
import json
import random
import unicodedata

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from app.sketch.fileio import GRID_LIMIT, LABEL_MAX, NAME_PATTERN, dumps_sketch, load_sketch, loads_sketch, save_sketch
from app.sketch.kinds import KINDS
from app.sketch.model import PlacedPart, Sketch, Wire

_coord = st.one_of(st.integers(-60, 60), st.sampled_from([-GRID_LIMIT, GRID_LIMIT, 0]))
_label = st.text(max_size=LABEL_MAX).filter(
    lambda t: not {unicodedata.category(c) for c in t} & {"Cc", "Cs"})
_number = st.one_of(st.floats(min_value=1e-12, max_value=1e12), st.sampled_from([1.0, 0.1 + 0.2, 5e-324, 1.7e308]))


@st.composite
def any_part(draw, name: str) -> PlacedPart:
    spec = KINDS[draw(st.sampled_from(sorted(KINDS)))]
    values = {}
    for f in spec.value_fields:
        if draw(st.booleans()):
            values[f.key] = draw(_number | st.just(0.0)) if f.zero_ok else draw(_number)
    flags = {k: draw(st.booleans()) for k in spec.flags if draw(st.booleans())}
    choices = {c.key: draw(st.sampled_from(c.keys)) for c in spec.choices if draw(st.booleans())}
    return PlacedPart(spec.kind, name, draw(_coord), draw(_coord), draw(st.sampled_from([0, 90, 180, 270])),
                      draw(st.booleans()), values, flags, draw(_label), choices)


@st.composite
def any_sketch(draw) -> Sketch:
    s = Sketch()
    names = draw(st.lists(st.from_regex(NAME_PATTERN, fullmatch=True), max_size=8, unique=True))
    for name in names:
        s.add_part(draw(any_part(name)))
    for _ in range(draw(st.integers(0, 6))):
        x, y = draw(st.integers(-60, 60)), draw(st.integers(-60, 60))
        n = draw(st.integers(-9, 9).filter(bool))
        s.add_wire(Wire(x, y, x + n, y) if draw(st.booleans()) else Wire(x, y, x, y + n))
    return s


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(any_sketch())
def test_every_kind_round_trips_byte_for_byte(s):
    text = dumps_sketch(s)
    again = loads_sketch(text)
    assert again == s
    assert [p.name for p in again.parts] == [p.name for p in s.parts]
    assert dumps_sketch(again) == text


def _reformatted(text: str, seed: int) -> str:
    """The same document as another tool might write it: keys shuffled, other spacing, escapes."""
    rng = random.Random(seed)

    def shuffle(node):
        if isinstance(node, dict):
            items = [(k, shuffle(v)) for k, v in node.items()]
            rng.shuffle(items)
            return dict(items)
        if isinstance(node, list):
            return [shuffle(v) for v in node]
        return node

    return json.dumps(shuffle(json.loads(text)), indent=rng.choice([None, 0, 1, 4, "\t"]),
                      ensure_ascii=rng.random() < 0.5)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(any_sketch(), st.integers(0, 2**32))
def test_a_reformatted_file_loads_the_same_and_saves_canonically(s, seed):
    text = dumps_sketch(s)
    other = _reformatted(text, seed)
    assert loads_sketch(other) == s
    assert dumps_sketch(loads_sketch(other)) == text


@settings(max_examples=15, deadline=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(any_sketch())
def test_load_then_save_on_disk_gives_identical_bytes(tmp_path, s):
    first, second = tmp_path / "first.lwsk", tmp_path / "second.lwsk"
    save_sketch(s, first, backup=False)
    save_sketch(load_sketch(first), second, backup=False)
    assert first.read_bytes() == second.read_bytes()
