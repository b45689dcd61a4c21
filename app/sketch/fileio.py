"""The ``.lwsk`` sketch file: a versioned JSON document.

A file is read in three steps, and nothing is built until all are done:
it is checked as text (size, UTF-8, nesting depth), parsed as JSON (no
duplicate keys, no NaN/Infinity, no over-long numbers), and every field is
checked for type and range.  The first problem found is reported in one
``SketchFileError`` whose message starts with the field's path, e.g.
``parts[3].values.resistance: must be a finite number > 0``.  Nothing in a
file is ever executed.  Writing is deterministic (fixed key order, floats by
``repr``) and atomic (temporary file, fsync, ``os.replace``, previous
version kept as ``name.lwsk.bak``).  The format is
described field by field in the developer guide; ``assets/lwsk.schema.json``
is its JSON Schema.
"""
from __future__ import annotations

import json
import keyword
import math
import os
import re
import unicodedata
from collections.abc import Callable
from typing import Any

from .atomic import SaveError, backup_path, write_atomically
from .kinds import KINDS
from .model import CHECK_KINDS, ROTATIONS, BranchTag, PlacedPart, SavedCheck, Sketch, Wire

__all__ = [
    "SketchFileError", "SaveError", "backup_path", "save_sketch", "load_sketch", "dumps_sketch", "loads_sketch",
    "FORMAT_TAG", "VERSION", "MAX_BYTES", "MAX_DEPTH", "GRID_LIMIT", "NAME_PATTERN", "LABEL_MAX",
    "text_problem", "CURRENT_NAME_PATTERN", "CHECK_MAX", "MAX_CHECKS",
]

FORMAT_TAG = "loopwright-sketch"
VERSION = 3
MAX_BYTES = 20 * 1024 * 1024
MAX_DEPTH = 16                 # the format itself nests 4 deep
MAX_NUMBER_DIGITS = 40
GRID_LIMIT = 1_000_000         # |x|, |y| of any grid point
NAME_PATTERN = r"[A-Za-z0-9][A-Za-z0-9_.+\-]{0,31}"
LABEL_MAX = 200
CURRENT_NAME_PATTERN = r"[A-Za-z][A-Za-z0-9_]{0,31}"
CHECK_MAX = 500                # characters of one typed check
MAX_CHECKS = 1000

_TOP_FIELDS = ("format", "version", "parts", "wires", "tags", "checks")
_TOP_REQUIRED = ("format", "version", "parts", "wires")
_TAG_FIELDS = ("name", "part", "forward")
_CHECK_FIELDS = ("text", "kind", "tolerance")
_CURRENT_NAME = re.compile(CURRENT_NAME_PATTERN)
_UNTAGGABLE = ("ground",)
_PART_FIELDS = ("kind", "name", "x", "y", "rotation", "mirror", "values", "flags", "choices", "label")
_PART_REQUIRED = ("kind", "name", "x", "y")
_WIRE_FIELDS = ("x1", "y1", "x2", "y2")
_NAME = re.compile(NAME_PATTERN)
_IDENTIFIER = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")
_TOKENS = re.compile(r'"(?:[^"\\]|\\.)*"|[\[\]{}]')



def _v1_to_v2(doc: dict[str, Any]) -> dict[str, Any]:
    """Version 2 adds bench parts, ratings, per-kind flag defaults and a part's ``choices``.

    Everything a version-1 file could hold means the same in version 2: its
    only flag (a switch's ``closed``) still defaults to true, and the new
    values (a resistor's power rating, a cell's capacity...) default to 0,
    "not given", so an old sketch raises no rating cautions it never asked for.
    """
    return dict(doc, version=2)


def _v2_to_v3(doc: dict[str, Any]) -> dict[str, Any]:
    """Version 3 adds the person's current tags and typed checks; a version-2 sketch has none."""
    return dict(doc, version=3, tags=[], checks=[])


# Upgrades from an older version: _MIGRATIONS[n] turns a version-n document
# (parsed JSON, not yet checked) into a version n+1 one.  Version 1 is the first.
_MIGRATIONS: dict[int, Callable[[dict[str, Any]], dict[str, Any]]] = {1: _v1_to_v2, 2: _v2_to_v3}


class SketchFileError(ValueError):
    """A sketch file that cannot be read or written; ``field`` is the path of the bad field, if any."""

    def __init__(self, message: str, field: str = "") -> None:
        super().__init__(message)
        self.field = field


class _Bad(Exception):
    """A problem at ``path``; turned into one SketchFileError."""

    def __init__(self, path: str, message: str) -> None:
        super().__init__(path, message)
        self.path = path
        self.message = message


# -- text and JSON ------------------------------------------------------------
def _show(text: str) -> str:
    """A user's string quoted for a message: escaped, ASCII, short."""
    shown = json.dumps(text)
    return shown if len(shown) <= 42 else shown[:38] + '…"'


def _key(base: str, key: str) -> str:
    if _IDENTIFIER.fullmatch(key):
        return f"{base}.{key}" if base else key
    return f"{base}[{_show(key)}]"


def _check_depth(text: str) -> None:
    depth = 0
    for token in _TOKENS.finditer(text):
        c = token.group()
        if c in "[{":
            depth += 1
            if depth > MAX_DEPTH:
                raise SketchFileError(
                    f"The file nests lists or objects more than {MAX_DEPTH} deep; "
                    "it is not a Loopwright sketch.")
        elif c in "]}":
            depth -= 1


def _pairs(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for k, v in pairs:
        if k in out:
            raise _Bad("", f"the key {_show(k)} appears twice in one object")
        out[k] = v
    return out


def _constant(name: str) -> Any:
    raise _Bad("", f"{name} is not a number a sketch can hold")


def _integer(digits: str) -> int:
    if len(digits) > MAX_NUMBER_DIGITS:
        raise _Bad("", f"a number has more than {MAX_NUMBER_DIGITS} digits")
    return int(digits)


def _parse(data: str | bytes) -> Any:
    if isinstance(data, bytes):
        if len(data) > MAX_BYTES:
            raise SketchFileError(f"The file is larger than {MAX_BYTES // 2**20} MB.")
        try:
            text = data.decode("utf-8-sig")
        except UnicodeDecodeError as e:
            raise SketchFileError(
                f"The file is not UTF-8 text (a bad byte at position {e.start}).") from None
    else:
        text = data.removeprefix("\ufeff")
        if len(text.encode("utf-8", "surrogatepass")) > MAX_BYTES:
            raise SketchFileError(f"The text is larger than {MAX_BYTES // 2**20} MB.")
    if not text.strip():
        raise SketchFileError("The file is empty: it holds no sketch.")
    _check_depth(text)
    try:
        return json.loads(text, object_pairs_hook=_pairs, parse_constant=_constant,
                          parse_int=_integer)
    except _Bad as e:
        raise SketchFileError(f"The file is not a valid sketch: {e.message}.") from None
    except json.JSONDecodeError as e:
        raise SketchFileError(
            f"The file is not valid JSON: {e.msg} (line {e.lineno}, column {e.colno}).") from None
    except (ValueError, RecursionError):
        raise SketchFileError("The file is not valid JSON.") from None


# -- checking fields -----------------------------------------------------------
def _object(value: Any, path: str, allowed: tuple[str, ...], required: tuple[str, ...]) -> dict:
    if not isinstance(value, dict):
        raise _Bad(path, "must be an object")
    for k in value:
        if k not in allowed:
            raise _Bad(_key(path, k), "unknown field")
    for k in required:
        if k not in value:
            raise _Bad(_key(path, k), "missing")
    return value


def _list(value: Any, path: str) -> list:
    if not isinstance(value, list):
        raise _Bad(path, "must be a list")
    return value


def _int(value: Any, path: str) -> int:
    if type(value) is not int:
        raise _Bad(path, "must be a whole number")
    if abs(value) > GRID_LIMIT:
        raise _Bad(path, f"must be between {-GRID_LIMIT} and {GRID_LIMIT}")
    return value


def _bool(value: Any, path: str) -> bool:
    if not isinstance(value, bool):
        raise _Bad(path, "must be true or false")
    return value


def text_problem(text: str, limit: int) -> str | None:
    """What keeps ``text`` out of a sketch file, in words ("must be at most 200 characters"),
    or None when it can be kept (a label, a typed check)."""
    if len(text) > limit:
        return f"must be at most {limit} characters"
    categories = {unicodedata.category(c) for c in text}
    if "Cc" in categories:
        return "must not hold control characters"
    if "Cs" in categories:
        return "holds a broken character (a lone surrogate)"
    return None


def _text(value: Any, path: str, limit: int) -> str:
    if not isinstance(value, str):
        raise _Bad(path, "must be text")
    problem = text_problem(value, limit)
    if problem:
        raise _Bad(path, problem)
    return value


def _number(value: Any, path: str, zero_ok: bool) -> float:
    bound = "≥ 0" if zero_ok else "> 0"
    if type(value) not in (int, float) or not math.isfinite(value) \
            or value < 0 or (value == 0 and not zero_ok):
        raise _Bad(path, f"must be a finite number {bound}")
    return float(value)


def _part(doc: Any, path: str, seen: dict[str, str]) -> PlacedPart:
    doc = _object(doc, path, _PART_FIELDS, _PART_REQUIRED)
    kind = doc["kind"]
    known = ", ".join(sorted(KINDS))
    if not isinstance(kind, str):
        raise _Bad(f"{path}.kind", f"must be text naming a part kind ({known})")
    if kind not in KINDS:
        raise _Bad(f"{path}.kind", f"unknown part kind {_show(kind)} (known: {known})")
    spec = KINDS[kind]
    name = doc["name"]
    if not isinstance(name, str) or not _NAME.fullmatch(name):
        raise _Bad(f"{path}.name", "must be 1 to 32 letters, digits or _ . + -, "
                                   "starting with a letter or digit")
    if name in seen:
        raise _Bad(f"{path}.name", f"{name} is already the name of {seen[name]}")
    seen[name] = path
    x, y = _int(doc["x"], f"{path}.x"), _int(doc["y"], f"{path}.y")
    rotation = doc.get("rotation", 0)
    if type(rotation) is not int or rotation not in ROTATIONS:
        raise _Bad(f"{path}.rotation", "must be 0, 90, 180 or 270")
    mirror = _bool(doc.get("mirror", False), f"{path}.mirror")

    fields = {f.key: f for f in spec.value_fields}
    values = _object(doc.get("values", {}), f"{path}.values", tuple(fields), ())
    checked_values = {k: _number(v, _key(f"{path}.values", k), fields[k].zero_ok)
                      for k, v in values.items()}
    flags = _object(doc.get("flags", {}), f"{path}.flags", spec.flags, ())
    checked_flags = {k: _bool(v, _key(f"{path}.flags", k)) for k, v in flags.items()}
    options = {c.key: c.keys for c in spec.choices}
    choices = _object(doc.get("choices", {}), f"{path}.choices", tuple(options), ())
    checked_choices = {k: _option(v, _key(f"{path}.choices", k), options[k]) for k, v in choices.items()}
    label = _text(doc.get("label", ""), f"{path}.label", LABEL_MAX)
    return PlacedPart(kind, name, x, y, rotation, mirror, checked_values, checked_flags, label,
                      checked_choices)


def _option(value: Any, path: str, keys: tuple[str, ...]) -> str:
    if not isinstance(value, str) or value not in keys:
        raise _Bad(path, "must be one of " + ", ".join(keys))
    return value


def _wire(doc: Any, path: str) -> Wire:
    doc = _object(doc, path, _WIRE_FIELDS, _WIRE_FIELDS)
    x1, y1, x2, y2 = (_int(doc[k], f"{path}.{k}") for k in _WIRE_FIELDS)
    if x1 != x2 and y1 != y2:
        raise _Bad(path, "must run horizontally or vertically (x1 = x2 or y1 = y2)")
    if (x1, y1) == (x2, y2):
        raise _Bad(path, "both ends are at the same point")
    return Wire(x1, y1, x2, y2)


def _upgrade(doc: Any) -> dict[str, Any]:
    """Check the format tag and version; bring an older document up to VERSION."""
    if not isinstance(doc, dict):
        raise _Bad("", "the file must hold one JSON object")
    if doc.get("format") != FORMAT_TAG:
        raise _Bad("format", f"this is not a Loopwright sketch (expected {_show(FORMAT_TAG)})")
    version = doc.get("version")
    if type(version) is not int or version < 1:
        raise _Bad("version", "must be a whole number ≥ 1")
    if version > VERSION:
        raise _Bad("version", f"the file is version {version}, written by a newer Loopwright; "
                              f"this one reads versions up to {VERSION}")
    while version < VERSION:
        doc = _MIGRATIONS[version](doc)
        version += 1
        if not isinstance(doc, dict) or doc.get("version") != version:
            raise _Bad("version", f"the upgrade to version {version} went wrong")
    return doc


def _tag(doc: Any, path: str, parts: dict[str, PlacedPart], names: dict[str, str],
         anchors: dict[str, str]) -> BranchTag:
    doc = _object(doc, path, _TAG_FIELDS, _TAG_FIELDS)
    name = doc["name"]
    if not isinstance(name, str) or not _CURRENT_NAME.fullmatch(name) or keyword.iskeyword(name):
        raise _Bad(f"{path}.name", "must be a current name: 1 to 32 letters, digits or _, "
                                   "starting with a letter (for example Ia or I_load)")
    if name in parts:
        raise _Bad(f"{path}.name", f"{name} is already the name of a part")
    if name in names:
        raise _Bad(f"{path}.name", f"{name} is already the name of the current in {names[name]}")
    part = doc["part"]
    if not isinstance(part, str) or part not in parts:
        shown = _show(part) if isinstance(part, str) else "that"
        raise _Bad(f"{path}.part", f"there is no part {shown} in this sketch")
    if parts[part].kind in _UNTAGGABLE:
        raise _Bad(f"{path}.part", f"{part} is a {parts[part].kind} symbol, which carries no current of its own")
    if part in anchors:
        raise _Bad(f"{path}.part", f"{part} already carries the tag in {anchors[part]}")
    forward = _bool(doc["forward"], f"{path}.forward")
    names[name] = anchors[part] = path
    return BranchTag(name, part, forward)


def _check(doc: Any, path: str) -> SavedCheck:
    doc = _object(doc, path, _CHECK_FIELDS, ("text", "kind"))
    text = _text(doc["text"], f"{path}.text", CHECK_MAX)
    if not text.strip():
        raise _Bad(f"{path}.text", "is empty")
    kind = _option(doc["kind"], f"{path}.kind", CHECK_KINDS)
    tol = doc.get("tolerance", 0.01)
    if type(tol) not in (int, float) or not (math.isfinite(tol) and 0 < tol < 1):
        raise _Bad(f"{path}.tolerance", "must be a fraction between 0 and 1 (0.01 is 1 %)")
    return SavedCheck(text, kind, float(tol))


def _validate(doc: Any) -> tuple[list[PlacedPart], list[Wire], list[BranchTag], list[SavedCheck]]:
    doc = _object(_upgrade(doc), "", _TOP_FIELDS, _TOP_REQUIRED)
    seen: dict[str, str] = {}
    parts = [_part(p, f"parts[{i}]", seen) for i, p in enumerate(_list(doc["parts"], "parts"))]
    wires = [_wire(w, f"wires[{i}]") for i, w in enumerate(_list(doc["wires"], "wires"))]
    by_name = {p.name: p for p in parts}
    names: dict[str, str] = {}
    anchors: dict[str, str] = {}
    tags = [_tag(t, f"tags[{i}]", by_name, names, anchors)
            for i, t in enumerate(_list(doc.get("tags", []), "tags"))]
    checks_doc = _list(doc.get("checks", []), "checks")
    if len(checks_doc) > MAX_CHECKS:
        raise _Bad("checks", f"must hold at most {MAX_CHECKS} checks")
    checks = [_check(c, f"checks[{i}]") for i, c in enumerate(checks_doc)]
    return parts, wires, tags, checks


def _error(bad: _Bad, lead: str = "") -> SketchFileError:
    where = f"{bad.path}: " if bad.path else ""
    return SketchFileError(f"{lead}{where}{bad.message}", bad.path)


# -- public ---------------------------------------------------------------------
def loads_sketch(text: str | bytes) -> Sketch:
    """The sketch in ``text`` (a whole .lwsk document); raises SketchFileError."""
    doc = _parse(text)
    try:
        parts, wires, tags, checks = _validate(doc)
    except _Bad as bad:
        raise _error(bad) from None
    sketch = Sketch()
    for part in parts:
        sketch.add_part(part)
    for wire in wires:
        sketch.add_wire(wire)
    for tag in tags:
        sketch.set_tag(tag.part, tag)
    for check in checks:
        sketch.add_check(check)
    return sketch


def load_sketch(path: str | os.PathLike[str]) -> Sketch:
    """Read the .lwsk file at ``path``; raises SketchFileError for any problem, reading included."""
    try:
        if os.stat(path).st_size > MAX_BYTES:
            raise SketchFileError(f"The file is larger than {MAX_BYTES // 2**20} MB.")
        with open(path, "rb") as f:
            data = f.read(MAX_BYTES + 1)
    except OSError as e:
        raise SketchFileError(f"Could not read {os.fspath(path)}: {e.strerror or e}.") from e
    return loads_sketch(data)


def _part_doc(p: PlacedPart) -> dict[str, Any]:
    order = [f.key for f in KINDS[p.kind].value_fields] if p.kind in KINDS else []
    keys = [k for k in order if k in p.values] + sorted(k for k in p.values if k not in order)
    return {
        "kind": p.kind, "name": p.name, "x": p.x, "y": p.y,
        "rotation": p.rotation, "mirror": p.mirror,
        "values": {k: _as_float(p.values[k]) for k in keys},
        "flags": {k: p.flags[k] for k in sorted(p.flags)},
        "choices": {k: p.choices[k] for k in sorted(p.choices)},
        "label": p.label,
    }


def _as_float(v: Any) -> Any:
    return float(v) if isinstance(v, (int, float)) and not isinstance(v, bool) else v


def _block(key: str, items: list[dict[str, Any]]) -> str:
    if not items:
        return f'  "{key}": []'
    rows = ",\n".join("    " + json.dumps(item, ensure_ascii=False, allow_nan=False) for item in items)
    return f'  "{key}": [\n{rows}\n  ]'


def dumps_sketch(sketch: Sketch) -> str:
    """The .lwsk text of ``sketch``: one part, wire, tag or check per line, the same text for the same sketch.

    Raises SketchFileError if the sketch holds something the format cannot
    (the message names the field, as for loading).
    """
    doc = {
        "format": FORMAT_TAG, "version": VERSION,
        "parts": [_part_doc(p) for p in sketch.parts],
        "wires": [{"x1": w.x1, "y1": w.y1, "x2": w.x2, "y2": w.y2} for w in sketch.wires],
        "tags": [{"name": t.name, "part": t.part, "forward": t.forward} for t in sketch.tags],
        "checks": [{"text": c.text, "kind": c.kind, "tolerance": _as_float(c.tolerance)} for c in sketch.checks],
    }
    try:
        _validate(doc)  # never write a file that would not load
    except _Bad as bad:
        raise _error(bad, "The sketch cannot be saved: ") from None
    head = f'{{\n  "format": {json.dumps(FORMAT_TAG)},\n  "version": {VERSION},\n'
    blocks = ",\n".join(_block(key, doc[key]) for key in ("parts", "wires", "tags", "checks"))
    return f'{head}{blocks}\n}}\n'


def save_sketch(sketch: Sketch, path: str | os.PathLike[str], *, backup: bool = True) -> None:
    """Write ``sketch`` to ``path`` atomically: a reader sees the old file or the whole new one.

    The text goes to a temporary file in the same folder, is flushed and
    fsynced, then renamed over ``path`` (see ``atomic.write_atomically``).
    With ``backup`` the previous file is kept as ``backup_path(path)``
    (``name.lwsk.bak``).  An existing file keeps its permissions.  Raises
    SketchFileError for an unsavable sketch and SaveError (an OSError, in
    plain words) if the file cannot be written; the old file is then untouched.
    """
    write_atomically(path, dumps_sketch(sketch).encode("utf-8"), backup=backup)
