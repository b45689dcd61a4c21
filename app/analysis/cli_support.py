"""Text for the command line: the circuit's equations, and the verdict on a typed equation."""
from __future__ import annotations

from typing import Iterable

from solver import Circuit, Solution

from .branches import CurrentTag, TagError
from .checker import check_equation
from .context import analyse
from .equations import equations

__all__ = ["equations_text", "check_equation_text"]


def equations_text(sol: Solution, circuit: Circuit, tags: Iterable[CurrentTag] = (), latex: bool = False,
                   forms: Iterable[str] = ("branch", "mesh")) -> str:
    """Branches, KVL per loop and KCL per junction (branch-current form), then the mesh-current form.

    ``forms`` picks which forms to give (``"branch"``, ``"mesh"`` or both).

    Plain text shows each equation with symbols and with the solved numbers
    and residual; ``latex=True`` gives one LaTeX line per equation instead.
    A bad tag gives its message rather than raising.
    """
    try:
        a = analyse(sol, circuit, tags)
    except TagError as exc:
        return exc.message
    lines: list[str] = []
    if not latex:
        lines.append("Branches (currents counted from the first node to the last):")
        for b in a.branches.branches:
            path = " → ".join(a.branches.label(n) for n in b.nodes)
            lines.append(f"  {b.current}{'' if b.tagged else ' (automatic name)'}: "
                         f"{', '.join(b.part_names)}  ({path})")
    forms = tuple(forms)
    for form, heading in (("branch", "Branch-current form"), ("mesh", "Mesh-current form")):
        if form not in forms:
            continue
        eqs = equations(a, form)
        if not eqs:
            continue
        lines.append("" if not lines else "")
        lines.append(f"% {heading}" if latex else f"{heading}:")
        for e in eqs:
            if latex:
                lines.append(f"{e.latex} \\quad \\text{{({e.title})}}")
                continue
            lines.append(f"  {e.title}")
            lines.append(f"    {e.text}")
            lines.append(f"    {e.numeric}")
            if e.note:
                lines.append(f"    ({e.note})")
    if not a.solution.loops:
        lines.append("This circuit has no closed loop, so there are no loop equations.")
    return "\n".join(lines).lstrip("\n")


def check_equation_text(sol: Solution, circuit: Circuit, text: str, tags: Iterable[CurrentTag] = ()
                        ) -> tuple[bool, str]:
    """(whether ``text`` is a valid KVL or KCL equation of the circuit, the verdict in plain words)."""
    try:
        a = analyse(sol, circuit, tags)
    except TagError as exc:
        return False, exc.message
    result = check_equation(a, text)
    report = result.report()
    if result.column is not None:
        report += f"\n  {text}\n  {' ' * result.column}^"
    return result.ok, report
