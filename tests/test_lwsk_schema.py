"""assets/lwsk.schema.json describes what fileio writes and refuses what it refuses.

The checker below covers only the JSON Schema 2020-12 keywords the schema
uses (JSON Schema Core/Validation 2020-12, sections on each keyword), and
fails on any other keyword so that it can never skip a rule silently.
"""
import json
import math
import re
from pathlib import Path

import pytest
from hypothesis import given, settings

from app.sketch.fileio import dumps_sketch
from app.sketch.kinds import KINDS
from test_fileio import MALFORMED_FIELDS, changed, sketches, workshop_sketch

SCHEMA = json.loads((Path(__file__).parents[1] / "assets" / "lwsk.schema.json").read_text("utf-8"))
DEMOS = sorted((Path(__file__).parents[1] / "demo_circuits").glob("*.lwsk"))

_ANNOTATIONS = {"$schema", "$id", "$comment", "$defs", "title", "description", "default"}
_TYPES = {
    "object": lambda v: isinstance(v, dict),
    "array": lambda v: isinstance(v, list),
    "string": lambda v: isinstance(v, str),
    "boolean": lambda v: isinstance(v, bool),
    "number": lambda v: isinstance(v, (int, float)) and not isinstance(v, bool),
    "integer": lambda v: (isinstance(v, int) and not isinstance(v, bool))
    or (isinstance(v, float) and math.isfinite(v) and v.is_integer()),
}


def _json_equal(a, b):
    if isinstance(a, bool) or isinstance(b, bool):
        return type(a) is type(b) and a == b
    return a == b


def errors(value, schema, root=SCHEMA, where="$"):
    """Every violation of ``schema`` by ``value``, as 'path: keyword' strings."""
    out = []
    for key, rule in schema.items():
        ok = True
        if key in _ANNOTATIONS or key in ("then", "properties", "additionalProperties"):
            continue
        if key == "$ref":
            assert rule.startswith("#/"), rule
            target = root
            for part in rule[2:].split("/"):
                target = target[part]
            out += errors(value, target, root, where)
        elif key == "type":
            ok = _TYPES[rule](value)
        elif key == "const":
            ok = _json_equal(value, rule)
        elif key == "enum":
            ok = any(_json_equal(value, r) for r in rule)
        elif key == "required":
            ok = not isinstance(value, dict) or all(k in value for k in rule)
        elif key == "items":
            if isinstance(value, list):
                for i, item in enumerate(value):
                    out += errors(item, rule, root, f"{where}[{i}]")
        elif key in ("minimum", "maximum", "exclusiveMinimum"):
            if _TYPES["number"](value):
                ok = {"minimum": value >= rule, "maximum": value <= rule,
                      "exclusiveMinimum": value > rule}[key]
        elif key == "pattern":
            ok = not isinstance(value, str) or re.search(rule, value) is not None
        elif key == "maxLength":
            ok = not isinstance(value, str) or len(value) <= rule
        elif key == "allOf":
            for sub in rule:
                out += errors(value, sub, root, where)
        elif key == "if":
            if not errors(value, rule, root, where) and "then" in schema:
                out += errors(value, schema["then"], root, where)
        else:
            raise AssertionError(f"the test checker does not know the keyword {key!r}")
        if key in ("type", "const", "enum", "required", "minimum", "maximum",
                   "exclusiveMinimum", "pattern", "maxLength") and not ok:
            out.append(f"{where}: {key}")
    if isinstance(value, dict):
        props = schema.get("properties", {})
        for k, v in value.items():
            if k in props:
                out += errors(v, props[k], root, f"{where}.{k}")
            elif schema.get("additionalProperties") is False:
                out.append(f"{where}.{k}: additionalProperties")
    return out


def test_the_schema_declares_draft_2020_12():
    assert SCHEMA["$schema"] == "https://json-schema.org/draft/2020-12/schema"


def test_saved_files_conform():
    assert errors(json.loads(dumps_sketch(workshop_sketch())), SCHEMA) == []


@pytest.mark.parametrize("demo", DEMOS, ids=lambda p: p.name)
def test_demo_files_conform(demo):
    assert errors(json.loads(demo.read_text("utf-8")), SCHEMA) == []


@settings(max_examples=40, deadline=None)
@given(sketches())
def test_generated_saved_files_conform(s):
    assert errors(json.loads(dumps_sketch(s)), SCHEMA) == []


def _schema_can_say(case):
    """False for the loader's refusals the schema cannot state (listed in its $comment)."""
    _, value, message = case
    beyond = ("already the name of", "must run horizontally", "both ends are at the same")
    whole_float = isinstance(value, float) and value.is_integer()  # 4.0 is an integer to JSON Schema
    return not whole_float and not any(b in message for b in beyond)


@pytest.mark.parametrize("path, value, message", [c for c in MALFORMED_FIELDS if _schema_can_say(c)])
def test_schema_refuses_what_the_loader_refuses(path, value, message):
    assert errors(json.loads(changed(path, value)), SCHEMA) != []


def test_schema_kinds_match_the_program():
    part = SCHEMA["$defs"]["part"]
    assert part["properties"]["kind"]["enum"] == sorted(KINDS)
    rules = {r["if"]["properties"]["kind"]["const"]: r["then"]["properties"] for r in part["allOf"]}
    assert set(rules) == set(KINDS)
    for kind, spec in KINDS.items():
        values = rules[kind]["values"]["properties"]
        assert list(values) == [f.key for f in spec.value_fields]
        for f in spec.value_fields:
            want = "#/$defs/nonNegative" if f.zero_ok else "#/$defs/positive"
            assert values[f.key]["$ref"] == want
        assert list(rules[kind]["flags"]["properties"]) == list(spec.flags)
