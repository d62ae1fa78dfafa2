"""Dense Smith-form elimination over the integers for small matrices.

The classical algorithm: take a nonzero entry of least absolute value as pivot, reduce its row
and column by division with remainder, repeat with a smaller remainder until the row and column
are clear, then drop them.  The pivots are the diagonal of a diagonal matrix equivalent to the
input; :func:`graphinv.normalform._matrix.chain_normalize` turns them into invariant factors.

References
----------
H. J. S. Smith, "On systems of linear indeterminate equations and congruences",
Phil. Trans. R. Soc. London 151 (1861).
R. Kannan, A. Bachem, "Polynomial algorithms for computing the Smith and Hermite normal forms of
an integer matrix", SIAM J. Comput. 8 (1979).
"""

from __future__ import annotations

__all__ = ["dense_pivots"]


def _least_entry(A: list[list[int]]) -> tuple[int, int, int]:
    best_i = best_j = -1
    best = 0
    for i, row in enumerate(A):
        for j, v in enumerate(row):
            if v:
                size = v if v > 0 else -v
                if best == 0 or size < best:
                    best_i, best_j, best = i, j, size
                    if size == 1:
                        return best_i, best_j, best
    return best_i, best_j, best


def dense_pivots(A: list[list[int]]) -> list[int]:
    """Absolute values of the pivots of a diagonalization of ``A`` (``A`` is consumed).

    The number of pivots is the rank; their product is the product of the nonzero invariant
    factors, and their gcd/lcm normalization is the Smith diagonal.

    Examples
    --------
    >>> sorted(dense_pivots([[2, 4], [6, 8]]))
    [2, 4]
    """
    A = [row for row in A if any(row)]
    pivots: list[int] = []
    while A:
        pi, pj, size = _least_entry(A)
        if size == 0:
            break
        while True:
            p = A[pi][pj]
            prow = A[pi]
            dirty = False
            for i, row in enumerate(A):
                if i != pi and row[pj]:
                    q = row[pj] // p
                    if q:
                        A[i] = row = [x - q * y for x, y in zip(row, prow, strict=True)]
                    if row[pj]:
                        dirty = True
            for j in range(len(prow)):
                if j != pj and prow[j]:
                    q = prow[j] // p
                    if q:
                        for row in A:
                            c = row[pj]
                            if c:
                                row[j] -= q * c
                    if prow[j]:
                        dirty = True
            if not dirty:
                break
            # A remainder smaller than the pivot is left in its row or column: take it next.
            best = abs(p)
            for i, row in enumerate(A):
                v = row[pj]
                if v and abs(v) < best:
                    pi, best = i, abs(v)
            prow = A[pi]
            for j, v in enumerate(prow):
                if v and abs(v) < best:
                    pj, best = j, abs(v)
        pivots.append(abs(A[pi][pj]))
        del A[pi]
        A = [row[:pj] + row[pj + 1 :] for row in A]
        A = [row for row in A if any(row)]
    return pivots
