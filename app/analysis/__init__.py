"""Checking a hand analysis (Qt-free): branches and current tags, the circuit's KVL and KCL
equations in branch- and mesh-current form, loops of one's own, and a checker for typed
equations and numeric answers.

>>> from solver import Circuit, solve
>>> from app.analysis import analyse, check_equation
>>> c = Circuit()
>>> c.cell("B1", plus="a", minus="g", emf=9.0)
>>> c.resistor("R1", "a", "g", 100.0)
>>> a = analyse(solve(c, ground="g"), c)
>>> check_equation(a, "B1 - I1*R1 = 0").ok
True
"""
from .answers import CheckOutcome, guess_kind, parse_answers, run_check
from .branches import Branch, BranchSet, CurrentTag, TagError, find_branches
from .checker import (DEFAULT_TOLERANCE, EquationCheck, Finding, ValueCheck, ValuesCheck, check_equation,
                      check_values)
from .context import Analysis, analyse
from .equations import (Equation, LoopError, equations, kcl_equations, kvl_equations, loop_equation,
                        merged_loop_equation, source_equations, trace_loop)
from .expr import ParseError, parse_equation
from .terms import Term

__all__ = [
    "Analysis", "analyse", "Branch", "BranchSet", "CurrentTag", "TagError", "find_branches",
    "Equation", "LoopError", "Term", "equations", "kvl_equations", "kcl_equations", "source_equations",
    "loop_equation", "merged_loop_equation", "trace_loop",
    "EquationCheck", "Finding", "ValueCheck", "ValuesCheck", "check_equation", "check_values",
    "DEFAULT_TOLERANCE", "ParseError", "parse_equation",
    "CheckOutcome", "run_check", "parse_answers", "guess_kind",
]
