"""Reading a typed equation into a linear form over unknowns, safely.

The text is parsed with Python's ``ast`` module and only an allow-list of
node types is walked (sums, differences, products, division by a number,
unary signs, names and plain numbers); nothing is ever evaluated as code.
Numbers may carry an SI prefix or be written in the resistor code of
IEC 60062 (``4.7k``, ``4k7``, ``10m``). Every refusal says where in the text
the trouble is.
"""
from __future__ import annotations

import ast
import math
import re
from dataclasses import dataclass
from typing import Callable

from app.units import parse_value

from .terms import Linear

__all__ = ["ParseError", "ParsedEquation", "parse_equation", "MAX_LENGTH", "MAX_TERMS"]

MAX_LENGTH = 500   # characters
MAX_TERMS = 400    # monomials after multiplying out

_SAME_WIDTH = str.maketrans({"−": "-", "–": "-", "·": "*", "×": "*", "⋅": "*", "\n": " ", "\r": " ", "\t": " "})
_PREFIXED = re.compile(r"(?<![\w.])(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?[pnuµμmkKMGT]\d*(?![\w.])")
Span = tuple[int, int]


class ParseError(ValueError):
    """A typed equation that cannot be read: ``message`` in plain words, ``column`` 0-based or None."""

    def __init__(self, message: str, column: int | None = None) -> None:
        super().__init__(message)
        self.message = message
        self.column = column


@dataclass(frozen=True)
class ParsedEquation:
    """``left − right`` as monomials, with the text spans of the top-level terms each came from."""

    text: str
    linear: Linear
    spans: dict[tuple[str | None, tuple[str, ...]], tuple[Span, ...]]
    equals: int | None = None

    def on_right(self, span: Span) -> bool:
        """True if ``span`` lies on the right of the equals sign."""
        return self.equals is not None and span[0] > self.equals

    def snippet(self, span: Span) -> str:
        return self.text[span[0]:span[1]].strip()


def _at(col: int | None) -> str:
    return f" (column {col + 1})" if col is not None else ""


class _Reader:
    """Walks one side's syntax tree, allowing only the node types of a linear equation."""

    def __init__(self, origin: list[int], resolve: Callable[[str], str]) -> None:
        self.origin = origin
        self.resolve = resolve

    def col(self, node: ast.AST) -> int:
        c = getattr(node, "col_offset", 0)
        return self.origin[min(c, len(self.origin) - 1)]

    def fail(self, message: str, node: ast.AST) -> ParseError:
        col = self.col(node)
        return ParseError(message + _at(col), col)

    def read(self, node: ast.AST) -> Linear:
        if isinstance(node, ast.Constant):
            v = node.value
            if isinstance(v, bool) or not isinstance(v, (int, float)):
                raise self.fail(f"{v!r} is not a number or a name", node)
            v = float(v)
            if not math.isfinite(v):
                raise self.fail("That number is too large", node)
            return {(None, ()): v}
        if isinstance(node, ast.Name):
            try:
                kind = self.resolve(node.id)
            except ValueError as exc:
                raise self.fail(str(exc), node) from None
            return {(node.id, ()): 1.0} if kind == "unknown" else {(None, (node.id,)): 1.0}
        if isinstance(node, ast.UnaryOp) and isinstance(node.op, (ast.UAdd, ast.USub)):
            inner = self.read(node.operand)
            return inner if isinstance(node.op, ast.UAdd) else {k: -v for k, v in inner.items()}
        if isinstance(node, ast.BinOp) and isinstance(node.op, (ast.Add, ast.Sub)):
            left, right = self.read(node.left), self.read(node.right)
            k = 1.0 if isinstance(node.op, ast.Add) else -1.0
            out = dict(left)
            for key, v in right.items():
                out[key] = out.get(key, 0.0) + k * v
            return self._check(out, node)
        if isinstance(node, ast.BinOp) and isinstance(node.op, ast.Mult):
            left, right = self.read(node.left), self.read(node.right)
            out: Linear = {}
            for (u1, f1), v1 in left.items():
                for (u2, f2), v2 in right.items():
                    if u1 is not None and u2 is not None:
                        raise self.fail(f"{u1} times {u2} is not linear: an equation of the circuit multiplies "
                                        "each current by values only", node.right)
                    key = (u1 if u1 is not None else u2, tuple(sorted(f1 + f2)))
                    out[key] = out.get(key, 0.0) + v1 * v2
            return self._check(out, node)
        if isinstance(node, ast.BinOp) and isinstance(node.op, ast.Div):
            left, right = self.read(node.left), self.read(node.right)
            if set(right) != {(None, ())}:
                raise self.fail("Divide only by a plain number", node.right)
            d = right[(None, ())]
            if d == 0:
                raise self.fail("Division by zero", node.right)
            return self._check({k: v / d for k, v in left.items()}, node)
        if isinstance(node, ast.BinOp) and isinstance(node.op, ast.Pow):
            left, right = self.read(node.left), self.read(node.right)
            if set(left) != {(None, ())} or set(right) != {(None, ())}:
                raise self.fail("Powers are allowed between plain numbers only", node)
            try:
                v = left[(None, ())] ** right[(None, ())]
            except (OverflowError, ZeroDivisionError):
                raise self.fail("That power cannot be worked out", node) from None
            if isinstance(v, complex) or not math.isfinite(v):
                raise self.fail("That power cannot be worked out", node)
            return {(None, ()): float(v)}
        raise self.fail(f"'{_describe(node)}' is not allowed in an equation; use names, numbers, + - * / and "
                        "brackets", node)

    def _check(self, form: Linear, node: ast.AST) -> Linear:
        if len(form) > MAX_TERMS:
            raise self.fail("The equation has too many terms once multiplied out", node)
        if any(not math.isfinite(v) for v in form.values()):
            raise self.fail("A number in the equation is too large", node)
        return {k: v for k, v in form.items() if v != 0}


def _describe(node: ast.AST) -> str:
    names = {ast.Call: "a function call", ast.Attribute: "a dot (attribute)", ast.Subscript: "brackets [ ]",
             ast.Compare: "a comparison", ast.Lambda: "lambda", ast.BoolOp: "and/or", ast.Tuple: "a comma",
             ast.List: "a list", ast.Dict: "braces { }", ast.Set: "braces { }", ast.JoinedStr: "a text string",
             ast.IfExp: "if/else", ast.NamedExpr: ":=", ast.Starred: "*", ast.Await: "await",
             ast.GeneratorExp: "a generator", ast.ListComp: "a list"}
    if isinstance(node, ast.BinOp):
        ops = {ast.FloorDiv: "//", ast.Mod: "%", ast.MatMult: "@", ast.LShift: "<<", ast.RShift: ">>",
               ast.BitAnd: "&", ast.BitOr: "|", ast.BitXor: "^"}
        return ops.get(type(node.op), type(node.op).__name__)
    if isinstance(node, ast.UnaryOp):
        return {ast.Not: "not", ast.Invert: "~"}.get(type(node.op), type(node.op).__name__)
    return names.get(type(node), type(node).__name__)


def _top_terms(node: ast.AST, sign: float = 1.0) -> list[tuple[ast.AST, float]]:
    """The terms of a top-level sum, with their signs (iterative, so deep sums cannot overflow the stack)."""
    out = []
    stack = [(node, sign)]
    while stack:
        n, s = stack.pop()
        if isinstance(n, ast.BinOp) and isinstance(n.op, (ast.Add, ast.Sub)):
            stack.append((n.right, s if isinstance(n.op, ast.Add) else -s))
            stack.append((n.left, s))
        else:
            out.append((n, s))
    return out


def _prepare(side: str, start: int) -> tuple[str, list[int]]:
    """The side with prefixed numbers written out, and each character's column in the original text."""
    out, origin = [], []
    pos = 0
    for m in _PREFIXED.finditer(side):
        out.append(side[pos:m.start()])
        origin.extend(range(start + pos, start + m.start()))
        try:
            value = parse_value(m.group().replace("μ", "µ"))
        except ValueError as exc:
            raise ParseError(f"{exc}{_at(start + m.start())}", start + m.start()) from None
        lit = repr(value)
        out.append(lit)
        origin.extend([start + m.start()] * len(lit))
        pos = m.end()
    out.append(side[pos:])
    origin.extend(range(start + pos, start + len(side)))
    origin.append(start + len(side))
    text = "".join(out)
    for i, ch in enumerate(text):
        if not ch.isascii() or (not ch.isprintable() and ch != " "):
            raise ParseError(f"The character '{ch}' cannot be used in an equation{_at(origin[i])}", origin[i])
    return text, origin


def _sides(text: str) -> list[tuple[str, int]]:
    """Split at the one equals sign ('==' counts as one)."""
    marks = []
    i = 0
    while i < len(text):
        if text[i] == "=":
            if i and text[i - 1] in "<>!":
                raise ParseError(f"Only = may join the two sides of an equation{_at(i - 1)}", i - 1)
            width = 2 if text[i:i + 2] == "==" else 1
            marks.append((i, width))
            i += width
        else:
            i += 1
    if len(marks) > 1:
        raise ParseError(f"An equation has one = sign; there is another one{_at(marks[1][0])}", marks[1][0])
    if not marks:
        return [(text, 0)]
    at, width = marks[0]
    return [(text[:at], 0), (text[at + width:], at + width)]


def parse_equation(text: str, resolve: Callable[[str], str]) -> ParsedEquation:
    """``text`` (``left = right``, or an expression meaning ``= 0``) as left minus right.

    ``resolve(name)`` returns ``"value"`` for a part value (multiplies like a
    number) or ``"unknown"`` for a current or source voltage, and raises
    ``ValueError`` with a message for a name that cannot be used. Raises
    :class:`ParseError` with a message and column for anything that cannot be read.
    """
    if not isinstance(text, str):
        raise ParseError("Type the equation as text, for example B1 - Ia*R1 = 0.")
    if len(text) > MAX_LENGTH:
        raise ParseError(f"The equation is too long; keep it under {MAX_LENGTH} characters.")
    text = text.translate(_SAME_WIDTH)
    if not text.strip():
        raise ParseError("Type an equation, for example B1 - Ia*R1 - Ib*R2 = 0.")
    total: Linear = {}
    spans: dict[tuple[str | None, tuple[str, ...]], list[Span]] = {}
    sides = _sides(text)
    for k, (side, start) in zip((1.0, -1.0), sides):
        if not side.strip():
            col = start if start else 0
            raise ParseError(f"One side of the equation is empty{_at(col)}; write 0 if you mean zero.", col)
        prepared, origin = _prepare(side, start)
        try:
            tree = ast.parse(prepared.strip(), mode="eval")
        except SyntaxError as exc:
            lead = len(prepared) - len(prepared.lstrip())
            off = max((exc.offset or 1) - 1 + lead, 0)
            col = origin[min(off, len(origin) - 1)]
            raise ParseError(f"The equation cannot be read here{_at(col)}: check for a missing * or bracket.",
                             col) from None
        except (ValueError, RecursionError, MemoryError, OverflowError):
            raise ParseError("The equation cannot be read: it is nested too deeply or has a number that "
                             "is too long.") from None
        lead = len(prepared) - len(prepared.lstrip())
        reader = _Reader(origin[lead:], resolve)
        for node, sign in _top_terms(tree.body):
            try:
                form = reader.read(node)
            except RecursionError:
                raise ParseError("The equation is nested too deeply to read.") from None
            begin = reader.col(node)
            back = begin - 1
            while back >= start and text[back] == " ":
                back -= 1
            if back >= start and text[back] in "+-":
                begin = back  # include the term's own sign in what is shown
            span = (begin, origin[lead + (node.end_col_offset or 0)])
            for key, v in form.items():
                total[key] = total.get(key, 0.0) + k * sign * v
                spans.setdefault(key, []).append(span)
            if len(total) > MAX_TERMS:
                raise ParseError("The equation has too many terms once multiplied out.")
    if any(not math.isfinite(v) for v in total.values()):
        raise ParseError("A number in the equation is too large.")
    linear = {key: v for key, v in total.items() if v != 0}
    equals = sides[1][1] - 1 if len(sides) > 1 else None
    return ParsedEquation(text, linear, {key: tuple(spans[key]) for key in linear}, equals)
