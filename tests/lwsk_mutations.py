"""Hostile and damaged .lwsk files, made from good ones, for fuzzing the loader.

Each mutation takes a ``random.Random`` and a good document (its parsed JSON
and its text) and returns the bytes of a damaged file.  Used by the fuzz
tests (tests/test_fuzz_loader.py) and the bench script
(tests/bench/fuzz_loader.py).  :func:`verdict` says whether the loader's
answer to one file was acceptable: a sketch that saves and loads back the
same, or one clean ``SketchFileError``.
"""
from __future__ import annotations

import copy
import json
import random
from collections.abc import Callable
from typing import Any

from app.sketch.fileio import SketchFileError, dumps_sketch, loads_sketch
from app.sketch.kinds import KINDS
from app.sketch.model import PlacedPart, Sketch, Wire

__all__ = ["BASES", "MUTATIONS", "mutate", "verdict", "MESSAGE_MAX"]

MESSAGE_MAX = 400   # a message the window shows in one line of a dialog


def _bench_sketch() -> Sketch:
    """An invented van conversion board: every kind of part, odd labels, wires in both directions."""
    s = Sketch()
    s.add_part(PlacedPart("cell", "B1", 0, 0, 90, values={"emf": 12.8, "internal_resistance": 0.004},
                          label="leisure battery — LiFePO₄"))
    s.add_part(PlacedPart("resistor", "R1", 4, 0, values={"resistance": 0.33}, label="fridge"))
    s.add_part(PlacedPart("resistor", "R.2+a", 8, 0, 270, True, values={"resistance": 1e-6}))
    s.add_part(PlacedPart("current_source", "I1", 12, 0, 180, values={"current": 2.5}))
    s.add_part(PlacedPart("switch", "S1", 0, 8, 0, flags={"closed": False}, label="isolator \"main\""))
    s.add_part(PlacedPart("switch", "S2", 4, 8))
    s.add_part(PlacedPart("ground", "GND1", 0, 4))
    s.add_wire(Wire(0, 4, 12, 4))
    s.add_wire(Wire(12, 4, 12, -20))
    s.add_wire(Wire(-999_999, 0, 1_000_000, 0))
    return s


def _bases() -> list[str]:
    empty = Sketch()
    many = Sketch()
    for k in range(60):
        many.add_part(PlacedPart("resistor", f"R{k}", k * 4, 0, values={"resistance": 1.0 + k}))
    return [dumps_sketch(_bench_sketch()), dumps_sketch(empty), dumps_sketch(many)]


BASES = _bases()

# -- building blocks -------------------------------------------------------------------
_ODD_TEXT = ["", " ", "resistor ", "Resistor", "RESISTOR", "résistor", "resistor\u0000", "\u202eroticser",
             "diode", "__class__", "../../etc/passwd", "𝓇𝑒𝓈𝒾𝓈𝓉𝑜𝓇", "\ufeff", "\\", "\"", "a" * 5000,
             "null", "true", "0", "1e400", "ground\n", "cell\t", "\ud7ff", "kind", "wire"]
_ODD_NUMBERS = ["0", "-0", "-0.0", "1e308", "1.7976931348623157e308", "1e309", "-1e309", "5e-324",
                "1e-400", "4.9e-325", "1" + "0" * 39, "1" + "0" * 40, "-" + "9" * 41, "0.1e1", "1E+2",
                "1000001", "-1000001", "1000000", "-1000000", "999999.9999999999", "2.5", "1e6", "01",
                "+1", ".5", "5.", "0x10", "1_000", "١", "NaN", "Infinity", "-Infinity", "nan", "inf"]


def _leaves(node: Any, path: tuple = ()) -> list[tuple]:
    """Every place in a parsed document, as a path of keys and indexes."""
    out = [path]
    if isinstance(node, dict):
        for k, v in node.items():
            out += _leaves(v, path + (k,))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            out += _leaves(v, path + (i,))
    return out


def _set(doc: Any, path: tuple, value: Any) -> Any:
    if not path:
        return value
    parent = doc
    for key in path[:-1]:
        parent = parent[key]
    parent[path[-1]] = value
    return doc


def _some_value(rng: random.Random, depth: int = 0) -> Any:
    """Any JSON value: scalars of every type, and at shallow depth lists and objects of them."""
    choice = rng.randrange(9 if depth < 3 else 7)
    if choice == 7:
        return [_some_value(rng, depth + 1) for _ in range(rng.randrange(3))]
    if choice == 8:
        return {rng.choice(_ODD_TEXT)[:8]: _some_value(rng, depth + 1) for _ in range(rng.randrange(3))}
    return [None, True, False, rng.randint(-2**70, 2**70), rng.uniform(-1e9, 1e9),
            rng.choice(_ODD_TEXT), rng.choice(list(KINDS))][choice]


def _dump(doc: Any) -> bytes:
    return json.dumps(doc, ensure_ascii=False, allow_nan=True).encode("utf-8", "surrogatepass")


def _number_spans(text: str) -> list[tuple[int, int]]:
    """Start and end of every JSON number token outside strings."""
    spans, i, in_str = [], 0, False
    while i < len(text):
        c = text[i]
        if in_str:
            if c == "\\":
                i += 1
            elif c == '"':
                in_str = False
        elif c == '"':
            in_str = True
        elif c in "-0123456789":
            j = i
            while j < len(text) and text[j] in "-+.eE0123456789":
                j += 1
            spans.append((i, j))
            i = j
            continue
        i += 1
    return spans


# -- the mutations ---------------------------------------------------------------------------
Mutation = Callable[[random.Random, Any, str], bytes]


def truncated(rng: random.Random, doc: Any, text: str) -> bytes:
    raw = text.encode("utf-8")
    return raw[: rng.randrange(len(raw))]


def wrong_type(rng: random.Random, doc: Any, text: str) -> bytes:
    for _ in range(rng.randint(1, 3)):
        doc = _set(doc, rng.choice(_leaves(doc)), _some_value(rng))
    return _dump(doc)


def odd_number(rng: random.Random, doc: Any, text: str) -> bytes:
    spans = _number_spans(text)
    for _ in range(rng.randint(1, 3)):
        if not spans:
            break
        start, end = rng.choice(spans)
        text = text[:start] + rng.choice(_ODD_NUMBERS) + text[end:]
        spans = _number_spans(text)
    return text.encode("utf-8")


def deep_nesting(rng: random.Random, doc: Any, text: str) -> bytes:
    depth = rng.choice([rng.randint(10, 20), rng.randint(100, 3000)])
    opener = rng.choice(["[", "{\"a\":", "[{\"k\":"])
    closer = {"[": "]", "{\"a\":": "}", "[{\"k\":": "}]"}[opener]
    inner = json.dumps(_some_value(rng))
    nested = opener * depth + inner + closer * rng.choice([depth, depth - 1, 0])
    where = rng.choice(_leaves(doc))
    marker = "\u2603MARK\u2603"
    return _dump(_set(doc, where, marker)).replace(json.dumps(marker, ensure_ascii=False).encode(),
                                                   nested.encode())


def unknown_kind(rng: random.Random, doc: Any, text: str) -> bytes:
    if not doc["parts"]:
        doc["parts"].append({"kind": "resistor", "name": "R1", "x": 0, "y": 0})
    part = rng.choice(doc["parts"])
    part["kind"] = rng.choice(_ODD_TEXT + [k.upper() for k in KINDS] + [rng.choice(list(KINDS)) + "s"])
    if rng.random() < 0.5:  # the fields of another kind
        other = rng.choice(list(KINDS.values()))
        part["values"] = {f.key: f.default for f in other.fields}
        part["flags"] = {f: True for f in other.flags}
    return _dump(doc)


def random_bytes(rng: random.Random, doc: Any, text: str) -> bytes:
    n = rng.choice([0, 1, 2, rng.randrange(64), rng.randrange(4096)])
    return bytes(rng.randrange(256) for _ in range(n))


def damaged_bytes(rng: random.Random, doc: Any, text: str) -> bytes:
    raw = bytearray(text.encode("utf-8"))
    for _ in range(rng.randint(1, 12)):
        at = rng.randrange(len(raw))
        op = rng.randrange(4)
        if op == 0:
            raw[at] ^= 1 << rng.randrange(8)
        elif op == 1:
            del raw[at]
        elif op == 2:
            raw.insert(at, rng.choice(b'{}[]",:\\0e-. \x00\xff\xc3'))
        else:
            raw[at:at] = raw[rng.randrange(len(raw)):][: rng.randrange(40)]
    return bytes(raw)


def same_names(rng: random.Random, doc: Any, text: str) -> bytes:
    parts = doc["parts"]
    if not parts:
        return _dump(dict(doc, parts=[{"kind": "ground", "name": "G", "x": 0, "y": 0}] * 2))
    op = rng.randrange(4)
    if op == 0:
        parts.append(copy.deepcopy(rng.choice(parts)))
    elif op == 1:
        rng.choice(parts)["name"] = rng.choice(parts)["name"]
    elif op == 2:
        rng.choice(parts)["name"] = rng.choice(["~w0", "", " R1", "R1 ", "R" * 33, "Ω1", "-R", "R/1", "R1\n"])
    else:
        rng.choice(parts)["name"] = rng.choice(parts)["name"].lower()
    return _dump(doc)


def duplicate_key(rng: random.Random, doc: Any, text: str) -> bytes:
    keys = ["format", "version", "parts", "wires", "kind", "name", "x", "y", "rotation", "values",
            "resistance", "emf", "x1", "y2"]
    key = rng.choice(keys)
    needle = f'"{key}": '
    at = text.find(needle)
    if at < 0:
        at = 1
    return (text[:at] + f'"{key}": {json.dumps(_some_value(rng))}, ' + text[at:]).encode("utf-8")


def off_the_grid(rng: random.Random, doc: Any, text: str) -> bytes:
    targets = [(("parts", i, k)) for i in range(len(doc["parts"])) for k in ("x", "y", "rotation")]
    targets += [(("wires", i, k)) for i in range(len(doc["wires"])) for k in ("x1", "y1", "x2", "y2")]
    if not targets:
        return _dump(dict(doc, wires=[{"x1": 0, "y1": 0, "x2": 1, "y2": 1}]))
    for _ in range(rng.randint(1, 3)):
        value = rng.choice([1_000_001, -1_000_001, 2**63, -2**63, 10**40, 0.5, 90.0, 360, -90, 45, 1e6,
                            True, "4", None, [], 1_000_000, -1_000_000])
        doc = _set(doc, rng.choice(targets), value)
    return _dump(doc)


def odd_version(rng: random.Random, doc: Any, text: str) -> bytes:
    op = rng.randrange(3)
    if op == 0:
        doc["version"] = rng.choice([0, -1, 2, 3, 99, 10**30, 1.0, 1.5, True, "1", None, [1], {"v": 1}])
    elif op == 1:
        doc["format"] = rng.choice(_ODD_TEXT + ["loopwright-sketch ", "Loopwright-Sketch", None, 1])
    else:
        key = rng.choice(list(doc))
        doc = {(rng.choice([key.upper(), key + " ", "\u200b" + key]) if k == key else k): v
               for k, v in doc.items()}
    return _dump(doc)


def odd_encoding(rng: random.Random, doc: Any, text: str) -> bytes:
    op = rng.randrange(7)
    if op == 0:
        return text.encode(rng.choice(["utf-16", "utf-16-le", "utf-32", "utf-8-sig"]))
    if op == 1:
        return b"\xef\xbb\xbf\xef\xbb\xbf" + text.encode()
    if op == 2:
        return text.encode("utf-8").replace(b'"', b"\xc0\xa2", 1)   # over-long UTF-8
    if op == 3:
        return text.replace('"label": "', '"label": "\\ud800', 1).encode()
    if op == 4:
        return text.replace('"label": "', '"label": "\\u0000\\u001b[2J', 1).encode()
    if op == 5:
        return text.replace('"label": "', '"label": "\udcff', 1).encode("utf-8", "surrogatepass")
    return text.encode("latin-1", "replace")


def huge_content(rng: random.Random, doc: Any, text: str) -> bytes:
    op = rng.randrange(3)
    if op == 0:
        doc["parts"] = [{"kind": "resistor", "name": f"R{k}", "x": k, "y": 0}
                        for k in range(rng.choice([100, 800]))]
    elif op == 1:
        part = {"kind": "resistor", "name": "R1", "x": 0, "y": 0, "label": "x" * rng.choice([201, 10**5])}
        doc["parts"] = [part]
    else:
        doc["wires"] = [{"x1": 0, "y1": 0, "x2": 0, "y2": 1}] * rng.choice([100, 1500])
    return _dump(doc)


def spliced(rng: random.Random, doc: Any, text: str) -> bytes:
    other = rng.choice(BASES)
    op = rng.randrange(4)
    if op == 0:
        return (text + other).encode()
    if op == 1:
        return (text + rng.choice(["x", "\x00", "]", ",", "// comment", "\n\n"])).encode()
    if op == 2:
        cut = rng.randrange(len(text))
        return (text[:cut] + other[cut:]).encode()
    return ("[" + text + "," + other + "]").encode()


MUTATIONS: dict[str, Mutation] = {f.__name__: f for f in (
    truncated, wrong_type, odd_number, deep_nesting, unknown_kind, random_bytes, damaged_bytes,
    same_names, duplicate_key, off_the_grid, odd_version, odd_encoding, huge_content, spliced)}


def mutate(rng: random.Random, name: str | None = None) -> tuple[str, bytes]:
    """One damaged file: the name of the mutation used and the bytes."""
    name = name or rng.choice(list(MUTATIONS))
    text = rng.choice(BASES)
    return name, MUTATIONS[name](rng, json.loads(text), text)


def verdict(data: bytes) -> str | None:
    """None if the loader answered ``data`` well; otherwise what went wrong, in one line.

    Well is: a sketch that saves and reads back equal, or a SketchFileError
    whose message is non-empty, one line, short, and not a traceback.
    """
    try:
        sketch = loads_sketch(data)
    except SketchFileError as e:
        message = str(e)
        if not message.strip():
            return "empty message"
        if "\n" in message or "\r" in message:
            return f"message over several lines: {message[:200]!r}"
        if len(message) > MESSAGE_MAX:
            return f"message of {len(message)} characters: {message[:200]!r}"
        if "Traceback" in message or "Error:" in message[:40]:
            return f"message looks like a traceback: {message[:200]!r}"
        return None
    except Exception as e:  # the very thing being hunted
        return f"{type(e).__name__}: {str(e)[:200]}"
    try:
        again = loads_sketch(dumps_sketch(sketch))
    except Exception as e:
        return f"accepted, but saving it back fails: {type(e).__name__}: {str(e)[:200]}"
    return None if again == sketch else "accepted, but it does not read back the same"
