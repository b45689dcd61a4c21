"""What every equation and check of one solved circuit shares: names, values, and the loop space.

Names an equation may use: a resistor's name (its resistance), a cell's name
(its EMF), ``r_B1`` (cell B1's internal resistance), branch current names
(tags and automatic ones), a current source's name (its set current, which is
also the current of its branch), ``V_I1`` (the unknown voltage across source
I1, V(first terminal) − V(second)) and ``IL1``, ``IL2``… (loop currents of
the solver's loops L1, L2…).

Two equations of currents can differ and still say the same thing because
KCL ties the branch currents together. To compare them, every current is
written in the loop currents (Maxwell's loop-current method: each branch
current is the signed sum of the loop currents through it; Desoer & Kuh,
*Basic Circuit Theory*, 1969, ch. 10), and the loop currents fixed by current
sources are eliminated, leaving independent coordinates.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Iterable

import numpy as np

from solver import Circuit, Solution

from .branches import BranchSet, CurrentTag, find_branches
from .terms import Linear

__all__ = ["Analysis", "analyse", "VALUE_KINDS", "UNKNOWN_KINDS"]

VALUE_KINDS = ("resistance", "emf", "internal resistance")
UNKNOWN_KINDS = ("current", "source current", "loop current", "source voltage")
_UNITS = {"resistance": "Ω", "internal resistance": "Ω", "emf": "V", "current": "A", "source current": "A",
          "loop current": "A", "source voltage": "V"}


@dataclass
class Analysis:
    """A solved circuit read the way a person writes its equations.

    ``kind[name]`` is one of :data:`VALUE_KINDS` or :data:`UNKNOWN_KINDS`;
    ``value[name]`` its number (solved, for unknowns); ``unit[name]`` its unit;
    ``part_of[name]`` the part it belongs to; ``loop_current[k]`` the name of
    loop ``k``'s current.

    :func:`analyse` fills it in and it is not changed after that, so what is
    derived from it (units, scales, the elimination, and the tables the
    equations and the checker look things up in) is worked out on first use
    and kept in ``_cache``, which keeps every step linear in the circuit's size.
    """

    solution: Solution
    circuit: Circuit
    branches: BranchSet
    kind: dict[str, str] = field(default_factory=dict)
    value: dict[str, float] = field(default_factory=dict)
    part_of: dict[str, str] = field(default_factory=dict)
    loop_current: list[str] = field(default_factory=list)
    _cache: dict = field(default_factory=dict, repr=False)

    def _kept(self, key: str, make):
        """``make()``, worked out on first use and kept in ``_cache``."""
        if key not in self._cache:
            self._cache[key] = make()
        return self._cache[key]

    @property
    def unit(self) -> dict[str, str]:
        """Each name's unit (worked out once and shared: read it, do not change it)."""
        return self._kept("units", lambda: {n: _UNITS[k] for n, k in self.kind.items()})

    # -- scales for comparing numbers -----------------------------------------
    @property
    def ohm_scale(self) -> float:
        """The largest resistance in the circuit (1 Ω if none)."""
        return self._kept("ohm scale", lambda: max(
            (v for n, v in self.value.items() if self.kind[n] in ("resistance", "internal resistance")),
            default=0.0) or 1.0)

    @property
    def volt_scale(self) -> float:
        """A natural voltage of the circuit: its EMFs plus source currents through all its resistance."""
        def make() -> float:
            emf = sum(abs(v) for n, v in self.value.items() if self.kind[n] == "emf")
            amps = sum(abs(v) for n, v in self.value.items() if self.kind[n] == "source current")
            ohms = sum(v for n, v in self.value.items() if self.kind[n] in ("resistance", "internal resistance"))
            return (emf + amps * ohms) or 1.0
        return self._kept("volt scale", make)

    @property
    def amp_scale(self) -> float:
        """A natural current of the circuit."""
        return self._kept("amp scale",
                          lambda: max((abs(b.value) for b in self.branches.branches), default=0.0) or 1.0)

    # -- the loop space ---------------------------------------------------------
    def _column(self, part: str) -> np.ndarray:
        """Loop-branch incidence of ``part``: +1 for each loop running through it first to second terminal."""
        cols = self._cache.get("columns")
        if cols is None:
            cols = {}
            for loop in self.solution.loops:
                for p, s in loop.parts:
                    cols.setdefault(p, np.zeros(len(self.solution.loops)))[loop.index] += s
            self._cache["columns"] = cols
        return cols.get(part, np.zeros(len(self.solution.loops))).copy()

    def _sources(self) -> list[str]:
        """The current sources, in the order of their names in ``kind``."""
        return self._kept("sources", lambda: [n for n, k in self.kind.items() if k == "source current"])

    def _positions(self) -> tuple[dict[str, int], dict[str, int]]:
        """Where each loop current and each current source sits in its coordinate vector."""
        return self._kept("positions", lambda: ({n: i for i, n in enumerate(self.loop_current)},
                                                {s: i for i, s in enumerate(self._sources())}))

    def loop_vector(self, unknown: str) -> tuple[np.ndarray, np.ndarray]:
        """``unknown`` as (coefficients over the loop currents, over the source voltages)."""
        n_loops = len(self.solution.loops)
        sources = self._sources()
        j, w = np.zeros(n_loops), np.zeros(len(sources))
        kind = self.kind[unknown]
        if kind == "loop current":
            j[self._positions()[0][unknown]] = 1.0
        elif kind == "source voltage":
            w[self._positions()[1][self.part_of[unknown]]] = 1.0
        elif kind == "source current":
            j = self._column(unknown)
        else:
            p, s = self.branches.named(unknown).parts[0]
            j = s * self._column(p)
        return j, w

    def _elimination(self) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """Pivot loops, free loops, M and c0 with j[pivot] = c0 − M·j[free] from the source rows."""
        return self._kept("elimination", self._eliminate)

    def _eliminate(self) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        n_loops = len(self.solution.loops)
        sources = self._sources()
        rows = np.array([self._column(s) for s in sources]).reshape(len(sources), n_loops)
        rhs = np.array([self.value[s] for s in sources], dtype=float)
        a = np.hstack([rows, rhs[:, None]])
        pivots: list[int] = []
        r = 0
        for c in range(n_loops):
            if r == len(a):
                break
            k = r + int(np.argmax(np.abs(a[r:, c])))
            if abs(a[k, c]) < 1e-9:
                continue
            a[[r, k]] = a[[k, r]]
            a[r] /= a[r, c]
            for i in range(len(a)):
                if i != r:
                    a[i] -= a[i, c] * a[r]
            pivots.append(c)
            r += 1
        free = [c for c in range(n_loops) if c not in pivots]
        piv = np.array(pivots, dtype=int)
        fr = np.array(free, dtype=int)
        return piv, fr, a[:len(pivots)][:, fr], a[:len(pivots), -1]

    def reduce(self, form: Linear) -> tuple[np.ndarray, np.ndarray, float]:
        """A KVL-type form with numbers in place of values, in independent coordinates.

        Returns (coefficients over the free loop currents, in ohms; over the
        source voltages; the constant, in volts), with every current written
        through the loop currents and the source currents fixed.
        """
        n_loops = len(self.solution.loops)
        j, w = np.zeros(n_loops), np.zeros(len(self._sources()))
        const = 0.0
        for (u, factors), c in form.items():
            c = c * float(np.prod([self.value[f] for f in factors])) if factors else c
            if u is None:
                const += c
            else:
                dj, dw = self.loop_vector(u)
                j += c * dj
                w += c * dw
        piv, fr, m, c0 = self._elimination()
        if len(piv):
            return j[fr] - m.T @ j[piv], w, const + float(j[piv] @ c0)
        return j, w, const

    def branch_coordinates(self, form: Linear) -> tuple[np.ndarray, float]:
        """A KCL-type form over the branches without a current source, plus the constant in amperes.

        The current of a branch with a current source is fixed, so it counts as a constant.
        """
        branches = self.branches.branches
        vec = np.zeros(len(branches))
        const = 0.0
        for (u, factors), c in form.items():
            c = c * float(np.prod([self.value[f] for f in factors])) if factors else c
            if u is None:
                const += c
                continue
            if self.kind[u] == "source current":
                const += c * self.value[u]
                continue
            b = self.branches.named(u)
            if any(self.kind.get(p) == "source current" for p in b.part_names):
                const += c * b.value
            else:
                vec[b.index] += c
        return vec, const


def analyse(sol: Solution, circuit: Circuit, tags: Iterable[CurrentTag] = ()) -> Analysis:
    """Branches, names and values of a solved circuit (raises :class:`TagError` for a bad tag)."""
    branches = find_branches(sol, circuit, tuple(tags))
    a = Analysis(sol, circuit, branches)

    def add(name: str, kind: str, value: float, part: str) -> None:
        a.kind[name] = kind
        a.value[name] = float(value)
        a.part_of[name] = part

    for b in branches.branches:
        for p in b.part_names:
            part = circuit.part(p)
            if part.kind == "resistor":
                add(p, "resistance", part.resistance, p)
            elif part.kind == "cell":
                add(p, "emf", part.emf, p)
                add(f"r_{p}", "internal resistance", part.resistance, p)
            elif part.kind == "current_source":
                add(p, "source current", part.current, p)
                add(f"V_{p}", "source voltage", sol.voltage(p), p)
        add(b.current, "current", b.value, b.parts[0][0])
    for loop in sol.loops:
        name = f"IL{loop.index + 1}"
        a.loop_current.append(name)
        add(name, "loop current", loop.current, loop.parts[0][0] if loop.parts else "")
    return a
