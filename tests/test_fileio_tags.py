""".lwsk version 3: current tags and typed checks kept with the sketch, changed only through the model."""
import json
from dataclasses import replace

import pytest

from app.sketch import fileio
from app.sketch.fileio import SketchFileError, dumps_sketch, load_sketch, loads_sketch, save_sketch
from app.sketch.model import BranchTag, PlacedPart, SavedCheck, Sketch, Wire
from test_fileio import workshop_sketch
from test_lwsk_schema import SCHEMA, errors


def tagged_sketch() -> Sketch:
    s = workshop_sketch()
    s.set_tag("R1", BranchTag("Ia", "R1", True))
    s.set_tag("I1", BranchTag("I_src", "I1", False))
    s.add_check(SavedCheck("B1 - Ia*R1 = 0"))
    s.add_check(SavedCheck("Ia = 2.5m, V(n2) = 4", "values", 0.02))
    return s


def doc_with(**fields):
    doc = json.loads(dumps_sketch(tagged_sketch()))
    doc.update(fields)
    return json.dumps(doc)


def test_tags_and_checks_round_trip_and_count_in_equality(tmp_path):
    s = tagged_sketch()
    path = tmp_path / "tagged.lwsk"
    save_sketch(s, path)
    loaded = load_sketch(path)
    assert loaded == s
    assert loaded.tags == [BranchTag("I_src", "I1", False), BranchTag("Ia", "R1", True)]  # by name
    assert loaded.checks[1] == SavedCheck("Ia = 2.5m, V(n2) = 4", "values", 0.02)
    loaded.remove_check(0)
    assert loaded != s


def test_resave_with_tags_is_byte_identical(tmp_path):
    first, second = tmp_path / "a.lwsk", tmp_path / "b.lwsk"
    save_sketch(tagged_sketch(), first)
    save_sketch(load_sketch(first), second)
    assert first.read_bytes() == second.read_bytes()
    assert errors(json.loads(first.read_text("utf-8")), SCHEMA) == []


def test_version_2_and_1_files_still_open_with_no_tags():
    doc = json.loads(dumps_sketch(workshop_sketch()))
    for version in (1, 2):
        old = {k: v for k, v in doc.items() if k not in ("tags", "checks")}
        old["version"] = version
        if version == 1:
            old["parts"] = [{k: v for k, v in p.items() if k != "choices"} for p in old["parts"]]
        s = loads_sketch(json.dumps(old))
        assert s == workshop_sketch() and s.tags == [] and s.checks == []
        assert json.loads(dumps_sketch(s))["version"] == fileio.VERSION == 3


def test_changes_go_through_the_model_and_are_announced():
    s = workshop_sketch()
    heard = []
    s.subscribe(lambda: heard.append(1))
    assert s.set_tag("R1", BranchTag("Ia", "R1")) is None
    assert s.set_tag("R1", BranchTag("Ia", "R1", False)) == BranchTag("Ia", "R1", True)
    s.add_check(SavedCheck("Ia = 1m", "values"))
    assert s.remove_check(0) == SavedCheck("Ia = 1m", "values")
    assert len(heard) == 4
    with pytest.raises(ValueError):
        s.set_tag("R1", BranchTag("Ib", "R2"))
    with pytest.raises(ValueError):
        s.add_check(SavedCheck("x", "poem"))


def test_a_tag_follows_a_renamed_part_and_waits_while_its_part_is_deleted():
    s = workshop_sketch()
    s.set_tag("R1", BranchTag("Ia", "R1"))
    s.replace_part("R1", replace(s.part("R1"), name="R7"))
    assert s.tags == [BranchTag("Ia", "R7")]
    part, index = s.remove_part("R7")
    assert s.tags == [] and "tags\": []" in dumps_sketch(s)
    assert s.next_name("resistor") != "R7"  # a new part does not inherit the waiting tag
    s.add_part(part, index)  # undo of the deletion
    assert s.tags == [BranchTag("Ia", "R7")]


@pytest.mark.parametrize("field, value, message", [
    ("tags", {}, "tags: must be a list"),
    ("tags", [{"name": "Ia", "part": "R1"}], "tags[0].forward: missing"),
    ("tags", [{"name": "Ia", "part": "R1", "forward": 1}], "tags[0].forward: must be true or false"),
    ("tags", [{"name": "I a", "part": "R1", "forward": True}], "tags[0].name: must be a current name"),
    ("tags", [{"name": "I" * 33, "part": "R1", "forward": True}], "tags[0].name: must be a current name"),
    ("tags", [{"name": "lambda", "part": "R1", "forward": True}], "tags[0].name: must be a current name"),
    ("tags", [{"name": "R2", "part": "R1", "forward": True}], "tags[0].name: R2 is already the name of a part"),
    ("tags", [{"name": "Ia", "part": "R9", "forward": True}], 'tags[0].part: there is no part "R9"'),
    ("tags", [{"name": "Ia", "part": 3, "forward": True}], "tags[0].part: there is no part"),
    ("tags", [{"name": "Ia", "part": "GND1", "forward": True}], "tags[0].part: GND1 is a ground symbol"),
    ("tags", [{"name": "Ia", "part": "R1", "forward": True}, {"name": "Ia", "part": "R2", "forward": True}],
     "tags[1].name: Ia is already the name of the current in tags[0]"),
    ("tags", [{"name": "Ia", "part": "R1", "forward": True}, {"name": "Ib", "part": "R1", "forward": True}],
     "tags[1].part: R1 already carries the tag in tags[0]"),
    ("tags", [{"name": "Ia", "part": "R1", "forward": True, "colour": "red"}], "tags[0].colour: unknown field"),
    ("checks", "B1 = 0", "checks: must be a list"),
    ("checks", [{"text": "B1 = 0"}], "checks[0].kind: missing"),
    ("checks", [{"text": "B1 = 0", "kind": "guess"}], "checks[0].kind: must be one of equation, values"),
    ("checks", [{"text": "   ", "kind": "equation"}], "checks[0].text: is empty"),
    ("checks", [{"text": "x" * 501, "kind": "equation"}], "checks[0].text: must be at most 500 characters"),
    ("checks", [{"text": "a\nb", "kind": "equation"}], "checks[0].text: must not hold control characters"),
    ("checks", [{"text": "Ia = 1", "kind": "values", "tolerance": 0}], "checks[0].tolerance: must be a fraction"),
    ("checks", [{"text": "Ia = 1", "kind": "values", "tolerance": True}], "checks[0].tolerance: must be a fraction"),
])
def test_bad_tags_and_checks_are_refused_with_the_field_path(field, value, message):
    text = doc_with(**{field: value})
    with pytest.raises(SketchFileError) as info:
        loads_sketch(text)
    assert str(info.value).startswith(message)
    assert info.value.field.startswith(field)
    schema_can_say = not any(b in message for b in ("already", "no part", "ground symbol", "is empty", "lambda",
                                                      "control"))
    if schema_can_say and "lambda" not in text:
        assert errors(json.loads(text), SCHEMA) != []


def test_a_check_is_only_text_in_the_file():
    """Nothing from the file runs: a check that looks like code is kept as text and loads as text."""
    s = Sketch()
    s.add_part(PlacedPart("resistor", "R1", 0, 0))
    s.add_wire(Wire(0, 0, 0, 4))
    s.add_check(SavedCheck("__import__('os').system('echo hi') = 0"))
    again = loads_sketch(dumps_sketch(s))
    assert again.checks == s.checks


def test_an_unsavable_check_is_refused_on_save_with_its_path():
    s = Sketch()
    s.add_check(SavedCheck("a\tb"))
    with pytest.raises(SketchFileError, match=r"checks\[0\]\.text: must not hold control characters"):
        dumps_sketch(s)
