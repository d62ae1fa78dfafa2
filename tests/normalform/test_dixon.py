"""Rational solutions by p-adic lifting against python-flint's exact solver.

References: J. D. Dixon, "Exact solution of linear equations using p-adic expansions", Numer.
Math. 40 (1982); rational reconstruction, Wang, Guy, Davenport, SIGSAM Bull. 16 (1982).  The
reference values come from python-flint (``fmpz_mat.solve``, ``fmpz_mat.det``) and Python's
``fractions.Fraction``.
"""

from __future__ import annotations

import math
import random
from fractions import Fraction

import flint
import networkx as nx
import pytest

from graphinv.matrices import laplacian_matrix
from graphinv.normalform._dixon import rational_reconstruction, solve_lifting
from graphinv.normalform.cokernel import sparse_cokernel_witness
from graphinv.normalform.determinant import subgroup_order


def flint_solution(rows: list[list[int]], B: list[list[int]]) -> tuple[list[int], list[list[int]]]:
    X = flint.fmpz_mat(rows).solve(flint.fmpz_mat(B))
    k = len(rows)
    orders, numerators = [], []
    for j in range(len(B[0])):
        lcd = math.lcm(*(int(X[i, j].denom()) for i in range(k)))
        orders.append(lcd)
        numerators.append([int(X[i, j].numer()) * (lcd // int(X[i, j].denom())) for i in range(k)])
    return orders, numerators


@pytest.mark.parametrize("seed", range(40))
def test_reconstruction_recovers_fractions(seed):
    # Reference: Python's Fraction; n/d is recovered from n d^-1 mod m when 2 N d < m.
    rng = random.Random(seed)
    m = 1_000_003**14  # a prime power, as in the lifting (about 279 bits)
    n, d = rng.randrange(-(1 << 90), 1 << 90), rng.randrange(1, 1 << 90)
    while math.gcd(d, m) != 1:
        d += 1
    bound = m // (2 << 90)
    found = rational_reconstruction(n * pow(d, -1, m) % m, m, bound)
    assert found is not None and Fraction(*found) == Fraction(n, d)


@pytest.mark.parametrize("seed", range(30))
def test_random_systems_match_flint(seed):
    # Reference: python-flint's exact rational solve (fmpz_mat.solve).
    rng = random.Random(seed)
    k = rng.choice([3, 10, 17, 40, 90])
    rows = [[rng.randrange(-50, 51) for _ in range(k)] for _ in range(k)]
    det = int(flint.fmpz_mat(rows).det())
    if det == 0:
        pytest.skip("singular draw")
    B = [[rng.randrange(-(1 << 20), 1 << 20) for _ in range(2)] for _ in range(k)]
    assert solve_lifting(rows, B, det_bound=abs(det)) == flint_solution(rows, B)


@pytest.mark.parametrize("n", [30, 80, 160])
def test_laplacian_core_matches_flint(n):
    # The reduced Laplacian of a random 4-regular graph: denominators up to the tree count
    # (several hundred bits).  Reference: python-flint.
    G = nx.random_regular_graph(4, n, seed=n)
    L = laplacian_matrix(G).to_rows()
    rows = [[L[i].get(j, 0) for j in range(n - 1)] for i in range(n - 1)]
    bound = math.prod(row[i] for i, row in enumerate(rows))  # Hadamard (PSD): the diagonal
    rng = random.Random(n)
    B = [[rng.randrange(-99, 100)] for _ in range(n - 1)]
    assert solve_lifting(rows, B, det_bound=bound) == flint_solution(rows, B)


def test_too_small_a_bound_still_exact_or_declined():
    # A bound far below |det| may not reconstruct; the answer is then None (never wrong).
    rng = random.Random(5)
    k = 30
    rows = [[rng.randrange(-50, 51) for _ in range(k)] for _ in range(k)]
    B = [[rng.randrange(-9, 10)] for _ in range(k)]
    got = solve_lifting(rows, B, det_bound=3)
    assert got is None or got == flint_solution(rows, B)


def test_declines_singular_and_huge_entries():
    # A singular matrix has no inverse modulo any prime; entries of 2^50 leave no exact float
    # product.  Both are declined (the caller falls back to python-flint).
    assert solve_lifting([[1, 2], [2, 4]], [[1], [1]], det_bound=10) is None
    assert solve_lifting([[1 << 50, 1], [1, 1]], [[1], [1]], det_bound=1 << 52) is None


def test_early_stopped_subgroup_order_divides_the_determinant():
    # With ``enough`` the order read from some coordinates still divides det A (the image of a
    # subgroup under a projection); reference: python-flint det of a 20 x 20 grid's reduced
    # Laplacian, which has two large invariant factors.
    G = nx.grid_2d_graph(20, 20)
    L = laplacian_matrix(G).to_rows()
    n = len(L) - 1
    rows = [{j: v for j, v in row.items() if j < n} for row in L[:n]]
    _, witness = sparse_cokernel_witness([dict(r) for r in rows], n_columns=n)
    assert witness is not None
    det = int(flint.fmpz_mat([[r.get(j, 0) for j in range(n)] for r in rows]).det())
    full = subgroup_order(rows, *witness)
    early = subgroup_order(rows, *witness, enough=2)
    assert det % full == 0 and full % early == 0 and early >= 2
