"""Topology checks made before the equations: circuits that have no unique solution.

Each check raises a :class:`CircuitError` subclass whose message says, in
plain words, what is wrong and what to do, and whose ``.parts`` name the
parts involved.
"""
from __future__ import annotations

import networkx as nx
import numpy as np

from .errors import CurrentSourceCutError, IdealCellLoopError, ShortedCellError
from .graph import Topology, components

__all__ = ["check_ideal_cells", "check_current_sources"]


_PREFIXES = ((1e12, "T"), (1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ"),
             (1e-9, "n"), (1e-12, "p"))


def _fmt(x: float, unit: str) -> str:
    """A value in engineering notation with an SI prefix, 3 significant figures (10 mA, 2.50 kV)."""
    if x == 0:
        return f"0 {unit}"
    for scale, prefix in _PREFIXES:
        if abs(x) >= scale * 0.9995:
            return f"{x / scale:.3g} {prefix}{unit}"
    return f"{x:.3g} {unit}"


def _names(names: list[str]) -> str:
    """Part names joined for a sentence; names starting with '~' (internal wire pieces) are left out."""
    names = [n for n in names if not n.startswith("~")]
    if not names:
        return ""
    if len(names) == 1:
        return names[0]
    return ", ".join(names[:-1]) + " and " + names[-1]


def _conductor_path(topo: Topology, pa: int, pb: int) -> list[str]:
    """Names of the wires/closed switches on a path between points ``pa`` and ``pb``."""
    g = nx.Graph()
    for ci in topo.conductor_parts:
        g.add_edge(int(topo.part_a[ci]), int(topo.part_b[ci]), part=topo.part_names[ci])
    try:
        path = nx.shortest_path(g, pa, pb)
    except (nx.NetworkXNoPath, nx.NodeNotFound):
        return []
    return [g.edges[x, y]["part"] for x, y in zip(path, path[1:])]


def check_ideal_cells(topo: Topology) -> None:
    """Refuse ideal cells that are shorted, or that form a loop with other ideal cells.

    With no resistance in the loop, KVL either cannot hold (EMFs that do not
    balance: unbounded current) or leaves the current undefined.
    """
    ideal = np.flatnonzero(~topo.br_cs & (topo.br_r == 0.0))  # resistors always have R > 0
    if len(ideal) == 0:
        return
    u, v = topo.br_u[ideal], topo.br_v[ideal]
    for k in ideal[u == v]:
        pi = topo.branch_parts[k]
        name = topo.part_names[pi]
        path = _conductor_path(topo, int(topo.part_a[pi]), int(topo.part_b[pi]))
        shown = _names(path)
        via = f" by {shown}" if shown else (" by a wire" if len(path) == 1 else " by wires" if path else "")
        raise ShortedCellError(
            f"{name} is shorted{via}: with no internal resistance the current would be "
            f"unbounded. Remove the short, or give {name} an internal resistance.",
            [name, *path],
        )
    # A cycle among ideal cells: more edges than a forest can hold.
    nodes, inv = np.unique(np.concatenate([u, v]), return_inverse=True)
    n = len(nodes)
    k = len(components(n, inv[: len(ideal)], inv[len(ideal):])[1])
    if len(ideal) <= n - k:
        return
    g = nx.MultiGraph()
    for k_ in ideal:
        g.add_edge(int(topo.br_u[k_]), int(topo.br_v[k_]), key=int(k_))
    cycle = nx.find_cycle(g)
    names, emf = [], 0.0
    for x, y, key in cycle:
        pi = topo.branch_parts[key]
        names.append(topo.part_names[pi])
        # traversing x -> y; the EMF raises potential from minus (v) to plus (u)
        sign = 1.0 if (topo.br_u[key] == y) else -1.0
        emf += sign * topo.br_e[key]
    scale = max(abs(topo.br_e[key]) for _, _, key in cycle) or 1.0
    if abs(emf) > 1e-12 * scale:
        raise IdealCellLoopError(
            f"{_names(names)} form a loop of ideal cells whose EMFs do not balance "
            f"(net {_fmt(abs(emf), 'V')} around the loop): the current would be unbounded. "
            "Give the cells internal resistance, or remove one.",
            names,
        )
    raise IdealCellLoopError(
        f"{_names(names)} are ideal cells in parallel: how the current shares between "
        "them is undefined. Give each cell its internal resistance.",
        names,
    )


def check_current_sources(topo: Topology) -> None:
    """Refuse current sources that form a cut: no return path, or series sources that conflict.

    Merge every node joined by a branch other than a current source; a current
    source between two such groups is part of a cut made only of current
    sources. KCL on a group then fixes the sum of the source currents
    (it must be zero), and the voltage across the cut is undefined.
    """
    cs = np.flatnonzero(topo.br_cs)
    if len(cs) == 0:
        return
    other = np.flatnonzero(~topo.br_cs)
    group, _ = components(topo.n_nodes, topo.br_u[other], topo.br_v[other])
    gu, gv = group[topo.br_u[cs]], group[topo.br_v[cs]]
    cut = gu != gv
    if not cut.any():
        return
    j = topo.br_j[cs]
    net = np.zeros(group.max() + 1)
    np.add.at(net, gu[cut], -j[cut])   # current leaves the group at the source's first terminal
    np.add.at(net, gv[cut], j[cut])
    scale = np.zeros_like(net)
    np.add.at(scale, gu[cut], np.abs(j[cut]))
    np.add.at(scale, gv[cut], np.abs(j[cut]))
    bad = np.flatnonzero(np.abs(net) > 1e-12 * np.maximum(scale, 1e-300))
    # Report the group with the fewest sources first: the clearest message.
    groups = bad if len(bad) else np.unique(np.concatenate([gu[cut], gv[cut]]))
    members = {int(g): [int(k) for k, a, b in zip(cs[cut], gu[cut], gv[cut]) if g in (a, b)] for g in groups}
    size = np.bincount(group)
    g0 = min(members, key=lambda g: (len(members[g]), size[g], g))  # a bare junction reads best
    ks = members[g0]
    names = [topo.part_names[topo.branch_parts[k]] for k in ks]
    if len(ks) == 1:
        raise CurrentSourceCutError(
            f"{names[0]} has no return path: its current has nowhere to flow. "
            "Close the loop through the rest of the circuit, or remove it.",
            names,
        )
    if len(bad):
        # each source's current as it arrives at the junction between them (+ in, - out)
        arriving = [topo.br_j[k] if group[topo.br_v[k]] == g0 else -topo.br_j[k] for k in ks]
        currents = " and ".join(_fmt(abs(topo.br_j[k]), "A") for k in ks)
        if len(ks) == 2 and arriving[0] == arriving[1]:
            what = (f"drive their currents ({currents}) against each other: both push into the junction "
                    "between them" if arriving[0] > 0 else
                    f"drive their currents ({currents}) against each other: both pull out of the junction "
                    "between them")
        else:
            what = f"do not agree on the current ({currents}): no current can satisfy them all"
        raise CurrentSourceCutError(
            f"{_names(names)} are current sources in series with nothing else at the junction between "
            f"them, and they {what}. Make them agree, or put a resistor across one of them.",
            names,
        )
    raise CurrentSourceCutError(
        f"{_names(names)} are current sources in series with nothing across them, so the "
        "voltage across each one is undefined. Put a resistor across one of them.",
        names,
    )
