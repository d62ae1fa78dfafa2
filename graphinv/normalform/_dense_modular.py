"""Determinants of dense integer matrices modulo many word-size primes at once.

The matrix is reduced modulo every prime into one array of shape ``(W, k, k)`` of float64
residues (one ``k x k`` matrix per prime), and all ``W`` matrices are factored together by a
recursive LU decomposition with row pivoting (Toledo's recursive formulation of the blocked
right-looking LU): the column range ``[c0, c1)`` of the active rows is split in two halves; the
left half is factored recursively, the top block of the right half is solved against the unit
lower triangle (``U12 = L11^{-1} A12``, itself recursive), the rest of the right half receives
the Schur complement update ``A22 <- A22 - L21 U12`` and is factored recursively.  Almost all the
work is in the updates, which are batched float64 matrix products (BLAS, one per prime) followed
by one reduction modulo each prime.  They are exact because every prime is below
``P_MAX = 2^22``: a product of two residues is below ``2^44`` and a dot product of at most
``CHUNK = 512`` of them is below ``2^53``, the range where float64 holds integers exactly;
longer inner dimensions are split into chunks of ``CHUNK``.

Panels of at most ``BASE`` columns are factored by a compiled kernel, one prime after another:
the pivot is the first row of the active part whose entry in the pivot column is nonzero modulo
the prime (exact arithmetic needs no numerical pivoting), a row swap is applied to the whole
row and flips the sign of the determinant.  A column with no nonzero entry in the active part
means the matrix is singular modulo that prime: its residue is 0 (a correct value, not a
failure), and that prime is skipped by the rest of the factorization.  Inside a panel the
rank-one updates are not reduced (at most ``BASE`` of them, each below ``2^44``, stay below
``2^53``); an entry is reduced when its column becomes the pivot column or its row the pivot row.

Entries are reduced modulo the primes without a Python operation per entry and prime: each
integer is split into 16-bit limbs (two's complement, the top limb signed), and the residues are
the product of the limb matrix with the table ``2^(16 i) mod p`` (a float64 matrix product,
exact for up to ``2^15`` limbs), reduced once.

References
----------
Dumas, Giorgi, Pernet, "Dense linear algebra over word-size prime fields: the FFLAS and FFPACK
packages", ACM Trans. Math. Software 35 (2008) (exact floating-point BLAS modulo p).
Toledo, "Locality of reference in LU decomposition with partial pivoting", SIAM J. Matrix Anal.
Appl. 18 (1997) (recursive LU).
Golub, Van Loan, "Matrix Computations", 4th ed., Johns Hopkins (2013), section 3.2.11 (blocked
LU).
"""

from __future__ import annotations

from typing import Any

from graphinv.normalform._level_determinant import CHUNK, P_MAX
from graphinv.normalform._matrix import InvalidMatrixError, as_int_rows

__all__ = ["BASE", "MEMORY_BUDGET", "dense_determinants"]

BASE = 16
"""Panels of at most this many columns are factored by the compiled kernel."""

MEMORY_BUDGET = 1 << 29
"""Bytes of residue storage aimed at: primes are processed in batches to stay near it."""

_KERNELS: list[Any] = []
np: Any = None  # numpy, bound on first use: the compiled kernels read it as a global
_CHECKED_PRIMES: set[int] = set()


def dense_determinants(rows: list[list[int]], primes: list[int]) -> list[int | None]:
    """``det(A) mod p`` for every prime ``p``, for a square dense integer matrix ``A``.

    Parameters
    ----------
    rows : list of list of int
        The rows of ``A`` (Python ints of any size and sign; any sequence of sequences of
        integers is accepted).  The matrix must be square.
    primes : list of int
        Primes below ``P_MAX = 2^22`` (see :func:`graphinv.normalform._level_determinant.
        float_primes`), repetitions allowed.

    Returns
    -------
    list of int or None
        Entry ``k`` is ``det(A) mod primes[k]`` in ``[0, p)``.  The factorization pivots, so
        every prime is decided; ``None`` is part of the contract for callers that combine
        several routines, but this one never returns it.  The empty matrix has determinant 1.

    Raises
    ------
    InvalidMatrixError
        If the rows are not a square array of integers.
    ValueError
        If a modulus is not a prime below ``P_MAX``.

    Notes
    -----
    Work is ``(2/3) k^3`` floating-point multiply-adds per prime, nearly all of it in batched
    BLAS products; memory is ``8 W k^2`` bytes for ``W`` primes, taken in batches of primes
    when that exceeds ``MEMORY_BUDGET``.  See the module docstring for the method.

    Examples
    --------
    >>> dense_determinants([[2, -1, 0], [-1, 2, -1], [0, -1, 2]], [7, 3])  # det = 4
    [4, 1]
    >>> dense_determinants([[0, 1], [1, 0]], [4194301])  # a row swap: det = -1
    [4194300]
    >>> dense_determinants([[2**70, 1], [3, 5]], [5, 13])  # det = 5 * 2^70 - 3
    [2, 8]
    >>> dense_determinants([], [13])
    [1]

    References
    ----------
    Dumas, Giorgi, Pernet, ACM Trans. Math. Software 35 (2008); Toledo, SIAM J. Matrix Anal.
    Appl. 18 (1997); Golub, Van Loan, "Matrix Computations" (2013), section 3.2.11.
    """
    import numpy as np

    moduli = _check_primes(primes)
    checked = _square_int_rows(rows)
    k = len(checked)
    if not moduli:
        return []
    if k == 0:
        return [1 % q for q in moduli]
    # The (W, k, k) residues plus the product temporaries (at most about a quarter of that).
    batch = max(1, int(MEMORY_BUDGET // (8 * 1.3 * k * k)))
    result: list[int | None] = []
    for start in range(0, len(moduli), batch):
        chunk = moduli[start : start + batch]
        p = np.array(chunk, dtype=np.float64)
        A = _residues(checked, chunk, k)
        result.extend(_factor(A, p))
    return result


def _check_primes(primes: list[int]) -> list[int]:
    moduli: list[int] = []
    for q in primes:
        if isinstance(q, bool) or not isinstance(q, int) or q not in _CHECKED_PRIMES:
            if (
                isinstance(q, bool)
                or not isinstance(q, int)
                or not 2 <= q < P_MAX
                or any(q % s == 0 for s in range(2, int(q**0.5) + 1))
            ):
                raise ValueError(f"Argument 'primes' must hold primes below {P_MAX}, not {q!r}.")
            _CHECKED_PRIMES.add(int(q))
        moduli.append(int(q))
    return moduli


def _square_int_rows(rows: Any) -> list[list[int]]:
    """The rows as lists of Python ints, checked to be square (plain lists of ints are checked
    at C speed; anything else goes through :func:`as_int_rows`)."""
    n = len(rows) if isinstance(rows, list) else -1
    if (
        n >= 0
        and all(type(row) is list and len(row) == n for row in rows)
        and all(set(map(type, row)) <= {int} for row in rows)
    ):
        return rows
    checked, n_rows, n_columns = as_int_rows(rows)
    if n_rows and n_rows != n_columns:
        raise InvalidMatrixError(f"expected a square matrix, got {n_rows} x {n_columns}")
    return checked


def _residues(rows: list[list[int]], primes: list[int], k: int) -> Any:
    """``(W, k, k)`` float64 residues of the entries, ``[w]`` modulo ``primes[w]``.

    Each entry is split into limbs in two's complement, ``entry = sum_i limb_i 2^(s i)`` with
    the top limb signed, and the residues are ``sum_i limb_i (2^(s i) mod p)``, reduced.
    Entries below ``2^63`` in absolute value are split by NumPy into three 21-bit limbs that a
    compiled kernel combines; larger ones go through ``int.to_bytes`` into 16-bit limbs, a slice
    of entries at a time, combined by a float64 matrix product (BLAS)."""
    import numpy as np

    p = np.array(primes, dtype=np.float64)
    pinv = 1.0 / p
    kernels = _kernels()
    A = np.zeros((len(primes), k * k), dtype=np.float64)
    try:
        words = np.array(rows, dtype=np.int64).reshape(-1)
    except OverflowError:
        words = None
    if words is not None:
        mask = (1 << 21) - 1
        limbs = np.empty((3, k * k), dtype=np.float64)
        limbs[0] = words & mask
        limbs[1] = (words >> 21) & mask
        limbs[2] = words >> 42
        kernels.combine_words(A, limbs, _limb_table(primes, 21, 3), p, pinv)
        return A.reshape(len(primes), k, k)
    flat = [v for row in rows for v in row]
    bits = max(max(flat).bit_length(), (-1 - min(flat)).bit_length()) + 1
    count = -(-bits // 16)
    table = _limb_table(primes, 16, count)
    step = max(1, (1 << 20) // count)
    for s in range(0, len(flat), step):
        data = b"".join([v.to_bytes(2 * count, "little", signed=True) for v in flat[s : s + step]])
        raw = np.frombuffer(data, dtype=np.uint16).reshape(-1, count)
        limbs = raw.astype(np.float64)
        limbs[:, -1] = raw.view(np.int16)[:, -1]
        # Products of at most 2^14 limbs (below 2^16) by residues (below 2^22) are exact.
        for t in range(0, count, 1 << 14):
            part = table[:, t : t + (1 << 14)] @ limbs[:, t : t + (1 << 14)].T
            kernels.add_reduce(A, s, part, p, pinv)
    return A.reshape(len(primes), k, k)


def _limb_table(primes: list[int], bits: int, count: int) -> Any:
    """``table[w, i] = 2^(bits i) mod primes[w]`` as float64."""
    import numpy as np

    table = np.empty((len(primes), count), dtype=np.float64)
    for w, q in enumerate(primes):
        power = 1
        step = pow(2, bits, q)
        for i in range(count):
            table[w, i] = power
            power = power * step % q
    return table


def _factor(A: Any, p: Any) -> list[int | None]:
    """Determinants of ``A[w]`` modulo ``p[w]``; ``A`` (residues) is overwritten."""
    import numpy as np

    kernels = _kernels()
    W, k = A.shape[0], A.shape[1]
    pinv = 1.0 / p
    det = np.ones(W, dtype=np.float64)
    alive = np.ones(W, dtype=np.bool_)

    def update(r0: int, c0: int, c1: int, inner0: int, inner1: int) -> None:
        # A[r0:, c0:c1] -= A[r0:, inner0:inner1] @ A[inner0:inner1, c0:c1]  (mod p)
        for s in range(inner0, inner1, CHUNK):
            e = min(inner1, s + CHUNK)
            product = np.matmul(A[:, r0:, s:e], A[:, s:e, c0:c1])
            kernels.subtract_reduce(A, product, r0, c0, p, pinv, alive)

    def solve(r0: int, r1: int, c0: int, c1: int) -> None:
        # A[r0:r1, c0:c1] <- L^{-1} A[r0:r1, c0:c1], L the unit lower triangle of A[r0:r1, r0:r1]
        if r1 - r0 <= BASE:
            kernels.lower_solve(A, r0, r1, c0, c1, p, pinv, alive)
            return
        m = r0 + (r1 - r0) // 2
        solve(r0, m, c0, c1)
        for s in range(r0, m, CHUNK):
            e = min(m, s + CHUNK)
            product = np.matmul(A[:, m:r1, s:e], A[:, s:e, c0:c1])
            kernels.subtract_reduce(A, product, m, c0, p, pinv, alive)
        solve(m, r1, c0, c1)

    def factor(c0: int, c1: int) -> None:
        # LU with row pivoting of the panel A[c0:, c0:c1]; swaps are applied to whole rows.
        if c1 - c0 <= BASE:
            kernels.panel(A, c0, c1, p, pinv, det, alive)
            return
        m = c0 + (c1 - c0) // 2
        factor(c0, m)
        solve(c0, m, m, c1)
        update(m, m, c1, c0, m)
        factor(m, c1)

    factor(0, k)
    return [int(d) if good else 0 for d, good in zip(det.tolist(), alive.tolist(), strict=True)]


def _kernels() -> Any:
    """The compiled kernels (numba, cached on disk after the first compilation)."""
    global np
    if not _KERNELS:
        from types import SimpleNamespace

        import numba
        import numpy as np

        jit = numba.njit(cache=True)
        _KERNELS.append(
            SimpleNamespace(
                combine_words=jit(_combine_words),
                add_reduce=jit(_add_reduce),
                panel=jit(_panel),
                lower_solve=jit(_lower_solve),
                subtract_reduce=jit(_subtract_reduce),
            )
        )
    return _KERNELS[0]


# The kernels below are compiled by numba (see _kernels).  Residues are float64 integers in
# [0, p); ``x - p * floor(x / p)`` (with one correction either way) reduces any |x| < 2^53.


def _combine_words(A: Any, limbs: Any, table: Any, p: Any, pinv: Any) -> None:
    """``A[w, j] <- sum_i limbs[i, j] table[w, i] mod p[w]`` for three limbs below ``2^21`` in
    absolute value (the sum is below ``2^46``)."""
    for w in range(A.shape[0]):
        pw = p[w]
        pi = pinv[w]
        t0 = table[w, 0]
        t1 = table[w, 1]
        t2 = table[w, 2]
        for j in range(A.shape[1]):
            x = limbs[0, j] * t0 + limbs[1, j] * t1 + limbs[2, j] * t2
            x -= pw * np.floor(x * pi)
            x = x + pw if x < 0.0 else x
            A[w, j] = x - pw if x >= pw else x


def _add_reduce(A: Any, start: int, part: Any, p: Any, pinv: Any) -> None:
    """``A[w, start + j] <- (A[w, start + j] + part[w, j]) mod p[w]`` for ``|part| < 2^53``."""
    for w in range(part.shape[0]):
        pw = p[w]
        pi = pinv[w]
        for j in range(part.shape[1]):
            x = part[w, j]
            x -= pw * np.floor(x * pi)
            x += A[w, start + j]
            x -= pw * np.floor(x * pi)
            x = x + pw if x < 0.0 else x
            A[w, start + j] = x - pw if x >= pw else x


def _subtract_reduce(A: Any, T: Any, r0: int, c0: int, p: Any, pinv: Any, alive: Any) -> None:
    """``A[w, r0 + i, c0 + j] <- (A[w, r0 + i, c0 + j] - T[w, i, j]) mod p[w]`` for live primes
    (``0 <= T < 2^53``)."""
    for w in range(T.shape[0]):
        if not alive[w]:
            continue
        pw = p[w]
        pi = pinv[w]
        for i in range(T.shape[1]):
            for j in range(T.shape[2]):
                x = A[w, r0 + i, c0 + j] - T[w, i, j]
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                A[w, r0 + i, c0 + j] = x - pw if x >= pw else x


def _lower_solve(A: Any, r0: int, r1: int, c0: int, c1: int, p: Any, pinv: Any, alive: Any) -> None:
    """``A[r0:r1, c0:c1] <- L^{-1} A[r0:r1, c0:c1]`` modulo each live prime, ``L`` the unit lower
    triangle of ``A[r0:r1, r0:r1]`` (forward substitution; a row takes at most ``BASE``
    unreduced updates and is reduced before it is used)."""
    for w in range(A.shape[0]):
        if not alive[w]:
            continue
        pw = p[w]
        pi = pinv[w]
        for i in range(r0 + 1, r1):
            for t in range(r0, i):
                f = A[w, i, t]
                if f == 0.0:
                    continue
                for j in range(c0, c1):
                    A[w, i, j] -= f * A[w, t, j]
            for j in range(c0, c1):
                x = A[w, i, j]
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                A[w, i, j] = x - pw if x >= pw else x


def _panel(A: Any, c0: int, c1: int, p: Any, pinv: Any, det: Any, alive: Any) -> None:
    """LU with row pivoting of ``A[w, c0:, c0:c1]`` modulo ``p[w]`` for each live prime, in place
    (multipliers below the diagonal, ``U`` on and above it); row swaps are applied to whole rows
    and the pivots multiplied into ``det[w]``.  A pivot column without a nonzero entry makes the
    matrix singular modulo ``p[w]``: ``det[w] = 0`` and ``alive[w] = False``.

    The panel is worked on transposed in a buffer, so that the rank-one updates run along
    contiguous columns of any length."""
    k = A.shape[1]
    rows = k - c0
    width = c1 - c0
    P = np.empty((width, rows), dtype=np.float64)
    for w in range(A.shape[0]):
        if not alive[w]:
            continue
        pw = p[w]
        pi = pinv[w]
        d = det[w]
        for i in range(rows):
            for j in range(width):
                P[j, i] = A[w, c0 + i, c0 + j]
        for c in range(width):
            r = -1
            for i in range(c, rows):
                x = P[c, i]
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                x = x - pw if x >= pw else x
                P[c, i] = x
                if r < 0 and x != 0.0:
                    r = i
            if r < 0:
                d = 0.0
                alive[w] = False
                break
            if r != c:
                for j in range(width):
                    t = P[j, r]
                    P[j, r] = P[j, c]
                    P[j, c] = t
                for j in range(k):
                    if c0 <= j < c1:
                        continue
                    t = A[w, c0 + r, j]
                    A[w, c0 + r, j] = A[w, c0 + c, j]
                    A[w, c0 + c, j] = t
                d = pw - d
            for j in range(c + 1, width):
                x = P[j, c]
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                P[j, c] = x - pw if x >= pw else x
            pivot = P[c, c]
            x = d * pivot
            x -= pw * np.floor(x * pi)
            x = x + pw if x < 0.0 else x
            d = x - pw if x >= pw else x
            # Inverse of the pivot by the extended Euclidean algorithm.
            a = np.int64(pivot)
            m = np.int64(pw)
            s0 = np.int64(1)
            s1 = np.int64(0)
            while m != 0:
                q = a // m
                a, m = m, a - q * m
                s0, s1 = s1, s0 - q * s1
            scale = float(s0 % np.int64(pw))
            for i in range(c + 1, rows):
                x = P[c, i] * scale
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                P[c, i] = x - pw if x >= pw else x
            for j in range(c + 1, width):
                u = P[j, c]
                if u == 0.0:
                    continue
                for i in range(c + 1, rows):
                    P[j, i] -= u * P[c, i]
        det[w] = d
        if not alive[w]:
            continue
        for i in range(rows):
            for j in range(width):
                A[w, c0 + i, c0 + j] = P[j, i]
