"""The solver's own graph building blocks held against the libraries they stand in for.

Reference libraries: scipy.sparse (its checked CSR constructor and csgraph)
and networkx (cycles of a permutation as the components of its functional
graph). The shortcuts these blocks take must give what the libraries give.
"""
from __future__ import annotations

import networkx as nx
import numpy as np
import pytest
from scipy.sparse import csgraph, csr_matrix

from solver.graph import adjacency, canonical_csr
from solver.loops import _cycles


@pytest.mark.parametrize("seed", range(20))
def test_canonical_csr_behaves_as_scipys_checked_matrix(seed):
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 40))
    m = int(rng.integers(0, 3 * n))
    u, v = rng.integers(0, n, m), rng.integers(0, n, m)
    fast = adjacency(n, u, v)
    # reference: scipy's own constructor from COO (it sums repeats; adjacency keeps one entry each)
    ref = csr_matrix((np.ones(2 * m), (np.r_[u, v], np.r_[v, u])), shape=(n, n))
    ref.data[:] = 1.0
    assert fast.shape == ref.shape and fast.nnz == ref.nnz and fast.format == "csr"
    assert np.array_equal(fast.indptr, ref.indptr) and np.array_equal(fast.indices, ref.indices)
    assert np.array_equal(fast.toarray(), ref.toarray())
    assert np.array_equal(fast @ np.arange(n), ref @ np.arange(n))
    k1, lab1 = csgraph.connected_components(fast, directed=True, connection="strong")
    k2, lab2 = csgraph.connected_components(ref, directed=True, connection="strong")
    assert k1 == k2 and np.array_equal(lab1, lab2)
    o1, p1 = csgraph.breadth_first_order(fast, 0, directed=True, return_predecessors=True)
    o2, p2 = csgraph.breadth_first_order(ref, 0, directed=True, return_predecessors=True)
    assert np.array_equal(o1, o2) and np.array_equal(p1, p2)
    assert repr(fast) == repr(ref)


def test_canonical_csr_takes_the_arrays_as_given():
    data = np.array([2.0, 3.0])
    m = canonical_csr(data, np.array([1, 0], np.int32), np.array([0, 1, 2], np.int32), (2, 3))
    assert m.shape == (2, 3)
    assert np.array_equal(m.toarray(), [[0.0, 2.0, 0.0], [3.0, 0.0, 0.0]])   # reference: the matrix written out


@pytest.mark.parametrize("seed", range(30))
def test_cycles_of_a_permutation_match_networkx(seed):
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 300))
    nxt = rng.permutation(n)
    face, count, position = _cycles(nxt)
    g = nx.DiGraph()
    g.add_nodes_from(range(n))
    g.add_edges_from(enumerate(nxt.tolist()))
    cycles = sorted((sorted(c) for c in nx.strongly_connected_components(g)), key=lambda c: c[0])
    assert count == len(cycles)
    for k, members in enumerate(cycles):   # numbered in order of the lowest element
        assert set(np.flatnonzero(face == k).tolist()) == set(members)
        x, steps = members[0], 0          # positions counted along the cycle from its lowest element
        while True:
            assert position[x] == steps
            x, steps = int(nxt[x]), steps + 1
            if x == members[0]:
                break
