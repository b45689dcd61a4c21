"""Terms of circuit equations: written as text or LaTeX, and expanded to a linear form.

A term is ``sign × (sum of values) × (sum of unknowns)``, for example
``-(Ia - Ib)*R5`` or ``(R1 + R5)*IL1``. Values are part values (a resistor's
resistance, a cell's EMF, ``r_B1`` a cell's internal resistance); unknowns are
currents and current-source voltages. Plain text uses ASCII operators so an
equation can be pasted back into the checker.
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache
from typing import Callable, Mapping

from app.units import format_value

__all__ = ["Term", "Linear", "side_text", "side_latex", "side_numeric", "latex_name", "term_value", "linear_of"]

Signed = tuple[tuple[str, int], ...]
# A linear form: (unknown or None for constants, value symbols multiplied) -> coefficient.
Linear = dict[tuple[str | None, tuple[str, ...]], float]


@dataclass(frozen=True)
class Term:
    """``sign × Σ factors × Σ unknowns``; an empty sum counts as 1.

    ``part`` is the part the term belongs to; ``factor_first`` writes the
    values before the unknowns (``R5*IL2`` rather than ``Ia*R2``).
    """

    sign: int
    factors: Signed = ()
    unknowns: Signed = ()
    part: str | None = None
    factor_first: bool = False


def _sum_text(items: Signed, name: Callable[[str], str], minus: str = " - ", plus: str = " + ",
              lpar: str = "(", rpar: str = ")") -> str:
    """A signed sum of names, in brackets when it has more than one."""
    if len(items) == 1:   # the usual case: a single name
        n, s = items[0]
        return "-" + name(n) if s < 0 else name(n)
    if not items:
        return ""
    n, s = items[0]
    head = "-" + name(n) if s < 0 else name(n)
    return lpar + head + "".join((minus if s < 0 else plus) + name(n) for n, s in items[1:]) + rpar


def _body(t: Term, name: Callable[[str], str], times: str, **kw: str) -> str:
    f = _sum_text(t.factors, name, **kw)
    u = _sum_text(t.unknowns, name, **kw)
    if not f:
        return u or "1"
    if not u:
        return f
    return f"{f}{times}{u}" if t.factor_first or len(t.factors) > 1 else f"{u}{times}{f}"


def _side(terms: tuple[Term, ...], body: Callable[[Term], str], minus: str = "-") -> str:
    if not terms:
        return "0"
    first = terms[0]
    return ((minus if first.sign < 0 else "") + body(first)
            + "".join(f" {minus if t.sign < 0 else '+'} {body(t)}" for t in terms[1:]))


def side_text(terms: tuple[Term, ...]) -> str:
    """Plain text of one side of an equation, e.g. ``B1 - Ia*R2 - (Ia - Ib)*R5``."""
    return _side(terms, lambda t: _body(t, str, "*"))


@lru_cache(maxsize=4096)   # the same few names come back in every equation of a circuit
def latex_name(name: str) -> str:
    """A name as a LaTeX symbol with a subscript: ``R2`` → ``R_{2}``, ``V_I1`` → ``V_{\\mathrm{I1}}``."""
    if "_" in name:
        head, tail = name.split("_", 1)
        return f"{head}_{{\\mathrm{{{tail.replace('_', '')}}}}}"
    m = re.fullmatch(r"([A-Z])(\w+)", name) or re.fullmatch(r"([a-z])(\d\w*)", name)
    if m:
        return f"{m[1]}_{{\\mathrm{{{m[2]}}}}}" if not m[2].isdigit() else f"{m[1]}_{{{m[2]}}}"
    return f"\\mathit{{{name}}}" if len(name) > 1 else name


def side_latex(terms: tuple[Term, ...]) -> str:
    """LaTeX of one side of an equation."""
    return _side(terms, lambda t: _body(t, latex_name, " ", lpar=r"\left(", rpar=r"\right)"))


def term_value(t: Term, value: Mapping[str, float]) -> float:
    """The term's value with every name replaced by ``value[name]``."""
    f = sum(s * value[n] for n, s in t.factors) if t.factors else 1.0
    u = sum(s * value[n] for n, s in t.unknowns) if t.unknowns else 1.0
    return t.sign * f * u


def side_numeric(terms: tuple[Term, ...], value: Mapping[str, float], unit: Mapping[str, str],
                 shown: dict[str, str] | None = None) -> str:
    """One side with the solved numbers in place of the names, in engineering notation.

    ``shown``, if given, keeps each name's number as text from call to call, so
    that writing many equations of one circuit formats each number once.
    """
    shown = {} if shown is None else shown

    def num(n: str) -> str:  # a negative value in brackets, so no "+ -14 mA"
        text = shown.get(n)
        if text is None:
            text = format_value(value[n], unit.get(n, ""), 4)
            text = shown[n] = f"({text.replace('-', '−', 1)})" if value[n] < 0 else text
        return text
    return _side(terms, lambda t: _body(t, num, " × ", minus=" − ", plus=" + "), minus="−")


def linear_of(lhs: tuple[Term, ...], rhs: tuple[Term, ...] = ()) -> Linear:
    """``lhs − rhs`` expanded into monomials (unknown, value symbols) → coefficient."""
    out: Linear = {}
    for side, k in ((lhs, 1), (rhs, -1)):
        for t in side:
            for f, sf in (t.factors or ((None, 1),)):
                for u, su in (t.unknowns or ((None, 1),)):
                    key = (u, (f,) if f is not None else ())
                    out[key] = out.get(key, 0.0) + k * t.sign * sf * su
    return {k: v for k, v in out.items() if v != 0}
