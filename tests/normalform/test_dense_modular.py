"""Dense determinants modulo many primes (graphinv.normalform._dense_modular).

Reference values: python-flint (FLINT's ``fmpz_mat.det`` and ``nmod_mat.det``), closed forms of
the Vandermonde determinant (common fact) and of the spanning-tree count of the complete graph
(Cayley 1889: ``K_n`` has ``n^(n-2)`` spanning trees; by Kirchhoff's matrix-tree theorem that is
the determinant of its reduced Laplacian).
"""

from __future__ import annotations

import random
from math import prod

import flint
import pytest

from graphinv.normalform import _dense_modular
from graphinv.normalform._dense_modular import dense_determinants
from graphinv.normalform._level_determinant import float_primes
from graphinv.normalform._matrix import InvalidMatrixError

PRIMES = [*float_primes(5), 2, 3, 101]


def random_rows(rnd: random.Random, k: int, bits: int) -> list[list[int]]:
    return [[rnd.randrange(-(1 << bits), 1 << bits) for _ in range(k)] for _ in range(k)]


def flint_residues(rows: list[list[int]], primes: list[int]) -> list[int]:
    # Reference library: python-flint, exact integer determinant reduced modulo each prime.
    det = int(flint.fmpz_mat(rows).det()) if rows else 1
    return [det % q for q in primes]


@pytest.mark.parametrize("k", [0, 1, 2, 3, 7, 16, 17, 40])
@pytest.mark.parametrize("bits", [4, 62, 63, 100])
def test_random_matches_flint(k: int, bits: int) -> None:
    rnd = random.Random(1000 * k + bits)
    rows = random_rows(rnd, k, bits)
    assert dense_determinants(rows, PRIMES) == flint_residues(rows, PRIMES)


def test_large_blocked_path_matches_flint_nmod_mat() -> None:
    # k = 200 > BASE: recursive panels, triangular solves and updates; python-flint nmod_mat.
    rnd = random.Random(7)
    rows = random_rows(rnd, 200, 70)
    primes = float_primes(12)
    expected = [int(flint.nmod_mat(rows, q).det()) for q in primes]
    assert dense_determinants(rows, primes) == expected


@pytest.mark.parametrize("k", [50, 110])
def test_batches_of_primes(monkeypatch: pytest.MonkeyPatch, k: int) -> None:
    # Entries beyond 2^63 are reduced into a (W, k, k) array; a tiny memory budget forces one
    # prime per batch (k = 110 also uses worker threads); python-flint fmpz_mat.det.
    monkeypatch.setattr(_dense_modular, "MEMORY_BUDGET", 1)
    rnd = random.Random(8)
    rows = random_rows(rnd, k, 70)
    assert dense_determinants(rows, PRIMES) == flint_residues(rows, PRIMES)


def test_huge_entries_and_negatives() -> None:
    rnd = random.Random(9)
    rows = random_rows(rnd, 30, 1000)
    rows[3][4] = -(1 << 3000) + 12345
    assert dense_determinants(rows, PRIMES) == flint_residues(rows, PRIMES)


def test_entries_at_the_int64_edges() -> None:
    rows = [[(1 << 63) - 1, -(1 << 63)], [-(1 << 63) + 1, (1 << 62) + 3]]
    assert dense_determinants(rows, PRIMES) == flint_residues(rows, PRIMES)
    rows = [[1 << 63, 1], [5, -(1 << 64)]]
    assert dense_determinants(rows, PRIMES) == flint_residues(rows, PRIMES)


def test_zero_leading_entries_need_pivoting() -> None:
    # Every leading principal minor vanishes, yet det = +-1 (a permutation matrix); flint.
    k = 70
    rows = [[1 if j == (i + 1) % k else 0 for j in range(k)] for i in range(k)]
    assert dense_determinants(rows, PRIMES) == flint_residues(rows, PRIMES)
    rnd = random.Random(10)
    rows = random_rows(rnd, 60, 20)
    for i in range(60):
        rows[i][0] = 0 if i < 59 else 1
        rows[i][33] = 0 if i != 40 else 7
    assert dense_determinants(rows, PRIMES) == flint_residues(rows, PRIMES)


def test_singular_over_the_integers() -> None:
    rnd = random.Random(11)
    rows = random_rows(rnd, 45, 50)
    rows[44] = [a + 3 * b for a, b in zip(rows[0], rows[20], strict=True)]
    assert dense_determinants(rows, PRIMES) == [0] * len(PRIMES)


def test_singular_modulo_some_primes_only() -> None:
    # Row 30 is row 31 plus p1 * p2 times a random vector: singular modulo p1 and p2 only.
    rnd = random.Random(12)
    primes = float_primes(6)
    rows = random_rows(rnd, 50, 40)
    factor = primes[1] * primes[4]
    rows[30] = [a + factor * rnd.randrange(-1000, 1000) for a in rows[31]]
    result = dense_determinants(rows, primes)
    assert result == flint_residues(rows, primes)
    assert result[1] == result[4] == 0
    assert all(result[i] != 0 for i in (0, 2, 3, 5))


def test_vandermonde() -> None:
    # Vandermonde determinant det[x_i^j] = prod_{i<j} (x_j - x_i) (common fact).
    xs = [3 * i * i - 7 * i + 2 for i in range(24)]
    rows = [[x**j for j in range(len(xs))] for x in xs]
    det = prod(xs[j] - xs[i] for j in range(len(xs)) for i in range(j))
    assert dense_determinants(rows, PRIMES) == [det % q for q in PRIMES]


@pytest.mark.parametrize("n", [2, 3, 10, 41, 90])
def test_complete_graph_spanning_trees(n: int) -> None:
    # Cayley 1889: K_n has n^(n-2) spanning trees = det of the reduced Laplacian (Kirchhoff).
    rows = [[n - 1 if i == j else -1 for j in range(n - 1)] for i in range(n - 1)]
    primes = [*float_primes(4), 7]
    assert dense_determinants(rows, primes) == [n ** (n - 2) % q for q in primes]


def test_repeated_and_small_primes() -> None:
    rows = [[4, 1], [2, 9]]  # det 34 = 2 * 17
    assert dense_determinants(rows, [2, 17, 2, 3, 4194301]) == [0, 0, 0, 1, 34]
    assert dense_determinants(rows, []) == []


def test_accepts_tuples_and_numpy() -> None:
    import numpy as np

    assert dense_determinants(((2, 1), (1, 2)), [5]) == [3]  # type: ignore[arg-type]
    assert dense_determinants(np.array([[2, 1], [1, 2]]), [5]) == [3]  # type: ignore[arg-type]


def test_bad_input() -> None:
    with pytest.raises(InvalidMatrixError, match="square"):
        dense_determinants([[1, 2, 3], [4, 5, 6]], [5])
    with pytest.raises(InvalidMatrixError, match="row 1"):
        dense_determinants([[1, 2], [3]], [5])
    with pytest.raises(InvalidMatrixError, match="integer"):
        dense_determinants([[1, 2.5], [3, 4]], [5])  # type: ignore[list-item]
    with pytest.raises(InvalidMatrixError, match="integer"):
        dense_determinants([[True, 2], [3, 4]], [5])
    for bad in (4, 1, 1 << 22, 4194303, 5.0, True, -7):
        with pytest.raises(ValueError, match="primes below"):
            dense_determinants([[1]], [bad])  # type: ignore[list-item]


def test_primes_shared_among_threads(monkeypatch: pytest.MonkeyPatch) -> None:
    # Three worker threads over seven primes (uneven shares); python-flint nmod_mat.
    monkeypatch.setattr(_dense_modular, "_worker_count", lambda k: 3)
    rnd = random.Random(13)
    rows = random_rows(rnd, 100, 64)
    primes = float_primes(7)
    expected = [int(flint.nmod_mat(rows, q).det()) for q in primes]
    assert dense_determinants(rows, primes) == expected


@pytest.mark.slow
def test_inner_dimension_beyond_chunk() -> None:
    # k = 1100: the top-level products have inner dimension 550 > CHUNK = 512 and are split;
    # python-flint nmod_mat as reference.
    rnd = random.Random(14)
    rows = random_rows(rnd, 1100, 40)
    primes = float_primes(2)
    expected = [int(flint.nmod_mat(rows, q).det()) for q in primes]
    assert dense_determinants(rows, primes) == expected
