"""One typed check, whatever it is: an equation, or numeric answers such as ``Ia = 12.3m``.

The Check panel and ``loopwright check`` both hand the person's text here and
get back one :class:`CheckOutcome`: the verdict, the lines to show, and where
in the text each problem is. Nothing here raises for any text.
"""
from __future__ import annotations

import re
from dataclasses import dataclass

from .checker import DEFAULT_TOLERANCE, check_equation, check_values
from .context import Analysis

__all__ = ["CheckOutcome", "parse_answers", "guess_kind", "run_check"]

_NAME = r"(?:[A-Za-z_][A-Za-z0-9_]*|[VI]\(\s*[^()=,;]+?\s*\))"
_NUMBER = r"[+\-−]?\s*(?:\d|\.\d)[^=,;]*"
_ANSWER = re.compile(rf"\s*({_NAME})\s*=\s*({_NUMBER}?)\s*")


@dataclass(frozen=True)
class CheckOutcome:
    """The verdict on one typed check.

    ``kind`` is ``"equation"`` or ``"values"``; ``summary`` a one-line
    verdict; ``lines`` the details, each ``(text, column)`` with the 0-based
    column in the typed text it points at, or None. ``label`` is the loop or
    junction matched (or closest), ``parts`` and ``nodes`` what to highlight.
    """

    ok: bool
    kind: str
    summary: str
    lines: tuple[tuple[str, int | None], ...] = ()
    label: str | None = None
    parts: tuple[str, ...] = ()
    nodes: tuple[str, ...] = ()
    column: int | None = None

    def report(self, text: str = "") -> str:
        """Plain text: the verdict, then each detail; with ``text``, a caret under the place it names."""
        out = [self.summary]
        for line, col in self.lines:
            out.append(f"  - {line}")
            if text and col is not None:
                out += [f"      {text}", f"      {' ' * col}^"]
        if text and self.column is not None and not any(c == self.column for _, c in self.lines):
            out += [f"  {text}", f"  {' ' * self.column}^"]
        return "\n".join(out)


def parse_answers(text: str) -> dict[str, str] | None:
    """``{"Ia": "12.3m", "V(n2)": "4.1"}`` for text made only of ``name = number`` pieces
    (separated by commas or semicolons), else None (then it is an equation)."""
    pieces = [p for p in re.split(r"[,;]", text) if p.strip()]
    if not pieces:
        return None
    out: dict[str, str] = {}
    for piece in pieces:
        m = _ANSWER.fullmatch(piece)
        if m is None or not m.group(2).strip():
            return None
        out[re.sub(r"\s+", "", m.group(1))] = m.group(2).strip().replace("−", "-")
    return out


def guess_kind(text: str) -> str:
    """``"values"`` when the text is a list of answers, else ``"equation"``."""
    return "values" if parse_answers(text) is not None else "equation"


def run_check(a: Analysis, text: str, kind: str | None = None, tolerance: float = DEFAULT_TOLERANCE
              ) -> CheckOutcome:
    """Check ``text`` against the analysed circuit; ``kind`` None guesses it from the text."""
    kind = kind or guess_kind(text)
    if kind == "values":
        answers = parse_answers(text)
        if answers is None:
            return CheckOutcome(False, kind, "Write answers as name = value, separated by commas, for example "
                                             "Ia = 12.3m, V(n2) = 4.1.", column=0)
        try:
            result = check_values(a, answers, tolerance)
        except ValueError as exc:
            return CheckOutcome(False, kind, str(exc))
        lines = tuple((item.message, None if item.ok else _find(text, item.name)) for item in result.items)
        right = sum(1 for i in result.items if i.ok)
        unknown = sum(1 for i in result.items if not i.ok and i.expected is None)
        n = len(result.items)
        off = n - right - unknown
        parts = ([f"{off} of {n} answer{'s' if n != 1 else ''} off by more than {tolerance * 100:.3g} %"]
                 if off else []) + ([f"{unknown} name{'s' if unknown != 1 else ''} not in this circuit"]
                                    if unknown else [])
        summary = (f"Right: {'all ' if n > 1 else ''}{n} answer{'s' if n != 1 else ''} within "
                   f"{tolerance * 100:.3g} %." if result.ok else "Not right: " + "; ".join(parts) + ".")
        return CheckOutcome(result.ok, kind, summary, lines)
    result = check_equation(a, text)
    lines = tuple((f.message, f.column) for f in result.findings)
    if not result.ok and result.reference is not None:
        lines = ((f"{result.reference.title}: {result.reference.text}", None),) + lines
    return CheckOutcome(result.ok, "equation", result.message, lines, result.label, result.parts, result.nodes,
                        result.column)


def _find(text: str, name: str) -> int | None:
    squeezed = re.sub(r"\s+", "", name)
    for m in re.finditer(re.escape(squeezed[:1]), text):
        if re.sub(r"\s+", "", text[m.start():])[:len(squeezed)] == squeezed:
            return m.start()
    return None
