"""Divisors on graphs: reduced divisors, linear equivalence, rank, Riemann-Roch."""

from __future__ import annotations

import itertools
import random

import networkx as nx
import pytest
import sympy

from graphinv.divisors import (
    DivisorError,
    canonical_divisor,
    divisor_degree,
    divisor_rank,
    equivalent_effective,
    genus,
    is_linearly_equivalent,
    reduced_divisor,
)
from graphinv.errors import DisconnectedGraphError, InvalidGraphError


def in_laplacian_lattice(G, D):
    """Reference: D is in the image of L over Z (sympy, exact rational solve)."""
    order = list(G)
    L = sympy.Matrix(nx.laplacian_matrix(G, nodelist=order, weight="weight").toarray().tolist())
    if sum(D.get(v, 0) for v in order) != 0:
        return False
    reduced = L[1:, 1:]
    rhs = sympy.Matrix([D.get(v, 0) for v in order[1:]])
    x = reduced.LUsolve(rhs)
    return all(value.is_integer for value in x)


def brute_force_rank(G, D, bound):
    """Reference rank straight from the definition, with effectiveness decided by searching
    firing scripts (all x in a box) -- only for tiny graphs."""
    order = list(G)
    L = nx.laplacian_matrix(G, nodelist=order, weight="weight").toarray().tolist()
    n = len(order)

    def winnable(values):
        # x with x[0] = 0 (scripts are defined up to constants)
        for x in itertools.product(range(-bound, bound + 1), repeat=n - 1):
            script = (0, *x)
            if all(values[i] - sum(L[i][j] * script[j] for j in range(n)) >= 0 for i in range(n)):
                return True
        return False

    values = [D.get(v, 0) for v in order]
    if not winnable(values):
        return -1
    k = 0
    while True:
        for E in itertools.combinations_with_replacement(range(n), k + 1):
            trial = values[:]
            for i in E:
                trial[i] -= 1
            if not winnable(trial):
                return k
        k += 1


def test_genus_and_canonical_divisor():
    # Baker-Norine 2007, §1: g = |E| - |V| + 1, K(v) = deg(v) - 2, deg K = 2g - 2.
    G = nx.MultiGraph([(0, 1), (0, 1), (1, 2), (2, 0), (2, 3)])
    assert genus(G) == 2
    K = canonical_divisor(G)
    assert K == {0: 1, 1: 1, 2: 1, 3: -1}
    assert divisor_degree(K) == 2 * genus(G) - 2
    assert genus(nx.petersen_graph()) == 6


@pytest.mark.parametrize("seed", range(6))
def test_linear_equivalence_matches_lattice_membership(seed):
    rng = random.Random(seed)
    G = nx.gnp_random_graph(6, 0.6, seed=seed)
    G.add_edges_from((i, i + 1) for i in range(5))
    for _ in range(10):
        D = {v: rng.randint(-3, 3) for v in G}
        E = {v: rng.randint(-3, 3) for v in G}
        diff = {v: D[v] - E[v] for v in G}
        assert is_linearly_equivalent(G, D, E) == in_laplacian_lattice(G, diff)


@pytest.mark.parametrize("seed", range(5))
def test_reduced_divisor_is_reduced_and_equivalent(seed):
    # Baker-Norine 2007, Prop. 3.1: unique q-reduced representative.
    rng = random.Random(seed)
    G = nx.gnp_random_graph(7, 0.5, seed=seed + 10)
    G.add_edges_from((i, i + 1) for i in range(6))
    q = 3
    for _ in range(8):
        D = {v: rng.randint(-4, 4) for v in G}
        R = reduced_divisor(G, D, q=q)
        assert is_linearly_equivalent(G, D, R)
        assert all(R[v] >= 0 for v in G if v != q)
        # no nonempty set avoiding q can fire (Dhar): brute force over subsets
        others = [v for v in G if v != q]
        for size in range(1, len(others) + 1):
            for S in itertools.combinations(others, size):
                inside = set(S)
                assert any(R[v] < sum(1 for w in G[v] if w not in inside) for v in S)
        # equivalent divisors reduce to the same one
        shifted = dict(D)
        v = rng.choice(list(G))
        shifted[v] -= G.degree(v)
        for w in G[v]:
            shifted[w] += 1
        assert reduced_divisor(G, shifted, q=q) == R


def test_rank_matches_definition_on_tiny_graphs():
    # Definition of Baker-Norine 2007 §1.3, checked by brute force on two tiny graphs.
    rng = random.Random(7)
    for G in (nx.complete_graph(3), nx.MultiGraph([(0, 1), (0, 1), (1, 2), (0, 2)])):
        for _ in range(12):
            D = {v: rng.randint(-1, 3) for v in G}
            assert divisor_rank(G, D) == brute_force_rank(G, D, bound=3)


@pytest.mark.parametrize(
    "G",
    [
        nx.complete_graph(4),
        nx.petersen_graph(),
        nx.wheel_graph(5),
        nx.MultiGraph([(0, 1), (0, 1), (1, 2), (2, 3), (3, 0), (0, 2), (2, 3)]),
    ],
)
def test_riemann_roch_on_random_divisors(G):
    # Baker-Norine 2007, Thm 1.12: r(D) - r(K - D) = deg D + 1 - g.
    g = genus(G)
    K = canonical_divisor(G)
    rng = random.Random(len(G))
    vertices = list(G)
    for _ in range(6):
        degree = rng.randint(-1, 2 * g - 1)
        D = dict.fromkeys(vertices, 0)
        for _ in range(abs(degree) + 2):
            D[rng.choice(vertices)] += 1
        D[rng.choice(vertices)] -= 2 if degree >= 0 else 2 + 2 * abs(degree)
        complement = {v: K[v] - D[v] for v in vertices}
        lhs = divisor_rank(G, D) - divisor_rank(G, complement)
        assert lhs == divisor_degree(D) + 1 - g


def test_rank_of_canonical_and_of_large_degree():
    # Baker-Norine 2007: r(K) = g - 1; deg D > 2g - 2 gives r(D) = deg D - g.
    G = nx.petersen_graph()
    g = genus(G)
    assert divisor_rank(G, canonical_divisor(G)) == g - 1
    D = dict.fromkeys(G, 0)
    D[0] = 2 * g - 1
    assert divisor_rank(G, D) == 2 * g - 1 - g


def test_tree_divisor_rank_is_degree():
    # common fact: on a tree (genus 0) every divisor of degree d >= 0 has rank d
    G = nx.balanced_tree(2, 2)
    assert divisor_rank(G, {0: 2, 3: 1, 6: -1}) == 2


def test_effective_equivalent():
    G = nx.cycle_graph(5)
    assert equivalent_effective(G, {0: 1, 2: -1}) is None
    E = equivalent_effective(G, {0: 2, 2: -1}, q=0)
    assert E is not None and min(E.values()) >= 0 and is_linearly_equivalent(G, E, {0: 2, 2: -1})


def test_bad_input():
    with pytest.raises(DivisorError, match="unknown vertex 9"):
        reduced_divisor(nx.path_graph(3), {9: 1})
    with pytest.raises(DivisorError, match="integers"):
        divisor_rank(nx.path_graph(3), {0: 0.5})
    with pytest.raises(DisconnectedGraphError, match="connected"):
        genus(nx.Graph([(0, 1), (2, 3)]))
    with pytest.raises(InvalidGraphError, match="undirected"):
        canonical_divisor(nx.DiGraph([(0, 1)]))
