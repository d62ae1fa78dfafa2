"""Exact rational solutions of nonsingular integer systems by p-adic lifting in float64.

For ``C y = b`` with ``C`` a nonsingular ``k x k`` integer matrix, Dixon's method inverts ``C``
once modulo a prime ``p`` that does not divide ``det C`` and then lifts: with ``r_0 = b``,

    ``x_i = C^-1 r_i mod p``,  ``r_{i+1} = (r_i - C x_i) / p``  (an exact division),

so ``y = sum_i x_i p^i`` modulo ``p^m``.  Once ``p^m > 2 N D`` for bounds ``N`` on the
numerators and ``D`` on the denominator, rational reconstruction (the extended Euclidean
algorithm stopped half way) recovers ``y`` as fractions.  The residues stay word-sized, so every
step is a float64 BLAS product that is exact: ``p`` is chosen with ``k (p - 1)^2 < 2^53`` and
``k max|C| p < 2^52``.

Nothing is trusted, and no big-integer product is needed to prove the answer.  Every lifting
step checks that ``r_i - C x_i`` is divisible by ``p`` (as ``int64``; the float64 arithmetic is
exact under the bounds above), so ``C x_i = r_i - p r_{i+1}`` holds exactly and, summed,
``C X = b - p^m r_m``.  For ``w = o X`` reduced modulo ``p^m``, ``C w - o b`` is then a multiple
of ``p^m``; it is zero, i.e. ``C w = o b``, as soon as ``k max|C| max|w| + o max|b| < p^m``,
which is checked.  ``None`` tells the caller to use another solver when a bound was too small,
the entries too large for the float path, or ``p`` divided ``det C``.

References
----------
J. D. Dixon, "Exact solution of linear equations using p-adic expansions", Numer. Math. 40
(1982) 137-141.
P. S. Wang, M. J. T. Guy, J. H. Davenport, "P-adic reconstruction of rational numbers",
SIGSAM Bull. 16 (1982); J. von zur Gathen, J. Gerhard, *Modern Computer Algebra* (2013), 5.10.
"""

from __future__ import annotations

import math
from typing import Any

__all__ = ["rational_reconstruction", "solve_lifting"]

# Lifting digits before the first reconstruction attempt beyond what the bounds ask for, and
# how many times the digits may grow by half before giving up.
EXTRA_BITS = 64
RETRIES = 3


def rational_reconstruction(a: int, modulus: int, numerator_bound: int) -> tuple[int, int] | None:
    """``(n, d)`` with ``n = a d (mod modulus)``, ``|n| <= numerator_bound``, ``0 < d`` minimal.

    The remainder sequence of ``(modulus, a)`` is stopped at the first remainder not above
    ``numerator_bound``; the cofactor there is the denominator.  ``None`` if it is not coprime
    to the modulus or ``d > modulus / (2 numerator_bound)`` (no unique answer).

    Examples
    --------
    >>> m = 10**9 + 7
    >>> rational_reconstruction(3 * pow(7, -1, m) % m, m, 100)  # 3/7
    (3, 7)
    >>> rational_reconstruction((-5 * pow(12, -1, m)) % m, m, 100)
    (-5, 12)

    References
    ----------
    Wang, Guy, Davenport, SIGSAM Bull. 16 (1982).
    """
    r0, r1 = modulus, a % modulus
    t0, t1 = 0, 1
    while r1 > numerator_bound:
        q = r0 // r1
        r0, r1 = r1, r0 - q * r1
        t0, t1 = t1, t0 - q * t1
    if t1 == 0:
        return None
    if t1 < 0:
        r1, t1 = -r1, -t1
    if 2 * numerator_bound * t1 >= modulus or math.gcd(t1, modulus) != 1:
        return None
    return r1, t1


def solve_lifting(
    rows: list[list[int]],
    B: list[list[int]],
    *,
    det_bound: int,
    array: Any = None,
) -> tuple[list[int], list[list[int]]] | None:
    """Exact solutions of ``C y_j = b_j`` as ``(orders, numerators)``: ``y_j = w_j / o_j``.

    Parameters
    ----------
    rows : list of lists of int
        The square matrix ``C``.
    B : list of lists of int
        The right-hand sides as columns (``k`` rows, one entry per system).
    det_bound : int
        A bound on ``|det C|`` (it bounds the denominators; the numerators get ``EXTRA_BITS``
        more before the first attempt, then the lifting goes on by half until ``RETRIES``).
    array : NumPy array, optional
        ``C`` already as float64.

    Returns
    -------
    (orders, numerators) or None
        ``o_j`` is the exact common denominator of ``y_j`` and ``w_j = o_j y_j`` integral;
        proven ``C w_j == o_j b_j`` (see the module notes).  ``None`` when this route does
        not apply.

    Examples
    --------
    >>> solve_lifting([[2, 1], [1, 3]], [[1], [0]], det_bound=10)  # (3/5, -1/5)
    ([5], [[3, -1]])

    References
    ----------
    Dixon, Numer. Math. 40 (1982); von zur Gathen, Gerhard, *Modern Computer Algebra*, 5.10.
    """
    import numpy as np

    from graphinv.normalform._level_determinant import _Arithmetic, float_residues

    k = len(rows)
    if k == 0 or any(len(row) != k for row in rows) or len(B) != k:
        return None
    width = len(B[0])
    # Entries beyond 2^53 only need to be seen as large.
    A = np.array(rows, dtype=np.float64) if array is None else array
    largest = int(np.abs(A).max())
    rhs = max(abs(v) for row in B for v in row)
    if largest >= 1 << 40 or rhs >= 1 << 40:
        return None
    bits = min((53 - (k - 1).bit_length()) // 2, 52 - (k * largest + 1).bit_length(), 22)
    if bits < 12:
        return None
    p = 0
    inverse = None
    for candidate in _lifting_primes(bits):
        ops = _Arithmetic(np.array([float(candidate)]), False)
        inv, _, ok = ops.inverse(float_residues(A, [candidate]))
        if ok[0]:
            p, inverse = candidate, inv[0]
            break
    if inverse is None:
        return None  # three primes divide det C: singular, or a rare coincidence
    fp = float(p)
    residual = np.array(B, dtype=np.float64)
    numerator_bound = det_bound << (rhs.bit_length() + k.bit_length() + EXTRA_BITS)
    need = (2 * numerator_bound * det_bound).bit_length()
    steps = -(-need // (p.bit_length() - 1))
    digits: list[Any] = []
    target = steps
    for _ in range(RETRIES + 1):
        while len(digits) < target:
            x = inverse @ _reduced(residual, fp)
            x = _reduced(x, fp)
            step = residual - A @ x  # exact: every term and sum stays below 2^52
            if np.any(step.astype(np.int64) % p):
                return None  # C x = r (mod p) failed: the inverse modulo p is wrong
            digits.append(x)
            residual = step / fp  # exact division
        # Now C X = B - p^m R exactly for X = sum x_i p^i and the last residual R.
        modulus = p ** len(digits)
        values = _combine(digits, p)
        # Denominators are at most det_bound; the numerators may use the rest of the modulus.
        answer = _reconstruct(values, modulus, modulus // (2 * det_bound) - 1, width, k)
        if answer is not None and _proven(answer, largest, rhs, k, modulus):
            return answer
        target = target + target // 2
    return None


def _reduced(x: Any, p: float) -> Any:
    """Integers below ``2^53`` in a float64 array, reduced into ``[0, p)`` (exact)."""
    import numpy as np

    return x - p * np.floor(x / p)  # the floor is exact below 2^53 (see float_residues)


def _proven(
    answer: tuple[list[int], list[list[int]]], largest: int, rhs: int, k: int, modulus: int
) -> bool:
    """Whether ``C w = o b`` follows for each column: from ``C X = b - p^m R`` and
    ``w = o X (mod p^m)``, ``C w - o b`` is a multiple of ``p^m``; it is zero when its size
    bound ``k max|C| max|w| + o max|b|`` is below ``p^m``."""
    for order, numerators in zip(*answer, strict=True):
        size = max(abs(v) for v in numerators)
        if k * largest * size + order * rhs >= modulus:
            return False
    return True


_PRIMES: dict[int, list[int]] = {}


def _lifting_primes(bits: int) -> list[int]:
    """The three largest primes below ``2^bits`` (cached)."""
    from graphinv.normalform._level_determinant import _primes_below

    if bits not in _PRIMES:
        _PRIMES[bits] = _primes_below(1 << bits, 3)
    return _PRIMES[bits]


def _combine(digits: list[Any], p: int) -> list[list[int]]:
    """``sum_i digits[i] p^i`` entrywise as Python ints (``k`` rows of ``width``)."""
    import numpy as np

    stack = np.array(digits).astype(np.int64)  # (m, k, width), exact: every digit < 2^22
    if len(stack) % 2:
        stack = np.concatenate((stack, np.zeros_like(stack[:1])))
    base = p * p
    level = (stack[0::2] + p * stack[1::2]).astype(object)  # pairs below 2^44 in int64
    while len(level) > 1:
        if len(level) % 2:
            level = np.concatenate((level, np.zeros_like(level[:1])))
        level = level[0::2] + level[1::2] * base
        base *= base
    result: list[list[int]] = level[0].tolist()
    return result


def _reconstruct(
    values: list[list[int]], modulus: int, numerator_bound: int, width: int, k: int
) -> tuple[list[int], list[list[int]]] | None:
    """Exact common denominators and numerators from the p-adic solutions.

    A running denominator ``d`` (the previous column's, at first 1) is kept while ``d y_i``
    reduces to a small residue; an entry whose residue is large has a further denominator
    factor, found by reconstructing ``d y_i`` alone.  Few reconstructions are needed: the
    entries mostly share the largest denominator.
    """
    orders: list[int] = []
    numerators: list[list[int]] = []
    half = modulus // 2
    d = 1
    for j in range(width):
        column = [values[i][j] for i in range(k)]
        w: list[int] = []
        for v in column:
            t = (d * v) % modulus
            if t > half:
                t -= modulus
            if abs(t) > numerator_bound:
                found = rational_reconstruction(t, modulus, numerator_bound)
                if found is None:
                    return None
                d *= found[1]
                w = [x * found[1] for x in w]
                t = found[0]
            w.append(t)
        common = d
        for v in w:
            common = math.gcd(common, v)
            if common == 1:
                break
        orders.append(d // common)
        numerators.append([v // common for v in w])
    return orders, numerators
