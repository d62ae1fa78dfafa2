"""Determinants modulo primes along a recorded order of unit pivots.

The exact unit-pivot elimination (:mod:`graphinv.normalform._sparse`) records where its ``+-1``
pivots were, ``(row, column)`` in order.  Replaying that order on the matrix's own entries is a
second, separate computation of the same Schur complement: a plain dense ``int64`` elimination
by row operations only, with an overflow guard.  Row operations keep the determinant, and after
them the rows and columns, pivots first, form a block upper triangular matrix
``[[T, X], [0, S]]`` with ``T`` triangular, so

    ``det A = sgn(rows) sgn(columns) prod(pivots) det S``,

``sgn`` being the signs of the two orderings.  ``det S`` modulo word-size primes comes from the
batched float64 LU of :mod:`graphinv.normalform._level_determinant` (all primes at once).  A
recorded pivot that is not ``+-1`` on replay, or an entry that would reach ``2^31``, makes the
replay decline, and the caller computes the residues another way; a residue returned is always
exact.  This is how the critical-group certificate confirms a determinant on graphs of a few
thousand vertices in a few milliseconds, instead of sweeping the whole matrix once per batch.

References
----------
G. H. Golub, C. F. Van Loan, *Matrix Computations*, 4th ed. (2013), 3.2 (Gaussian elimination,
Schur complements); J.-G. Dumas, B. D. Saunders, G. Villard, J. Symbolic Comput. 32 (2001)
(unit pivots on integer matrices).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

__all__ = ["REPLAY_LIMIT", "replay_determinant"]

REPLAY_LIMIT = 2500
"""Largest order replayed (a dense ``int64`` copy: 50 MB at this size)."""

BATCH_ENTRIES = 1 << 22
"""Residues of the rest held at once (32 MB of float64); more primes go in batches."""

_KERNELS: list[Any] = []


def replay_determinant(
    rows: Sequence[Mapping[int, int]], pivots: Sequence[tuple[int, int]], primes: list[int]
) -> list[int] | None:
    """``det A mod p`` for each prime, by replaying the unit pivots ``(row, column)``.

    Parameters
    ----------
    rows : sequence of mappings
        The square matrix ``A``, rows ``{column: int}`` (read only).
    pivots : list of (int, int)
        Positions of ``+-1`` pivots, in elimination order, each in a row and column not used
        before.
    primes : list of int
        Primes below ``2^22`` (:func:`graphinv.normalform._level_determinant.float_primes`).

    Returns
    -------
    list of int or None
        Residues in ``[0, p)``; ``None`` when the replay does not apply (order above
        ``REPLAY_LIMIT``, an entry of ``2^31`` or more, or a recorded pivot that is not
        ``+-1`` here).

    Examples
    --------
    The reduced Laplacian of the 4-cycle (4 spanning trees), pivot at row 0, column 1:

    >>> replay_determinant([{0: 2, 1: -1}, {0: -1, 1: 2, 2: -1}, {1: -1, 2: 2}], [(0, 1)], [7, 5])
    [4, 4]

    References
    ----------
    Golub, Van Loan, *Matrix Computations* (2013), 3.2.
    """
    import numpy as np

    from graphinv.normalform._level_determinant import _check_primes, dense_determinants_mod

    moduli = _check_primes(primes)
    n = len(rows)
    if n > REPLAY_LIMIT:
        return None
    A = np.zeros((n, n), dtype=np.int64)
    for i, row in enumerate(rows):
        for j, v in row.items():
            if not -(1 << 31) < v < 1 << 31:
                return None
            A[i, j] = v
    prow = np.array([r for r, _ in pivots], dtype=np.int64)
    pcol = np.array([c for _, c in pivots], dtype=np.int64)
    live_rows = np.ones(n, dtype=np.bool_)
    live_cols = np.ones(n, dtype=np.bool_)
    status, sign = _kernels().replay(A, prow, pcol, live_rows, live_cols)
    if status:
        return None
    rest_rows = np.flatnonzero(live_rows)
    rest_cols = np.flatnonzero(live_cols)
    sign *= _parity(np.concatenate((prow, rest_rows))) * _parity(np.concatenate((pcol, rest_cols)))
    if len(rest_rows) == 0:
        return [sign % q for q in moduli]
    found = dense_determinants_mod(A[np.ix_(rest_rows, rest_cols)], moduli, BATCH_ENTRIES)
    return [d * sign % q for d, q in zip(found, moduli, strict=True)]


def _parity(order: Any) -> int:
    """The sign of a permutation of ``0..n-1`` given as a sequence."""
    return int(_kernels().parity(order))


def _kernels() -> Any:
    """The compiled kernels (numba, cached on disk after the first compilation)."""
    if not _KERNELS:
        from types import SimpleNamespace

        import numba

        jit = numba.njit(cache=True)
        _KERNELS.append(SimpleNamespace(replay=jit(_replay), parity=jit(_permutation_sign)))
    return _KERNELS[0]


# Compiled by numba (see _kernels).


def _replay(A: Any, prow: Any, pcol: Any, live_rows: Any, live_cols: Any) -> tuple[int, int]:
    """Row operations along the pivots, in place; ``(status, product of the pivots)`` with
    status 0 done, 1 a pivot not +-1, 2 an entry out of range, 3 a row or column used twice."""
    n = A.shape[0]
    limit = 1 << 31
    columns = [0] * 0
    product = 1
    for t in range(len(prow)):
        r = prow[t]
        c = pcol[t]
        if r < 0 or r >= n or c < 0 or c >= n or not live_rows[r] or not live_cols[c]:
            return 3, 0
        a = A[r, c]
        if a != 1 and a != -1:
            return 1, 0
        product *= a
        live_rows[r] = False
        live_cols[c] = False
        columns.clear()
        for j in range(n):
            if live_cols[j] and A[r, j] != 0:
                columns.append(j)
        for i in range(n):
            if not live_rows[i]:
                continue
            f = A[i, c]
            if f == 0:
                continue
            f *= a  # a = +-1 is its own inverse
            for j in columns:
                x = A[i, j] - f * A[r, j]
                if x >= limit or x <= -limit:
                    return 2, 0
                A[i, j] = x
            A[i, c] = 0
    return 0, product


def _permutation_sign(order: Any) -> int:
    n = len(order)
    seen = [False] * n
    sign = 1
    for start in range(n):
        if seen[start]:
            continue
        length = 0
        k = start
        while not seen[k]:
            seen[k] = True
            k = order[k]
            length += 1
        if length % 2 == 0:
            sign = -sign
    return sign
