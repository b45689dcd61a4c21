"""KVL and KCL equations of a solved circuit, in the trade's sign conventions.

Conventions (design notes): going round a loop, an I·R term is positive where
the loop runs against the current and negative where it runs along it; an EMF
is positive where the loop goes from the − to the + terminal; so each KVL
equation reads "sum of rises = 0". At a junction, currents coming in are
positive and going out negative. A current source's voltage is an unknown of
the loop equations, written ``V_I1`` (V(first terminal) − V(second)).

Two forms: branch-current form (terms in branch current names, one term per
part) and mesh-current form (the row of the loop-resistance matrix: self and
mutual resistances times loop currents = the EMFs round the loop; Maxwell's
method, see e.g. Desoer & Kuh, *Basic Circuit Theory*, 1969, ch. 10).
"""
from __future__ import annotations

import itertools
from dataclasses import dataclass
from typing import Iterable, Sequence

import networkx as nx

from app.units import format_value

from .branches import Branch
from .context import Analysis
from .terms import Linear, Term, linear_of, side_latex, side_numeric, side_text, term_value

__all__ = ["Equation", "LoopError", "Cycle", "equations", "kvl_equations", "kcl_equations", "source_equations",
           "cycle_equation", "trace_loop", "merge_loops", "loop_equation", "merged_loop_equation",
           "solver_cycles", "simple_cycles", "MAX_CYCLES"]

# A closed walk: (part, sense) in order, sense +1 where it runs from the part's first terminal to its second.
Cycle = tuple[tuple[str, int], ...]
MAX_CYCLES = 500      # bound on the simple cycles enumerated for the checker
MAX_CYCLE_LENGTH = 12  # branches per enumerated cycle


class LoopError(ValueError):
    """A traced loop that is refused; ``message`` says why, ``parts`` the parts involved."""

    def __init__(self, message: str, parts: tuple[str, ...] = ()) -> None:
        super().__init__(message)
        self.message = message
        self.parts = parts


@dataclass(frozen=True)
class Equation:
    """One equation, ready to show: symbols, numbers, LaTeX and residual.

    ``law`` is ``"KVL"``, ``"KCL"`` or ``"source"`` (a current source fixing
    loop currents, mesh form); ``form`` ``"branch"`` or ``"mesh"``; ``label``
    the loop (``"L1"``) or junction (``"n3"``) it belongs to; ``parts`` and
    ``nodes`` what to highlight; ``loop`` the solver loop index if any.
    ``residual`` is left side minus right side with the solved numbers,
    ``size`` the sum of the terms' magnitudes (the residual's yardstick).
    """

    law: str
    form: str
    label: str
    title: str
    lhs: tuple[Term, ...]
    rhs: tuple[Term, ...]
    parts: tuple[str, ...]
    nodes: tuple[str, ...]
    loop: int | None
    text: str
    latex: str
    numeric: str
    residual: float
    size: float
    unit: str
    note: str = ""

    @property
    def linear(self) -> Linear:
        """Left minus right side as monomials (see :func:`terms.linear_of`)."""
        return linear_of(self.lhs, self.rhs)


def _make(a: Analysis, law: str, form: str, label: str, title: str, lhs: Sequence[Term], rhs: Sequence[Term],
          parts: Iterable[str], nodes: Iterable[str], loop: int | None, unit: str) -> Equation:
    lhs, rhs = tuple(lhs), tuple(rhs)
    left = [term_value(t, a.value) for t in lhs]
    right = [term_value(t, a.value) for t in rhs]
    residual = sum(left) - sum(right)
    size = sum(abs(x) for x in left + right)
    units, shown = a.unit, a._cache.setdefault("numbers shown", {})
    numeric = (f"{side_numeric(lhs, a.value, units, shown)} = {side_numeric(rhs, a.value, units, shown)}"
               f"   (residual {format_value(residual, unit)})")
    sources = sorted({t.part for t in lhs + rhs for n, _ in t.unknowns if a.kind.get(n) == "source voltage"})
    note = ("; ".join(f"V_{s} is the unknown voltage across current source {s}" for s in sources)
            if law == "KVL" else "")
    return Equation(law, form, label, title, lhs, rhs, tuple(dict.fromkeys(parts)), tuple(dict.fromkeys(nodes)),
                    loop, f"{side_text(lhs)} = {side_text(rhs)}", f"{side_latex(lhs)} = {side_latex(rhs)}",
                    numeric, residual, size, unit, note)


# -- branch currents --------------------------------------------------------
def current_expression(a: Analysis, b: Branch, combine: bool = True) -> tuple[tuple[str, int], ...]:
    """The current of ``b`` as written in equations.

    An untagged branch meeting a junction where every other branch carries a
    person's tag is written through those tags by KCL, as on paper
    (``Ia - Ib``); otherwise it is its own name.
    """
    if b.tagged or not combine or not a.branches.any_tagged:
        return ((b.current, 1),)
    for node in (b.start, b.end):
        if node not in a.branches.junction_set:
            continue
        here = a.branches.at(node)
        own = [e for x, e in here if x.index == b.index]
        others = [(x, e) for x, e in here if x.index != b.index]
        if len(own) != 1 or not others or len(others) > 3 or not all(x.tagged for x, _ in others):
            continue
        combo = [(x.current, -own[0] * e) for x, e in others]
        combo.sort(key=lambda t: -t[1])
        return tuple(combo)
    return ((b.current, 1),)


def _kvl_terms(a: Analysis, cycle: Cycle, combine: bool) -> list[Term]:
    terms = []
    for part, s in cycle:
        p = a.circuit.part(part)
        b = a.branches.of_part(part)
        sigma = b.sense(part)
        current = current_expression(a, b, combine)
        if p.kind == "resistor":
            terms.append(Term(-s * sigma, ((part, 1),), current, part))
        elif p.kind == "cell":
            terms.append(Term(-s, ((part, 1),), (), part))
            if p.resistance > 0:
                terms.append(Term(-s * sigma, ((f"r_{part}", 1),), current, part))
        else:
            terms.append(Term(-s, (), ((f"V_{part}", 1),), part))
    return terms


def _cycle_nodes(a: Analysis, cycle: Cycle) -> list[str]:
    """The node each step of ``cycle`` starts from (parts not in the graph are skipped)."""
    term = _terminals(a)
    return [term[part][0 if s > 0 else 1] for part, s in cycle if part in term]


def _loops_through(a: Analysis) -> dict[str, dict[int, int]]:
    """Part → {solver loop index: the loop's sense through the part}, built once per analysis."""
    through = a._cache.get("loops through")
    if through is None:
        through = {}
        for loop in a.solution.loops:
            for p, s in loop.parts:
                through.setdefault(p, {})[loop.index] = s
        a._cache["loops through"] = through
    return through


def _mesh_terms(a: Analysis, cycle: Cycle) -> tuple[list[Term], list[Term]]:
    lhs, rhs = [], []
    through = _loops_through(a)
    # Only the loops through some part of the cycle can give a term; visit them in the solver's order.
    for k in sorted({k for part, _ in cycle for k in through.get(part, ())}):
        loop = a.solution.loops[k]
        factors = []
        for part, s in cycle:
            signs = through.get(part, {})
            if k not in signs:
                continue
            p = a.circuit.part(part)
            sym = part if p.kind == "resistor" else f"r_{part}" if p.kind == "cell" and p.resistance > 0 else None
            if sym is not None:
                factors.append((sym, s * signs[k]))
        if not factors:
            continue
        sign = -1 if all(f < 0 for _, f in factors) else 1
        lhs.append(Term(sign, tuple((n, f * sign) for n, f in factors),
                        ((a.loop_current[loop.index], 1),), None, True))
    for part, s in cycle:
        p = a.circuit.part(part)
        if p.kind == "cell":
            rhs.append(Term(-s, ((part, 1),), (), part))
        elif p.kind == "current_source":
            rhs.append(Term(-s, (), ((f"V_{part}", 1),), part))
    return lhs, rhs


def cycle_equation(a: Analysis, cycle: Cycle, label: str, title: str, form: str = "branch",
                   loop: int | None = None, combine: bool = True) -> Equation:
    """The KVL equation of a closed walk ``cycle`` in branch or mesh form."""
    parts = [p for p, _ in cycle]
    nodes = _cycle_nodes(a, cycle)
    if form == "mesh":
        lhs, rhs = _mesh_terms(a, cycle)
        return _make(a, "KVL", "mesh", label, title, lhs, rhs, parts, nodes, loop, "V")
    if form != "branch":
        raise ValueError(f"The equation form is 'branch' or 'mesh', not {form!r}.")
    return _make(a, "KVL", "branch", label, title, _kvl_terms(a, cycle, combine), (), parts, nodes, loop, "V")


def _loop_title(loop) -> str:
    how = f", {loop.orientation}" if loop.orientation else ""
    return f"KVL around loop {loop.name}{how}"


def kvl_equations(a: Analysis, form: str = "branch", combine: bool = True) -> list[Equation]:
    """One KVL equation per loop the solver used, in the solver's loop direction."""
    return [cycle_equation(a, tuple(loop.parts), loop.name, _loop_title(loop), form, loop.index, combine)
            for loop in a.solution.loops]


def kcl_equations(a: Analysis) -> list[Equation]:
    """One KCL equation per junction: currents coming in positive, going out negative."""
    out = []
    for node in a.branches.junctions:
        here = a.branches.at(node)
        if not here:
            continue
        lhs = [Term(e, (), ((b.current, 1),), b.parts[0][0]) for b, e in here]
        label = a.branches.label(node)
        parts = [p for b, _ in here for p in b.part_names]
        out.append(_make(a, "KCL", "branch", label, f"KCL at junction {label}", lhs, (), parts, (node,), None, "A"))
    return out


def source_equations(a: Analysis) -> list[Equation]:
    """Mesh form: each current source fixes the signed sum of the loop currents through it."""
    out = []
    through = _loops_through(a)
    for name, kind in a.kind.items():
        if kind != "source current":
            continue
        lhs = [Term(s, (), ((a.loop_current[k], 1),), None) for k, s in through.get(name, {}).items()]
        if lhs:
            out.append(_make(a, "source", "mesh", name, f"Current source {name} sets its loop currents",
                             lhs, [Term(1, (), ((name, 1),), name)], [name], (), None, "A"))
    return out


def equations(a: Analysis, form: str = "branch", combine: bool = True) -> list[Equation]:
    """All equations of the circuit: KVL per loop, then KCL per junction (branch form) or
    the current-source rows (mesh form, where KCL holds by construction)."""
    extra = kcl_equations(a) if form == "branch" else source_equations(a)
    return kvl_equations(a, form, combine) + extra


# -- loops of a person's own --------------------------------------------------
def _terminals(a: Analysis) -> dict[str, tuple[str, str]]:
    """Part → its (first, second) terminal nodes, for the parts in the graph; built once per analysis."""
    term = a._cache.get("terminals")
    if term is None:
        term = {key: data["terminals"] for _, _, key, data in a.solution.graph.edges(keys=True, data=True)}
        a._cache["terminals"] = term
    return term


def _orientation(a: Analysis, cycle: Cycle) -> str | None:
    """``"clockwise"`` or ``"anticlockwise"`` on screen (y downwards), or None without positions."""
    pos = a.circuit.positions
    pts = []
    for part, s in cycle:
        p = a.circuit.part(part)
        ends = (p.a, p.b) if s > 0 else (p.b, p.a)
        if any(e not in pos for e in ends):
            return None
        pts.extend(pos[e] for e in ends)
    area = sum(x0 * y1 - x1 * y0 for (x0, y0), (x1, y1) in zip(pts, pts[1:] + pts[:1]))
    if area == 0:
        return None
    return "clockwise" if area > 0 else "anticlockwise"


def _direct(a: Analysis, cycle: Cycle, direction: str) -> Cycle:
    if direction == "as given":
        return cycle
    flipped = tuple((p, -s) for p, s in reversed(cycle))
    if direction == "reversed":
        return flipped
    if direction in ("clockwise", "anticlockwise"):
        now = _orientation(a, cycle)
        if now is None:
            raise LoopError("This circuit has no drawing positions, so clockwise has no meaning here; "
                            "choose 'as given' or 'reversed'.")
        return cycle if now == direction else flipped
    raise LoopError(f"The direction is 'as given', 'reversed', 'clockwise' or 'anticlockwise', not {direction!r}.")


def trace_loop(a: Analysis, items: Sequence[str], direction: str = "as given") -> Cycle:
    """The closed walk through ``items`` (part names or point names, in order).

    Consecutive points must be joined by one part or one branch; a part must
    touch the node the walk has reached. The walk must end where it began and
    pass no node twice. Raises :class:`LoopError` with the reason otherwise.
    """
    sol, lab = a.solution, a.branches.label
    term = _terminals(a)
    points = set(sol.points)
    items = [str(x) for x in items]
    if len(items) < 2:
        raise LoopError("A loop needs at least two parts, or its points in order with the first one again at the end.")
    kinds = []
    for x in items:
        if x in term:
            kinds.append("part")
        elif x in a.circuit and not x.startswith("~") and a.circuit.part(x).kind == "switch":
            raise LoopError(f"{x} is an open switch: no loop can pass through it.", (x,))
        elif x in a.circuit and a.circuit.part(x).is_conductor:
            kinds.append("wire")
        elif x in points:
            kinds.append("point")
        else:
            raise LoopError(f"{x} is neither a part nor a point of this circuit.")

    def ends_of(x: str, kind: str) -> set[str]:
        if kind == "point":
            return {sol.node_of(x)}
        if kind == "wire":
            return {sol.node_of(a.circuit.part(x).a)}
        return set(term[x])

    steps: list[tuple[str, int]] = []
    nodes: list[str] = []
    here: str | None = None
    for i, (x, kind) in enumerate(zip(items, kinds)):
        if here is None:
            if kind == "part":
                u, v = term[x]
                nxt = ends_of(items[i + 1], kinds[i + 1]) if i + 1 < len(items) else set()
                if not nxt & {u, v}:
                    raise LoopError(f"{x} and {items[i + 1]} do not touch.", (x,))
                here = u if v in nxt else v
            else:
                here = next(iter(ends_of(x, kind)))
            nodes.append(here)
        if kind == "wire":
            if sol.node_of(a.circuit.part(x).a) != here:
                raise LoopError(f"{x} does not touch node {lab(here)}, where the loop has got to.", (x,))
            continue
        if kind == "point":
            target = sol.node_of(x)
            if target == here:
                continue
            runs = [b for b in a.branches.branches if here in b.nodes and target in b.nodes]
            if runs:  # the most direct run: fewest parts between the two nodes
                gap = {b.index: abs(b.nodes.index(here) - b.nodes.index(target)) for b in runs}
                runs = [b for b in runs if gap[b.index] == min(gap.values())]
            if not runs:
                raise LoopError(f"No part or branch joins node {lab(here)} directly to point {x}; "
                                "click the points in order round the loop.")
            if len(runs) > 1:
                names = " and ".join(r.parts[0][0] for r in runs)
                raise LoopError(f"Nodes {lab(here)} and {lab(target)} are joined by more than one branch "
                                f"({names}); click a part to say which way the loop goes.",
                                tuple(r.parts[0][0] for r in runs))
            b = runs[0]
            i0, i1 = b.nodes.index(here), b.nodes.index(target)
            path = list(b.parts[i0:i1]) if i0 < i1 else [(p, -s) for p, s in reversed(b.parts[i1:i0])]
            for p, s in path:
                steps.append((p, s))
                nodes.append(term[p][1] if s > 0 else term[p][0])
            here = target
            continue
        u, v = term[x]
        if here not in (u, v):
            raise LoopError(f"{x} does not touch node {lab(here)}, where the loop has got to.", (x,))
        s = 1 if here == u else -1
        steps.append((x, s))
        here = v if s > 0 else u
        nodes.append(here)
    if not steps:
        raise LoopError("The path passes no part, so it is no loop.")
    names = [p for p, _ in steps]
    twice = [p for p in dict.fromkeys(names) if names.count(p) > 1]
    if twice:
        raise LoopError(f"The path goes through {twice[0]} twice; a loop passes each part once.", (twice[0],))
    if nodes[-1] != nodes[0]:
        raise LoopError(f"The path ends at node {lab(nodes[-1])}, not where it starts ({lab(nodes[0])}): it is not "
                        "closed. End on the starting point to close it.", tuple(names))
    inner = nodes[:-1]
    again = [n for n in dict.fromkeys(inner) if inner.count(n) > 1]
    if again:
        raise LoopError(f"The path passes node {lab(again[0])} more than once; a loop visits each node once. "
                        "Split it into separate loops.", tuple(names))
    return _direct(a, tuple(steps), direction)


def merge_loops(a: Analysis, loops: Iterable[int]) -> Cycle:
    """The boundary of several of the solver's loops taken together, as one closed walk.

    Parts shared by two chosen loops cancel (they run opposite ways in
    neighbouring windows). Raises :class:`LoopError` if what is left is not
    one closed loop.
    """
    chosen = sorted(set(int(k) for k in loops))
    sol = a.solution
    if not chosen:
        raise LoopError("Choose at least one loop.")
    bad = [k for k in chosen if not 0 <= k < len(sol.loops)]
    if bad:
        raise LoopError(f"There is no loop L{bad[0] + 1}; this circuit has {len(sol.loops)}.")
    names = " + ".join(sol.loops[k].name for k in chosen)
    total: dict[str, int] = {}
    for k in chosen:
        for p, s in sol.loops[k].parts:
            total[p] = total.get(p, 0) + s
    edges = {p: s for p, s in total.items() if s}
    if not edges:
        raise LoopError(f"{names} cancel out completely; there is no loop left round them.")
    if any(abs(s) > 1 for s in edges.values()):
        raise LoopError(f"{names} do not fit together into one loop (a part would be passed twice).",
                        tuple(p for p, s in edges.items() if abs(s) > 1))
    term = _terminals(a)
    out: dict[str, list[str]] = {}
    for p, s in edges.items():
        u, v = term[p] if s > 0 else term[p][::-1]
        out.setdefault(u, []).append(p)
    if any(len(v) > 1 for v in out.values()):
        touch = next(n for n, v in out.items() if len(v) > 1)
        raise LoopError(f"{names} only touch at node {a.branches.label(touch)}; together they make no single loop.",
                        tuple(edges))
    first = next(iter(edges))
    cycle = []
    p = first
    while True:
        s = edges[p]
        cycle.append((p, s))
        nxt_node = term[p][1] if s > 0 else term[p][0]
        nxt = out.get(nxt_node)
        if not nxt or nxt[0] == first:
            break
        p = nxt[0]
    if len(cycle) != len(edges):
        raise LoopError(f"{names} do not share a side; together they make separate loops, not one.", tuple(edges))
    return tuple(cycle)


def loop_equation(a: Analysis, items: Sequence[str], direction: str = "as given", form: str = "branch",
                  combine: bool = True) -> Equation:
    """The KVL equation of a loop a person traced (see :func:`trace_loop`)."""
    cycle = trace_loop(a, items, direction)
    how = _orientation(a, cycle)
    title = "KVL around your loop through " + ", ".join(p for p, _ in cycle) + (f", {how}" if how else "")
    return cycle_equation(a, cycle, "your loop", title, form, None, combine)


def merged_loop_equation(a: Analysis, loops: Iterable[int], form: str = "branch", combine: bool = True) -> Equation:
    """The KVL equation round several of the solver's loops taken as one larger loop."""
    chosen = sorted(set(int(k) for k in loops))
    cycle = merge_loops(a, chosen)
    label = " + ".join(a.solution.loops[k].name for k in chosen)
    how = _orientation(a, cycle)
    return cycle_equation(a, cycle, label, f"KVL around {label}" + (f", {how}" if how else ""), form, None, combine)


# -- cycles for the checker -------------------------------------------------------
def solver_cycles(a: Analysis) -> list[tuple[str, Cycle, int | None]]:
    """The solver's loops as (label, cycle, loop index)."""
    return [(loop.name, tuple(loop.parts), loop.index) for loop in a.solution.loops]


def _run(b: Branch, forward: bool) -> list[tuple[str, int]]:
    return list(b.parts) if forward else [(p, -s) for p, s in reversed(b.parts)]


def simple_cycles(a: Analysis, limit: int = MAX_CYCLES) -> list[Cycle]:
    """Simple cycles of the branch graph (each branch taken whole), at most ``limit``.

    Node cycles come from ``networkx.simple_cycles`` with a length bound;
    parallel branches are expanded into one cycle per choice.
    """
    g = nx.MultiGraph()
    for b in a.branches.branches:
        g.add_edge(b.start, b.end, key=b.index)
    by_index = {b.index: b for b in a.branches.branches}
    out: list[Cycle] = []
    for nodes in itertools.islice(nx.simple_cycles(g, length_bound=MAX_CYCLE_LENGTH), limit):
        if len(nodes) == 1:
            for k in g[nodes[0]][nodes[0]]:
                out.append(tuple(_run(by_index[k], True)))
        elif len(nodes) == 2:
            u, v = nodes
            for k1, k2 in itertools.combinations(list(g[u][v]), 2):
                b1, b2 = by_index[k1], by_index[k2]
                out.append(tuple(_run(b1, b1.start == u) + _run(b2, b2.start == v)))
        else:
            pairs = list(zip(nodes, nodes[1:] + nodes[:1]))
            for choice in itertools.islice(itertools.product(*(list(g[u][v]) for u, v in pairs)), limit):
                cycle = []
                for (u, _), k in zip(pairs, choice):
                    b = by_index[k]
                    cycle += _run(b, b.start == u)
                out.append(tuple(cycle))
        if len(out) >= limit:
            break
    return out[:limit]
