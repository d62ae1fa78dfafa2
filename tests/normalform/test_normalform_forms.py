"""Smith and Hermite normal forms, cokernels and determinants of integer matrices.

Reference libraries: SymPy (``invariant_factors``, ``hermite_normal_form``, ``Matrix.det``) and
python-flint (``fmpz_mat.snf``, ``fmpz_mat.hnf``, ``fmpz_mat.det``), on seeded random matrices.
"""

from __future__ import annotations

import random

import flint
import numpy as np
import pytest
from sympy import ZZ, Matrix
from sympy.matrices.normalforms import hermite_normal_form, invariant_factors

from graphinv.normalform import (
    Cokernel,
    InvalidMatrixError,
    cokernel,
    determinant,
    hermite_form,
    smith_diagonal,
    smith_form,
    sparse_cokernel,
    sparse_determinant,
)
from graphinv.normalform._matrix import chain_normalize
from graphinv.normalform._modular import modular_core_diagonal


def random_matrix(rng: random.Random, m: int, n: int, spread: int = 6) -> list[list[int]]:
    entries = [0, 0, 1, -1, *range(-spread, spread + 1)]
    return [[rng.choice(entries) for _ in range(n)] for _ in range(m)]


def mixed_diagonal(rng: random.Random, diagonal: list[int], rounds: int) -> list[list[int]]:
    """``diag(diagonal)`` mixed by ``rounds`` random unimodular row or column operations (the
    Smith form is unchanged: common fact)."""
    k = len(diagonal)
    A = [[diagonal[i] if i == j else 0 for j in range(k)] for i in range(k)]
    for _ in range(rounds):
        i, j = rng.sample(range(k), 2)
        c = rng.randrange(-2, 3)
        if rng.random() < 0.5:
            A[i] = [x + c * y for x, y in zip(A[i], A[j], strict=True)]
        else:
            for row in A:
                row[i] += c * row[j]
    return A


def flint_diagonal(A: list[list[int]]) -> tuple[int, ...]:
    m, n = len(A), len(A[0]) if A else 0
    S = flint.fmpz_mat(A).snf()
    return tuple(int(S[i, i]) for i in range(min(m, n)))


def sympy_factors(A: list[list[int]]) -> tuple[int, ...]:
    return tuple(int(d) for d in invariant_factors(Matrix(A), domain=ZZ))


CASES = [(seed, 1 + seed % 7, 1 + (seed * 5) % 8) for seed in range(240)]


@pytest.mark.parametrize(("seed", "m", "n"), CASES)
def test_smith_diagonal_agrees_with_flint(seed, m, n):
    # Reference: python-flint fmpz_mat.snf on the same seeded random matrix.
    A = random_matrix(random.Random(seed), m, n)
    assert smith_diagonal(A) == flint_diagonal(A)


@pytest.mark.parametrize("seed", range(60))
def test_smith_diagonal_agrees_with_sympy(seed):
    # Reference: SymPy invariant_factors (the diagonal of its Smith form).
    rng = random.Random(10_000 + seed)
    A = random_matrix(rng, rng.randrange(1, 6), rng.randrange(1, 6))
    assert smith_diagonal(A) == sympy_factors(A)


@pytest.mark.parametrize("seed", range(80))
def test_transforms_verify(seed):
    # U A V == S with det U, det V = +-1, and the diagonal is python-flint's.
    rng = random.Random(20_000 + seed)
    m, n = rng.randrange(1, 7), rng.randrange(1, 7)
    A = random_matrix(rng, m, n, spread=20)
    S = smith_form(A, transforms=True)
    assert S.diagonal == flint_diagonal(A)
    assert S.U is not None and S.V is not None
    product = (np.array(S.U, dtype=object) @ np.array(A, dtype=object)) @ np.array(
        S.V, dtype=object
    )
    assert [list(r) for r in product] == [list(r) for r in S.matrix()]
    assert abs(int(flint.fmpz_mat([list(r) for r in S.U]).det())) == 1
    assert abs(int(flint.fmpz_mat([list(r) for r in S.V]).det())) == 1
    assert S.verify(A)


def test_verify_rejects_wrong_forms():
    A = [[2, 4], [6, 8]]
    S = smith_form(A, transforms=True)
    assert not type(S)((2, 8), (2, 2), S.U, S.V).verify(A)
    assert not type(S)((2, 4), (2, 2)).verify([[2, 0], [0, 8]])
    assert not type(S)((4, 2), (2, 2)).verify(A)


@pytest.mark.parametrize("seed", range(60))
def test_hermite_agrees_with_flint_and_sympy(seed):
    # Reference: python-flint fmpz_mat.hnf (same row convention, so equal entry by entry) and
    # SymPy hermite_normal_form (column convention on the transpose: its basis must span the
    # same lattice, so our form of its basis is our form of A, the HNF being unique).
    rng = random.Random(30_000 + seed)
    m, n = rng.randrange(1, 6), rng.randrange(1, 6)
    A = random_matrix(rng, m, n)
    F = hermite_form(A)
    assert F.verify(A)
    assert [list(r) for r in F.H] == [
        [int(x) for x in row] for row in flint.fmpz_mat(A).hnf().tolist()
    ]
    basis = hermite_normal_form(Matrix(A).T).T.tolist()
    if basis and basis[0]:
        G = hermite_form([[int(x) for x in row] for row in basis])
        assert [r for r in G.H if any(r)] == [r for r in F.H if any(r)]


@pytest.mark.parametrize("seed", range(40))
def test_determinant_agrees_with_sympy(seed):
    # Reference: SymPy Matrix.det (Bareiss), and the sparse multi-modular route.
    rng = random.Random(40_000 + seed)
    n = rng.randrange(1, 9)
    A = random_matrix(rng, n, n, spread=30)
    expected = int(Matrix(A).det())
    assert determinant(A) == expected
    assert sparse_determinant([{j: v for j, v in enumerate(r) if v} for r in A]) == expected


@pytest.mark.parametrize("seed", range(6))
def test_sparse_determinant_beyond_the_dense_start(seed):
    # A sparse banded matrix large enough for the elimination sweep; reference python-flint det.
    rng = random.Random(50_000 + seed)
    n = 150
    A = [[0] * n for _ in range(n)]
    for i in range(n):
        A[i][i] = rng.randrange(3, 9)
        for j in (i - 7, i + 1, i + 13):
            if 0 <= j < n:
                A[i][j] = rng.choice([-2, -1, 1, 3])
    rows = [{j: v for j, v in enumerate(r) if v} for r in A]
    assert sparse_determinant(rows) == int(flint.fmpz_mat(A).det())


def test_cokernel_basics():
    # Z^n / row lattice: Laplacian of the 4-cycle is Z/4 + Z (common fact).
    C4 = [[2, -1, 0, -1], [-1, 2, -1, 0], [0, -1, 2, -1], [-1, 0, -1, 2]]
    assert cokernel(C4) == Cokernel((4,), 1)
    assert cokernel([[0, 0, 0]]) == Cokernel((), 3)
    assert cokernel([[6, 0], [0, 4]]) == Cokernel((2, 12), 0)
    assert cokernel([]) == Cokernel((), 0)
    assert sparse_cokernel([{0: 3}], n_columns=2) == Cokernel((3,), 1)
    assert Cokernel((2, 6), 1).torsion_order == 12


@pytest.mark.parametrize("seed", range(12))
def test_modular_finish_agrees_with_flint(seed):
    # Dense nonsingular matrices with a rich group structure (diag * unimodular mixing);
    # reference python-flint fmpz_mat.snf.
    rng = random.Random(60_000 + seed)
    k = rng.randrange(25, 45)
    diagonal = [rng.choice([1, 1, 2, 3, 4, 6, 12, 5, 10]) for _ in range(k)]
    A = mixed_diagonal(rng, diagonal, 4 * k)
    expected = [d for d in flint_diagonal(A) if d]
    assert modular_core_diagonal([row[:] for row in A]) == expected
    assert list(smith_diagonal(A)) == expected


def test_chain_normalize():
    # diag(a, b) ~ diag(gcd, lcm) (common fact)
    assert chain_normalize([4, 6]) == [2, 12]
    assert chain_normalize([0, 3, 1]) == [1, 3, 0]


@pytest.mark.parametrize(
    ("bad", "message"),
    [
        ([[1, 2], [3]], "row 1 has 1 entries"),
        ([[1, 0.5]], "must be an integer"),
        ([[1, "2"]], "must be an integer"),
        ("12", "expected a matrix"),
        ([[True]], "must be an integer"),
    ],
)
def test_bad_matrices(bad, message):
    with pytest.raises(InvalidMatrixError, match=message):
        smith_diagonal(bad)


def test_bad_shapes():
    with pytest.raises(InvalidMatrixError, match="square"):
        determinant([[1, 2]])
    with pytest.raises(InvalidMatrixError, match="outside"):
        sparse_cokernel([{5: 1}], n_columns=2)
    with pytest.raises(InvalidMatrixError, match="not an integer"):
        sparse_determinant([{0: 1.5}])


def test_small_matrix_speed_path_accepts_numpy():
    A = np.array([[2, -1], [-1, 2]])
    assert smith_diagonal(A) == (1, 3)


@pytest.mark.parametrize(("seed", "m", "n"), CASES[:120])
def test_pure_python_tiny_elimination_agrees_with_flint_and_sympy(seed, m, n):
    # Tiny matrices are diagonalized by FLINT in production; the project's own pivoting
    # elimination (used for empty shapes and as the sparse path's dense finish) must give the
    # same invariants. References: python-flint fmpz_mat.snf and SymPy invariant_factors.
    from graphinv.normalform.cokernel import _tiny_invariants

    A = random_matrix(random.Random(50_000 + seed), m, n)
    units, core = _tiny_invariants([row[:] for row in A])
    ours = tuple([1] * units + core)
    expected = tuple(d for d in flint_diagonal(A) if d)
    assert ours == expected
    assert tuple(d for d in ours if d > 1) == tuple(d for d in sympy_factors(A) if d > 1)


def test_sparse_path_agrees_with_flint_beyond_the_tiny_size():
    # Matrices above the tiny size go through unit-pivot elimination and the modular finish.
    # Reference: python-flint fmpz_mat.snf.
    rng = random.Random(77)
    for _ in range(20):
        A = random_matrix(rng, 22, 21, spread=3)
        assert smith_diagonal(A) == flint_diagonal(A)


@pytest.mark.parametrize("seed", range(10))
def test_modular_finish_few_hard_primes_agrees_with_flint(seed):
    # Mostly units with a few non-cyclic primes (the p-adic Schur complement route of the local
    # Smith forms); reference python-flint fmpz_mat.snf.
    rng = random.Random(70_000 + seed)
    k = rng.randrange(60, 90)
    tail = rng.sample([2, 4, 8, 3, 9, 6, 12, 24, 5, 25, 7, 49, 36, 60], 6)
    diagonal = [1] * (k - len(tail)) + tail
    A = mixed_diagonal(rng, diagonal, 6 * k)
    expected = [d for d in flint_diagonal(A) if d]
    assert modular_core_diagonal([row[:] for row in A]) == expected
