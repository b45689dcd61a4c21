"""Fuzzing the solver with degenerate circuits: a solution that keeps the laws, or a plain CircuitError.

Random circuits (hypothesis) lean on what breaks solvers: ideal cells in
loops and shorted, current sources cut off or in series, parts whose ends
wires join (self-loops), every switch open, values from 1e-300 to 1e300,
isolated parts, many islands, parallel duplicates, points placed on top of
each other.  Every outcome must be either

- a Solution whose every number is finite and that satisfies, checked here
  from the reported readings and not from the solver's own checks, KCL at
  every point, KVL around every reported loop (which must close), each
  part's own law (Ohm's law V = R·I, a cell's V = E + r·I, a source's set
  current, zero drop across a conductor, zero current in an open switch),
  V = potential(first) − potential(second), and Tellegen's theorem; or
- a CircuitError with a non-empty one-line message whose ``.parts`` name
  parts of the circuit,

and never any other exception.  Laws: Kirchhoff (Ann. Phys. 64, 1845);
Ohm's law; Tellegen, Philips Res. Rep. 7 (1952): absorbed powers sum to 0.
"""
from __future__ import annotations

import math

import pytest
from hypothesis import HealthCheck, given, note, settings
from hypothesis import strategies as st

from solver import Circuit, CircuitError, solve

RTOL = 1e-9      # relative to the largest term of each equation (the brief)
NOISE = 1e-15    # ... plus rounding noise: this fraction of the island's own scale
TINY = 1e-280    # ... plus underflow: readings this small (V, A, W) are zero in double precision

_NICE = st.floats(min_value=-12, max_value=12).map(lambda e: 10.0 ** e)
_WILD = st.sampled_from([5e-324, 1e-300, 1e-100, 1e-30, 1e-15, 1e-9, 1e15, 1e18, 1e18 * (1 + 1e-15),
                         1e30, 1e300, 1.7e308])  # either side of the limits the circuit accepts
VALUES = st.one_of(_NICE, _NICE, _NICE, _WILD, st.sampled_from([1.0, 1.0, 2.0]))
KINDS = ["resistor", "resistor", "ideal_cell", "cell", "current_source", "wire", "wire",
         "closed_switch", "open_switch"]


@st.composite
def circuits(draw, max_parts: int = 14):
    """Steps that build a circuit of up to ``max_parts`` parts over up to five islands, and a ground.

    Returned as the calls to make, so that a value the circuit itself refuses
    (beyond any real part) is checked like any other refusal.
    """
    islands = [[f"n{i}_{k}" for k in range(draw(st.integers(2, 5)))] for i in range(draw(st.integers(1, 5)))]
    all_open = draw(st.booleans()) and draw(st.booleans())
    zero_sources = draw(st.booleans()) and draw(st.booleans())
    last: tuple[str, str] | None = None
    steps: list[tuple[str, tuple, dict]] = []
    for count in range(1, draw(st.integers(1, max_parts)) + 1):
        pts = draw(st.sampled_from(islands))
        if last is not None and draw(st.integers(0, 4)) == 0:
            a, b = last if draw(st.booleans()) else last[::-1]       # a parallel duplicate
        else:
            a = draw(st.sampled_from(pts))
            b = draw(st.sampled_from([p for p in pts if p != a]))
        last = (a, b)
        kind = draw(st.sampled_from(KINDS))
        source = 0.0 if zero_sources else draw(VALUES)
        if kind == "resistor":
            steps.append(("resistor", (f"R{count}", a, b, draw(VALUES)), {}))
        elif kind == "ideal_cell":
            steps.append(("cell", (f"B{count}",), {"plus": a, "minus": b, "emf": source}))
        elif kind == "cell":
            steps.append(("cell", (f"B{count}",), {"plus": a, "minus": b, "emf": source,
                                                   "internal_resistance": draw(VALUES)}))
        elif kind == "current_source":
            steps.append(("current_source", (f"I{count}", a, b, source), {}))
        elif kind == "wire":
            steps.append(("wire", (f"W{count}", a, b), {}))
        else:
            steps.append(("switch", (f"S{count}", a, b), {"closed": kind == "closed_switch" and not all_open}))
    used = list(dict.fromkeys(p for _, args, kw in steps
                              for p in (*args[1:3], kw.get("plus"), kw.get("minus")) if isinstance(p, str)))
    if draw(st.booleans()):
        grid = st.integers(0, draw(st.sampled_from([3, 12])))  # on a small grid points often share a position
        steps += [("place", (p, draw(grid), draw(grid)), {}) for p in used]
    ground = draw(st.one_of(st.none(), st.sampled_from(used)))
    return steps, ground


def describe(steps, ground) -> str:
    """A reproducer: the Python that builds and solves the circuit."""
    calls = [f"c.{method}({', '.join([*map(repr, args), *(f'{k}={v!r}' for k, v in kw.items())])})"
             for method, args, kw in steps]
    return "\n".join(["c = Circuit()", *calls, f"sol = solve(c, ground={ground!r})"])


def _find(parent: dict[str, str], x: str) -> str:
    while parent[x] != x:
        parent[x] = parent[parent[x]]
        x = parent[x]
    return x


def _groups(c: Circuit, joining) -> dict[str, str]:
    """Each point's representative when the parts ``joining(part)`` accepts join their ends (own union-find)."""
    parent = {p: p for p in c.points}
    for p in c.parts:
        if joining(p):
            parent[_find(parent, p.a)] = _find(parent, p.b)
    return {p: _find(parent, p) for p in c.points}


def _close(residual: float, scale: float, floor: float) -> bool:
    return abs(residual) <= RTOL * scale + floor + TINY


def check_solution(c: Circuit, sol) -> None:
    parts = c.parts
    cur = {p.name: sol.current(p.name) for p in parts}
    volt = {p.name: sol.voltage(p.name) for p in parts}
    pot = {pt: sol.potential(pt) for pt in c.points}
    loops = list(sol.loops)
    numbers = [*cur.values(), *volt.values(), *pot.values(), *(sol.power(p.name) for p in parts),
               *(loop.current for loop in loops)]
    assert all(math.isfinite(x) for x in numbers), "a reading is not finite"

    # the scale of each island (parts that conduct join points): rounding noise is judged against it
    island = _groups(c, lambda p: not (p.kind == "switch" and not p.closed))
    v_isl: dict[str, float] = {}
    i_isl: dict[str, float] = {}
    for p in parts:
        k = island[p.a]
        v_isl[k] = max(v_isl.get(k, 0.0), abs(volt[p.name]), p.emf, abs(pot[p.a]), abs(pot[p.b]))
        i_isl[k] = max(i_isl.get(k, 0.0), abs(cur[p.name]), p.current)
    # the sources' own scale: a current's rounding error, carried through the largest resistance
    # of its island, shows as a drop; EMFs plus set currents times resistances bound it (as in
    # tests/test_solver_reference.py natural_scales)
    for k in v_isl:
        members = [p for p in parts if island[p.a] == k]
        ohms = math.fsum(p.resistance for p in members)
        amps = math.fsum(p.current for p in members)
        emf = math.fsum(p.emf for p in members)
        v_isl[k] = max(v_isl[k], emf + amps * ohms)
        # likewise a current's scale: set currents plus what the EMFs drive through the smallest
        # resistance (a cell of 1000 V behind 1e18 ohm drives 1e-15 A: noise far below it is zero)
        least = min((p.resistance for p in members if p.resistance > 0), default=0.0)
        i_isl[k] = max(i_isl[k], amps + (emf / least if least else 0.0))

    def v_floor(point: str) -> float:
        return NOISE * v_isl.get(island[point], 0.0)

    def i_floor(point: str) -> float:
        return NOISE * i_isl.get(island[point], 0.0)

    for p in parts:
        i, v = cur[p.name], volt[p.name]
        assert _close(v - (pot[p.a] - pot[p.b]), max(abs(v), abs(pot[p.a]), abs(pot[p.b])), v_floor(p.a)), \
            f"{p.name}: drop {v} is not the difference of its potentials {pot[p.a]} - {pot[p.b]}"
        if p.kind == "resistor":
            assert _close(v - p.resistance * i, max(abs(v), abs(p.resistance * i)), v_floor(p.a)), \
                f"{p.name}: Ohm's law fails, V={v} R={p.resistance} I={i}"
        elif p.kind == "cell":
            drop = p.resistance * i
            assert _close(v - (p.emf + drop), max(abs(v), p.emf, abs(drop)), v_floor(p.a)), \
                f"{p.name}: V={v} is not E + r·I (E={p.emf}, r={p.resistance}, I={i})"
        elif p.kind == "current_source":
            assert _close(i - p.current, p.current, i_floor(p.a)), f"{p.name} drives {i}, not {p.current}"
        elif p.kind == "switch" and not p.closed:
            assert i == 0.0, f"open switch {p.name} carries {i}"
        else:
            assert _close(v, abs(pot[p.a]), v_floor(p.a)), f"conductor {p.name} drops {v}"

    terms: dict[str, list[float]] = {pt: [] for pt in c.points}
    for p in parts:
        terms[p.a].append(cur[p.name])     # leaves at the first terminal
        terms[p.b].append(-cur[p.name])    # arrives at the second
    for pt, t in terms.items():
        assert _close(math.fsum(t), max(map(abs, t)), i_floor(pt)), f"KCL fails at {pt}: {t}"

    node = _groups(c, lambda p: p.kind == "wire" or (p.kind == "switch" and p.closed))
    by_name = {p.name: p for p in parts}
    for loop in loops:
        assert loop.parts, f"{loop.name} has no parts"
        balance: dict[str, int] = {}
        for name, sign in loop.parts:
            assert name in by_name and sign in (1, -1), f"{loop.name}: ({name!r}, {sign!r})"
            p = by_name[name]
            start, end = (p.a, p.b) if sign > 0 else (p.b, p.a)
            balance[node[start]] = balance.get(node[start], 0) + 1
            balance[node[end]] = balance.get(node[end], 0) - 1
        assert not any(balance.values()), f"{loop.name} does not close: {loop.parts}"
        drops = [sign * volt[name] for name, sign in loop.parts]
        size = max(max(abs(volt[n]), by_name[n].emf, abs(cur[n]) * by_name[n].resistance) for n, _ in loop.parts)
        first = by_name[loop.parts[0][0]].a
        assert _close(math.fsum(drops), size, v_floor(first)), f"KVL fails around {loop.name}: {drops}"

    absorbed = [sol.power(p.name) for p in parts]
    size = math.fsum(abs(volt[p.name] * cur[p.name]) + p.emf * abs(cur[p.name]) for p in parts)
    floor = NOISE * max((v_isl[k] * i_isl[k] for k in v_isl), default=0.0) * len(parts)
    assert _close(math.fsum(absorbed), size, floor), f"Tellegen: absorbed powers sum to {math.fsum(absorbed)}"


def check_refusal(names: set[str], err: CircuitError) -> None:
    message = str(err)
    assert message.strip() and "\n" not in message, f"message {message!r}"
    assert err.parts, f"{type(err).__name__} names no parts: {message}"
    assert set(err.parts) <= names, f"{type(err).__name__} names unknown parts {err.parts}"


def run(steps, ground) -> None:
    note(describe(steps, ground))
    c = Circuit()
    try:
        for method, args, kw in steps:
            getattr(c, method)(*args, **kw)
    except CircuitError as err:  # a value no real part has, refused as it is added
        check_refusal({args[0]}, err)
        return
    try:
        sol = solve(c, ground=ground)
    except CircuitError as err:
        check_refusal({p.name for p in c.parts}, err)
        return
    check_solution(c, sol)


def test_potentials_are_not_walked_through_rounding_noise():
    c = Circuit()
    c.current_source("I1", "a", "b", 1.0)
    c.resistor("R2", "b", "a", 100.0)
    c.cell("B3", plus="a", minus="n3", emf=1.0)
    c.resistor("R4", "n3", "b", 1e7)
    c.cell("B5", plus="a", minus="b", emf=1.0)
    sol = solve(c)
    # B5 is ideal: V(a) - V(b) = 1 V exactly; B3 and B5 balance, so R4 carries nothing (KVL)
    assert abs(sol.potential("a") - sol.potential("b") - 1.0) <= 1e-12
    assert abs(sol.voltage("R4")) <= 1e-12


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(circuits())
def test_degenerate_circuits_are_solved_or_refused_plainly(case):
    run(*case)


@pytest.mark.slow
@settings(max_examples=5000, deadline=None, suppress_health_check=list(HealthCheck))
@given(circuits(max_parts=30))
def test_many_degenerate_circuits(case):
    run(*case)
