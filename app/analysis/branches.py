"""Branches as a person sees them: chains of parts in series between junctions.

After wires are merged into nodes, a *junction* is a node where three or more
branch ends meet. A branch is a maximal chain of parts joined end to end
through nodes that are not junctions; every part on it carries the same
current. Each branch has one current name: a person's :class:`CurrentTag`
(name and direction) or an automatic name ``I1``, ``I2``, … that clashes with
no tag, part or other name in use.
"""
from __future__ import annotations

import keyword
import re
from collections import defaultdict
from dataclasses import dataclass
from functools import cached_property

from solver import Circuit, Solution

__all__ = ["CurrentTag", "Branch", "BranchSet", "TagError", "find_branches", "is_reserved_name", "node_labels"]

_RESERVED = re.compile(r"(V_|r_).*|IL\d+|V")


class TagError(ValueError):
    """A current tag that cannot be used; ``message`` in plain words, ``parts`` the parts involved."""

    def __init__(self, message: str, parts: tuple[str, ...] = ()) -> None:
        super().__init__(message)
        self.message = message
        self.parts = parts


@dataclass(frozen=True)
class CurrentTag:
    """A named, directed current on a part, as a person labels currents on paper.

    ``forward`` means the current is counted from the part's first terminal to
    its second (for a cell: from + to − inside the cell). The tag names the
    current of the whole branch the part is on.
    """

    name: str
    part: str
    forward: bool = True


@dataclass(frozen=True)
class Branch:
    """One branch: parts in series from node ``start`` to node ``end``.

    ``parts`` lists ``(part, sense)`` in order from ``start``: sense +1 where
    the branch direction runs from the part's first terminal to its second.
    ``nodes`` are the nodes passed, ``start`` first and ``end`` last (equal
    for a branch that closes on itself). ``current`` is its current name,
    counted from ``start`` to ``end``; ``tagged`` says whether a person chose
    it. ``value`` is the solved current in amperes in that direction.
    """

    index: int
    parts: tuple[tuple[str, int], ...]
    nodes: tuple[str, ...]
    current: str
    tagged: bool
    value: float

    @property
    def start(self) -> str:
        return self.nodes[0]

    @property
    def end(self) -> str:
        return self.nodes[-1]

    @cached_property
    def part_names(self) -> tuple[str, ...]:
        return tuple(p for p, _ in self.parts)

    @property
    def closed_on_itself(self) -> bool:
        return self.nodes[0] == self.nodes[-1]

    @cached_property
    def _senses(self) -> dict[str, int]:
        # A part is on its branch once; built once, as the branch is immutable.
        return dict(self.parts)

    def sense(self, part: str) -> int:
        """+1 if ``part``'s first-to-second terminal runs along the branch direction, else −1."""
        return self._senses[part]


@dataclass(frozen=True)
class BranchSet:
    """All branches of a solved circuit, with junctions and readable node labels.

    ``node_label`` maps each node that touches a branch to ``n1``, ``n2``, …
    in the solver's node order; ``junctions`` are the nodes where three or
    more branch ends meet, in that order.

    The look-ups below go through indexes built on first use, so that writing
    every equation of a large circuit stays linear in its size.
    """

    branches: tuple[Branch, ...]
    junctions: tuple[str, ...]
    node_label: dict[str, str]

    @cached_property
    def _by_part(self) -> dict[str, Branch]:
        return {p: b for b in reversed(self.branches) for p in b.part_names}   # the first branch wins

    @cached_property
    def _by_current(self) -> dict[str, Branch]:
        return {b.current: b for b in reversed(self.branches)}

    @cached_property
    def _ends(self) -> dict[str, list[tuple[Branch, int]]]:
        out: dict[str, list[tuple[Branch, int]]] = defaultdict(list)
        for b in self.branches:
            if not b.closed_on_itself:
                out[b.end].append((b, 1))
                out[b.start].append((b, -1))
        return out

    @cached_property
    def junction_set(self) -> frozenset[str]:
        """The junctions, for membership tests."""
        return frozenset(self.junctions)

    @cached_property
    def any_tagged(self) -> bool:
        """Whether a person tagged any branch."""
        return any(b.tagged for b in self.branches)

    def of_part(self, part: str) -> Branch:
        """The branch that ``part`` is on."""
        try:
            return self._by_part[part]
        except KeyError:
            raise KeyError(part) from None

    def named(self, current: str) -> Branch:
        """The branch whose current is called ``current``."""
        try:
            return self._by_current[current]
        except KeyError:
            raise KeyError(current) from None

    def at(self, node: str) -> list[tuple[Branch, int]]:
        """Branches ending at ``node`` with +1 where the current enters it, −1 where it leaves.

        A branch that closes on itself at ``node`` enters and leaves, so it is left out.
        """
        return list(self._ends.get(node, ()))

    def label(self, node: str) -> str:
        return self.node_label.get(node, node)


def is_reserved_name(name: str) -> bool:
    """True for names kept for the equations: ``V_…`` (source voltages), ``r_…`` (internal
    resistances), ``IL1``… (loop currents) and ``V``."""
    return bool(_RESERVED.fullmatch(name))


def _check_name(tag: CurrentTag, circuit: Circuit) -> None:
    name = tag.name
    if not isinstance(name, str) or not name.isidentifier() or not name.isascii() or keyword.iskeyword(name):
        raise TagError(f"'{name}' cannot be a current name: use letters, digits and _, starting with a "
                       "letter, for example Ia or I_load.", (tag.part,))
    if name in circuit:
        raise TagError(f"'{name}' is already the name of a part; give the current another name, such as I{name}.",
                       (tag.part, name))
    if is_reserved_name(name):
        raise TagError(f"'{name}' is kept for the equations (V_… source voltages, r_… internal resistances, "
                       "IL1… loop currents); choose another current name.", (tag.part,))


def _walks(sol: Solution) -> list[tuple[list[tuple[str, int]], list[str]]]:
    """Chains of the branch graph between nodes of degree other than two.

    Each is ``(parts with sense along the walk, nodes passed)``.
    """
    g = sol.graph
    inc: dict[str, list[tuple[str, str, int]]] = defaultdict(list)   # node -> (part, other node, sense)
    for u, v, key, data in g.edges(keys=True, data=True):
        a, b = data["terminals"]
        inc[a].append((key, b, 1))
        if a != b:
            inc[b].append((key, a, -1))
    degree = {n: sum(2 if o == n else 1 for _, o, _ in inc[n]) for n in inc}
    seen: set[str] = set()
    walks = []
    order = list(sol.nodes)
    ends = [n for n in order if n in inc and degree[n] != 2]
    for n in ends:
        for part, other, sense in inc[n]:
            if part in seen:
                continue
            parts, nodes = [(part, sense)], [n, other]
            seen.add(part)
            while degree[nodes[-1]] == 2 and nodes[-1] != n:
                here = nodes[-1]
                nxt = [(p, o, s) for p, o, s in inc[here] if p not in seen]
                if not nxt:
                    break
                p, o, s = nxt[0]
                seen.add(p)
                parts.append((p, s))
                nodes.append(o)
            walks.append((parts, nodes))
    # Rings with no junction at all (a single loop): start at a cell's minus terminal if any.
    circuit_order = {p: i for i, p in enumerate(sol.parts)}
    for n in order:
        for part, other, sense in list(inc.get(n, ())):
            if part in seen:
                continue
            parts, nodes = [(part, sense)], [n, other]
            seen.add(part)
            while nodes[-1] != n:
                here = nodes[-1]
                p, o, s = next((p, o, s) for p, o, s in inc[here] if p not in seen)
                seen.add(p)
                parts.append((p, s))
                nodes.append(o)
            walks.append((parts, nodes))
    walks.sort(key=lambda w: min(circuit_order[p] for p, _ in w[0]))
    return walks


def node_labels(sol: Solution) -> dict[str, str]:
    """``n1``, ``n2``, … for the nodes that touch a branch, in the solver's node order.

    The one numbering of nodes that equations, the checker and ``loopwright solve`` share.
    """
    g = sol.graph
    return {n: f"n{k + 1}" for k, n in enumerate(n for n in sol.nodes if g.degree(n) > 0)}


def find_branches(sol: Solution, circuit: Circuit, tags: tuple[CurrentTag, ...] | list[CurrentTag] = ()
                  ) -> BranchSet:
    """The branches of ``sol`` with their current names and directions.

    A tagged branch is directed and named by its tag. An untagged branch runs
    the way its solved current flows (so its reading comes out positive), or
    from its first part's first terminal when it carries no current. Raises
    :class:`TagError` for a tag with a bad name, on an unknown part, on a part
    that is no branch, two tags on one branch, or one name on two branches.
    """
    walks = _walks(sol)
    where: dict[str, int] = {p: i for i, (parts, _) in enumerate(walks) for p, _ in parts}
    chosen: dict[int, CurrentTag] = {}
    for tag in dict.fromkeys(tags):
        if tag.part not in circuit or tag.part.startswith("~"):
            raise TagError(f"The current {tag.name} is tagged on {tag.part}, which is not a part of this circuit.",
                           ())
        _check_name(tag, circuit)
        if tag.part not in where:
            raise TagError(f"{tag.part} is not on any branch (a wire, or an open switch), so it cannot carry "
                           f"the current {tag.name}; tag a resistor, cell or source instead.", (tag.part,))
        w = where[tag.part]
        if w in chosen:
            other = chosen[w]
            raise TagError(f"{other.name} and {tag.name} are both on the branch through "
                           f"{', '.join(p for p, _ in walks[w][0])}; a branch carries one current, so keep one tag.",
                           (other.part, tag.part))
        for k, t in chosen.items():
            if t.name == tag.name:
                raise TagError(f"The name {tag.name} is on two different branches ({t.part} and {tag.part}); "
                               "give each branch its own current name.", (t.part, tag.part))
        chosen[w] = tag

    used = {t.name for t in chosen.values()} | {p.name for p in circuit.parts}
    counter = 0
    branches = []
    for i, (parts, nodes) in enumerate(walks):
        tag = chosen.get(i)
        if tag is not None:
            ref, ref_sense = next((p, s) for p, s in parts if p == tag.part)
            flip = ref_sense != (1 if tag.forward else -1)
        else:
            ref, ref_sense = parts[0]
            i_ref = sol.current(ref) * ref_sense
            flip = i_ref < 0 and abs(i_ref) > 1e-15 * max(abs(sol.current(ref)), 1e-300)
        if flip:
            parts = [(p, -s) for p, s in reversed(parts)]
            nodes = list(reversed(nodes))
        if tag is not None:
            name = tag.name
        else:
            counter += 1
            while f"I{counter}" in used:
                counter += 1
            name = f"I{counter}"
        p0, s0 = parts[0]
        branches.append(Branch(i, tuple(parts), tuple(nodes), name, tag is not None, s0 * sol.current(p0)))

    label = node_labels(sol)
    touching = list(label)
    ends: dict[str, int] = defaultdict(int)
    for b in branches:
        ends[b.start] += 1
        ends[b.end] += 1
    junctions = tuple(n for n in touching if ends[n] >= 3)
    return BranchSet(tuple(branches), junctions, label)

