"""Holding a person's own equations and numbers against the circuit.

A typed equation is read into a linear form (see :mod:`expr`), sorted into a
KVL-type equation (every term a voltage) or a KCL-type one (every term a
current), and compared with the circuit's own equations: the solver's loops,
every simple cycle of the branch graph (bounded, see
:data:`equations.MAX_CYCLES`) and every junction. Equal up to a constant
factor (so also written the other way round) means correct. Currents are
compared modulo KCL, so ``(Ia - Ib)*R5`` is right where R5's branch carries
``Ia − Ib``. Otherwise the closest equation is taken and each term that is
wrong, missing, extra or of the wrong sign is named.
"""
from __future__ import annotations

import difflib
import math
from collections import Counter
from dataclasses import dataclass
from typing import Mapping

import numpy as np

from app.units import format_value, parse_value

from .context import Analysis
from .equations import Equation, cycle_equation, kcl_equations, simple_cycles, solver_cycles
from .expr import ParsedEquation, ParseError, parse_equation
from .terms import Linear, Term, side_text

__all__ = ["Finding", "EquationCheck", "ValueCheck", "ValuesCheck", "check_equation", "check_values",
           "RTOL", "DEFAULT_TOLERANCE"]

RTOL = 1e-6              # relative agreement of coefficients for "the same equation"
DEFAULT_TOLERANCE = 0.01  # numeric answers: 1 %


@dataclass(frozen=True)
class Finding:
    """One thing wrong with a typed equation.

    ``kind``: ``"sign"``, ``"missing"``, ``"extra"``, ``"wrong current"``,
    ``"wrong resistor"``, ``"coefficient"``, ``"numbers"`` or ``"units"``.
    ``part`` is the part concerned, ``column`` where it is in the text (0-based).
    """

    kind: str
    message: str
    part: str | None = None
    column: int | None = None


@dataclass(frozen=True)
class EquationCheck:
    """The verdict on a typed equation.

    ``ok`` — it is a valid KVL or KCL equation of the circuit. ``law`` and
    ``label`` say which law and which loop or junction it matches (or is
    closest to); ``scale`` is the factor between the typed equation and
    ``reference`` (−1: written the other way round). ``column`` points at a
    problem in the text when it could not be read.
    """

    ok: bool
    message: str
    law: str | None = None
    label: str | None = None
    scale: float | None = None
    reference: Equation | None = None
    findings: tuple[Finding, ...] = ()
    column: int | None = None

    @property
    def parts(self) -> tuple[str, ...]:
        return self.reference.parts if self.reference else ()

    @property
    def nodes(self) -> tuple[str, ...]:
        return self.reference.nodes if self.reference else ()

    def report(self) -> str:
        """The verdict and findings as plain text, one per line."""
        lines = [self.message]
        if self.reference is not None and not self.ok:
            lines.append(f"  {self.reference.title}: {self.reference.text}")
        lines += [f"  - {f.message}" for f in self.findings]
        return "\n".join(lines)


# -- reading names --------------------------------------------------------------
def _resolver(a: Analysis):
    def resolve(name: str) -> str:
        kind = a.kind.get(name)
        if kind in ("resistance", "emf", "internal resistance"):
            return "value"
        if kind is not None:
            return "unknown"
        if name in a.circuit:
            p = a.circuit.part(name)
            if p.kind == "switch":
                raise ValueError(f"{name} is a switch; it has no value to put in an equation")
            raise ValueError(f"{name} is not on any closed branch, so it has no place in an equation")
        close = difflib.get_close_matches(name, list(a.kind), n=2, cutoff=0.6)
        hint = f"; did you mean {' or '.join(close)}?" if close else (
            "; use part names (R1, B1…), current names (" + ", ".join(b.current for b in a.branches.branches[:4])
            + "…) or numbers")
        raise ValueError(f"There is no part or current called {name}{hint}")
    return resolve


def _slot(a: Analysis, key: tuple[str | None, tuple[str, ...]]) -> tuple[str, str | None]:
    """What a monomial is: ("drop", R), ("emf", B), ("source", V_I), ("current", None), ("number", None) or
    ("bad", reason)."""
    u, f = key
    uk = a.kind.get(u) if u is not None else None
    if len(f) > 1:
        return "bad", "multiplies two part values together"
    if len(f) == 1:
        fk = a.kind[f[0]]
        if fk in ("resistance", "internal resistance"):
            if uk in ("current", "source current", "loop current"):
                return "drop", f[0]
            if uk is None:
                return "bad", f"is a resistance on its own, not a voltage or a current (multiply {f[0]} by a current)"
            return "bad", "multiplies a resistance by a voltage"
        if uk is None:
            return "emf", f[0]
        return "bad", "multiplies an EMF by a current or voltage"
    if uk is None:
        return "number", None
    if uk == "source voltage":
        return "source", u
    return "current", u


def _group(a: Analysis, form: Linear) -> dict[tuple[str, str | None], Linear]:
    out: dict[tuple[str, str | None], Linear] = {}
    for key, c in form.items():
        kind, what = _slot(a, key)
        slot = (kind, what) if kind in ("drop", "emf", "source") else (kind, None)
        out.setdefault(slot, {})[key] = c
    return out


def _col(parsed: ParsedEquation | None, form: Linear) -> int | None:
    if parsed is None:
        return None
    cols = [s[0] for key in form for s in parsed.spans.get(key, ())]
    return min(cols) if cols else None


def _snip(parsed: ParsedEquation, form: Linear) -> str:
    spans = sorted({s for key in form for s in parsed.spans.get(key, ())})
    return ", ".join(parsed.snippet(s) for s in spans)


# -- comparing numbers --------------------------------------------------------------
def _ratio(p: np.ndarray, v: np.ndarray, rtol: float = RTOL) -> float | None:
    """k with p = k·v (componentwise, to ``rtol`` of the largest entry), or None."""
    vv = float(v @ v)
    if vv == 0 or not np.any(p):
        return None
    k = float(p @ v) / vv
    big = max(float(np.max(np.abs(p))), float(np.max(np.abs(k * v))))
    return k if k != 0 and float(np.max(np.abs(p - k * v))) <= rtol * big else None


def _kvl_vector(a: Analysis, form: Linear) -> np.ndarray:
    y, w, c = a.reduce(form)
    return np.concatenate([y / a.ohm_scale, w, [c / a.volt_scale]])


def _kcl_vector(a: Analysis, form: Linear) -> np.ndarray:
    vec, c = a.branch_coordinates(form)
    return np.concatenate([vec, [c / a.amp_scale]])


def _current_vector(a: Analysis, combo: Linear) -> np.ndarray:
    """A combination of currents (monomials with one resistance dropped) in independent coordinates.

    Kept per analysis (read it, do not change it): a diagnosis asks for the same combinations of
    every candidate loop again and again.
    """
    kept = a._cache.setdefault("current vectors", {})
    key = tuple(combo.items())
    vec = kept.get(key)
    if vec is None:
        y, w, c = a.reduce({(u, ()): v for (u, _), v in combo.items()})
        vec = kept[key] = np.concatenate([y, w, [c / a.amp_scale]])
    return vec


def _combination(parsed_form: Linear) -> Linear:
    return {(u, ()): v for (u, _), v in parsed_form.items()}


def _describe(k: float) -> str:
    parts = []
    if k < 0:
        parts.append("written the other way round")
    if not math.isclose(abs(k), 1.0, rel_tol=1e-9):
        parts.append(f"multiplied by {abs(k):.6g}")
    return f" ({', '.join(parts)})" if parts else ""


def _right_side(parsed: ParsedEquation, form: Linear) -> bool:
    spans = [s for key in form for s in parsed.spans.get(key, ())]
    return bool(spans) and all(parsed.on_right(s) for s in spans)


def _scaled(t: Term, k: float, right: bool = False) -> str:
    """The reference term as it would be written on the person's side, in the person's direction."""
    sign = t.sign if (k > 0) != right else -t.sign
    return side_text((Term(sign, t.factors, t.unknowns, t.part),))


# -- KVL ------------------------------------------------------------------------------
def _kvl_candidates(a: Analysis) -> tuple[list[Equation], list[np.ndarray]]:
    """The loop equations a typed KVL equation is held against, with their vectors (see :func:`_kvl_vector`).

    The same for every check of one analysis, so worked out on the first check and kept.
    """
    cached = a._cache.get("kvl candidates")
    if cached is not None:
        return cached
    out = [cycle_equation(a, cycle, label, f"KVL around loop {label}", "branch", loop, combine=False)
           for label, cycle, loop in solver_cycles(a)]
    seen = {frozenset(e.parts) for e in out}   # Equation.parts holds part names
    for cycle in sorted(simple_cycles(a), key=len):
        key = frozenset(p for p, _ in cycle)
        if key in seen:
            continue
        seen.add(key)
        names = ", ".join(p for p, _ in cycle)
        out.append(cycle_equation(a, cycle, f"the loop through {names}", f"KVL around the loop through {names}",
                                  "branch", None, combine=False))
    cached = a._cache["kvl candidates"] = (out, [_kvl_vector(a, ref.linear) for ref in out])
    return cached


def _kcl_candidates(a: Analysis) -> tuple[list[Equation], list[np.ndarray]]:
    """The junction equations with their vectors (see :func:`_kcl_vector`), worked out once per analysis."""
    cached = a._cache.get("kcl candidates")
    if cached is None:
        out = kcl_equations(a)
        cached = a._cache["kcl candidates"] = (out, [_kcl_vector(a, ref.linear) for ref in out])
    return cached


def _kvl_findings(a: Analysis, parsed: ParsedEquation, ref: Equation) -> tuple[float, list[Finding]]:
    mine = _group(a, parsed.linear)
    theirs = _group(a, ref.linear)
    term_of = {}
    for t in ref.lhs:
        if t.factors:
            term_of[("drop" if a.kind[t.factors[0][0]] != "emf" else "emf", t.factors[0][0])] = t
        else:
            term_of[("source", t.unknowns[0][0])] = t

    def vec(slot: tuple[str, str | None], form: Linear) -> np.ndarray:
        if slot[0] == "drop":
            return _current_vector(a, _combination(form))
        return np.array([sum(form.values())])

    ratios = []
    for slot in set(mine) & set(theirs):
        r = _ratio(vec(slot, mine[slot]), vec(slot, theirs[slot]))
        if r is not None:
            ratios.append(round(r, 9))
    k = 1.0
    if ratios:
        counts = Counter(ratios)
        k = max(counts, key=lambda r: (counts[r], r == 1.0, r == -1.0, r > 0))
    found: list[Finding] = []
    missing = [s for s in theirs if s not in mine]
    extra = [s for s in mine if s not in theirs and s[0] not in ("number", "current")]
    for slot in [s for s in mine if s in theirs]:
        p, v = vec(slot, mine[slot]), vec(slot, theirs[slot])
        if np.allclose(p, k * v, rtol=RTOL, atol=RTOL * float(np.max(np.abs(k * v)))):
            continue
        col = _col(parsed, mine[slot])
        t = term_of[slot]
        part = t.part
        right = _scaled(t, k, _right_side(parsed, mine[slot]))
        if np.allclose(p, -k * v, rtol=RTOL, atol=RTOL * float(np.max(np.abs(k * v)))):
            why = _sign_reason(a, ref, t)
            found.append(Finding("sign", f"'{_snip(parsed, mine[slot])}' has the wrong sign: {why}, so it is "
                                         f"{right}.", part, col))
        elif slot[0] == "drop" and _ratio(p, v) is not None:
            found.append(Finding("coefficient", f"'{_snip(parsed, mine[slot])}' should be {right}.", part, col))
        elif slot[0] == "drop":
            found.append(Finding("wrong current", _current_message(a, parsed, mine[slot], t, right), part, col))
        else:
            found.append(Finding("coefficient", f"'{_snip(parsed, mine[slot])}' should be {right}.", part, col))
    # An extra resistor carrying the current a missing one should carry: the wrong resistor.
    for e in list(extra):
        if e[0] != "drop":
            continue
        pe = vec(e, mine[e])
        for m in list(missing):
            if m[0] != "drop":
                continue
            pm = vec(m, theirs[m])
            r = _ratio(pe, pm)
            if r is not None and math.isclose(abs(r), abs(k), rel_tol=1e-6):
                t = term_of[m]
                sign = "" if math.isclose(r, k, rel_tol=1e-6) else " and the sign is wrong too"
                found.append(Finding("wrong resistor", f"'{_snip(parsed, mine[e])}': {e[1]} is not on this loop; "
                                     f"the part there is {m[1]}, so the term is {_scaled(t, k)}{sign}.",
                                     m[1], _col(parsed, mine[e])))
                extra.remove(e)
                missing.remove(m)
                break
    for (u, f), c in mine.get(("current", None), {}).items():
        pu = _current_vector(a, {(u, ()): 1.0})
        for m in [m for m in missing if m[0] == "drop"]:
            t = term_of[m]
            want = k * t.sign * a.value[m[1]]
            r = _ratio(pu, _current_vector(a, {(t.unknowns[0][0], ()): 1.0}))
            if r is not None and math.isclose(abs(c * r), abs(want), rel_tol=1e-6):
                missing.remove(m)
                if not math.isclose(c * r, want, rel_tol=1e-6):
                    found.append(Finding("sign", f"'{_snip(parsed, {(u, f): c})}' (the drop across {m[1]}) has the "
                                                 f"wrong sign: {_sign_reason(a, ref, t)}.", m[1],
                                         _col(parsed, {(u, f): c})))
                break
        else:
            kind = "units" if abs(c) == 1 else "numbers"
            why = ("is a current on its own; in a loop equation multiply it by a resistance" if kind == "units"
                   else "does not match the drop across any part of this loop")
            found.append(Finding(kind, f"'{_snip(parsed, {(u, f): c})}' {why}.", None, _col(parsed, {(u, f): c})))
    numbers = mine.get(("number", None), {})
    if missing and numbers:
        # Numbers may stand for the missing EMFs' values.
        want = sum(k * term_value_of(a, term_of[m]) for m in missing if m[0] == "emf")
        got = sum(numbers.values())
        if want and math.isclose(got, want, rel_tol=1e-6):
            missing = [m for m in missing if m[0] != "emf"]
            numbers = {}
    for m in missing:
        t = term_of[m]
        what = {"drop": f"the drop across {m[1]}", "emf": f"the EMF of {m[1]}",
                "source": f"the voltage across current source {t.part}"}[m[0]]
        found.append(Finding("missing", f"{what} is missing: the loop passes {t.part}, which adds {_scaled(t, k)} "
                                        "(on the left-hand side).",
                             t.part, None))
    for e in extra:
        name = e[1] if e[0] != "source" else a.part_of.get(e[1] or "", e[1])
        found.append(Finding("extra", f"'{_snip(parsed, mine[e])}': {name} is not on {ref.label}.", name,
                             _col(parsed, mine[e])))
    if numbers and not found:
        found.append(Finding("numbers", f"the plain numbers ({_snip(parsed, numbers)}) do not belong: the EMFs "
                             "round this loop are already written by name.", None, _col(parsed, numbers)))
    return k, found


def term_value_of(a: Analysis, t: Term) -> float:
    """The value of an EMF term (sign × EMF)."""
    return t.sign * sum(s * a.value[n] for n, s in t.factors)


def _sign_reason(a: Analysis, ref: Equation, t: Term) -> str:
    kind = a.kind.get(t.factors[0][0]) if t.factors else "source voltage"
    if kind == "emf":
        return (f"the loop goes through {t.part} from − to +" if t.sign > 0 else
                f"the loop goes through {t.part} from + to −")
    if kind == "source voltage":
        return f"going round the loop, the voltage across {t.part} counts with this sign"
    cur = t.unknowns[0][0] if t.unknowns else "the current"
    return (f"the loop runs through {t.part} against {cur}" if t.sign > 0 else
            f"the loop runs through {t.part} along {cur}")


def _current_message(a: Analysis, parsed: ParsedEquation, combo: Linear, t: Term, right: str) -> str:
    b = a.branches.of_part(t.part)
    names = [u for (u, _) in combo]
    snippet = _snip(parsed, combo)
    if len(names) == 1 and a.kind.get(names[0]) == "current" and names[0] != b.current:
        other = a.branches.named(names[0])
        return (f"'{snippet}': {t.part} carries {b.current}, but {names[0]} is the current of another branch "
                f"({', '.join(other.part_names)}); the term is {right}.")
    return f"'{snippet}': that is not the current through {t.part}, which carries {b.current}; the term is {right}."


def _loop_scale(parsed: ParsedEquation, a: Analysis, k: float) -> str:
    """How the typed equation relates to the reference; an equation in loop currents is compared with the
    mesh form (resistances × currents = EMFs), the negative of the sum of rises."""
    if any(u is not None and a.kind[u] == "loop current" for u, _ in parsed.linear):
        return _describe(-k) + " (in loop currents)"
    return _describe(k)


def _first_multiple(p: np.ndarray, candidates: list[Equation], vectors: list[np.ndarray]):
    """The first candidate equation whose vector ``p`` is a multiple of, with the factor; else None."""
    for ref, v in zip(candidates, vectors):
        k = _ratio(p, v)
        if k is not None:
            return ref, k
    return None


def _kvl_match(a: Analysis, parsed: ParsedEquation) -> EquationCheck | None:
    """The verdict if the equation is KVL of a loop (or follows from KVL), else None."""
    p = _kvl_vector(a, parsed.linear)
    if not np.any(p):
        return EquationCheck(False, "Everything in this equation cancels out (it says 0 = 0 by KCL).", "KVL")
    candidates, vectors = _kvl_candidates(a)
    found = _first_multiple(p, candidates, vectors)
    if found is not None:
        ref, k = found
        return EquationCheck(True, f"Correct: KVL around {ref.label}{_loop_scale(parsed, a, k)}.", "KVL",
                             ref.label, k, ref)
    rows = np.array([v for ref, v in zip(candidates, vectors) if ref.loop is not None])
    if len(rows):
        x, *_ = np.linalg.lstsq(rows.T, p, rcond=None)
        if np.allclose(rows.T @ x, p, rtol=0, atol=RTOL * float(np.max(np.abs(p)))):
            combo = " ".join(f"{'+' if c > 0 else '−'} {abs(c):.3g}×L{i + 1}" for i, c in enumerate(x)
                             if abs(c) > 1e-9).lstrip("+ ")
            return EquationCheck(True, f"Correct: it follows from KVL ({combo}), though it is not the equation of "
                                       "a single loop.", "KVL")
    return None


def _kvl_diagnose(a: Analysis, parsed: ParsedEquation) -> EquationCheck:
    """The closest loop equation and what differs from it."""
    best: tuple[int, Equation, float, list[Finding]] | None = None
    for ref in _kvl_candidates(a)[0]:
        k, found = _kvl_findings(a, parsed, ref)
        if not found:
            found = [Finding("numbers", "the numbers in it do not match this loop's resistances and EMFs.")]
        if best is None or len(found) < best[0]:
            best = (len(found), ref, k, found)
    if best is None:
        return EquationCheck(False, "This circuit has no closed loop, so it has no KVL equations.", "KVL")
    _, ref, k, found = best
    return EquationCheck(False, f"Not a KVL equation of this circuit. Closest: KVL around {ref.label}"
                                f"{_loop_scale(parsed, a, k)}.", "KVL", ref.label, k, ref, tuple(found))


# -- KCL ------------------------------------------------------------------------------
def _kcl_findings(a: Analysis, parsed: ParsedEquation, ref: Equation) -> tuple[float, list[Finding]]:
    def by_branch(form: Linear) -> dict[int, tuple[float, Linear]]:
        out: dict[int, tuple[float, Linear]] = {}
        for key, c in form.items():
            u = key[0]
            if u is None:
                continue
            if a.kind[u] == "source current":
                b = a.branches.of_part(u)
                c = c * b.sense(u)
            else:
                b = a.branches.named(u)
            old = out.get(b.index, (0.0, {}))
            out[b.index] = (old[0] + c, {**old[1], key: c})
        return out

    mine, theirs = by_branch(parsed.linear), by_branch(ref.linear)
    ratios = Counter(round(mine[i][0] / theirs[i][0], 9) for i in set(mine) & set(theirs) if mine[i][0])
    k = max(ratios, key=lambda r: (ratios[r], r == 1.0, r == -1.0, r > 0)) if ratios else 1.0
    found: list[Finding] = []
    branches = a.branches.branches
    where = ref.label
    for i in sorted(set(mine) | set(theirs)):
        b = branches[i]
        if i in theirs:
            e = theirs[i][0]
            way = "comes into" if e > 0 else "leaves"
            right = side_text((Term(1 if e * k > 0 else -1, (), ((b.current, 1),)),))
            if i in mine and _right_side(parsed, mine[i][1]):
                right = side_text((Term(-1 if e * k > 0 else 1, (), ((b.current, 1),)),))
        if i not in mine:
            if any(a.kind.get(p) == "source current" for p in b.part_names) and (None, ()) in parsed.linear:
                continue  # written as a number; the numeric check decides
            found.append(Finding("missing", f"{b.current} (through {', '.join(b.part_names)}) {way} {where} and is "
                                            f"missing (on the left-hand side: {right}).", b.parts[0][0]))
        elif i not in theirs:
            found.append(Finding("extra", f"'{_snip(parsed, mine[i][1])}': the branch of {b.current} "
                                          f"({', '.join(b.part_names)}) does not meet at {where}.", b.parts[0][0],
                                 _col(parsed, mine[i][1])))
        elif not math.isclose(mine[i][0], k * theirs[i][0], rel_tol=1e-9):
            kind = "sign" if math.isclose(mine[i][0], -k * theirs[i][0], rel_tol=1e-9) else "coefficient"
            what = "has the wrong sign" if kind == "sign" else "has the wrong factor"
            found.append(Finding(kind, f"'{_snip(parsed, mine[i][1])}' {what}: {b.current} {way} {where}, so on "
                                       f"that side it is {right}.", b.parts[0][0], _col(parsed, mine[i][1])))
    return k, found


def _kcl_check(a: Analysis, parsed: ParsedEquation) -> EquationCheck:
    loops = [u for (u, _) in parsed.linear if u is not None and a.kind[u] == "loop current"]
    if loops:
        return EquationCheck(False, f"{loops[0]} is a loop current; loop currents satisfy KCL by themselves, so "
                                    "write KCL with branch currents.", "KCL",
                             column=_col(parsed, {k: v for k, v in parsed.linear.items() if k[0] in loops}))
    p = _kcl_vector(a, parsed.linear)
    if not np.any(p):
        return EquationCheck(False, "Everything in this equation cancels out (it says 0 = 0).", "KCL")
    candidates, vectors = _kcl_candidates(a)
    found = _first_multiple(p, candidates, vectors)
    if found is not None:
        ref, k = found
        return EquationCheck(True, f"Correct: KCL at junction {ref.label}{_describe(k)}.", "KCL", ref.label, k, ref)
    if candidates:
        rows = np.array(vectors)
        x, *_ = np.linalg.lstsq(rows.T, p, rcond=None)
        if np.allclose(rows.T @ x, p, rtol=0, atol=RTOL * float(np.max(np.abs(p)))):
            used = [ref.label for ref, c in zip(candidates, x) if abs(c) > 1e-9]
            return EquationCheck(True, f"Correct: KCL for the junctions {', '.join(used)} taken together.", "KCL")
    else:
        return EquationCheck(False, "This circuit has no junctions, so it has no KCL equations: every part on a "
                                    "branch carries the same current.", "KCL")
    best = None
    for ref in candidates:
        k, found = _kcl_findings(a, parsed, ref)
        if not found:
            found = [Finding("numbers", "the numbers do not add up to the currents at this junction.")]
        if best is None or len(found) < best[0]:
            best = (len(found), ref, k, found)
    _, ref, k, found = best
    return EquationCheck(False, f"Not a KCL equation of this circuit. Closest: KCL at junction {ref.label}"
                                f"{_describe(k)}.", "KCL", ref.label, k, ref, tuple(found))


def check_equation(a: Analysis, text: str) -> EquationCheck:
    """Whether ``text`` is a valid KVL or KCL equation of the circuit, and if not, what is wrong.

    Never raises for any text: a problem reading it comes back as a message with its column.
    """
    try:
        parsed = parse_equation(text, _resolver(a))
    except ParseError as exc:
        return EquationCheck(False, exc.message, column=exc.column)
    if not parsed.linear:
        return EquationCheck(False, "Everything in this equation cancels out; there is nothing to check.")
    slots = {key: _slot(a, key) for key in parsed.linear}
    bad = [(key, why) for key, (kind, why) in slots.items() if kind == "bad"]
    if bad:
        found = tuple(Finding("units", f"'{_snip(parsed, {key: 1.0})}' {why}.", None, _col(parsed, {key: 1.0}))
                      for key, why in bad)
        return EquationCheck(False, "Some terms are neither voltages nor currents.", findings=found,
                             column=found[0].column)
    volts = {key: 1.0 for key, (kind, _) in slots.items() if kind in ("drop", "emf", "source")}
    amps = {key: c for key, c in parsed.linear.items() if slots[key][0] == "current"}
    if not volts and not amps:
        return EquationCheck(False, "The equation has only numbers in it; use part names and currents.")
    if not volts:
        kcl = _kcl_check(a, parsed)
        if kcl.ok:
            return kcl
        kvl = _kvl_match(a, parsed)
        if kvl is not None:
            return kvl
        sizes = {round(abs(c), 9) for c in amps.values()}
        if len(sizes) == 1 and (None, ()) not in parsed.linear or kcl.column is not None:
            return kcl
    return _kvl_match(a, parsed) or _kvl_diagnose(a, parsed)


# -- numeric answers ---------------------------------------------------------------------
@dataclass(frozen=True)
class ValueCheck:
    """One typed answer: what it is, the solved value, the typed one and the verdict."""

    name: str
    what: str
    unit: str
    expected: float | None
    got: float | None
    ok: bool
    message: str


@dataclass(frozen=True)
class ValuesCheck:
    """All typed answers; ``ok`` when each is within ``tolerance`` (relative)."""

    ok: bool
    tolerance: float
    items: tuple[ValueCheck, ...]

    def report(self) -> str:
        return "\n".join(i.message for i in self.items)


def _expected(a: Analysis, name: str) -> tuple[str, str, float]:
    """(what, unit, solved value) for an answer's name; raises KeyError with a message."""
    sol = a.solution
    name = name.strip()
    kind = a.kind.get(name)
    if kind in ("current", "loop current"):
        return kind, "A", a.value[name]
    if kind == "source voltage":
        return f"voltage across {a.part_of[name]}", "V", a.value[name]
    if name.startswith(("V(", "I(")) and name.endswith(")"):
        inner = name[2:-1].strip()
        if name[0] == "I":
            if inner in a.circuit and not inner.startswith("~"):
                return f"current through {inner}", "A", sol.current(inner)
            raise KeyError(f"{name}: there is no part called {inner}.")
        label_to_node = {v: k for k, v in a.branches.node_label.items()}
        if inner in label_to_node:
            return f"potential of node {inner}", "V", sol.potential(a.solution.nodes[label_to_node[inner]][0])
        if inner in sol.points:
            return f"potential of point {inner}", "V", sol.potential(inner)
        if inner in a.circuit and not inner.startswith("~"):
            return f"voltage across {inner}", "V", sol.voltage(inner)
        raise KeyError(f"{name}: there is no node, point or part called {inner}.")
    raise KeyError(f"{name}: there is no current called {name}; use a current name ("
                   + ", ".join(b.current for b in a.branches.branches[:4]) + "…), V(node), V(part) or I(part).")


def check_values(a: Analysis, values: Mapping[str, float | str], tol: float = DEFAULT_TOLERANCE) -> ValuesCheck:
    """Compare typed answers with the solution, each within ``tol`` of the solved value.

    Keys: branch current names, loop currents (``IL1``), source voltages
    (``V_I1``), ``V(n3)`` or ``V(point)`` for potentials, ``V(R1)`` for the
    drop across a part (first terminal minus second), ``I(R1)`` for the
    current through it. Values are numbers or text such as ``"12.3m"``.
    """
    if not (isinstance(tol, (int, float)) and math.isfinite(tol) and 0 < tol < 1):
        raise ValueError("The tolerance is a fraction between 0 and 1, such as 0.01 for 1 %.")
    items = []
    for name, typed in values.items():
        try:
            what, unit, exp = _expected(a, str(name))
        except KeyError as exc:
            items.append(ValueCheck(str(name), "", "", None, None, False, str(exc.args[0])))
            continue
        try:
            got = parse_value(typed, unit) if isinstance(typed, str) else float(typed)
            if not math.isfinite(got):
                raise ValueError("not finite")
        except (TypeError, ValueError) as exc:
            items.append(ValueCheck(str(name), what, unit, exp, None, False, f"{name}: {exc}"))
            continue
        scale = a.amp_scale if unit == "A" else a.volt_scale
        ok = abs(got - exp) <= tol * max(abs(exp), 1e-6 * scale)
        shown = f"{name} = {format_value(got, unit)}"
        if ok:
            msg = f"{shown}: right (solved {format_value(exp, unit)})."
        elif exp != 0 and math.isclose(got, -exp, rel_tol=tol):
            msg = (f"{shown}: the size is right but the sign is not; solved {format_value(exp, unit)}, so it "
                   f"flows (or points) the other way to the direction you took.")
        else:
            off = f", {abs(got - exp) / abs(exp):.0%} off" if exp else ""
            msg = f"{shown}: expected {format_value(exp, unit)} ({what}){off}."
        items.append(ValueCheck(str(name), what, unit, exp, got, ok, msg))
    if not items:
        items.append(ValueCheck("", "", "", None, None, False, "No answers were given to check."))
    return ValuesCheck(all(i.ok for i in items), tol, tuple(items))
