"""The solved circuit: currents, drops, powers, potentials, loops and notes.

Results are held in arrays indexed like the circuit's parts and points;
the per-name accessors of the solver contract read from them.
"""
from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import networkx as nx
import numpy as np

from .errors import UnknownPartError
from .graph import Topology, multigraph
from .loops import LoopSet

__all__ = ["Solution", "Loop", "Note"]


@dataclass(frozen=True)
class Note:
    """Something the person should know about a solved circuit.

    ``kind`` is a short key (``"open"``, ``"shorted"``, ``"reference"``,
    ``"precision"``), ``message`` plain words, ``parts`` the parts involved.
    """

    kind: str
    message: str
    parts: tuple[str, ...] = ()


@dataclass(frozen=True)
class Loop:
    """One loop of the mesh equations.

    ``parts`` are the branches around the loop in traversal order as
    ``(name, sign)``: sign +1 where the loop runs from the part's first
    terminal to its second. ``orientation`` is ``"clockwise"`` or
    ``"anticlockwise"`` as seen on screen, or None without positions.
    ``current`` is the loop (mesh) current in amperes, in the loop's direction.
    """

    index: int
    parts: tuple[tuple[str, int], ...]
    orientation: str | None
    current: float
    kind: str  # "window" or "fundamental"

    @property
    def name(self) -> str:
        return f"L{self.index + 1}"


def _new_loop(index: int, parts: tuple[tuple[str, int], ...], orientation: str | None, current: float,
              kind: str) -> Loop:
    """``Loop(...)`` without the frozen dataclass's per-field ``object.__setattr__`` calls."""
    loop = object.__new__(Loop)
    loop.__dict__.update(index=index, parts=parts, orientation=orientation, current=current, kind=kind)
    return loop


class Solution:
    """Every part's current, drop and absorbed power; every point's potential.

    Sign rule (passive convention, one rule for every part): ``current`` runs
    through the part from its first terminal to its second; ``voltage`` is
    V(first) − V(second); ``power`` = voltage × current is absorbed power, so a
    delivering cell shows negative power.
    """

    def __init__(self, topo: Topology, current: np.ndarray, voltage: np.ndarray,
                 node_potential: np.ndarray, loopset: LoopSet | None, loop_current: np.ndarray,
                 notes: list[Note], ground: str | None, references: list[str],
                 island_of_node: np.ndarray | None = None) -> None:
        self._topo = topo
        self._island_of_node = island_of_node
        self.currents = current
        self.voltages = voltage
        self.powers = voltage * current
        self.node_potentials = node_potential
        self._loopset = loopset
        self.loop_currents = loop_current
        self.notes: list[Note] = notes
        self.ground = ground
        self.references = references

    # -- the contract ---------------------------------------------------------
    @cached_property
    def _part_index(self) -> dict[str, int]:
        return {n: i for i, n in enumerate(self._topo.part_names)}

    def _pi(self, part: str) -> int:
        try:
            return self._part_index[part]
        except KeyError:
            raise UnknownPartError(f"There is no part named {part}.", []) from None

    def current(self, part: str) -> float:
        """Current in amperes through ``part`` from its first terminal to its second."""
        return float(self.currents[self._pi(part)])

    def voltage(self, part: str) -> float:
        """V(first terminal) − V(second terminal), volts."""
        return float(self.voltages[self._pi(part)])

    def power(self, part: str) -> float:
        """Power absorbed by ``part``, watts (negative when it delivers)."""
        return float(self.powers[self._pi(part)])

    def potential(self, point: str) -> float:
        """Potential of ``point`` in volts relative to ground (or its island's reference)."""
        try:
            i = self._topo.point_index[point]
        except KeyError:
            raise UnknownPartError(f"There is no point named {point}.", []) from None
        return float(self.node_potentials[self._topo.node_of_point[i]])

    @cached_property
    def loops(self) -> list[Loop]:
        """The loops used, each with its parts, orientation and loop current."""
        ls = self._loopset
        if ls is None:
            return []
        names = self._topo.part_names
        members = ls.members
        if members is None or members[0] is not names:
            entry_names = [names[i] for i in self._topo.branch_parts[ls.branch].tolist()]
            signs = ls.sign.tolist()
            bounds = np.searchsorted(ls.loop, np.arange(ls.n_loops + 1)).tolist()
            members = ls.members = (
                names,
                [tuple(zip(entry_names[lo:hi], signs[lo:hi])) for lo, hi in zip(bounds, bounds[1:])],
                ["clockwise" if cw > 0 else "anticlockwise" if cw < 0 else None for cw in ls.clockwise.tolist()])
        kind = "window" if ls.method == "windows" else "fundamental"
        make = _new_loop
        return [make(k, parts, orientation, current, kind)
                for k, (parts, orientation, current) in enumerate(zip(members[1], members[2],
                                                                      self.loop_currents.tolist()))]

    # -- more -----------------------------------------------------------------
    @property
    def loop_method(self) -> str:
        """``"windows"`` (faces of the drawing) or ``"fundamental"`` (spanning tree), or ``"none"``."""
        return self._loopset.method if self._loopset is not None else "none"

    @property
    def parts(self) -> list[str]:
        return list(self._topo.part_names)

    @property
    def points(self) -> list[str]:
        return list(self._topo.point_names)

    @cached_property
    def islands(self) -> list[list[str]]:
        """The points of each connected piece of the circuit (open switches join nothing)."""
        topo = self._topo
        if self._island_of_node is None or topo.n_points == 0:
            return [list(topo.point_names)] if topo.n_points else []
        of_point = self._island_of_node[topo.node_of_point]
        out: dict[int, list[str]] = {}
        for name, k in zip(topo.point_names, of_point.tolist()):
            out.setdefault(k, []).append(name)
        return list(out.values())

    @cached_property
    def nodes(self) -> dict[str, list[str]]:
        """Each node (named after its first point) with the points merged into it."""
        out: dict[str, list[str]] = {n: [] for n in self._topo.node_names}
        for p, i in self._topo.point_index.items():
            out[self._topo.node_names[self._topo.node_of_point[i]]].append(p)
        return out

    def node_of(self, point: str) -> str:
        """The name of the node that ``point`` belongs to."""
        return self._topo.node_names[self._topo.node_of_point[self._topo.point_index[point]]]

    @property
    def source_power(self) -> float:
        """Total power delivered by the parts that deliver power (negative absorbed power), watts.

        A source can also absorb (a cell being charged, a current source with
        the voltage against it); it then counts with the loads.
        """
        p = self.powers
        return float(-p[p < 0].sum())

    @property
    def power_balance(self) -> float:
        """Sum of absorbed power over all parts (zero by Tellegen's theorem), watts."""
        return float(self.powers.sum())

    @cached_property
    def graph(self) -> nx.MultiGraph:
        """The circuit's topology as a networkx MultiGraph (built on first use)."""
        return multigraph(self._topo)

    @property
    def warnings(self) -> list[Note]:
        """The notes, under the name the design notes give them (a warning per island, open part…)."""
        return self.notes
