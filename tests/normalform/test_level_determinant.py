"""Determinants modulo many primes by level-block elimination.

Outside sources: python-flint (``nmod_mat.det``, ``fmpz_mat.det``) on seeded random matrices,
SymPy (``isprime``), Cayley's formula, OEIS A007341 (spanning trees of the n x n grid) and
networkx (``number_of_spanning_trees``).
"""

from __future__ import annotations

import random

import flint
import networkx as nx
import pytest
from sympy import isprime

from graphinv.matrices import laplacian_matrix
from graphinv.normalform import InvalidMatrixError
from graphinv.normalform import _level_determinant as level_module
from graphinv.normalform._level_determinant import (
    CHUNK,
    P_MAX,
    float_primes,
    level_determinant,
)

PRIMES = [*float_primes(4), 2, 3, 101]


def reduced_laplacian(G: nx.Graph) -> list[dict[int, int]]:
    """Sparse rows of the Laplacian of ``G`` with its last vertex deleted."""
    rows = laplacian_matrix(G).to_rows()
    n = len(rows) - 1
    return [{j: v for j, v in row.items() if j < n} for row in rows[:n]]


def full_laplacian(G: nx.Graph) -> list[dict[int, int]]:
    G = nx.convert_node_labels_to_integers(G)
    rows: list[dict[int, int]] = [{} for _ in G]
    for v in G:
        rows[v][v] = G.degree(v)
        for u in G[v]:
            rows[v][u] = -1
    return rows


def dense(rows: list[dict[int, int]]) -> list[list[int]]:
    n = len(rows)
    return [[row.get(j, 0) for j in range(n)] for row in rows]


def random_sparse(rng: random.Random, n: int, density: float, symmetric: bool) -> list[dict[int, int]]:
    rows: list[dict[int, int]] = [{} for _ in range(n)]
    for i in range(n):
        for j in range(n):
            if rng.random() < density or (i == j and rng.random() < 0.85):
                v = rng.choice([rng.randint(-4, 4), rng.randint(-(2**70), 2**70), -1, 1])
                if v:
                    rows[i][j] = v
                    if symmetric:
                        rows[j][i] = v
    return rows


def test_float_primes_are_descending_primes_below_the_bound() -> None:
    primes = float_primes(200)
    assert primes == sorted(primes, reverse=True)
    assert len(set(primes)) == 200
    assert all(isprime(p) and p < P_MAX for p in primes)  # SymPy isprime
    # No prime between the bound and the first one returned (SymPy nextprime/isprime).
    assert not any(isprime(q) for q in range(primes[0] + 1, P_MAX))
    assert float_primes(5) == primes[:5]
    # The exactness bound the products rely on.
    assert CHUNK * (P_MAX - 1) ** 2 < 2**53


def test_float_primes_rejects_bad_counts() -> None:
    with pytest.raises(ValueError, match="count"):
        float_primes(-1)
    with pytest.raises(ValueError, match="count"):
        float_primes(2.5)  # type: ignore[arg-type]


def test_bad_input_raises() -> None:
    with pytest.raises(InvalidMatrixError, match="outside"):
        level_determinant([{0: 1, 2: 1}, {1: 1}], [7])
    with pytest.raises(InvalidMatrixError, match="not an integer"):
        level_determinant([{0: 1.5}], [7])  # type: ignore[dict-item]
    with pytest.raises(ValueError, match="primes"):
        level_determinant([{0: 1}], [15])
    with pytest.raises(ValueError, match="primes"):
        level_determinant([{0: 1}], [P_MAX + 1])
    with pytest.raises(ValueError, match="primes"):
        level_determinant([{0: 1}], [[7]])  # type: ignore[list-item]
    with pytest.raises(ValueError, match="primes"):
        level_determinant([{0: 1}], [True])


def test_trivial_sizes() -> None:
    assert level_determinant([], PRIMES) == [1] * len(PRIMES)  # det of the 0 x 0 matrix: common fact
    assert level_determinant([{0: -(2**80) - 5}], PRIMES) == [(-(2**80) - 5) % p for p in PRIMES]
    assert level_determinant([{0: 3}], []) == []


@pytest.mark.parametrize("symmetric", [False, True])
def test_random_sparse_matrices_agree_with_flint(symmetric: bool) -> None:
    rng = random.Random(20261202 + symmetric)
    undecided = 0
    nonsingular = 0
    for _ in range(60):
        n = rng.randint(1, 70)
        rows = random_sparse(rng, n, rng.choice([0.02, 0.05, 0.15]), symmetric)
        A = dense(rows)
        residues = level_determinant(rows, PRIMES)
        exact = int(flint.fmpz_mat(A).det())  # python-flint fmpz_mat.det
        nonsingular += exact != 0
        for p, r in zip(PRIMES, residues, strict=True):
            if r is None:
                undecided += exact != 0
                continue
            assert r == int(flint.nmod_mat(A, p).det())  # python-flint nmod_mat.det
    assert nonsingular >= 15
    # A prime is undecided only when a merged dense block would exceed the memory budget.
    assert undecided == 0


def test_disconnected_pattern_with_big_entries() -> None:
    rng = random.Random(7)
    blocks = [random_sparse(rng, k, 0.3, False) for k in (1, 5, 12, 3)]
    rows: list[dict[int, int]] = []
    for block in blocks:
        offset = len(rows)
        rows.extend({offset + j: v for j, v in row.items()} for row in block)
    # A simultaneous permutation of rows and columns keeps det (common fact): scramble the order.
    perm = list(range(len(rows)))
    rng.shuffle(perm)
    where = {old: new for new, old in enumerate(perm)}
    scrambled = [{where[j]: v for j, v in rows[old].items()} for old in perm]
    A = dense(scrambled)
    residues = level_determinant(scrambled, PRIMES)
    for p, r in zip(PRIMES, residues, strict=True):
        assert r == int(flint.nmod_mat(A, p).det())  # python-flint nmod_mat.det


@pytest.mark.parametrize("n", [2, 5, 9, 40])
def test_complete_graphs_follow_cayley(n: int) -> None:
    # Cayley (1889): K_n has n^(n-2) spanning trees (OEIS A000272).
    residues = level_determinant(reduced_laplacian(nx.complete_graph(n)), PRIMES)
    assert residues == [pow(n, n - 2, p) for p in PRIMES]


# OEIS A007341: spanning trees of the n x n grid graph, n = 1..8.
GRID_TREES = [
    1, 4, 192, 100352, 557568000, 32565539635200, 19872369301840986112,
    126231322912498539682594816,
]


@pytest.mark.parametrize("n", range(1, 9))
def test_square_grids_match_oeis(n: int) -> None:
    residues = level_determinant(reduced_laplacian(nx.grid_2d_graph(n, n)), PRIMES)
    assert residues == [GRID_TREES[n - 1] % p for p in PRIMES]


def test_rectangular_grid_matches_networkx() -> None:
    G = nx.grid_2d_graph(7, 23)
    trees = round(nx.number_of_spanning_trees(G))  # networkx (float; exact to this size)
    exact = int(flint.fmpz_mat(dense(reduced_laplacian(G))).det())  # python-flint
    assert abs(exact - trees) <= trees // 10**9
    primes = float_primes(30)
    assert level_determinant(reduced_laplacian(G), primes) == [exact % p for p in primes]


@pytest.mark.parametrize(("degree", "n"), [(3, 120), (4, 90), (5, 60)])
def test_random_regular_graphs_match_flint(degree: int, n: int) -> None:
    G = nx.random_regular_graph(degree, n, seed=20261201)
    rows = reduced_laplacian(G)
    exact = int(flint.fmpz_mat(dense(rows)).det())  # python-flint fmpz_mat.det
    primes = float_primes(12)
    assert level_determinant(rows, primes) == [exact % p for p in primes]


def test_wide_level_gives_one_large_block() -> None:
    # A wheel seen from a rim vertex has a level of nearly all rim vertices: one dense block of
    # several hundred rows.  Spanning trees of the wheel with n spokes: L_{2n} - 2 (OEIS A004146).
    spokes = 600
    G = nx.wheel_graph(spokes + 1)
    lucas = [2, 1]
    while len(lucas) <= 2 * spokes:
        lucas.append(lucas[-1] + lucas[-2])
    primes = float_primes(3)
    residues = level_determinant(reduced_laplacian(G), primes)
    assert residues == [(lucas[2 * spokes] - 2) % p for p in primes]


def test_chunked_products(monkeypatch: pytest.MonkeyPatch) -> None:
    # Inner dimensions above CHUNK are split and reduced between chunks; a tiny CHUNK makes
    # every product take that path.
    monkeypatch.setattr(level_module, "CHUNK", 5)
    rng = random.Random(31)
    for symmetric in (False, True):
        rows = random_sparse(rng, 160, 0.03, symmetric)
        A = dense(rows)
        for p, r in zip(PRIMES, level_determinant(rows, PRIMES), strict=True):
            assert r == int(flint.nmod_mat(A, p).det())  # python-flint nmod_mat.det
    G = nx.random_regular_graph(3, 300, seed=5)
    exact = int(flint.fmpz_mat(dense(reduced_laplacian(G))).det())  # python-flint
    assert level_determinant(reduced_laplacian(G), PRIMES) == [exact % p for p in PRIMES]


def test_singular_laplacian_gives_zero_or_none() -> None:
    # The full Laplacian of a connected graph is singular (rank n - 1): common fact.
    for G in (nx.grid_2d_graph(6, 6), nx.random_regular_graph(3, 80, seed=3), nx.path_graph(1)):
        residues = level_determinant(full_laplacian(G), PRIMES)
        assert all(r in (0, None) for r in residues)


def test_trees_and_stars_have_one_spanning_tree() -> None:
    # A tree has exactly one spanning tree: common fact.  Pendant vertices are peeled exactly,
    # so a star with thousands of leaves costs no wide level.
    for G in (nx.star_graph(3000), nx.random_labeled_tree(400, seed=9), nx.path_graph(300)):
        assert level_determinant(reduced_laplacian(G), PRIMES) == [1] * len(PRIMES)


def test_graphs_with_hanging_trees_match_flint() -> None:
    # Pendant trees and paths attached to a dense core; python-flint fmpz_mat.det as reference.
    G = nx.random_regular_graph(4, 60, seed=4)
    rng = random.Random(8)
    for k in range(200):
        G.add_edge(60 + k, rng.randrange(60 + k))
    G.add_edge(300, 301)  # a separate component: the reduced Laplacian is singular
    rows = reduced_laplacian(G)
    exact = int(flint.fmpz_mat(dense(rows)).det())
    assert level_determinant(rows, PRIMES) == [exact % p for p in PRIMES]
    G.remove_nodes_from([300, 301])
    rows = reduced_laplacian(G)
    exact = int(flint.fmpz_mat(dense(rows)).det())
    assert exact != 0
    assert level_determinant(rows, PRIMES) == [exact % p for p in PRIMES]


def test_singular_intermediate_blocks(monkeypatch: pytest.MonkeyPatch) -> None:
    # Adjacency matrix of the path on n vertices: det = (-1)^(n/2) for even n (its one perfect
    # matching), 0 for odd n: common fact.  With one level per block every S_1 = [0] is
    # singular, so each prime must get past it by merging blocks.
    monkeypatch.setattr(level_module, "MERGE_TARGET", 1)
    for n in (40, 41):
        rows: list[dict[int, int]] = [{} for _ in range(n)]
        for i in range(n - 1):
            rows[i][i + 1] = rows[i + 1][i] = 1
        expected = (-1) ** (n // 2) if n % 2 == 0 else 0
        assert level_determinant(rows, PRIMES) == [expected % p for p in PRIMES]
    # Without room to merge, the primes are undecided rather than wrong.
    monkeypatch.setattr(level_module, "MEMORY_BUDGET", 0)
    assert level_determinant(rows, PRIMES) == [None] * len(PRIMES)


def test_primes_in_batches_give_the_same_residues(monkeypatch: pytest.MonkeyPatch) -> None:
    G = nx.random_regular_graph(3, 100, seed=12)
    rows = reduced_laplacian(G)
    primes = float_primes(9)
    whole = level_determinant(rows, primes)
    monkeypatch.setattr(level_module, "MEMORY_BUDGET", 1 << 18)  # a few primes per batch
    assert level_determinant(rows, primes) == whole
    exact = int(flint.fmpz_mat(dense(rows)).det())  # python-flint fmpz_mat.det
    assert whole == [exact % p for p in primes]


def test_relabelling_does_not_change_the_result() -> None:
    G = nx.random_regular_graph(3, 150, seed=11)
    rows = reduced_laplacian(G)
    rng = random.Random(2)
    perm = list(range(len(rows)))
    rng.shuffle(perm)
    where = {old: new for new, old in enumerate(perm)}
    scrambled = [{where[j]: v for j, v in rows[old].items()} for old in perm]
    primes = float_primes(6)
    # A simultaneous permutation of rows and columns keeps det: common fact.
    assert level_determinant(scrambled, primes) == level_determinant(rows, primes)
