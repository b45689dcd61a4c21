"""Fuzz the .lwsk loader: many damaged and hostile files, each must give a sketch or one clean message.

Uses the mutations of tests/lwsk_mutations.py (truncation, wrong types, odd
and huge numbers, NaN, deep nesting, unknown kinds, random bytes and more).
Prints the cases tried, how many were refused or accepted per mutation, the
time taken, and every failure (a crash, a traceback-like or multi-line
message, or an accepted file that does not save back the same) with the seed
that makes it again.  Exit status 1 if anything failed.

Run:  python tests/bench/fuzz_loader.py [--cases 20000] [--seed N] [--mutation NAME]
"""
from __future__ import annotations

import argparse
import os
import random
import sys
import time
from collections import Counter

sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.abspath(__file__))))

from lwsk_mutations import MUTATIONS, mutate, verdict  # noqa: E402

from app.sketch.fileio import SketchFileError, loads_sketch  # noqa: E402


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--cases", type=int, default=20_000)
    ap.add_argument("--seed", type=int, default=None)
    ap.add_argument("--mutation", choices=sorted(MUTATIONS), default=None)
    args = ap.parse_args()
    seed = args.seed if args.seed is not None else random.randrange(2**32)
    tried: Counter[str] = Counter()
    refused: Counter[str] = Counter()
    failures: list[str] = []
    start = time.perf_counter()
    for k in range(args.cases):
        case_seed = seed + k
        name, data = mutate(random.Random(case_seed), args.mutation)
        tried[name] += 1
        problem = verdict(data)
        if problem is not None:
            failures.append(f"  seed {case_seed} ({name}): {problem}")
            continue
        try:
            loads_sketch(data)
        except SketchFileError:
            refused[name] += 1
    took = time.perf_counter() - start
    print(f"fuzz_loader: {args.cases} cases from seed {seed} in {took:.1f} s "
          f"({args.cases / took:.0f} a second)")
    print(f"{'mutation':<16}{'tried':>8}{'refused':>9}{'loaded':>8}")
    for name in sorted(tried):
        loaded = tried[name] - refused[name] - sum(f"({name})" in f for f in failures)
        print(f"{name:<16}{tried[name]:>8}{refused[name]:>9}{loaded:>8}")
    print(f"failures: {len(failures)}")
    for line in failures[:50]:
        print(line)
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
