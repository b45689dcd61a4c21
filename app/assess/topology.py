"""How parts sit against each other: nodes, and series or parallel placement.

Used to spot the two classic bench mistakes, a voltmeter in series and an
ammeter across a part, from the circuit's connections alone.
"""
from __future__ import annotations

import networkx as nx

from solver import Circuit, Part
from solver.circuit import CELL, CURRENT_SOURCE

__all__ = ["node_map", "series_partners", "parallel_parts", "is_source"]


def is_source(part: Part) -> bool:
    """True for a cell or a current source."""
    return part.kind in (CELL, CURRENT_SOURCE)


def node_map(circuit: Circuit, skip: str | None = None) -> dict[str, int]:
    """Each point's node number, points joined by conductors (wires, closed switches) sharing one.

    ``skip`` names a conductor left out, to see what its ends would be without it.
    """
    g = nx.Graph()
    g.add_nodes_from(circuit.points)
    g.add_edges_from((p.a, p.b) for p in circuit.parts if p.is_conductor and p.name != skip)
    return {point: k for k, comp in enumerate(nx.connected_components(g)) for point in comp}


def _branch_graph(circuit: Circuit, nodes: dict[str, int], leave_out: str) -> nx.MultiGraph:
    g = nx.MultiGraph()
    g.add_nodes_from(set(nodes.values()))
    for p in circuit.parts:
        if p.is_branch and p.name != leave_out:
            g.add_edge(nodes[p.a], nodes[p.b], key=p.name)
    return g


def series_partners(circuit: Circuit, name: str) -> list[str]:
    """The parts in series with part ``name``: every loop through it runs through them too.

    Empty when the part sits directly across another part (their loop has only
    the two of them, as a voltmeter across a cell) or is in no loop at all.
    Method: without the part, its partners are the bridges on any path
    between its two nodes (a bridge on one path separates the ends, so it is
    on every path).
    """
    part = circuit.part(name)
    nodes = node_map(circuit)
    u, v = nodes[part.a], nodes[part.b]
    if u == v:
        return []
    g = _branch_graph(circuit, nodes, name)
    try:
        path = nx.shortest_path(g, u, v)
    except nx.NetworkXNoPath:
        return []
    if len(path) == 2:
        return []  # directly across a part
    bridges = {frozenset(e) for e in nx.bridges(g)}
    out = []
    for x, y in zip(path, path[1:]):
        if frozenset((x, y)) in bridges:
            out.extend(g[x][y])  # a bridge is a single edge: its one part
    return out


def parallel_parts(circuit: Circuit, name: str) -> tuple[bool, list[str]]:
    """Whether part ``name`` is shorted by conductors, and the parts connected directly across it.

    Its own ends are found without it, so a zero-ohm meter is seen for what
    it bridges.
    """
    part = circuit.part(name)
    nodes = node_map(circuit, skip=name)
    ends = {nodes[part.a], nodes[part.b]}
    if len(ends) == 1:
        return True, []
    across = [p.name for p in circuit.parts
              if p.name != name and p.is_branch and {nodes[p.a], nodes[p.b]} == ends]
    return False, across
