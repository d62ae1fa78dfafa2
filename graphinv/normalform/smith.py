"""Smith normal form of an integer matrix, with or without the unimodular transforms.

For an ``m`` by ``n`` integer matrix ``A`` there are unimodular ``U`` (``m`` by ``m``) and ``V``
(``n`` by ``n``) with ``U A V = S`` diagonal, ``S = diag(d_1, ..., d_r, 0, ..., 0)``, every
``d_i > 0`` and ``d_i | d_{i+1}``.  The ``d_i`` (the invariant factors) are unique.

:func:`smith_diagonal` is the fast route (no transforms): unit-pivot sparse elimination, then
the modular finish of :mod:`graphinv.normalform.cokernel` on the dense core.  :func:`smith_form`
with ``transforms=True`` runs the classical elimination with bookkeeping, meant for small and
medium matrices (a few hundred rows).

References
----------
H. J. S. Smith, "On systems of linear indeterminate equations and congruences",
Phil. Trans. R. Soc. London 151 (1861).
R. Kannan, A. Bachem, "Polynomial algorithms for computing the Smith and Hermite normal forms of
an integer matrix", SIAM J. Comput. 8 (1979).
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from graphinv.normalform._matrix import IntMatrix, as_int_rows, identity

__all__ = ["SmithForm", "smith_diagonal", "smith_form"]


def _matmul(A: Sequence[Sequence[int]], B: Sequence[Sequence[int]]) -> list[list[int]]:
    columns = list(zip(*B, strict=True)) if B else []
    return [[sum(a * b for a, b in zip(row, col, strict=True)) for col in columns] for row in A]


@dataclass(frozen=True)
class SmithForm:
    """The Smith normal form ``S = U A V`` of an integer matrix.

    Attributes
    ----------
    diagonal : tuple of int
        All ``min(m, n)`` diagonal entries of ``S``: nonnegative, each dividing the next,
        zeros last.
    shape : tuple of int
        ``(m, n)``, the shape of ``A`` and ``S``.
    U, V : tuple of tuples of int, or None
        Unimodular transforms (determinant ``+1`` or ``-1``) with ``U A V = S``; ``None`` unless
        asked for with ``transforms=True``.
    """

    diagonal: tuple[int, ...]
    shape: tuple[int, int]
    U: IntMatrix | None = None
    V: IntMatrix | None = None

    @property
    def rank(self) -> int:
        """The rank of the matrix (number of nonzero diagonal entries)."""
        return sum(1 for d in self.diagonal if d)

    @property
    def invariant_factors(self) -> tuple[int, ...]:
        """The nonzero diagonal entries (ones included)."""
        return tuple(d for d in self.diagonal if d)

    def matrix(self) -> IntMatrix:
        """``S`` itself, as a tuple of rows."""
        m, n = self.shape
        return tuple(
            tuple(self.diagonal[i] if i == j and i < len(self.diagonal) else 0 for j in range(n))
            for i in range(m)
        )

    def verify(self, matrix: Sequence[Sequence[int]] | Any) -> bool:
        """Check that this is the Smith form of ``matrix``.

        Always checks the shape and the divisibility chain.  With transforms, checks
        ``U A V == S`` exactly and that ``det U`` and ``det V`` are ``+-1``; without them,
        recomputes the diagonal by an independent elimination (the dense classical algorithm).

        Examples
        --------
        >>> A = [[2, 4, 4], [-6, 6, 12], [10, -4, -16]]
        >>> S = smith_form(A, transforms=True)
        >>> S.diagonal, S.verify(A)
        ((2, 6, 12), True)
        """
        from graphinv.normalform.determinant import determinant

        rows, m, n = as_int_rows(matrix)
        if (m, n) != self.shape or len(self.diagonal) != min(m, n):
            return False
        chain = self.diagonal
        for a, b in itertools.pairwise(chain):
            if a < 0 or (a == 0 and b != 0) or (a and b % a):
                return False
        if self.U is None or self.V is None:
            return _classical_diagonal(rows, m, n) == chain
        if _matmul(_matmul(self.U, rows), self.V) != [list(r) for r in self.matrix()]:
            return False
        return abs(determinant(self.U)) == 1 and abs(determinant(self.V)) == 1


def _classical_diagonal(rows: list[list[int]], m: int, n: int) -> tuple[int, ...]:
    from graphinv.normalform._dense import dense_pivots
    from graphinv.normalform._matrix import chain_normalize

    pivots = dense_pivots([row[:] for row in rows])
    return tuple(chain_normalize(pivots + [0] * (min(m, n) - len(pivots))))


def smith_diagonal(matrix: Sequence[Sequence[int]] | Any) -> tuple[int, ...]:
    """The diagonal of the Smith normal form (all ``min(m, n)`` entries, zeros last).

    Parameters
    ----------
    matrix : sequence of sequences of int
        An ``m`` by ``n`` integer matrix.

    Returns
    -------
    tuple of int

    Examples
    --------
    >>> smith_diagonal([[2, -1, -1], [-1, 2, -1], [-1, -1, 2]])
    (1, 3, 0)

    References
    ----------
    Dumas, Saunders, Villard, "On efficient sparse integer matrix Smith normal form
    computations", J. Symbolic Comput. 32 (2001).
    """
    from graphinv.normalform.cokernel import diagonal_of_rows

    rows, m, n = as_int_rows(matrix)
    return diagonal_of_rows(rows, m, n)


def smith_form(matrix: Sequence[Sequence[int]] | Any, *, transforms: bool = False) -> SmithForm:
    """The Smith normal form of an integer matrix.

    Parameters
    ----------
    matrix : sequence of sequences of int
        An ``m`` by ``n`` integer matrix.
    transforms : bool, default False
        Also compute unimodular ``U`` and ``V`` with ``U A V = S`` (classical elimination with
        bookkeeping; meant for matrices up to a few hundred rows).

    Returns
    -------
    SmithForm

    Examples
    --------
    >>> S = smith_form([[0, 2], [3, 0]], transforms=True)
    >>> S.diagonal
    (1, 6)
    >>> S.U, S.V
    (...)
    >>> S.verify([[0, 2], [3, 0]])
    True

    References
    ----------
    Kannan, Bachem, SIAM J. Comput. 8 (1979).
    """
    rows, m, n = as_int_rows(matrix)
    if not transforms:
        return SmithForm(smith_diagonal(rows), (m, n))
    diagonal, U, V = _smith_with_transforms(rows, m, n)
    return SmithForm(
        tuple(diagonal),
        (m, n),
        tuple(tuple(r) for r in U),
        tuple(tuple(r) for r in V),
    )


def _smith_with_transforms(
    rows: list[list[int]], m: int, n: int
) -> tuple[list[int], list[list[int]], list[list[int]]]:
    """Classical Smith elimination keeping ``U`` (row operations) and ``V`` (column ones)."""
    A = [row[:] for row in rows]
    U = identity(m)
    V = identity(n)

    def swap_rows(i: int, k: int) -> None:
        A[i], A[k] = A[k], A[i]
        U[i], U[k] = U[k], U[i]

    def swap_columns(j: int, k: int) -> None:
        for M in (A, V):
            for row in M:
                row[j], row[k] = row[k], row[j]

    def add_row(target: int, source: int, q: int) -> None:
        # row_target -= q * row_source
        for M in (A, U):
            t, s = M[target], M[source]
            M[target] = [x - q * y for x, y in zip(t, s, strict=True)]

    def add_column(target: int, source: int, q: int) -> None:
        for M in (A, V):
            for row in M:
                row[target] -= q * row[source]

    t = 0
    while t < min(m, n):
        best = None
        for i in range(t, m):
            for j in range(t, n):
                v = A[i][j]
                if v and (best is None or abs(v) < best[0]):
                    best = (abs(v), i, j)
        if best is None:
            break
        _, i, j = best
        swap_rows(t, i)
        swap_columns(t, j)
        while True:
            p = A[t][t]
            for i in range(t + 1, m):
                if A[i][t]:
                    add_row(i, t, A[i][t] // p)
            rest = [(abs(A[i][t]), i) for i in range(t + 1, m) if A[i][t]]
            if rest:
                swap_rows(t, min(rest)[1])
                continue
            for j in range(t + 1, n):
                if A[t][j]:
                    add_column(j, t, A[t][j] // p)
            rest = [(abs(A[t][j]), j) for j in range(t + 1, n) if A[t][j]]
            if rest:
                swap_columns(t, min(rest)[1])
                continue
            bad = next(
                (i for i in range(t + 1, m) for j in range(t + 1, n) if A[i][j] % p),
                None,
            )
            if bad is None:
                break
            # Bring an entry the pivot does not divide into row t; the next round shrinks p.
            add_row(t, bad, -1)
        if A[t][t] < 0:
            A[t] = [-x for x in A[t]]
            U[t] = [-x for x in U[t]]
        t += 1
    diagonal = [A[i][i] for i in range(min(m, n))]
    return diagonal, U, V
