"""The ``loopwright`` command.

    loopwright FILE                open a sketch in the window
    loopwright solve FILE [--json] solve a sketch and print the results
    loopwright shot FILE -o OUT [--paper a4|a3|letter]
                                   render the annotated sketch to PNG, SVG or PDF
    loopwright equations FILE [--latex] [--mesh]
                                   the KVL and KCL equations, with numbers and residuals
    loopwright check FILE [--eq TEXT]...
                                   hold typed equations or answers (or the sketch's saved
                                   checks) against the circuit

Exit status: 0 solved (and every check right), 1 file error, 2 circuit error
(a current tag that does not fit counts as one), 3 a check is wrong.
"""
from __future__ import annotations

import argparse
import json
import os
import sys
from pathlib import Path

from solver import CircuitError, solve

__all__ = ["main"]

EXIT_OK, EXIT_FILE, EXIT_CIRCUIT, EXIT_WRONG = 0, 1, 2, 3
COMMANDS = ("solve", "shot", "equations", "check")


def _load(path: str):
    from .sketch.fileio import SketchFileError, load_sketch
    try:
        return load_sketch(path)
    except SketchFileError as exc:
        raise _FileProblem(str(exc)) from None
    except OSError as exc:
        raise _FileProblem(f"Cannot read {path}: {exc.strerror or exc}.") from None


class _FileProblem(Exception):
    pass


def _solve_file(path: str):
    """The solution of the sketch in ``path``, its cautions (app/assess) and its parts' descriptions."""
    from .assess import assess
    from .sketch.netlist import to_circuit
    from .assess.return_path import explained
    sketch = _load(path)
    net = to_circuit(sketch)
    try:
        sol = solve(net.circuit, ground=net.ground)
    except CircuitError as exc:
        raise CircuitError(*explained(exc, net.circuit, {p.name: p.kind for p in sketch.parts})) from None
    return sol, assess(sketch, net, sol), {p.name: p.label for p in sketch.parts if p.label}


def cmd_solve(args: argparse.Namespace) -> int:
    from .report import solution_dict, solution_table
    sol, cautions, descriptions = _solve_file(args.file)
    if args.json:
        json.dump(solution_dict(sol, cautions, descriptions), sys.stdout, indent=2, allow_nan=False)
        sys.stdout.write("\n")
    else:
        print(solution_table(sol, title=args.file, cautions=cautions, descriptions=descriptions))
    return EXIT_OK


def _analysed_file(path: str):
    """(the sketch in ``path``, its saved current tags, the analysis of its solution with those tags)."""
    from .analysis import CurrentTag, TagError, analyse
    from .sketch.netlist import to_circuit
    sketch = _load(path)
    net = to_circuit(sketch)
    sol = solve(net.circuit, ground=net.ground)
    tags = [CurrentTag(t.name, t.part, t.forward) for t in sketch.tags]
    try:
        return sketch, tags, analyse(sol, net.circuit, tags)
    except TagError as exc:
        raise CircuitError(exc.message, exc.parts) from None


def cmd_equations(args: argparse.Namespace) -> int:
    from .analysis.cli_support import equations_text
    _, tags, a = _analysed_file(args.file)
    forms = ("mesh",) if args.mesh else ("branch",)
    print(equations_text(a.solution, a.circuit, tags, args.latex, forms))
    return EXIT_OK


def cmd_check(args: argparse.Namespace) -> int:
    from .analysis.answers import run_check
    sketch, _, a = _analysed_file(args.file)
    typed = [(t, None, args.tolerance) for t in args.eq]
    if not typed:
        typed = [(c.text, c.kind, c.tolerance) for c in sketch.checks]
    if not typed:
        print("loopwright: nothing to check: give --eq \"…\", or save checks with the sketch.", file=sys.stderr)
        return EXIT_FILE
    wrong = 0
    for text, kind, tol in typed:
        outcome = run_check(a, text, kind, tol)
        wrong += not outcome.ok
        print(text)
        print(outcome.report(text))
        print()
    return EXIT_WRONG if wrong else EXIT_OK


def _fraction(text: str) -> float:
    try:
        value = float(text.rstrip("%")) / (100 if text.endswith("%") else 1)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a tolerance; write 0.01 or 1%") from None
    if not 0 < value < 1:
        raise argparse.ArgumentTypeError("the tolerance is between 0 and 1 (or 0% and 100%)")
    return value


def cmd_shot(args: argparse.Namespace) -> int:
    """Write the picture; exit 2 (after writing it, with the problem marked) if the circuit cannot be solved."""
    _load(args.file)  # file problems are reported before Qt starts
    out = Path(args.output)
    if out.suffix.lower() not in (".png", ".svg", ".pdf"):
        raise _FileProblem(f"Pictures can be written as .png, .svg or .pdf, not '{out.suffix or out.name}'.")
    if out.is_dir() or not out.parent.is_dir():
        raise _FileProblem(f"Cannot write {out}: " +
                           ("that is a folder." if out.is_dir() else "its folder does not exist."))
    from .ui.shot import render
    try:
        render(args.file, args.output, paper=args.paper)
    except (OSError, ValueError) as exc:
        raise _FileProblem(str(exc)) from None
    try:
        _solve_file(args.file)
    except CircuitError as exc:
        print(f"loopwright: picture written with the problem marked; the circuit cannot be solved: {exc}",
              file=sys.stderr)
        return EXIT_CIRCUIT
    return EXIT_OK


def cmd_open(path: str | None) -> int:
    if path is not None:
        _load(path)
    try:
        from .ui.main_window import run
    except ImportError as exc:
        print(f"loopwright: the window cannot start here ({exc}).", file=sys.stderr)
        return EXIT_FILE
    return run(path)


class _Parser(argparse.ArgumentParser):
    """argparse with the program's exit status for a command given wrongly (1, not 2: 2 means
    the circuit cannot be solved)."""

    def error(self, message: str):
        self.print_usage(sys.stderr)
        self.exit(EXIT_FILE, f"loopwright: {message}\n")


def _parser() -> argparse.ArgumentParser:
    p = _Parser(prog="loopwright", description="Sketch DC circuits and solve them by mesh-current analysis. "
                "'loopwright FILE.lwsk' (or no argument) opens the window.",
                epilog="Exit status: 0 solved (or the check holds), 1 the file could not be read or the "
                "command was given wrongly, 2 the circuit cannot be solved, 3 a check found it wrong.")
    sub = p.add_subparsers(dest="command", required=True, parser_class=_Parser)
    s = sub.add_parser("solve", help="solve a sketch and print every part's current, drop and power")
    s.add_argument("file", help="a .lwsk sketch")
    s.add_argument("--json", action="store_true", help="print JSON (parts, nodes, loops, warnings)")
    s.set_defaults(func=cmd_solve)
    t = sub.add_parser("shot", help="render the annotated sketch to a PNG or SVG picture")
    t.add_argument("file", help="a .lwsk sketch")
    t.add_argument("-o", "--output", required=True, help="picture to write: .png, .svg, or .pdf (sheets with the cautions)")
    t.add_argument("--paper", choices=("a4", "a3", "letter"), default="a4",
                   help="sheet size of a PDF (default a4)")
    t.set_defaults(func=cmd_shot)
    e = sub.add_parser("equations", help="print KVL per loop and KCL per junction, with numbers and residuals")
    e.add_argument("file", help="a .lwsk sketch (its current tags name the currents)")
    e.add_argument("--latex", action="store_true", help="one LaTeX line per equation")
    e.add_argument("--mesh", action="store_true", help="the mesh-current form (loop-resistance rows)")
    e.set_defaults(func=cmd_equations)
    c = sub.add_parser("check", help="check typed equations or answers; exit status 3 when one is wrong")
    c.add_argument("file", help="a .lwsk sketch (its current tags name the currents)")
    c.add_argument("--eq", action="append", default=[], metavar="TEXT",
                   help='an equation such as "B1 - I1*R1 - I2*R2 = 0", or answers such as '
                        '"I1 = 12.3m, V(n2) = 4.1"; may be given more than once; without it the '
                        "checks saved with the sketch are run")
    c.add_argument("--tolerance", type=_fraction, default=0.01, help="for answers: 0.01 or 1%% (default)")
    c.set_defaults(func=cmd_check)
    return p


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit status."""
    argv = list(sys.argv[1:] if argv is None else argv)
    try:
        if not argv or (argv[0] not in COMMANDS and not argv[0].startswith("-")):
            return cmd_open(argv[0] if argv else None)
        args = _parser().parse_args(argv)
        return args.func(args)
    except _FileProblem as exc:
        print(f"loopwright: {exc}", file=sys.stderr)
        return EXIT_FILE
    except CircuitError as exc:
        named = [p for p in exc.parts if not p.startswith("~")]
        where = f" [parts: {', '.join(named)}]" if named else ""
        print(f"loopwright: the circuit cannot be solved: {exc}{where}", file=sys.stderr)
        return EXIT_CIRCUIT
    except BrokenPipeError:
        # the reader went away (e.g. `loopwright solve F | head`): stop quietly, as Unix tools do
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return EXIT_OK


if __name__ == "__main__":
    sys.exit(main())
