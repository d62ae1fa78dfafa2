"""Local Smith forms over ``Z / p^e`` in word arithmetic, compiled.

Over the local ring ``Z / p^e`` an entry of least ``p``-adic valuation divides every other
entry, so it can serve as pivot: its column is cleared by row operations and its row and column
are dropped (the column operations that would clear the row touch nothing else).  The pivots'
valuations, in the order taken, are the valuations of the invariant factors; a remainder that
vanishes modulo ``p^e`` contributes ``e`` for each of its rows.  With ``p^e < 2^31`` every
product of two residues fits in ``int64``; for ``p^e < 2^26`` the row updates run in float64,
where the reduction ``x - m floor(x / m)`` (with one correction) is exact and vectorizes.

References
----------
M. Newman, *Integral Matrices*, Academic Press (1972), II.15 (Smith form over a local ring);
B. D. Saunders, Z. Wan, "Smith normal form of dense integer matrices, fast algorithms into
practice", ISSAC 2004 (local Smith forms modulo prime powers).
"""

from __future__ import annotations

from typing import Any

__all__ = ["local_valuations"]

_KERNELS: list[Any] = []
np: Any = None  # numpy, bound on first use: the compiled kernels read it as a global


def local_valuations(rows: Any, p: int, precision: int) -> list[int]:
    """Valuations at ``p`` of the invariant factors of a square integer matrix, modulo
    ``p^precision < 2^31`` (a factor that vanishes there counts as ``precision``).

    Parameters
    ----------
    rows : list of lists of int, or 2-D integer array
        The square matrix.
    p : int
        A prime.
    precision : int
        ``e >= 1`` with ``p^e < 2^31``.

    Returns
    -------
    list of int
        One valuation per row, in the order the pivots were taken (nondecreasing).

    Examples
    --------
    ``diag(2, 12, 0)`` at 2, modulo 2^5: valuations 1, 2 and 5 (the zero).

    >>> local_valuations([[2, 0, 0], [0, 12, 0], [0, 0, 0]], 2, 5)
    [1, 2, 5]

    References
    ----------
    Newman, *Integral Matrices* (1972), II.15; Saunders, Wan, ISSAC 2004.
    """
    import numpy as np

    modulus = p**precision
    if modulus >= 1 << 31:
        raise ValueError(f"p^precision must be below 2^31, not {modulus}")
    if isinstance(rows, np.ndarray) and rows.dtype == np.int64:
        A = rows % modulus
    else:
        A = np.array([[x % modulus for x in row] for row in rows], dtype=np.int64)
    k = A.shape[0]
    out = np.zeros(k, dtype=np.int64)
    if k:
        kernels = _kernels()
        if modulus < 1 << 26:
            kernels.float_valuations(A.astype(np.float64), p, precision, modulus, out)
        else:
            kernels.int_valuations(A, p, precision, modulus, out)
    return [int(v) for v in out.tolist()]


def _kernels() -> Any:
    """The compiled kernels (numba, cached on disk after the first compilation)."""
    global np, _pivot_step
    if not _KERNELS:
        from types import SimpleNamespace

        import numba
        import numpy as np

        jit = numba.njit(cache=True)
        _pivot_step = jit(_pivot_step)  # shared by both kernels, bound compiled to its name
        _KERNELS.append(
            SimpleNamespace(
                int_valuations=jit(_int_valuations), float_valuations=jit(_float_valuations)
            )
        )
    return _KERNELS[0]


# Compiled by numba (see _kernels).  The two kernels differ only in the row update: int64
# remainders, or the exact float64 floor (``x - m floor(x / m)`` for ``|x| < 2^52``), which
# vectorizes.


def _pivot_step(A: Any, step: int, level: int, p: int, precision: int, modulus: int) -> Any:
    """Move an entry of least valuation (at least ``level``) to ``(step, step)``; return
    ``(its valuation, inverse of its unit part modulo p^precision)``, or ``(precision, 0)``
    when the rest vanishes modulo ``p^precision``."""
    k = A.shape[0]
    power = p**level
    pi = -1
    pj = -1
    while level < precision:
        higher = power * p
        for i in range(step, k):
            for j in range(step, k):
                if A[i, j] % higher != 0:  # exact for float64 integers too (fmod)
                    pi = i
                    pj = j
                    break
            if pi >= 0:
                break
        if pi >= 0:
            break
        level += 1
        power = higher
    if level >= precision:
        return precision, 0
    for j in range(k):
        A[step, j], A[pi, j] = A[pi, j], A[step, j]
    for i in range(k):
        A[i, step], A[i, pj] = A[i, pj], A[i, step]
    # Inverse of the unit A[step, step] / p^level modulo p^precision (extended Euclid).
    r0, r1 = modulus, (int(A[step, step]) // power) % modulus
    t0, t1 = 0, 1
    while r1 != 0:
        q = r0 // r1
        r0, r1 = r1, r0 - q * r1
        t0, t1 = t1, t0 - q * t1
    return level, t0 % modulus


def _int_valuations(A: Any, p: int, precision: int, modulus: int, out: Any) -> None:
    k = A.shape[0]
    level = 0
    for step in range(k):
        level, inverse = _pivot_step(A, step, level, p, precision, modulus)
        if level >= precision:
            for t in range(step, k):
                out[t] = precision
            return
        power = p**level
        for i in range(step + 1, k):
            a = A[i, step]
            if a == 0:
                continue
            f = ((a // power) * inverse) % modulus
            for j in range(step, k):
                A[i, j] = (A[i, j] - f * A[step, j]) % modulus
        out[step] = level


def _float_valuations(A: Any, p: int, precision: int, modulus: int, out: Any) -> None:
    k = A.shape[0]
    m = float(modulus)
    level = 0
    for step in range(k):
        level, inverse = _pivot_step(A, step, level, p, precision, modulus)
        if level >= precision:
            for t in range(step, k):
                out[t] = precision
            return
        power = p**level
        for i in range(step + 1, k):
            a = int(A[i, step])
            if a == 0:
                continue
            f = float(((a // power) * inverse) % modulus)
            for j in range(step, k):
                x = A[i, j] - f * A[step, j]  # exact: |x| < 2^52
                A[i, j] = x - m * np.floor(x / m)  # exact floor (see float_residues)
        out[step] = level
