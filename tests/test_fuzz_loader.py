"""Fuzzing the .lwsk loader with hostile and damaged files: always a sketch or one clean message.

The mutations (tests/lwsk_mutations.py) add to the fuzz tests of
tests/test_fileio.py: truncation, wrong types, odd and huge numbers, NaN and
infinity tokens, deep nesting, unknown kinds, duplicate names and keys,
points off the grid, odd versions and encodings, huge content, spliced files
and random bytes.  A quick run is in the normal suite; the long run (over
10,000 files) is marked slow; tests/bench/fuzz_loader.py prints a tally.
"""
import random

import pytest
from hypothesis import HealthCheck, given, note, settings
from hypothesis import strategies as st

from app.sketch.fileio import SketchFileError, loads_sketch
from lwsk_mutations import BASES, MUTATIONS, mutate, verdict

CASES = st.tuples(st.sampled_from(sorted(MUTATIONS)), st.randoms(use_true_random=False))


def _check(case):
    name, rng = case
    used, data = mutate(rng, name)
    note(f"{used}: {data[:300]!r}")
    problem = verdict(data)
    assert problem is None, f"{used}: {problem}\nfile: {data[:300]!r}"


def test_the_good_bases_load():
    for text in BASES:
        assert verdict(text.encode()) is None


@pytest.mark.parametrize("name", sorted(MUTATIONS))
def test_every_mutation_damages_some_files(name):
    # a mutation that never makes a refused file would test nothing
    rng = random.Random(6)
    refused = 0
    for _ in range(30):
        try:
            loads_sketch(mutate(rng, name)[1])
        except SketchFileError:
            refused += 1
    assert refused, name


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(CASES)
def test_damaged_files_give_a_sketch_or_one_clean_message(case):
    _check(case)


@pytest.mark.slow
@settings(max_examples=10_500, deadline=None, suppress_health_check=list(HealthCheck))
@given(CASES)
def test_ten_thousand_damaged_files(case):
    _check(case)
