"""A solved sketch as plain data and as a readable table, for the command line.

Internal circuit parts (wire pieces, ground ties: names starting with ``~``)
are left out; the person sees the parts they drew.
"""
from __future__ import annotations

from collections.abc import Mapping, Sequence

from solver import Solution

from .analysis.branches import node_labels
from .assess import DISCLAIMER, Caution
from .units import format_value

__all__ = ["solution_dict", "solution_table", "caution_dict", "CAUTION"]

CAUTION = DISCLAIMER  # the one disclaimer, as the window and the printed page show it


def _shown(name: str) -> bool:
    return not name.startswith("~")


def solution_dict(sol: Solution, cautions: Sequence[Caution] = (),
                  descriptions: Mapping[str, str] | None = None) -> dict:
    """Parts, nodes, loops and warnings as JSON-ready data (SI base units).

    ``warnings`` holds the solver's notes, then the cautions (see ``caution_dict``);
    a part with a description in ``descriptions`` (part name -> what it is) carries it.
    """
    parts = {
        name: {"current": sol.current(name), "voltage": sol.voltage(name), "power": sol.power(name)}
        for name in sol.parts if _shown(name)
    }
    for name, text in (descriptions or {}).items():
        if text and name in parts:
            parts[name]["description"] = text
    labels = node_labels(sol)
    nodes = {name: {"potential": sol.potential(name), "points": points, "label": labels.get(name)}
             for name, points in sol.nodes.items()}
    loops = [{
        "name": lp.name,
        "parts": [[n, s] for n, s in lp.parts],
        "orientation": lp.orientation,
        "current": lp.current,
    } for lp in sol.loops]
    warnings = [{"kind": n.kind, "message": n.message, "parts": [p for p in n.parts if _shown(p)]}
                for n in sol.notes]
    warnings += [caution_dict(c) for c in cautions]
    return {
        "ground": sol.ground,
        "loop_method": sol.loop_method,
        "parts": parts,
        "nodes": nodes,
        "loops": loops,
        "warnings": warnings,
        "source_power": sol.source_power,
        "power_balance": sol.power_balance,
    }


# -- cautions (app/assess) ---------------------------------------------------------
def caution_dict(c: Caution) -> dict:
    """One caution as a ``warnings`` entry: kind, severity, part, parts, message, figures (SI, finite)."""
    return {"kind": c.kind, "severity": c.severity, "part": c.part, "parts": list(c.parts),
            "message": c.message, "figures": dict(c.figures)}


def _caution_lines(cautions: Sequence[Caution]) -> list[str]:
    return [f"Caution ({c.severity}): {c.message}" for c in cautions]
# -- end of cautions ---------------------------------------------------------------


def _table(header: list[str], rows: list[list[str]], texts: int = 1) -> list[str]:
    """Aligned columns: figures to the right, the first column and the last ``texts - 1`` to the left."""
    widths = [max(len(h), *(len(r[i]) for r in rows)) if rows else len(h) for i, h in enumerate(header)]
    left = {0, *range(len(header) - texts + 1, len(header))}
    line = lambda cells: "  ".join(c.ljust(w) if i in left else c.rjust(w)  # noqa: E731
                                   for i, (c, w) in enumerate(zip(cells, widths))).rstrip()
    return [line(header), line(["-" * w for w in widths])] + [line(r) for r in rows]


def solution_table(sol: Solution, title: str = "", cautions: Sequence[Caution] = (),
                   descriptions: Mapping[str, str] | None = None) -> str:
    """A plain-text report: parts, node potentials, loop currents, warnings, cautions.

    ``descriptions`` (part name -> what it is) adds a last column to the parts' table
    when any part shown has one."""
    out: list[str] = []
    if title:
        out += [title, ""]
    names = [n for n in sol.parts if _shown(n)]
    rows = [[n, format_value(sol.current(n), "A"), format_value(sol.voltage(n), "V"),
             format_value(sol.power(n), "W")] for n in names]
    header = ["Part", "Current", "Drop", "Power"]
    described = descriptions or {}
    if any(described.get(n) for n in names):
        header.append("Description")
        for n, row in zip(names, rows):
            row.append(described.get(n, ""))
        out += _table(header, rows, texts=2)
    else:
        out += _table(header, rows)
    ref = (f"relative to ground (node {sol.node_of(sol.ground)})" if sol.ground
           else "relative to each island's reference")
    out += ["", f"Node potentials, {ref} (n1, n2, … as in the equations):"]
    labels = node_labels(sol)
    out += _table(["Node", "Label", "Potential"],
                  [[n, labels.get(n, ""), format_value(sol.potential(n), "V")] for n in sol.nodes])
    if sol.loops:
        out += ["", f"Loop currents ({sol.loop_method}):"]
        out += _table(["Loop", "Current", "Sense", "Parts"],
                      [[lp.name, format_value(lp.current, "A"), lp.orientation or "-",
                        " ".join(("+" if s > 0 else "-") + n for n, s in lp.parts)]
                       for lp in sol.loops])
    balance = sol.power_balance
    tiny = abs(balance) <= 1e-9 * max(abs(sol.source_power), 1e-300)
    shown = "0 W to rounding" if tiny else format_value(balance, "W")
    out += ["", f"Sources deliver {format_value(sol.source_power, 'W')}; every part's absorbed power, "
                f"a delivering source's counted negative, sums to {shown} (Tellegen's theorem)."]
    for n in sol.notes:
        out.append(f"Note ({n.kind}): {n.message}")
    out += _caution_lines(cautions)
    out += ["", CAUTION]
    return "\n".join(out)
