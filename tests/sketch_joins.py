"""Which terminals a sketch joins, read through the netlist (whose rules the netlist tests check
against hand-read drawings): for tests of edits that must never change it."""
from __future__ import annotations

from app.sketch.model import Sketch
from app.sketch.netlist import to_circuit

__all__ = ["joined"]


def joined(sketch: Sketch) -> frozenset[frozenset[tuple[str, int]]]:
    """Which terminals are joined: the groups of (part, terminal index) on one node."""
    net = to_circuit(sketch)
    up: dict[str, str] = {}

    def find(x: str) -> str:
        up.setdefault(x, x)
        while up[x] != x:
            x = up[x]
        return x

    for p in net.circuit.parts:
        if p.kind == "wire":
            up[find(p.a)] = find(p.b)
    groups: dict[str, set[tuple[str, int]]] = {}
    for part in sketch.parts:
        for k, t in enumerate(part.terminals()):
            groups.setdefault(find(net.point_at[t]), set()).add((part.name, k))
    return frozenset(frozenset(g) for g in groups.values())
