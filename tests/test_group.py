"""The critical group and spanning-tree counts against published values."""

from __future__ import annotations

import networkx as nx
import pytest

from graphinv import (
    InvalidGraphError,
    InvalidWeightError,
    critical_group,
    spanning_tree_count,
)


def factors(G, **kwargs):
    return critical_group(G, **kwargs).invariant_factors


@pytest.mark.parametrize("n", range(3, 9))
def test_complete_graph(n):
    # K(K_n) = (Z/n)^(n-2): Lorenzini, Discrete Math. 91 (1991); Biggs, J. Algebraic Combin. 9 (1999) (memory)
    assert factors(nx.complete_graph(n)) == (n,) * (n - 2)


def test_petersen():
    # Z2 + Z10^3, order 2000: common fact (memory)
    K = critical_group(nx.petersen_graph())
    assert K.invariant_factors == (2, 10, 10, 10)
    assert str(K) == "Z/2 ⊕ Z/10 ⊕ Z/10 ⊕ Z/10"
    assert K.order == 2000 == K.certificate.spanning_trees


def test_grid_counts():
    # OEIS A007341: spanning trees of the n x n grid
    expected = [1, 4, 192, 100352, 557568000, 32565539635200]
    assert [spanning_tree_count(nx.grid_2d_graph(n, n)) for n in range(1, 7)] == expected


def test_bad_input():
    with pytest.raises(InvalidGraphError):
        critical_group(nx.Graph())
    with pytest.raises(InvalidGraphError):
        critical_group(nx.DiGraph([(0, 1)]))
    G = nx.Graph()
    G.add_edge(0, 1, weight=-1)
    with pytest.raises(InvalidWeightError):
        critical_group(G)
