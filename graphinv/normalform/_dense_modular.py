"""Determinants of dense integer matrices modulo many word-size primes at once.

For each prime the matrix is reduced to a ``k x k`` matrix of float64 residues, which is
factored by a recursive LU decomposition with row pivoting (Toledo's recursive formulation of
the blocked right-looking LU): the column range ``[c0, c1)`` of the active rows is split in two halves; the left half is
factored recursively, the top block of the right half is solved against the unit lower triangle
(``U12 = L11^{-1} A12``, itself recursive), the rest of the right half receives the Schur
complement update ``A22 <- A22 - L21 U12`` and is factored recursively.  Almost all the work is
in the updates: float64 matrix products (BLAS, through numba's ``np.dot``) followed by one
reduction modulo the prime.  They are exact because every prime is below ``P_MAX = 2^22``: a
product of two residues is below ``2^44`` and a dot product of at most ``CHUNK = 512`` of them
is below ``2^53``, the range where float64 holds integers exactly; longer inner dimensions are
split into chunks of ``CHUNK``.  The whole recursion of one prime runs compiled (on an explicit
stack), one prime after another, so that a prime's matrix stays in the processor's cache.

Panels of at most ``BASE`` columns are factored by a compiled kernel: the pivot is the first row
of the active part whose entry in the pivot column is nonzero modulo the prime (exact arithmetic
needs no numerical pivoting); a row swap is applied to the whole row and flips the sign of the
determinant.  A column with no nonzero entry in the active part means the matrix is singular
modulo that prime: its residue is 0 (a correct value, not a failure) and the factorization of
that prime stops.  Inside a panel the rank-one updates are not reduced (at most ``BASE`` of
them, each below ``2^44``, stay below ``2^53``); an entry is reduced when its column becomes the
pivot column or its row the pivot row.

Entries are reduced modulo the primes without a Python operation per entry and prime.  Entries
below ``2^63`` in absolute value are split by NumPy into three 21-bit limbs (two's complement,
the top limb signed), and the kernel forms each prime's matrix from them,
``sum_i limb_i (2^(21 i) mod p)``, just before factoring it, so no ``(W, k, k)`` array exists.
Larger entries are split by ``int.to_bytes`` into 16-bit limbs and all residues are formed at
once by a float64 matrix product of the limbs with the table ``2^(16 i) mod p`` (BLAS; exact for
up to ``2^14`` limbs at a time), primes taken in batches that fit ``MEMORY_BUDGET``.

The primes are independent: they are shared among worker threads (one per usable core, at most
``MAX_WORKERS``; the compiled kernel releases the GIL), and each thread keeps BLAS to a single
thread for its own calls (``openblas_set_num_threads_local``), because threaded BLAS on products
of this size mostly waits when the machine is shared.

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

import threading
from functools import partial
from typing import Any

from graphinv.normalform._level_determinant import CHUNK, _check_primes
from graphinv.normalform._matrix import InvalidMatrixError, as_int_rows

__all__ = ["BASE", "MAX_WORKERS", "MEMORY_BUDGET", "dense_determinants"]

BASE = 8
"""Panels of at most this many columns are factored by the compiled kernel."""

MEMORY_BUDGET = 1 << 29
"""Bytes of residue storage aimed at: primes are processed in batches to stay near it."""

MAX_WORKERS = 4
"""At most this many threads factor matrices modulo different primes at the same time."""

_KERNELS: list[Any] = []
_KERNELS_LOCK = threading.Lock()
_THREAD_SETTERS: list[list[Any]] = []
np: Any = None  # numpy, bound on first use: the compiled kernels read it as a global


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
    Work is about ``(2/3) k^3`` floating-point multiply-adds per prime, nearly all of it in
    BLAS products, the primes shared among worker threads.  Memory is a few ``k x k`` float64
    matrices per thread when every entry is below ``2^63`` in absolute value, otherwise
    ``8 W k^2`` bytes for ``W`` primes, taken in batches of primes that fit ``MEMORY_BUDGET``.
    See the module docstring for the method.

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
    _kernels()
    workers = _worker_count(k)
    limbs = _word_limbs(checked, k)
    if limbs is not None:
        # Each prime's matrix is formed from the limbs inside the kernel: no (W, k, k) array.
        batch = len(moduli)
    else:
        # The (W, k, k) residues; a prime's products need about one more k x k matrix each.
        batch = max(1, MEMORY_BUDGET // (8 * k * k) - 2 * workers)
        limbs = np.empty((3, 0), dtype=np.float64)
    result: list[int | None] = []
    for start in range(0, len(moduli), batch):
        chunk = moduli[start : start + batch]
        p = np.array(chunk, dtype=np.float64)
        det = np.empty(len(chunk), dtype=np.float64)
        table = _limb_table(chunk, 21, 3)
        A = np.empty((0, k, k)) if limbs.shape[1] else _residues(checked, chunk, k)
        # The primes are independent: each worker thread takes a share of them (the compiled
        # kernel releases the GIL), with single-threaded BLAS.
        shares = [range(len(chunk))[w :: workers] for w in range(min(workers, len(chunk)))]
        spans = [(share.start, share.start + len(share) * share.step, share.step) for share in shares]
        work = partial(_factor_primes, k, A, limbs, table, p, det)
        if len(spans) == 1:
            work(spans[0])
        else:
            from concurrent.futures import ThreadPoolExecutor

            with ThreadPoolExecutor(max_workers=len(spans)) as pool:
                list(pool.map(work, spans))
        result.extend(int(d) for d in det.tolist())
    return result


def _worker_count(k: int) -> int:
    """Threads for the factorizations: the usable cores, for matrices large enough."""
    import os

    if k < 96:
        return 1
    try:
        cores = len(os.sched_getaffinity(0))
    except AttributeError:  # not on Linux
        cores = os.cpu_count() or 1
    return max(1, min(cores, MAX_WORKERS))


def _factor_primes(
    k: int, A: Any, limbs: Any, table: Any, p: Any, det: Any, span: tuple[int, int, int]
) -> None:
    """``det[s] <- det mod p[s]`` for ``s`` in ``range(*span)``, of the matrix ``A[s]`` or, when
    ``limbs`` has columns, of the matrix given by the limbs (see ``_word_limbs``); BLAS held at
    one thread for calls from this thread."""
    import numpy as np

    start, stop, step = span
    setters = _blas_thread_setters()
    previous = [set_threads(1) for set_threads in setters]
    try:
        part = np.empty(len(range(start, stop, step)), dtype=np.float64)
        _kernels().determinants_by_prime(k, A, limbs, table, p, 1.0 / p, part, start, stop, step)
        det[start:stop:step] = part
    finally:
        for set_threads, count in zip(setters, previous, strict=True):
            set_threads(count)


def _blas_thread_setters() -> list[Any]:
    """``openblas_set_num_threads_local`` of each OpenBLAS loaded in the process (SciPy's is the
    one behind numba's ``np.dot``); empty where none can be found.  Each sets the number of
    threads used by calls from the current thread only and returns the previous number."""
    if not _THREAD_SETTERS:
        import ctypes

        import scipy.linalg.cython_blas  # noqa: F401  (loads the library numba calls)

        setters: list[Any] = []
        try:
            with open("/proc/self/maps") as maps:
                paths = {line.split()[-1] for line in maps if "openblas" in line.lower()}
            for path in sorted(paths):
                function = getattr(ctypes.CDLL(path), "openblas_set_num_threads_local", None)
                if function is not None:
                    function.restype = ctypes.c_int
                    function.argtypes = [ctypes.c_int]
                    setters.append(function)
        except OSError:
            setters = []
        _THREAD_SETTERS.append(setters)
    return list(_THREAD_SETTERS[0])


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


def _word_limbs(rows: list[list[int]], k: int) -> Any:
    """The entries split into three 21-bit limbs in two's complement (the top one signed),
    ``entry = limbs[0] + limbs[1] 2^21 + limbs[2] 2^42``, shape ``(3, k * k)`` float64; None
    if an entry is not below ``2^63`` in absolute value."""
    import numpy as np

    try:
        words = np.array(rows, dtype=np.int64).reshape(-1)
    except OverflowError:
        return None
    mask = (1 << 21) - 1
    limbs = np.empty((3, k * k), dtype=np.float64)
    limbs[0] = words & mask
    limbs[1] = (words >> 21) & mask
    limbs[2] = words >> 42
    return limbs


def _residues(rows: list[list[int]], primes: list[int], k: int) -> Any:
    """``(W, k, k)`` float64 residues of the entries, ``[w]`` modulo ``primes[w]``.

    Each entry is split by ``int.to_bytes`` into 16-bit limbs in two's complement (the top
    limb signed), ``entry = sum_i limb_i 2^(16 i)``, a slice of entries at a time, and the
    residues are ``sum_i limb_i (2^(16 i) mod p)``: a float64 matrix product (BLAS), reduced."""
    import numpy as np

    p = np.array(primes, dtype=np.float64)
    pinv = 1.0 / p
    kernels = _kernels()
    A = np.zeros((len(primes), k * k), dtype=np.float64)
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


def _kernels() -> Any:
    """The compiled kernels (numba, cached on disk after the first compilation)."""
    global np, _panel_one, _solve_one, _update_one
    with _KERNELS_LOCK:
        if not _KERNELS:
            from types import SimpleNamespace

            import numba
            import numpy as np

            jit = numba.njit(cache=True, nogil=True)
            # The single-prime kernels call each other: each is bound, compiled, to its name.
            _panel_one = jit(_panel_one)
            _solve_one = jit(_solve_one)
            _update_one = jit(_update_one)
            _KERNELS.append(
                SimpleNamespace(
                    add_reduce=jit(_add_reduce),
                    determinants_by_prime=jit(_determinants_by_prime),
                )
            )
    return _KERNELS[0]


# The kernels below are compiled by numba (see _kernels).  Residues are float64 integers in
# [0, p); ``x - p * floor(x / p)`` (with one correction either way) reduces any |x| < 2^53.


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


# Single-prime kernels: the whole recursion for one prime runs compiled, its matrix stays in
# the processor's cache, and the products go to BLAS through numba's ``np.dot``.


def _panel_one(M: Any, c0: int, c1: int, pw: float, pi: float, P: Any) -> float:
    """LU with row pivoting of ``M[c0:, c0:c1]`` modulo ``pw`` in place (multipliers below the
    diagonal, ``U`` on and above it; swaps applied to whole rows).  Returns the product of the
    pivots times the sign of the swaps modulo ``pw``, or 0 when a pivot column has no nonzero
    entry (``M`` is then singular modulo ``pw`` and is left unfinished).  The panel is worked on
    transposed in the buffer ``P``, so that the rank-one updates run along contiguous columns."""
    k = M.shape[0]
    rows = k - c0
    width = c1 - c0
    d = 1.0
    for i in range(rows):
        for j in range(width):
            P[j, i] = M[c0 + i, c0 + j]
    for c in range(width):
        for i in range(c, rows):
            x = P[c, i]
            x -= pw * np.floor(x * pi)
            x = x + pw if x < 0.0 else x
            P[c, i] = x - pw if x >= pw else x
        r = -1
        for i in range(c, rows):
            if P[c, i] != 0.0:
                r = i
                break
        if r < 0:
            return 0.0
        if r != c:
            for j in range(width):
                t = P[j, r]
                P[j, r] = P[j, c]
                P[j, c] = t
            for j in range(k):
                if c0 <= j < c1:
                    continue
                t = M[c0 + r, j]
                M[c0 + r, j] = M[c0 + c, j]
                M[c0 + c, j] = t
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
    for i in range(rows):
        for j in range(width):
            M[c0 + i, c0 + j] = P[j, i]
    return d


def _solve_one(M: Any, r0: int, r1: int, c0: int, c1: int, pw: float, pi: float) -> None:
    """``M[r0:r1, c0:c1] <- L^{-1} M[r0:r1, c0:c1]`` modulo ``pw``, ``L`` the unit lower triangle
    of ``M[r0:r1, r0:r1]`` (forward substitution; a row takes at most ``BASE`` unreduced
    updates and is reduced before it is used)."""
    for i in range(r0 + 1, r1):
        for t in range(r0, i):
            f = M[i, t]
            if f == 0.0:
                continue
            for j in range(c0, c1):
                M[i, j] -= f * M[t, j]
        for j in range(c0, c1):
            x = M[i, j]
            x -= pw * np.floor(x * pi)
            x = x + pw if x < 0.0 else x
            M[i, j] = x - pw if x >= pw else x


def _update_one(
    M: Any, r0: int, r1: int, c0: int, c1: int, i0: int, i1: int, pw: float, pi: float
) -> None:
    """``M[r0:r1, c0:c1] <- (M[r0:r1, c0:c1] - M[r0:r1, i0:i1] M[i0:i1, c0:c1]) mod pw``, the
    product by BLAS in float64, ``CHUNK`` inner indices at a time (each partial product of
    residues is then below ``2^53``, exact)."""
    for s in range(i0, i1, CHUNK):
        e = min(i1, s + CHUNK)
        T = np.dot(np.ascontiguousarray(M[r0:r1, s:e]), np.ascontiguousarray(M[s:e, c0:c1]))
        for i in range(r1 - r0):
            for j in range(c1 - c0):
                x = M[r0 + i, c0 + j] - T[i, j]
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                M[r0 + i, c0 + j] = x - pw if x >= pw else x


def _determinants_by_prime(
    k: int, A: Any, limbs: Any, table: Any, p: Any, pinv: Any, det: Any,
    start: int, stop: int, step: int,
) -> None:
    """``det[t] <- det mod p[w]`` for the ``t``-th ``w`` in ``range(start, stop, step)``, by the
    recursive LU of the module docstring, one prime after another.  The matrix is ``A[w]``
    (overwritten) or, when ``limbs`` has columns, ``sum_i limbs[i] table[w, i]`` reduced, formed
    in a work matrix (three limbs below ``2^21``: the sum is below ``2^46``).  The recursion
    runs on an explicit stack of tasks: ``(0, c0, c1)`` factor the panel ``[c0, c1)``;
    ``(1, r0, r1, c0, c1)`` triangular solve; ``(2, r0, r1, c0, c1, i0, i1)`` Schur complement
    update."""
    formed = limbs.shape[1] > 0
    work = np.empty((k, k) if formed else (0, 0), dtype=np.float64)
    P = np.empty((BASE, k), dtype=np.float64)
    stack = np.empty((8 * 64 + 16, 7), dtype=np.int64)
    for t, w in enumerate(range(start, stop, step)):
        pw = p[w]
        pi = pinv[w]
        if formed:
            t0 = table[w, 0]
            t1 = table[w, 1]
            t2 = table[w, 2]
            for i in range(k):
                for j in range(k):
                    e = i * k + j
                    x = limbs[0, e] * t0 + limbs[1, e] * t1 + limbs[2, e] * t2
                    x -= pw * np.floor(x * pi)
                    x = x + pw if x < 0.0 else x
                    work[i, j] = x - pw if x >= pw else x
            M = work
        else:
            M = A[w]
        d = 1.0
        stack[0, 0] = 0
        stack[0, 1] = 0
        stack[0, 2] = k
        top = 1
        while top > 0:
            top -= 1
            kind = stack[top, 0]
            a0 = stack[top, 1]
            a1 = stack[top, 2]
            if kind == 0:
                if a1 - a0 <= BASE:
                    f = _panel_one(M, a0, a1, pw, pi, P)
                    x = d * f
                    x -= pw * np.floor(x * pi)
                    x = x + pw if x < 0.0 else x
                    d = x - pw if x >= pw else x
                    if d == 0.0:
                        break
                    continue
                m = a0 + (a1 - a0) // 2
                # Pushed in reverse order of execution.
                stack[top, 0] = 0
                stack[top, 1] = m
                stack[top, 2] = a1
                stack[top + 1, 0] = 2
                stack[top + 1, 1] = m
                stack[top + 1, 2] = k
                stack[top + 1, 3] = m
                stack[top + 1, 4] = a1
                stack[top + 1, 5] = a0
                stack[top + 1, 6] = m
                stack[top + 2, 0] = 1
                stack[top + 2, 1] = a0
                stack[top + 2, 2] = m
                stack[top + 2, 3] = m
                stack[top + 2, 4] = a1
                stack[top + 3, 0] = 0
                stack[top + 3, 1] = a0
                stack[top + 3, 2] = m
                top += 4
            elif kind == 1:
                c0 = stack[top, 3]
                c1 = stack[top, 4]
                if a1 - a0 <= BASE:
                    _solve_one(M, a0, a1, c0, c1, pw, pi)
                    continue
                m = a0 + (a1 - a0) // 2
                stack[top, 0] = 1
                stack[top, 1] = m
                stack[top, 2] = a1
                stack[top, 3] = c0
                stack[top, 4] = c1
                stack[top + 1, 0] = 2
                stack[top + 1, 1] = m
                stack[top + 1, 2] = a1
                stack[top + 1, 3] = c0
                stack[top + 1, 4] = c1
                stack[top + 1, 5] = a0
                stack[top + 1, 6] = m
                stack[top + 2, 0] = 1
                stack[top + 2, 1] = a0
                stack[top + 2, 2] = m
                stack[top + 2, 3] = c0
                stack[top + 2, 4] = c1
                top += 3
            else:
                _update_one(
                    M, a0, a1, stack[top, 3], stack[top, 4], stack[top, 5], stack[top, 6], pw, pi
                )
        det[t] = d
