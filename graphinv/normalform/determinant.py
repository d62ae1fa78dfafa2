"""Exact determinants of integer matrices.

Dense matrices go to python-flint's ``fmpz_mat.det`` (multi-modular with a Hadamard bound and
a divisor found by a rational solve).  :func:`sparse_determinant` works on large sparse matrices:
Gaussian elimination over word-size primes ``p`` (``det A mod p``), one sweep for many primes at
once, combined by the Chinese remainder theorem until the product of the primes exceeds twice a
bound on ``|det A|``.

References
----------
J. Hadamard, "Résolution d'une question relative aux déterminants", Bull. Sci. Math. 17 (1893).
G. E. Collins, "The calculation of multivariate polynomial resultants", J. ACM 18 (1971)
(the multi-modular method).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from graphinv.normalform._matrix import InvalidMatrixError, as_int_rows, as_sparse_int_rows

__all__ = ["determinant"]


def determinant(matrix: Sequence[Sequence[int]] | Any) -> int:
    """The exact determinant of a square integer matrix.

    Parameters
    ----------
    matrix : sequence of sequences of int

    Returns
    -------
    int

    Raises
    ------
    InvalidMatrixError
        If the matrix is not square.

    Examples
    --------
    >>> determinant([[2, -1, 0], [-1, 2, -1], [0, -1, 2]])
    4
    >>> determinant([])
    1

    References
    ----------
    Collins, J. ACM 18 (1971); Hadamard, Bull. Sci. Math. 17 (1893).
    """
    rows, m, n = as_int_rows(matrix)
    if m != n:
        raise InvalidMatrixError(f"the determinant needs a square matrix, not {m} by {n}")
    if m == 0:
        return 1
    import flint

    return int(flint.fmpz_mat(rows).det())


def sparse_determinant(rows: Sequence[Mapping[int, int]], *, bound: int | None = None) -> int:
    """The exact determinant of a square sparse integer matrix given as rows ``{column: value}``.

    Multi-modular: one sparse elimination sweep (minimum-degree pivots) modulo many primes
    below ``2^31`` at once, the dense remainder by python-flint per prime, then the Chinese
    remainder theorem.

    Parameters
    ----------
    rows : sequence of mappings
        Row ``i`` maps column indices to integers; the matrix is ``len(rows)`` square.
    bound : int, optional
        A known bound on ``|det|``; default Hadamard's bound (product of the row lengths).  For
        a positive semidefinite matrix the product of the diagonal entries is a tighter valid
        bound (Hadamard's inequality).

    Returns
    -------
    int

    Examples
    --------
    >>> sparse_determinant([{0: 2, 1: -1}, {0: -1, 1: 2, 2: -1}, {1: -1, 2: 2}])
    4
    >>> sparse_determinant([{1: 3}, {0: 2}])
    -6

    References
    ----------
    Collins, J. ACM 18 (1971); Hadamard, Bull. Sci. Math. 17 (1893).
    """
    from graphinv.normalform._modular import hadamard_bound
    from graphinv.normalform._modular_elimination import modular_determinant

    checked = as_sparse_int_rows(rows, len(rows))
    limit = hadamard_bound(checked)
    if bound is not None:
        limit = min(limit, bound)
    return modular_determinant(checked, limit)
