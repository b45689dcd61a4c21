"""Why a current source has no return path: the open switches, blown fuses or ideal voltmeters in the way.

The solver says that a current source's current has nowhere to flow; on a
drawing the cause is often a switch left open. This names the open parts
whose closing would give the source a path, in the words of their kinds.
"""
from __future__ import annotations

import networkx as nx

from solver import Circuit, CircuitError, CurrentSourceCutError
from solver.circuit import CURRENT_SOURCE, SWITCH

__all__ = ["opens_in_the_way", "return_path_hint", "explained"]


def opens_in_the_way(circuit: Circuit, source: str) -> list[str]:
    """The open switches (in the circuit's terms: also blown fuses and ideal voltmeters) that,
    all closed, would join the ends of current source ``source`` through the rest of the circuit.

    The points joined by every part but current sources and open switches fall into groups;
    the open switches join groups. The ones on a shortest chain of them from one end's group to
    the other's are returned (none when no chain of open switches would do).

    Example
    -------
    >>> c = Circuit()
    >>> c.current_source("I1", "a", "g", 0.01)
    >>> c.switch("S1", "a", "b", closed=False)
    >>> c.resistor("R1", "b", "g", 100.0)
    >>> opens_in_the_way(c, "I1")
    ['S1']
    """
    parts = {p.name: p for p in circuit.parts}
    src = parts[source]
    joined = nx.Graph()
    joined.add_nodes_from(circuit.points)
    opens = []
    for p in circuit.parts:
        if p.kind == SWITCH and not p.closed:
            opens.append(p)
        elif p.kind != CURRENT_SOURCE:
            joined.add_edge(p.a, p.b)
    group = {point: k for k, comp in enumerate(nx.connected_components(joined)) for point in comp}
    chain = nx.Graph()
    chain.add_nodes_from((group[src.a], group[src.b]))
    for p in opens:
        if group[p.a] != group[p.b]:
            chain.add_edge(group[p.a], group[p.b], name=p.name)
    try:
        path = nx.shortest_path(chain, group[src.a], group[src.b])
    except nx.NetworkXNoPath:
        return []
    return [chain.edges[u, v]["name"] for u, v in zip(path, path[1:])]


def return_path_hint(names: list[str], source: str, kinds: dict[str, str]) -> str:
    """A sentence saying that the open parts ``names`` (``opens_in_the_way``) keep ``source``'s
    current from flowing; ``kinds`` maps part names to their sketch kinds, for the words."""
    said = []
    for n in names:
        kind = kinds.get(n)
        said.append(f"{n} is blown" if kind == "fuse" else
                    f"{n} is an ideal voltmeter and passes no current" if kind == "voltmeter" else
                    f"{n} is open")
    what = said[0] if len(said) == 1 else ", ".join(said[:-1]) + " and " + said[-1]
    return f"{what}; once {'it conducts' if len(names) == 1 else 'they conduct'}, {source} has a path."


def explained(error: CircuitError, circuit: Circuit, kinds: dict[str, str]) -> tuple[str, tuple[str, ...]]:
    """``error``'s message and the parts it names; for a current source with no return path,
    followed by the open parts in the way (``return_path_hint``), which are named too."""
    parts = tuple(error.parts)
    if isinstance(error, CurrentSourceCutError) and len(parts) == 1:
        opens = opens_in_the_way(circuit, parts[0])
        if opens:
            return f"{error.message} {return_path_hint(opens, parts[0], kinds)}", parts + tuple(opens)
    return error.message, parts
