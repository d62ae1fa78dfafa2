"""The modular finish: Smith invariants of a dense nonsingular core without big-integer elimination.

Let ``C`` be a ``k`` by ``k`` nonsingular integer matrix with invariant factors
``d_1 | ... | d_k`` and ``D = |det C| = d_1 ... d_k``.

1. **An element of large order.**  For an integer vector ``b``, the order of ``b`` in
   ``Z^k / C Z^k`` is the least common denominator of ``C^{-1} b`` (``C`` and ``C^T`` have the
   same invariant factors).  Solving ``C x = b`` for two random ``b`` (p-adic lifting in
   float64, :mod:`graphinv.normalform._dixon`; python-flint's solver when the entries are too
   large for it) gives an order ``s``
   with ``s | d_k``; with high probability ``s = d_k`` (Eberly, Giesbrecht, Villard 2000; Pan
   1988).  Whatever ``s`` is, the group has a cyclic subgroup of order ``s``.
2. **The determinant** ``D = s q`` by the Chinese remainder theorem: ``q`` modulo word-size
   primes, until their product exceeds twice ``bound / s`` (Hadamard's bound of the matrix before
   elimination).  No guess is involved.
3. **The non-cyclic part.**  ``N = D / s`` is a multiple of ``d_1 ... d_{k-1}``.  For a prime
   ``p`` not dividing ``N`` the Sylow ``p``-subgroup has order ``p^{v_p(s)}`` and contains an
   element of that order, so it is cyclic and sits in ``d_k``.  For each prime ``p | N``:
   ``k - rank(C mod p)`` invariant factors are divisible by ``p``.  If that count is 1 or equals
   ``v_p(D)`` the valuations follow at once; otherwise the local Smith form: choose rows ``R``
   and columns ``K`` independent modulo ``p`` (a nonsingular ``C[R, K]`` mod ``p``), form the
   Schur complement ``S = C22 - C21 C11^{-1} C12`` (rational, denominators prime to ``p``), and
   eliminate ``S`` over ``Z / p^{v_p(D)+1}`` with pivots of least valuation (Saunders, Wan 2004;
   Dumas, Saunders, Villard 2001).  One Schur complement serves every prime for which ``C11``
   stays nonsingular.
4. ``d_k = D / (d_1 ... d_{k-1})``, checked: ``s | d_k`` and ``d_{k-1} | d_k``; the valuations
   found locally must add up to ``v_p(D)``.

References
----------
W. Eberly, M. Giesbrecht, G. Villard, "On computing the determinant and Smith form of an integer
matrix", FOCS 2000.
V. Pan, "Computing the determinant and the characteristic polynomial of a matrix via solving
linear systems of equations", Inform. Process. Lett. 28 (1988).
B. D. Saunders, Z. Wan, "Smith normal form of dense integer matrices, fast algorithms into
practice", ISSAC 2004.
J. D. Dixon, "Exact solution of linear equations using p-adic expansions", Numer. Math. 40
(1982).
"""

from __future__ import annotations

import math
import random
from functools import reduce
from math import isqrt
from operator import mul
from typing import Any

from graphinv.errors import GraphInvError
from graphinv.normalform._local_smith import local_valuations

__all__ = [
    "crt_determinant",
    "crt_signed",
    "hadamard_bound",
    "largest_primes",
    "modular_core",
    "modular_core_diagonal",
    "word_primes",
]

_PRIMES: dict[int, list[int]] = {}


class _InternalCheckError(GraphInvError, ArithmeticError):
    """An internal consistency check of the modular finish failed (a bug; please report)."""


def largest_primes(bits: int, count: int) -> list[int]:
    """The ``count`` largest primes below ``2^bits``, in descending order (cached per ``bits``).

    Examples
    --------
    >>> largest_primes(31, 2)
    [2147483647, 2147483629]
    """
    import flint

    found = _PRIMES.setdefault(bits, [])
    candidate = (1 << bits) - 1 if not found else found[-1] - 2
    while len(found) < count:
        if flint.fmpz(candidate).is_prime():
            found.append(candidate)
        candidate -= 2
    return found[:count]


def word_primes(count: int) -> list[int]:
    """The ``count`` largest primes below ``2^62`` (cached).

    Examples
    --------
    >>> word_primes(2)
    [4611686018427387847, 4611686018427387817]
    """
    return largest_primes(62, count)


def hadamard_bound(rows: list[dict[int, int]] | list[list[int]]) -> int:
    """An integer ``H >= |det A|``: the product of the Euclidean lengths of the rows, rounded up.

    Examples
    --------
    >>> hadamard_bound([[2, -1], [-1, 2]])
    5
    """
    product = 1
    for row in rows:
        values = row.values() if isinstance(row, dict) else row
        product *= sum(v * v for v in values)
    return isqrt(product - 1) + 1 if product else 0


# Dense cores from these sizes on get their residues from a batched float-BLAS elimination.
DENSE_BATCH = 200
SMALL_BATCH = 40


def crt_determinant(
    C: Any, bound: int, divisor: int = 1, rows: list[list[int]] | None = None, array: Any = None
) -> int:
    """``det C`` for an ``fmpz_mat`` with ``|det C| <= bound`` and ``divisor | det C``
    (``C`` may be None when ``rows`` are given: it is then built if needed).

    When the rows are given as Python ints, all the residues come from one batched elimination
    modulo primes below ``2^22``: from ``DENSE_BATCH`` rows on the recursive LU of
    :mod:`graphinv.normalform._dense_modular`, from ``SMALL_BATCH`` rows on (entries below
    ``2^53``) the block LU of :mod:`graphinv.normalform._level_determinant`.  Otherwise
    python-flint works prime by prime.  ``array`` may pass the rows already as a float64
    NumPy array.

    Examples
    --------
    >>> import flint
    >>> crt_determinant(flint.fmpz_mat([[2, -1], [-1, 2]]), 5)
    3
    """
    import flint

    limit = 2 * (bound // divisor) + 1
    residues: dict[int, int] = {}  # det C / divisor modulo each prime
    product = 1
    if rows is not None and SMALL_BATCH <= len(rows) < DENSE_BATCH:
        found = _batched_residues(rows if array is None else array, limit, divisor)
        if found is not None:
            residues, product = found
    if rows is not None and len(rows) >= DENSE_BATCH:
        from graphinv.normalform._dense_modular import dense_determinants
        from graphinv.normalform._level_determinant import float_primes

        offset = 0
        while product <= limit:
            count = (limit // product).bit_length() // 21 + 2
            batch = [q for q in float_primes(offset + count)[offset:] if divisor % q]
            offset += count
            for q, r in zip(batch, dense_determinants(rows, batch), strict=True):
                if r is not None:
                    residues[q] = r * pow(divisor % q, -1, q) % q
                    product *= q
    index = 0
    while product <= limit:
        index += 1
        p = word_primes(index)[-1]
        if divisor % p:
            if C is None:
                if rows is None:
                    raise ValueError("crt_determinant needs the matrix or its rows")
                C = flint.fmpz_mat(rows)
            residues[p] = int(flint.nmod_mat(C, p).det()) * pow(divisor % p, -1, p) % p
            product *= p
    return crt_signed(residues) * divisor


def _batched_residues(rows: Any, limit: int, divisor: int) -> tuple[dict[int, int], int] | None:
    """``det C / divisor`` modulo primes below ``2^22`` whose product exceeds ``limit``, all
    primes in one batched float64 LU (:mod:`graphinv.normalform._level_determinant`); ``None``
    for entries of ``2^53`` or more (no exact float residues) or too few usable primes."""
    import numpy as np

    from graphinv.normalform._level_determinant import dense_determinants_mod, float_primes_avoiding

    A = np.asarray(rows, dtype=np.float64)
    primes = float_primes_avoiding(limit.bit_length() // 21 + 1, divisor)
    if primes is None or np.abs(A).max(initial=0) >= 2.0**53:
        return None
    residues: dict[int, int] = {}
    product = 1
    for q, r in zip(primes, dense_determinants_mod(A, primes), strict=True):
        residues[q] = r * pow(divisor % q, -1, q) % q
        product *= q
    return residues, product


def crt_signed(residues: dict[int, int]) -> int:
    """The integer of least absolute value with the given residues (Garner's CRT).

    Examples
    --------
    >>> crt_signed({5: 3, 7: 4})
    -17
    """
    value = 0
    product = 1
    for p, r in residues.items():
        t = (r - value) * pow(product % p, -1, p) % p
        value += product * t
        product *= p
    return value - product if value > product // 2 else value


def _mod_matrix(C: Any, p: int) -> Any:
    import flint

    if p < (1 << 63):
        return flint.nmod_mat(C, p)
    ctx = flint.fmpz_mod_ctx(p)
    return flint.fmpz_mod_mat(C, ctx)


def _pivot_columns(M: Any, rank: int) -> list[int]:
    rows = M.tolist()
    columns = []
    for i in range(rank):
        row = rows[i]
        columns.append(next(j for j, v in enumerate(row) if int(v) != 0))
    return columns


def _valuation(n: int, p: int) -> int:
    v = 0
    while n % p == 0:
        n //= p
        v += 1
    return v


def _schur_complement(C: Any, p: int, t: int) -> tuple[Any | None, Any]:
    """``(C11, S)``: ``C11 = C[R, K]`` for rows ``R`` and columns ``K`` independent modulo
    ``p`` (``None`` when the rank modulo ``p`` is 0) and the exact rational Schur complement
    ``S`` (an ``fmpq_mat``) of ``C11``.

    ``r`` rows independent modulo ``p`` and ``r`` independent columns of a rank-``r`` matrix
    meet in a nonsingular ``r`` by ``r`` block, so ``C11`` is invertible over the ``p``-adic
    integers and ``C`` is equivalent there to ``diag(C11, S)``.
    """
    import flint

    k = C.nrows()
    r = k - t
    if r == 0:
        return None, flint.fmpq_mat(C)
    reduced_columns, rank_c = _mod_matrix(C, p).rref()
    reduced_rows, rank_r = _mod_matrix(C.transpose(), p).rref()
    if rank_c != r or rank_r != r:
        raise _InternalCheckError("rank modulo p changed between two computations")
    K = _pivot_columns(reduced_columns, r)
    R = _pivot_columns(reduced_rows, r)
    K_rest = sorted(set(range(k)) - set(K))
    R_rest = sorted(set(range(k)) - set(R))
    entries = C.tolist()

    def block(rows: list[int], columns: list[int]) -> Any:
        return flint.fmpz_mat([[entries[i][j] for j in columns] for i in rows])

    C11 = block(R, K)
    X = C11.solve(block(R, K_rest))
    S = flint.fmpq_mat(block(R_rest, K_rest)) - flint.fmpq_mat(block(R_rest, K)) * X
    return C11, S


def _reduce_rational(S: Any, modulus: int) -> list[list[int]]:
    out = []
    for row in S.tolist():
        line = []
        for q in row:
            numerator, denominator = int(q.numer()), int(q.denom())
            line.append(numerator * pow(denominator, -1, modulus) % modulus)
        out.append(line)
    return out


def _complement_of_independent(M: Any, t: int, p: int) -> list[int]:
    """``t`` column indices of ``M`` (rank ``ncols - t`` modulo ``p``) whose complement is a set
    of independent columns: rows of a nullspace basis forming a nonsingular ``t`` by ``t``
    block (a dependency among the other columns would be a kernel vector vanishing there)."""
    import flint

    k = M.ncols()
    X, nullity = M.nullspace()
    if nullity != t:
        raise _InternalCheckError("rank modulo p changed between two computations")
    selector = flint.nmod_mat(k, t, [1 if i == j else 0 for i in range(k) for j in range(t)], p)
    basis = [[int(x) for x in line] for line in (X * selector).tolist()]
    chosen: list[int] = []
    reduced: list[tuple[int, list[int]]] = []  # (pivot position, normalized row)
    for i, line in enumerate(basis):
        v = list(line)
        for position, pivot_row in reduced:
            if v[position]:
                factor = v[position]
                v = [(a - factor * b) % p for a, b in zip(v, pivot_row, strict=True)]
        position = next((j for j, x in enumerate(v) if x), -1)
        if position >= 0:
            inverse = pow(v[position], -1, p)
            reduced.append((position, [x * inverse % p for x in v]))
            chosen.append(i)
            if len(chosen) == t:
                return chosen
    raise _InternalCheckError("a nullspace basis of full rank was expected")


def _local_schur_word(
    rows: list[list[int]], C: Any, p: int, t: int, precision: int
) -> list[list[int]]:
    """The ``t`` by ``t`` Schur complement ``S = C22 - C21 C11^{-1} C12`` modulo ``q = p^precision``
    (``q < 2^62``), where ``C11 = C[R, K]`` is nonsingular modulo ``p`` (``t`` = corank of ``C``
    modulo ``p``).

    Over the ``p``-adic integers ``C`` is equivalent to ``diag(C11, S)`` with ``C11``
    invertible, so ``S`` carries the whole local Smith form.  ``X = C11^{-1} C12`` is lifted
    ``p``-adically (Dixon 1982): one inverse modulo ``p``, then one product per digit, all in
    word-size arithmetic modulo ``q`` (the entries are reduced first, however big they were).
    """
    import flint

    k = len(rows)
    q = p**precision
    K_rest = _complement_of_independent(_mod_matrix(C, p), t, p)
    R_rest = _complement_of_independent(_mod_matrix(C.transpose(), p), t, p)
    dropped_columns, dropped_rows = set(K_rest), set(R_rest)
    K = [j for j in range(k) if j not in dropped_columns]
    R = [i for i in range(k) if i not in dropped_rows]
    reduced = [[x % q for x in line] for line in rows]

    def block(row_index: list[int], columns: list[int]) -> list[list[int]]:
        return [[reduced[i][j] for j in columns] for i in row_index]

    C11 = flint.nmod_mat(block(R, K), q)
    inverse = flint.nmod_mat(block(R, K), p).inv()
    residual = block(R, K_rest)
    X = [[0] * t for _ in R]
    power = 1
    for _ in range(precision):
        digit = [
            [int(x) for x in line]
            for line in (inverse * flint.nmod_mat(residual, p)).tolist()
        ]
        for line, add in zip(X, digit, strict=True):
            for j in range(t):
                line[j] += power * add[j]
        # residual - C11 digit is divisible by p; it is known modulo q / power, enough for
        # the digits still to come.
        difference = (flint.nmod_mat(residual, q) - C11 * flint.nmod_mat(digit, q)).tolist()
        residual = [[int(x) // p for x in line] for line in difference]
        power *= p
    S = flint.nmod_mat(block(R_rest, K_rest), q) - flint.nmod_mat(
        block(R_rest, K), q
    ) * flint.nmod_mat([[x % q for x in line] for line in X], q)
    return [[int(x) for x in line] for line in S.tolist()]


def _local_valuations(S: Any, p: int, precision: int) -> list[int]:
    """Valuations at ``p`` of the invariant factors of the ``fmpz_mat`` ``S``, known modulo
    ``p^precision`` (a factor that vanishes modulo ``p^precision`` counts as ``precision``).

    Level by level: divide out the common power of ``p``, count the pivots that are units
    modulo ``p`` (the rank modulo ``p``), and continue with the Schur complement of a
    nonsingular block of that rank, which is again an integer matrix modulo a smaller power.
    """
    import flint

    found: list[int] = []
    shift = 0
    while S.nrows():
        n = S.nrows()
        common = 0
        for x in S.entries():
            common = math.gcd(common, int(x))
        if common == 0:
            return found + [precision] * n
        v = _valuation(common, p)
        if shift + v >= precision:
            return found + [precision] * n
        if v:
            scale = p**v
            S = flint.fmpz_mat([[int(x) // scale for x in row] for row in S.tolist()])
            shift += v
        r = _mod_matrix(S, p).rank()
        found += [shift] * r
        if r == n:
            return found
        _, S_next = _schur_complement(S, p, n - r)
        S = flint.fmpz_mat(_reduce_rational(S_next, p ** (precision - shift)))
    return found


def modular_core_diagonal(
    rows: list[list[int]], *, bound: int | None = None, seed: int = 0
) -> list[int]:
    """Nonzero Smith invariants (ones included, in chain order) of a dense integer matrix.

    Square nonsingular matrices take the modular route described in the module docstring;
    others fall back to python-flint's ``snf``.

    Parameters
    ----------
    rows : list of lists of int
    bound : int, optional
        A known bound on ``|det|`` (for instance Hadamard's bound of the matrix this core was
        reduced from); default the core's own Hadamard bound.
    seed : int
        Seed for the random right-hand sides (the answer does not depend on it).

    Examples
    --------
    >>> modular_core_diagonal([[2, 0, 0], [0, 6, 0], [0, 0, 4]])
    [2, 2, 12]
    """
    return modular_core(rows, bound=bound, seed=seed)[0]


def modular_core(
    rows: list[list[int]],
    *,
    bound: int | None = None,
    seed: int = 0,
    matrix: Any = None,
    array: Any = None,
) -> tuple[list[int], tuple[list[int], list[list[int]]] | None]:
    """:func:`modular_core_diagonal` and two rational solutions of ``C y = c``, ``c`` integral.

    The solutions are returned as ``(orders, numerators)`` with ``y_j = numerators[j] /
    orders[j]``; ``None`` when the core is singular or not square.  The subgroup they generate
    in ``C^{-1} Z^k / Z^k`` has an order dividing ``det C`` (Lagrange), which is what the
    determinant certificate of :mod:`graphinv.group` builds on.  ``matrix`` and ``array`` may
    pass the same rows already converted to a python-flint ``fmpz_mat`` or a NumPy array.

    Examples
    --------
    >>> modular_core([[2, 0, 0], [0, 6, 0], [0, 0, 4]], seed=1)[0]
    [2, 2, 12]
    """
    import flint

    k = len(rows)
    C = matrix  # the same rows as an fmpz_mat, built only when a step below needs it
    if k == 0 or any(len(row) != k for row in rows):
        return _flint_fallback(C if C is not None else flint.fmpz_mat(rows)), None
    rng = random.Random(seed * 1_000_003 + k)
    B = [[rng.randrange(-(1 << 20), 1 << 20) for _ in range(2)] for _ in range(k)]
    # C and its transpose have the same invariant factors, so the order of ``c`` in
    # ``Z^k / C Z^k`` (the common denominator of ``C^{-1} c``) divides ``d_k`` just as well.
    solved = None
    if bound is not None:
        import numpy as np

        from graphinv.normalform._dixon import solve_lifting

        # One float64 copy, shared by the lifting and the residues (an int64 core is cast once).
        array = np.array(rows, dtype=np.float64) if array is None else array.astype(np.float64)
        solved = solve_lifting(rows, B, det_bound=bound, array=array)  # exact, or None
    if solved is None:
        if C is None:
            C = flint.fmpz_mat(rows)
        try:
            X = C.solve(flint.fmpz_mat(B))
        except ZeroDivisionError:
            return _flint_fallback(C), None
        solved = _fractions(X, k)
    orders, numerators = solved
    s = math.lcm(*orders)
    witness = (orders, numerators)
    # The two solutions generate a subgroup H with invariant factors h | s: s | d_k and, as the
    # invariant factors of a subgroup divide those of the group in turn, h | d_{k-1}; and
    # |H| = s h divides D (Lagrange), which halves the primes the determinant needs when the
    # group has two large factors.  The image of H on the first coordinates alone has an order
    # dividing |H| (a projection is a homomorphism): enough for the determinant's divisor, and
    # the whole h is needed only when D / s > 1.
    divisor = math.lcm(s, pair_subgroup_order([w[:PREFIX] for w in numerators], orders))
    # A bound inherited from the matrix before elimination is far tighter than the core's own
    # Hadamard bound (which costs a pass over k^2 big entries), so the latter is only a default.
    D = abs(
        crt_determinant(
            C, bound if bound is not None else hadamard_bound(rows), divisor, rows, array
        )
    )
    if D == 0 or D % divisor:
        raise _InternalCheckError("the determinant is not a multiple of a subgroup order")
    N = D // s
    if N == 1:
        return [1] * (k - 1) + [D], witness
    h = _second_invariant(numerators, orders, s)
    if N % h:
        raise _InternalCheckError("the determinant is not a multiple of the subgroup order")
    if C is None:
        C = flint.fmpz_mat(rows)
    # A prime p of h that does not divide N / h has v_p(D) = v_p(s) + v_p(h), which forces
    # v_p(d_k) = v_p(s), v_p(d_{k-1}) = v_p(h) and no p in the others: such primes ("settled")
    # need neither factoring nor ranks, which matters when N is a product of many large primes.
    settled = h if h > 1 and N % h == 0 else 1
    common = math.gcd(settled, N // settled)
    while common > 1:
        settled //= common
        common = math.gcd(settled, common)
    N_rest = N // settled
    primes = sorted(int(p) for p, _ in flint.fmpz(N_rest).factor()) if N_rest > 1 else []
    valuations: dict[int, list[int]] = {}
    hard: list[tuple[int, int, int]] = []
    for p in primes:
        e = _valuation(D, p)
        t = k - _mod_matrix(C, p).rank()
        if t == 1:
            valuations[p] = [e]
        elif t == e:
            valuations[p] = [1] * t
        else:
            hard.append((t, p, e))
    hard.sort(reverse=True)
    for item in list(hard):
        t, p, e = item
        cap = min(e + 1, int(math.log(2**31 - 1, p)))
        while cap > 0 and p**cap >= 2**31:  # guard against rounding in log
            cap -= 1
        if cap < 2:
            continue
        # Only the second largest valuation must stay below the precision (the total fixes the
        # largest), and it is usually small: start low and raise the precision when needed.
        precision = min(cap, max(2, int(8 / math.log2(p)) + 1))
        while True:
            reduced = _local_schur_word(rows, C, p, t, precision) if t < k // 4 else rows
            local = sorted(
                (v for v in local_valuations(reduced, p, precision) if v), reverse=True
            )
            saturated = sum(1 for v in local if v >= precision)
            if (len(local) == t and saturated <= 1) or precision >= cap:
                break
            precision = min(cap, 2 * precision)
        if len(local) == t and saturated <= 1:
            # Only the largest can be cut off by the precision; the total fixes it.
            local[0] = e - sum(local[1:])
            if local[0] < (local[1] if len(local) > 1 else 1) or (saturated and local[0] < precision):
                raise _InternalCheckError(f"local Smith form at {p} does not match the determinant")
            valuations[p] = local
            hard.remove(item)
    while hard:
        t, p, e = hard.pop(0)
        C11, S = _schur_complement(C, p, t)
        served = [(t, p, e)]
        for item in list(hard):
            if C11 is None or _mod_matrix(C11, item[1]).det() != 0:
                served.append(item)
                hard.remove(item)
        for t_q, q, e_q in served:
            local = _local_valuations(flint.fmpz_mat(_reduce_rational(S, q ** (e_q + 1))), q, e_q + 1)
            local = sorted((v for v in local if v), reverse=True)
            if len(local) != t_q or sum(local) != e_q:
                raise _InternalCheckError(f"local Smith form at {q} does not match the determinant")
            valuations[q] = local
    depth = max([len(v) for v in valuations.values()] + [2 if settled > 1 else 1])
    lower = [
        reduce(mul, (p ** v[j] for p, v in valuations.items() if j < len(v)), 1)
        for j in range(1, depth)
    ]
    lower.reverse()  # d_{k-depth+1}, ..., d_{k-1}
    if settled > 1:
        lower[-1] *= settled
    product = reduce(mul, lower, 1)
    if D % product:
        raise _InternalCheckError("the invariant factors do not divide the determinant")
    last = D // product
    if last % s or (lower and last % lower[-1]):
        raise _InternalCheckError("the invariant factors do not form a divisibility chain")
    return [1] * (k - depth) + lower + [last], witness


# Coordinates of the two solutions whose lattice gives the determinant's divisor ``s h``.
PREFIX = 24


def _fractions(X: Any, k: int) -> tuple[list[int], list[list[int]]]:
    """Exact common denominators and numerators of the columns of an ``fmpq_mat``."""
    numerators: list[list[int]] = []
    orders: list[int] = []
    for column in range(X.ncols()):
        entries = [X[i, column] for i in range(k)]
        lcd = 1
        for q in entries:
            lcd = math.lcm(lcd, int(q.denom()))
        orders.append(lcd)
        numerators.append([int(q.numer()) * (lcd // int(q.denom())) for q in entries])
    return orders, numerators


def pair_subgroup_order(
    numerators: list[list[int]], orders: list[int], *, enough: int | None = None
) -> int:
    """``|H|`` for ``H`` generated by ``x_j = numerators[j] / orders[j]`` (two vectors) in
    ``Q^n / Z^n``; the ``orders`` need only be common denominators, not exact ones.

    ``H = Z^2 / Lambda`` with ``Lambda = {v : v_0 x_0 + v_1 x_1 in Z^n}``, a lattice containing
    ``s Z^2`` (``s = lcm(orders)``); it is intersected coordinate by coordinate, kept in Hermite
    form ``{(a, c), (0, d)}``, and ``|H| = a d``.

    Examples
    --------
    >>> pair_subgroup_order([[1, 0], [0, 1]], [2, 3]), pair_subgroup_order([[1, 0], [1, 0]], [2, 2])
    (6, 2)
    >>> pair_subgroup_order([[0], [-8]], [3, 5])  # x_0 = 0: only the order 5 of x_1 counts
    5

    With ``enough``, the scan stops once the order of the subgroup spanned so far (of the
    coordinates read: a divisor of ``|H|``) reaches it; the result is then such a divisor.

    >>> pair_subgroup_order([[1, 0], [0, 1]], [2, 3], enough=3)
    6
    """
    s = math.lcm(*orders)
    scale0, scale1 = s // orders[0], s // orders[1]
    a, c, d = 1, 0, 1  # Lambda = Z^2
    for u, v in zip(numerators[0], numerators[1], strict=True):
        alpha, beta = u * scale0 % s, v * scale1 % s
        gamma1, gamma2 = (alpha * a + beta * c) % s, beta * d % s
        g = math.gcd(gamma1, gamma2)
        if g == 0:
            continue
        m = s // math.gcd(g, s)
        if m == 1:
            continue
        # (gamma1, gamma2) U = (g, 0) with U = [[x, -gamma2/g], [y, gamma1/g]] unimodular.
        if gamma2 == 0:
            x, y = 1, 0
        else:
            x = pow(gamma1 // g, -1, gamma2 // g) if gamma2 // g > 1 else 1
            y = (g - gamma1 * x) // gamma2
        # New generators: m (x v1 + y v2) and (-gamma2/g) v1 + (gamma1/g) v2, with v1 = (a, c),
        # v2 = (0, d); plus s e_1 and s e_2.  Hermite form by gcds on the first coordinate.
        w1 = (m * x * a, m * (x * c + y * d))
        w2 = (-(gamma2 // g) * a, -(gamma2 // g) * c + (gamma1 // g) * d)
        a, c, d = _hermite2([w1, w2], s)
        if enough is not None and a * d >= enough:
            break
    return a * d


def _second_invariant(numerators: list[list[int]], orders: list[int], s: int) -> int:
    """``h = |H| / s`` for the subgroup ``H`` spanned by two solutions with exact denominators
    ``orders`` (so ``s = lcm(orders)`` is its exponent): ``H = Z/h + Z/s`` with ``h | s``.  The
    invariant factors of a subgroup divide those of the group in turn, so ``h | d_{k-1}``."""
    index = pair_subgroup_order(numerators, orders)
    if index % s:
        raise _InternalCheckError("the subgroup order is not a multiple of its exponent")
    return index // s


def _hermite2(vectors: list[tuple[int, int]], s: int) -> tuple[int, int, int]:
    """Hermite basis ``(a, c), (0, d)`` of the lattice spanned by ``vectors``, ``(s, 0)`` and
    ``(0, s)`` (``a, d > 0``, ``0 <= c < d``)."""
    a, c, d = s, 0, s
    for p, q in vectors:
        if p == 0:
            d = math.gcd(d, q)
            continue
        g = math.gcd(a, p)
        x = pow(a // g, -1, p // g) if abs(p // g) > 1 else 0
        y = (g - a * x) // p
        c, leftover = x * c + y * q, (p // g) * c - (a // g) * q
        a = g
        d = math.gcd(d, leftover)
    return a, c % d, d


def _flint_fallback(C: Any) -> list[int]:
    S = C.snf()
    k = min(S.nrows(), S.ncols())
    return [int(S[i, i]) for i in range(k) if S[i, i] != 0]
