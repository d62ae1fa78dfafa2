"""Hermite normal form of an integer matrix (row style).

Convention: ``H = U A`` with ``U`` unimodular (``m`` by ``m``) and ``H`` in row echelon form:
the leading (pivot) entry of each nonzero row is positive and lies strictly to the right of the
pivot of the row above, the entries above a pivot lie in ``0 <= h < pivot``, and zero rows come
last.  The nonzero rows of ``H`` are the unique reduced basis of the lattice spanned by the rows
of ``A``.  (SymPy's ``hermite_normal_form`` uses the column convention: apply it to the
transpose and compare after transposing and removing zero columns.)

References
----------
C. Hermite, "Sur l'introduction des variables continues dans la théorie des nombres",
J. Reine Angew. Math. 41 (1851).
H. Cohen, *A Course in Computational Algebraic Number Theory*, Springer 1993, §2.4.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from graphinv.normalform._matrix import IntMatrix, as_int_rows, identity

__all__ = ["HermiteForm", "hermite_form"]


@dataclass(frozen=True)
class HermiteForm:
    """The row-style Hermite normal form ``H = U A``.

    Attributes
    ----------
    H : tuple of tuples of int
        The Hermite normal form (same shape as ``A``).
    U : tuple of tuples of int
        A unimodular matrix with ``U A = H``.
    pivots : tuple of int
        The pivot column of each nonzero row of ``H``.
    """

    H: IntMatrix
    U: IntMatrix
    pivots: tuple[int, ...]

    @property
    def rank(self) -> int:
        """The rank of ``A`` (number of nonzero rows of ``H``)."""
        return len(self.pivots)

    def verify(self, matrix: Sequence[Sequence[int]] | Any) -> bool:
        """Check ``U A == H``, ``det U = +-1`` and the echelon conditions.

        Examples
        --------
        >>> A = [[2, 3], [4, 5]]
        >>> hermite_form(A).verify(A)
        True
        """
        from graphinv.normalform.determinant import determinant
        from graphinv.normalform.smith import _matmul

        rows, _, _ = as_int_rows(matrix)
        if [list(r) for r in self.H] != _matmul(self.U, rows):
            return False
        if abs(determinant(self.U)) != 1:
            return False
        previous = -1
        for i, row in enumerate(self.H):
            lead = next((j for j, v in enumerate(row) if v), None)
            if lead is None:
                if any(any(r) for r in self.H[i:]):
                    return False
                break
            if lead <= previous or row[lead] <= 0 or self.pivots[i] != lead:
                return False
            if any(not 0 <= self.H[r][lead] < row[lead] for r in range(i)):
                return False
            previous = lead
        return True


def hermite_form(matrix: Sequence[Sequence[int]] | Any) -> HermiteForm:
    """The row-style Hermite normal form ``H = U A`` of an integer matrix.

    Parameters
    ----------
    matrix : sequence of sequences of int

    Returns
    -------
    HermiteForm

    Examples
    --------
    >>> F = hermite_form([[2, 3], [4, 5]])
    >>> F.H, F.U
    (((2, 0), (0, 1)), ((-5, 3), (2, -1)))

    References
    ----------
    Cohen, *A Course in Computational Algebraic Number Theory* (1993), Algorithm 2.4.4 (row
    version).
    """
    rows, m, n = as_int_rows(matrix)
    A = [row[:] for row in rows]
    U = identity(m)

    def combine(target: int, source: int, q: int) -> None:
        A[target] = [x - q * y for x, y in zip(A[target], A[source], strict=True)]
        U[target] = [x - q * y for x, y in zip(U[target], U[source], strict=True)]

    pivots: list[int] = []
    r = 0
    for c in range(n):
        if r == m:
            break
        while True:
            live = [(abs(A[i][c]), i) for i in range(r, m) if A[i][c]]
            if not live:
                break
            _, i = min(live)
            A[r], A[i] = A[i], A[r]
            U[r], U[i] = U[i], U[r]
            if len(live) == 1:
                break
            for i in range(r + 1, m):
                if A[i][c]:
                    combine(i, r, A[i][c] // A[r][c])
        if not A[r][c]:
            continue
        if A[r][c] < 0:
            A[r] = [-x for x in A[r]]
            U[r] = [-x for x in U[r]]
        for i in range(r):
            if A[i][c]:
                combine(i, r, A[i][c] // A[r][c])
        pivots.append(c)
        r += 1
    return HermiteForm(tuple(map(tuple, A)), tuple(map(tuple, U)), tuple(pivots))
