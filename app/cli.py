"""The ``loopwright`` command.

    loopwright FILE                open a sketch in the window
    loopwright solve FILE [--json] solve a sketch and print the results
    loopwright shot FILE -o OUT    render the annotated sketch to PNG or SVG

Exit status: 0 solved, 1 file error, 2 circuit error.
"""
from __future__ import annotations

import argparse
import json
import sys

from solver import CircuitError, solve

__all__ = ["main"]

EXIT_OK, EXIT_FILE, EXIT_CIRCUIT = 0, 1, 2
COMMANDS = ("solve", "shot")


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
    """The solution of the sketch in ``path`` and its cautions (app/assess)."""
    from .assess import assess
    from .sketch.netlist import to_circuit
    sketch = _load(path)
    net = to_circuit(sketch)
    sol = solve(net.circuit, ground=net.ground)
    return sol, assess(sketch, net, sol)


def cmd_solve(args: argparse.Namespace) -> int:
    from .report import solution_dict, solution_table
    sol, cautions = _solve_file(args.file)
    if args.json:
        json.dump(solution_dict(sol, cautions), sys.stdout, indent=2, allow_nan=False)
        sys.stdout.write("\n")
    else:
        print(solution_table(sol, title=args.file, cautions=cautions))
    return EXIT_OK


def cmd_shot(args: argparse.Namespace) -> int:
    _load(args.file)  # file problems are reported before Qt starts
    from .ui.shot import render
    render(args.file, args.output)
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


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="loopwright", description="Sketch DC circuits and solve them by mesh-current analysis.")
    sub = p.add_subparsers(dest="command", required=True)
    s = sub.add_parser("solve", help="solve a sketch and print every part's current, drop and power")
    s.add_argument("file", help="a .lwsk sketch")
    s.add_argument("--json", action="store_true", help="print JSON (parts, nodes, loops, warnings)")
    s.set_defaults(func=cmd_solve)
    t = sub.add_parser("shot", help="render the annotated sketch to a PNG or SVG picture")
    t.add_argument("file", help="a .lwsk sketch")
    t.add_argument("-o", "--output", required=True, help="picture to write (.png or .svg)")
    t.set_defaults(func=cmd_shot)
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


if __name__ == "__main__":
    sys.exit(main())
