"""The .lwsk file: round trips, byte-identical resaves, plain refusals, fuzzing."""
import json
import os
import stat

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from app.sketch import fileio
from app.sketch.fileio import (
    MAX_BYTES,
    SketchFileError,
    dumps_sketch,
    load_sketch,
    loads_sketch,
    save_sketch,
)
from app.sketch.model import PlacedPart, Sketch, Wire


def workshop_sketch():
    """An invented bench fixture: a 12 V bank feeding two lamps' stand-in resistors."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 12.0, "internal_resistance": 0.05},
                          label="bench bank — left"))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, 0, values={"resistance": 4.7e3}))
    s.add_part(PlacedPart("resistor", "R2", 8, 0, 90, mirror=True, values={"resistance": 0.1}))
    s.add_part(PlacedPart("switch", "S1", 0, 8, 270, flags={"closed": False}))
    s.add_part(PlacedPart("current_source", "I1", 12, 0, 180, values={"current": 1e-3}))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    s.add_wire(Wire(0, 4, 8, 4))
    s.add_wire(Wire(8, 4, 8, -3))
    return s


def base_doc():
    return json.loads(dumps_sketch(workshop_sketch()))


def test_round_trip_equality(tmp_path):
    s = workshop_sketch()
    assert loads_sketch(dumps_sketch(s)) == s
    path = tmp_path / "fixture.lwsk"
    save_sketch(s, path)
    loaded = load_sketch(path)
    assert loaded == s
    assert [p.name for p in loaded.parts] == [p.name for p in s.parts]
    assert loaded.part("R2").mirror is True and loaded.part("B1").label == "bench bank — left"


def test_resave_is_byte_identical(tmp_path):
    first, second = tmp_path / "a.lwsk", tmp_path / "b.lwsk"
    save_sketch(workshop_sketch(), first)
    save_sketch(load_sketch(first), second)
    assert first.read_bytes() == second.read_bytes()


def test_floats_are_written_by_repr():
    s = Sketch()
    s.add_part(PlacedPart("resistor", "R1", 0, 0, values={"resistance": 0.1 + 0.2}))
    doc = json.loads(dumps_sketch(s))
    assert doc["parts"][0]["values"]["resistance"] == 0.1 + 0.2  # exact, not rounded
    assert repr(0.1 + 0.2) in dumps_sketch(s)


def test_hand_written_file_with_optional_fields_left_out():
    text = json.dumps({"format": "loopwright-sketch", "version": 1,
                       "parts": [{"kind": "resistor", "name": "R9", "x": -3, "y": 7}],
                       "wires": [{"x1": -3, "y1": 7, "x2": -3, "y2": 0}]})
    s = loads_sketch(text)
    r9 = s.part("R9")
    assert (r9.rotation, r9.mirror, r9.values, r9.flags, r9.label) == (0, False, {}, {}, "")
    assert s.wires == [Wire(-3, 7, -3, 0)]


def test_integer_values_load_as_floats():
    doc = base_doc()
    doc["parts"][1]["values"]["resistance"] = 470
    value = loads_sketch(json.dumps(doc)).part("R1").values["resistance"]
    assert value == 470.0 and type(value) is float


DELETE = object()


def changed(path, value):
    doc = base_doc()
    target = doc
    for key in path[:-1]:
        target = target[key]
    if value is DELETE:
        del target[path[-1]]
    else:
        target[path[-1]] = value
    return json.dumps(doc, ensure_ascii=False)


MALFORMED_FIELDS = [
    (("parts", 1, "values", "resistance"), -1.0, "parts[1].values.resistance: must be a finite number > 0"),
    (("parts", 1, "values", "resistance"), 0, "parts[1].values.resistance: must be a finite number > 0"),
    (("parts", 0, "values", "emf"), "12", "parts[0].values.emf: must be a finite number ≥ 0"),
    (("parts", 0, "values", "internal_resistance"), True,
     "parts[0].values.internal_resistance: must be a finite number ≥ 0"),
    (("parts", 1, "values", "colour"), 3.0, "parts[1].values.colour: unknown field"),
    (("parts", 5, "values"), {"emf": 1.0}, "parts[5].values.emf: unknown field"),
    (("parts", 1, "flags"), {"closed": True}, "parts[1].flags.closed: unknown field"),
    (("parts", 3, "flags", "closed"), "no", "parts[3].flags.closed: must be true or false"),
    (("parts", 0, "kind"), "diode", "parts[0].kind: unknown part kind \"diode\""),
    (("parts", 0, "kind"), 7, "parts[0].kind: must be text naming a part kind"),
    (("parts", 1, "name"), "B1", "parts[1].name: B1 is already the name of parts[0]"),
    (("parts", 1, "name"), "~w0.1", "parts[1].name: must be 1 to 32 letters"),
    (("parts", 1, "name"), "", "parts[1].name: must be 1 to 32"),
    (("parts", 1, "name"), DELETE, "parts[1].name: missing"),
    (("parts", 2, "x"), 1.5, "parts[2].x: must be a whole number"),
    (("parts", 2, "x"), 4.0, "parts[2].x: must be a whole number"),
    (("parts", 2, "y"), True, "parts[2].y: must be a whole number"),
    (("parts", 2, "y"), 10**9, "parts[2].y: must be between -1000000 and 1000000"),
    (("parts", 2, "rotation"), 45, "parts[2].rotation: must be 0, 90, 180 or 270"),
    (("parts", 2, "rotation"), 90.0, "parts[2].rotation: must be 0, 90, 180 or 270"),
    (("parts", 2, "mirror"), "yes", "parts[2].mirror: must be true or false"),
    (("parts", 2, "label"), "x" * 201, "parts[2].label: must be at most 200 characters"),
    (("parts", 2, "label"), "bell\x07", "parts[2].label: must not hold control characters"),
    (("parts", 2, "label"), 5, "parts[2].label: must be text"),
    (("parts", 2, "colour"), "red", "parts[2].colour: unknown field"),
    (("parts", 2, "two words"), 1, 'parts[2]["two words"]: unknown field'),
    (("parts", 2), [1, 2], "parts[2]: must be an object"),
    (("parts",), {}, "parts: must be a list"),
    (("wires",), DELETE, "wires: missing"),
    (("wires", 0, "x2"), DELETE, "wires[0].x2: missing"),
    (("wires", 1, "x2"), 3, "wires[1]: must run horizontally or vertically"),
    (("wires", 1, "y2"), 4, "wires[1]: both ends are at the same point"),
    (("wires", 1, "y1"), "4", "wires[1].y1: must be a whole number"),
    (("colour",), "red", "colour: unknown field"),
    (("format",), "some-other-format", "format: this is not a Loopwright sketch"),
    (("format",), DELETE, "format: this is not a Loopwright sketch"),
    (("version",), 4, "version: the file is version 4, written by a newer Loopwright; "
                      "this one reads versions up to 3"),
    (("version",), "1", "version: must be a whole number ≥ 1"),
    (("version",), 0, "version: must be a whole number ≥ 1"),
]


@pytest.mark.parametrize("path, value, message", MALFORMED_FIELDS)
def test_malformed_field_is_named(path, value, message):
    with pytest.raises(SketchFileError) as info:
        loads_sketch(changed(path, value))
    assert str(info.value).startswith(message)
    assert "\n" not in str(info.value)


GOOD = dumps_sketch(workshop_sketch())

MALFORMED_TEXT = [
    (GOOD.replace('"resistance": 4700.0', '"resistance": 1e400'),
     "parts[1].values.resistance: must be a finite number > 0"),
    (GOOD.replace('"resistance": 4700.0', '"resistance": NaN'), "NaN is not a number"),
    (GOOD.replace('"resistance": 4700.0', '"resistance": -Infinity'), "-Infinity is not a number"),
    (GOOD.replace('"x": 4,', '"x": ' + "9" * 5000 + ","), "more than 40 digits"),
    (GOOD.replace('"x": 4,', '"x": 4, "x": 5,'), 'the key "x" appears twice'),
    (GOOD[:-10], "not valid JSON"),
    ("", "empty"),
    ("[]", "must hold one JSON object"),
    ('"loopwright-sketch"', "must hold one JSON object"),
    ("[" * 5000 + "]" * 5000, "nests lists or objects more than 16 deep"),
    ('{"a": ' * 100 + "1" + "}" * 100, "nests lists or objects more than 16 deep"),
    (GOOD.replace('"label": "bench bank', '"label": "\\ud800 bench bank'),
     "parts[0].label: holds a broken character (a lone surrogate)"),
]


@pytest.mark.parametrize("text, message", MALFORMED_TEXT)
def test_malformed_text_is_refused(text, message):
    with pytest.raises(SketchFileError) as info:
        loads_sketch(text)
    assert message in str(info.value)


def test_a_depth_within_limits_inside_strings_is_not_counted():
    doc = base_doc()
    doc["parts"][0]["label"] = "[[[[[[[[[[[[[[[[[[[[{{{{{{{{{{"
    assert loads_sketch(json.dumps(doc)).part("B1").label.startswith("[[[")


def test_bad_bytes_and_byte_order_mark():
    with pytest.raises(SketchFileError, match="not UTF-8"):
        loads_sketch(b'{"format": "\xff"}')
    assert loads_sketch(b"\xef\xbb\xbf" + GOOD.encode()) == workshop_sketch()


def test_oversized_text_is_refused_before_parsing():
    with pytest.raises(SketchFileError, match="larger than 20 MB"):
        loads_sketch(b" " * (MAX_BYTES + 1))


def test_oversized_file_is_refused_without_reading(tmp_path):
    path = tmp_path / "huge.lwsk"
    with open(path, "wb") as f:
        f.truncate(MAX_BYTES + 1)  # sparse: costs no disk
    with pytest.raises(SketchFileError, match="larger than 20 MB"):
        load_sketch(path)


def test_missing_file_is_a_sketch_file_error(tmp_path):
    with pytest.raises(SketchFileError, match="Could not read"):
        load_sketch(tmp_path / "nowhere.lwsk")


def test_first_problem_is_the_one_reported():
    doc = base_doc()
    doc["parts"][4]["rotation"] = 12
    doc["parts"][1]["values"]["resistance"] = -5.0
    doc["wires"][0]["x1"] = 0.5
    with pytest.raises(SketchFileError) as info:
        loads_sketch(json.dumps(doc))
    assert str(info.value) == "parts[1].values.resistance: must be a finite number > 0"
    assert info.value.field == "parts[1].values.resistance"


def test_nothing_is_built_from_a_bad_file(monkeypatch):
    doc = base_doc()
    doc["wires"][-1]["y2"] = 0.25  # the very last field is bad
    built = []
    monkeypatch.setattr(Sketch, "add_part", lambda self, p, index=None: built.append(p))
    monkeypatch.setattr(Sketch, "add_wire", lambda self, w, index=None: built.append(w))
    with pytest.raises(SketchFileError, match=r"wires\[1\]\.y2"):
        loads_sketch(json.dumps(doc))
    assert built == []


def test_older_version_is_upgraded_by_its_migration(monkeypatch):
    def one_to_two(doc):
        doc = dict(doc, version=2)
        doc["wires"] = [{"x1": a, "y1": b, "x2": c, "y2": d} for a, b, c, d in doc.pop("runs")]
        return doc

    monkeypatch.setattr(fileio, "VERSION", 2)
    monkeypatch.setattr(fileio, "_MIGRATIONS", {1: one_to_two})
    old = {"format": "loopwright-sketch", "version": 1, "parts": [], "runs": [[0, 0, 0, 4]]}
    s = loads_sketch(json.dumps(old))
    assert s.wires == [Wire(0, 0, 0, 4)]
    assert json.loads(dumps_sketch(s))["version"] == 2


def test_a_migration_that_goes_wrong_is_reported(monkeypatch):
    monkeypatch.setattr(fileio, "VERSION", 2)
    monkeypatch.setattr(fileio, "_MIGRATIONS", {1: lambda doc: doc})
    with pytest.raises(SketchFileError, match="version: the upgrade to version 2 went wrong"):
        loads_sketch(json.dumps({"format": "loopwright-sketch", "version": 1,
                                 "parts": [], "wires": []}))


@pytest.mark.parametrize("bad, message", [
    (PlacedPart("resistor", "R1", 0, 0, values={"resistance": float("nan")}),
     "parts[0].values.resistance: must be a finite number > 0"),
    (PlacedPart("resistor", "R 1", 0, 0), "parts[0].name: must be 1 to 32"),
    (PlacedPart("resistor", "R1", 0, 0, rotation=45), "parts[0].rotation"),
    (PlacedPart("resistor", "R1", 2_000_000, 0), "parts[0].x: must be between"),
])
def test_unsavable_sketch_is_refused_and_file_left_alone(tmp_path, bad, message):
    path = tmp_path / "keep.lwsk"
    save_sketch(workshop_sketch(), path)
    before = path.read_bytes()
    s = Sketch()
    s.add_part(bad)
    with pytest.raises(SketchFileError) as info:
        save_sketch(s, path)
    assert str(info.value).startswith(f"The sketch cannot be saved: {message}")
    assert path.read_bytes() == before
    assert os.listdir(tmp_path) == ["keep.lwsk"]


def test_save_is_atomic_when_the_rename_fails(tmp_path, monkeypatch):
    path = tmp_path / "keep.lwsk"
    save_sketch(workshop_sketch(), path)
    before = path.read_bytes()

    def refuse(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr(fileio.os, "replace", refuse)
    with pytest.raises(OSError, match="disk full"):
        save_sketch(Sketch(), path)
    assert path.read_bytes() == before
    assert os.listdir(tmp_path) == ["keep.lwsk"]  # no temporary file left behind


@pytest.mark.skipif(os.name != "posix", reason="POSIX permission bits")
def test_save_keeps_an_existing_files_permissions(tmp_path):
    path = tmp_path / "shared.lwsk"
    path.write_text("old")
    os.chmod(path, 0o640)
    save_sketch(workshop_sketch(), path)
    assert stat.S_IMODE(os.stat(path).st_mode) == 0o640
    assert load_sketch(path) == workshop_sketch()


# -- generated sketches and fuzzing ------------------------------------------------------
_coord = st.integers(-50, 50)
_finite = st.floats(min_value=1e-12, max_value=1e12, allow_nan=False)


@st.composite
def sketches(draw):
    s = Sketch()
    for i in range(draw(st.integers(0, 5))):
        kind = draw(st.sampled_from(["resistor", "cell", "current_source", "switch", "ground"]))
        values = {}
        if kind == "resistor" and draw(st.booleans()):
            values["resistance"] = draw(_finite)
        if kind == "cell":
            values = draw(st.fixed_dictionaries({}, optional={"emf": _finite, "internal_resistance": _finite}))
        flags = {"closed": draw(st.booleans())} if kind == "switch" else {}
        s.add_part(PlacedPart(kind, f"P{i}", draw(_coord), draw(_coord),
                              draw(st.sampled_from([0, 90, 180, 270])), draw(st.booleans()),
                              values, flags, draw(st.text(max_size=20).filter(
                                  lambda t: t.isprintable()))))
    for _ in range(draw(st.integers(0, 5))):
        x, y, n = draw(_coord), draw(_coord), draw(st.integers(-9, 9).filter(bool))
        s.add_wire(Wire(x, y, x + n, y) if draw(st.booleans()) else Wire(x, y, x, y + n))
    return s


@settings(max_examples=60, deadline=None)
@given(sketches())
def test_generated_sketches_round_trip_byte_for_byte(s):
    text = dumps_sketch(s)
    again = loads_sketch(text)
    assert again == s
    assert dumps_sketch(again) == text


_json = st.recursive(
    st.none() | st.booleans() | st.integers(-10**6, 10**6) | st.floats() | st.text(max_size=8),
    lambda inner: st.lists(inner, max_size=3) | st.dictionaries(st.text(max_size=6), inner, max_size=3),
    max_leaves=8,
)


def _locations(node, path=()):
    yield path
    if isinstance(node, dict):
        for k, v in node.items():
            yield from _locations(v, path + (k,))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield from _locations(v, path + (i,))


def _loads_or_refuses(data):
    try:
        s = loads_sketch(data)
    except SketchFileError as e:
        assert str(e) and "Traceback" not in str(e)
        return
    assert isinstance(s, Sketch)
    assert loads_sketch(dumps_sketch(s)) == s


@settings(max_examples=80, deadline=None)
@given(st.binary(max_size=400))
def test_random_bytes_give_a_sketch_or_a_sketch_file_error(data):
    _loads_or_refuses(data)


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.data())
def test_mutated_documents_give_a_sketch_or_a_sketch_file_error(data):
    doc = base_doc()
    for _ in range(data.draw(st.integers(1, 3))):
        where = data.draw(st.sampled_from(list(_locations(doc))))
        if not where:
            doc = data.draw(_json)
            continue
        parent = doc
        for key in where[:-1]:
            parent = parent[key]
        if data.draw(st.booleans()):
            parent[where[-1]] = data.draw(_json)
        elif isinstance(parent, dict):
            del parent[where[-1]]
        else:
            parent.pop(where[-1])
    _loads_or_refuses(json.dumps(doc, allow_nan=True))


@settings(max_examples=40, deadline=None)
@given(st.data())
def test_damaged_text_gives_a_sketch_or_a_sketch_file_error(data):
    raw = bytearray(GOOD.encode())
    for _ in range(data.draw(st.integers(1, 4))):
        at = data.draw(st.integers(0, len(raw) - 1))
        if data.draw(st.booleans()):
            del raw[at]
        else:
            raw[at] = data.draw(st.integers(0, 255))
    _loads_or_refuses(bytes(raw))
    _loads_or_refuses(bytes(raw).decode("utf-8", "replace"))
