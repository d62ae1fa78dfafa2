"""Determinants of sparse integer matrices modulo many word-size primes at once, by levels.

The symmetrized nonzero pattern of the square matrix ``A`` is a graph.  Each connected component
is ordered by the levels of a breadth-first search from a pseudo-peripheral vertex (George and
Liu's level structures, the ordering behind Cuthill--McKee): an edge only joins a level to itself
or to a neighbouring level, so in that order ``A`` is block tridiagonal.  The components are laid
one after another and consecutive small levels are merged (a merge keeps the matrix block
tridiagonal), which leaves few, reasonably large diagonal blocks ``A_ii``.  A simultaneous
permutation of rows and columns does not change the determinant, and the block sweep

    S_1 = A_11,    S_{i+1} = A_{i+1,i+1} - A_{i+1,i} S_i^{-1} A_{i,i+1},    det A = prod det S_i

needs only dense arithmetic on the blocks, never on the whole matrix.  Only the rows and columns
of ``S_i^{-1}`` that meet the (sparse) couplings to the next block are formed: the block is
ordered with those vertices last, its leading part is eliminated and only the inverse of the
trailing Schur complement is computed.  The coupling product itself is a sparse-dense-sparse
product done by a compiled kernel.

All primes are handled at once: a block is an array of shape ``(W, l, l)`` of float64 residues,
one ``l x l`` matrix per prime.  Inverses use recursive 2 x 2 block (Schur complement)
inversion, whose work is batched float64 matrix products (BLAS).  They are exact because every
prime is below ``P_MAX = 2^22``: a product of two residues is below ``2^44`` and a dot product of
at most ``CHUNK = 512`` of them is below ``2^53``, the range where float64 holds integers exactly;
longer inner dimensions are split into chunks and reduced between them.  Blocks of at most
``BASE`` rows are inverted by a compiled Gauss--Jordan kernel that runs all primes in step (the
primes are the innermost, vectorized loop); a prime meeting a zero pivot there is redone alone
with row pivoting.
When a leading half-block is singular modulo some prime, that prime's whole block is redone by
the pivoting kernel, so only a Schur complement ``S_i`` that is itself singular modulo the prime
stops the sweep.  That prime is then swept again alone, and a singular ``S_i`` is not eliminated
but bordered by the next block into one larger dense block (the matrix stays block
tridiagonal); a prime is given up (``None``) only if that block would outgrow the memory budget.
A singular last block simply gives the residue 0.

Before the sweep, vertices of pattern degree 0 and pendant vertices whose pivot is ``+-1`` are
eliminated exactly over the integers, repeatedly (so trees hanging off a Laplacian, and stars,
cost nothing and make no wide level).

Symmetric matrices (Laplacians) use the symmetric form of the block inverse (four products
instead of six), and couplings with small integer entries are applied to the residues without
intermediate reductions.

References
----------
George, Liu, "Computer Solution of Large Sparse Positive Definite Systems", Prentice-Hall (1981),
ch. 4 (level structures, pseudo-peripheral nodes).
Dumas, Giorgi, Pernet, "Dense linear algebra over word-size prime fields: the FFLAS and FFPACK
packages", ACM Trans. Math. Software 35 (2008) (exact floating-point BLAS modulo p).
Strassen, "Gaussian elimination is not optimal", Numer. Math. 13 (1969) (block inversion by
Schur complements).
"""

from __future__ import annotations

from typing import Any

from graphinv.normalform._matrix import as_sparse_int_rows

__all__ = [
    "CHUNK",
    "P_MAX",
    "dense_determinants_mod",
    "float_primes",
    "float_primes_avoiding",
    "float_residues",
    "level_determinant",
]

P_MAX = 1 << 22
"""Every prime used is below this bound, so residue products are below ``2^44``."""

CHUNK = 512
"""Longest inner dimension of one exact float64 product: ``CHUNK * (P_MAX - 1)^2 < 2^53``."""

BASE = 16
"""Blocks up to this size are inverted by the compiled Gauss-Jordan kernels."""

BASE_DETERMINANT = 32
"""Blocks up to this size get their determinant by compiled elimination, without inversion."""

MERGE_TARGET = 64
"""Consecutive levels are merged while the merged block stays at most this size."""

MEMORY_BUDGET = 1 << 29
"""Bytes of block storage aimed at: primes are processed in batches to stay near it."""

_PRIMES: list[int] = []


def float_residues(A: Any, primes: Any) -> Any:
    """``A mod p`` for each prime, shape ``(W,) + A.shape``, float64 in ``[0, p)``.

    ``A`` holds integers below ``2^53`` in absolute value (float64 or int64).  The residue is
    ``A - p floor(A / p)``, exact with no correction: for ``A = n p + f``, ``0 < f < p``, the
    rounding error of ``A / p`` is below ``|A / p| 2^-53 < 1 / p``, the distance from
    ``A / p`` to the nearest integer, so the floor is ``n``; for ``f = 0`` the quotient is exact.
    Several times quicker than ``numpy.mod`` on floats.

    Examples
    --------
    >>> import numpy as np
    >>> float_residues(np.array([[-7.0, 9.0]]), [5, 7]).tolist()
    [[[3.0, 4.0]], [[0.0, 2.0]]]
    """
    import numpy as np

    X = np.asarray(A, dtype=np.float64)[None]
    p = np.asarray(primes, dtype=np.float64).reshape((-1,) + (1,) * (X.ndim - 1))
    if X.size and np.abs(X).max() < p.min():
        return np.where(X < 0, X + p, X)  # small entries (the usual case): one correction
    quotient = X / p
    np.floor(quotient, out=quotient)
    quotient *= p
    return np.subtract(X, quotient, out=quotient)


def dense_determinants_mod(A: Any, primes: list[int], batch_entries: int = 1 << 22) -> list[int]:
    """``det A mod p`` for a square integer array (entries below ``2^53``) and each prime below
    ``P_MAX``, all primes of a batch in one block LU (``batch_entries`` residues at a time).

    Examples
    --------
    >>> import numpy as np
    >>> dense_determinants_mod(np.array([[2, -1], [-1, 2]]), [5, 7])  # det = 3
    [3, 3]
    """
    import numpy as np

    batch = max(1, batch_entries // max(1, A.size))
    found: list[int] = []
    for start in range(0, len(primes), batch):
        p = np.array(primes[start : start + batch], dtype=np.float64)
        det = _Arithmetic(p, False).determinant(float_residues(A, p))
        found.extend(int(d) for d in det.tolist())
    return found


def float_primes_avoiding(count: int, avoid: int) -> list[int] | None:
    """The ``count`` largest primes below ``P_MAX`` that do not divide ``avoid``; ``None`` if the
    first ``count + 16`` do not hold that many (``avoid`` has many prime factors near
    ``P_MAX``).

    Examples
    --------
    >>> float_primes_avoiding(2, float_primes(1)[0]) == float_primes(3)[1:]
    True
    """
    primes = [q for q in float_primes(count + 16) if avoid % q][:count]
    return primes if len(primes) == count else None


def float_primes(count: int) -> list[int]:
    """The ``count`` largest primes below ``P_MAX = 2^22``, in descending order.

    Residues modulo these primes multiply exactly in float64 matrix products whose inner
    dimension is at most ``CHUNK = 512`` (``512 * (2^22 - 1)^2 < 2^53``).  The list is cached.

    Parameters
    ----------
    count : int
        How many primes, at least 0.

    Returns
    -------
    list of int

    Raises
    ------
    ValueError
        If ``count`` is not a non-negative integer or exceeds the number of primes below
        ``P_MAX``.

    Examples
    --------
    >>> float_primes(3)
    [4194301, 4194287, 4194277]

    References
    ----------
    Dumas, Giorgi, Pernet, ACM Trans. Math. Software 35 (2008), section 3.
    """
    if isinstance(count, bool) or not isinstance(count, int) or count < 0:
        raise ValueError(f"Argument 'count' must be a non-negative integer, not {count!r}.")
    if len(_PRIMES) < count:
        _PRIMES[:] = _primes_below(P_MAX, count)
    return _PRIMES[:count]


def _primes_below(bound: int, count: int) -> list[int]:
    """The ``count`` largest primes below ``bound`` (segmented sieve of Eratosthenes)."""
    import numpy as np

    small = _small_primes(int(bound**0.5) + 1)
    span = max(4096, 32 * count)
    while True:
        low = max(2, bound - span)
        is_prime = np.ones(bound - low, dtype=bool)
        for q in small.tolist():
            if q * q >= bound:
                break
            start = max(q * q, -(-low // q) * q)
            is_prime[start - low :: q] = False
        found = (np.flatnonzero(is_prime) + low)[::-1]
        if len(found) >= count or low == 2:
            if len(found) < count:
                raise ValueError(
                    f"Argument 'count' must be at most {len(found)} (primes below {bound}), "
                    f"not {count}."
                )
            return [int(q) for q in found[:count]]
        span *= 4


def _small_primes(bound: int) -> Any:
    import numpy as np

    sieve = np.ones(bound + 1, dtype=bool)
    sieve[:2] = False
    for q in range(2, int(bound**0.5) + 1):
        if sieve[q]:
            sieve[q * q :: q] = False
    return np.flatnonzero(sieve)


def level_determinant(rows: list[dict[int, int]], primes: list[int]) -> list[int | None]:
    """``det(A) mod p`` for every prime ``p``, for a square sparse integer matrix ``A``.

    Parameters
    ----------
    rows : list of dict
        Row ``i`` maps column indices to integers (any size, any sign); the matrix is
        ``len(rows)`` square.
    primes : list of int
        Distinct or repeated primes below ``P_MAX = 2^22`` (see :func:`float_primes`).

    Returns
    -------
    list of int or None
        Entry ``k`` is ``det(A) mod primes[k]`` in ``[0, p)``, or ``None`` when that prime
        could not be decided: an intermediate Schur complement was singular modulo it and the
        merged dense block that would get past it exceeds the memory budget (rare; use another
        prime).  A residue given is always right.  The empty matrix has determinant 1.

    Raises
    ------
    InvalidMatrixError
        If a row has a column index outside ``0..n-1`` or a non-integer entry.
    ValueError
        If a modulus is not a prime below ``P_MAX``.

    Notes
    -----
    See the module docstring for the method.  Work is ``O(W * sum l_i^3)`` for ``W`` primes and
    block sizes ``l_i``; memory is ``O(W * max l_i^2)`` (primes are taken in batches when that
    would be large).  Graphs whose level structure has a very wide level (a star, say) give a
    large dense block and are slow with this method.

    Examples
    --------
    The reduced Laplacian of the 4-cycle counts its 4 spanning trees:

    >>> level_determinant([{0: 2, 1: -1}, {0: -1, 1: 2, 2: -1}, {1: -1, 2: 2}], [7, 5])
    [4, 4]
    >>> level_determinant([{1: 3}, {0: 2}], [4194301])  # det = -6
    [4194295]
    >>> level_determinant([], [13])
    [1]

    References
    ----------
    George, Liu, "Computer Solution of Large Sparse Positive Definite Systems" (1981);
    Dumas, Giorgi, Pernet, ACM Trans. Math. Software 35 (2008); Strassen, Numer. Math. 13 (1969).
    """
    import numpy as np

    moduli = _check_primes(primes)
    n = len(rows)
    checked = rows if _plain_rows(rows, n) else as_sparse_int_rows(rows, n)
    if not moduli:
        return []
    factor, checked = _peel_unit_leaves(checked)
    n = len(checked)
    if n == 0 or factor == 0:
        return [factor % q for q in moduli]
    plan = _plan(checked, n)
    # A batch of primes holds about ten (W, l, l) blocks and the (W, nnz) entry residues.
    batch = max(1, MEMORY_BUDGET // (8 * (10 * plan.largest**2 + 3 * len(plan.values))))
    result: list[int | None] = []
    for start in range(0, len(moduli), batch):
        chunk = moduli[start : start + batch]
        p = np.array(chunk, dtype=np.float64)
        residues = _residues(plan.values, chunk)
        det, ok = _sweep(plan, residues, p)
        # A prime that met a singular Schur complement is swept again alone, merging that
        # block with the next one instead of eliminating it.
        for w in np.flatnonzero(~ok).tolist():
            one, good = _sweep(plan, residues[w : w + 1], p[w : w + 1], merge=True)
            det[w], ok[w] = one[0], good[0]
        if factor != 1:
            det = det * np.array([factor % q for q in chunk], dtype=np.int64) % p.astype(np.int64)
        result.extend(int(d) if good else None for d, good in zip(det.tolist(), ok.tolist(), strict=True))
    return result


def _peel_unit_leaves(rows: list[dict[int, int]]) -> tuple[int, list[dict[int, int]]]:
    """Eliminate, exactly over the integers, vertices of pattern degree 0 and pendant vertices
    whose pivot is +-1 (repeatedly: hanging trees of a Laplacian peel away completely).

    A pendant vertex ``v`` with neighbour ``u`` and ``A[v, v] = a = +-1`` leaves the Schur
    complement ``A[u, u] - A[u, v] a A[v, u]`` on the other rows; an isolated vertex contributes
    its diagonal entry.  Returns the product of the eliminated pivots and the remaining rows,
    renumbered.  This keeps stars and trees from making one very wide level.
    """
    if not any(len(row) <= 2 for row in rows):
        return 1, rows
    n = len(rows)
    neighbours = [set(row) for row in rows]
    for i, row in enumerate(rows):
        neighbours[i].discard(i)
        for j in row:
            if j != i:
                neighbours[j].add(i)
    queue = [v for v in range(n) if len(neighbours[v]) <= 1]
    if not queue:
        return 1, rows
    work = [dict(row) for row in rows]
    alive = [True] * n
    factor = 1
    while queue:
        v = queue.pop()
        if not alive[v] or len(neighbours[v]) > 1:
            continue
        pivot = work[v].get(v, 0)
        if not neighbours[v]:
            factor *= pivot
            alive[v] = False
            continue
        if pivot not in (1, -1):
            continue
        (u,) = neighbours[v]
        change = work[u].get(v, 0) * work[v].get(u, 0) * pivot
        if change:
            value = work[u].get(u, 0) - change
            if value:
                work[u][u] = value
            else:
                work[u].pop(u, None)
        work[u].pop(v, None)
        neighbours[u].discard(v)
        factor *= pivot
        alive[v] = False
        if len(neighbours[u]) <= 1:
            queue.append(u)
    kept = [v for v in range(n) if alive[v]]
    if len(kept) == n:
        return 1, rows
    index = {v: k for k, v in enumerate(kept)}
    return factor, [{index[j]: x for j, x in work[v].items()} for v in kept]


def _plain_rows(rows: list[dict[int, int]], n: int) -> bool:
    """Whether the rows are already dicts of plain ints, columns in range, no zero entries
    (the common case, checked at C speed; anything else goes through the full check)."""
    for row in rows:
        if type(row) is not dict:
            return False
        if not row:
            continue
        if set(map(type, row)) != {int} or set(map(type, row.values())) != {int}:
            return False
        if min(row) < 0 or max(row) >= n or 0 in row.values():
            return False
    return True


_CHECKED_PRIMES: set[int] = set()


def _check_primes(primes: list[int]) -> list[int]:
    moduli: list[int] = []
    for q in primes:
        if isinstance(q, bool) or not isinstance(q, int):
            raise ValueError(f"Argument 'primes' must hold primes below {P_MAX}, not {q!r}.")
        if q not in _CHECKED_PRIMES:
            if not 2 <= q < P_MAX or any(q % s == 0 for s in range(2, int(q**0.5) + 1)):
                raise ValueError(f"Argument 'primes' must hold primes below {P_MAX}, not {q!r}.")
            _CHECKED_PRIMES.add(q)
        moduli.append(int(q))
    return moduli


def _residues(values: list[int], primes: list[int]) -> Any:
    """Residues of the entries modulo each prime, shape ``(W, nnz)`` float64."""
    import numpy as np

    limit = 1 << 62
    p = np.array(primes, dtype=np.int64)
    small = [v if -limit < v < limit else 0 for v in values]
    out = np.array(small, dtype=np.int64)[None, :] % p[:, None]
    for k, v in enumerate(values):
        if not -limit < v < limit:
            out[:, k] = [v % q for q in primes]
    return out.astype(np.float64)


class _Plan:
    """The block structure: vertex order, blocks, entries sorted by their block."""

    def __init__(self) -> None:
        self.values: list[int] = []
        self.symmetric = False
        self.largest = 0
        self.blocks: list[dict[str, Any]] = []


def _plan(rows: list[dict[int, int]], n: int) -> _Plan:
    import numpy as np

    plan = _Plan()
    row_index: list[int] = []
    col_index: list[int] = []
    for i, row in enumerate(rows):
        row_index.extend([i] * len(row))
        col_index.extend(row.keys())
        plan.values.extend(row.values())
    plan.symmetric = all(rows[j].get(i) == v for i, row in enumerate(rows) for j, v in row.items())
    r = np.array(row_index, dtype=np.int64)
    c = np.array(col_index, dtype=np.int64)

    off = r != c
    heads = np.concatenate((r[off], c[off]))
    tails = np.concatenate((c[off], r[off]))
    key = np.unique(heads * n + tails)
    heads, tails = key // n, key % n
    indptr = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(np.bincount(heads, minlength=n), out=indptr[1:])
    order, level_ptr = _kernels().level_structure(indptr, tails.astype(np.int64), n)

    # Merge consecutive levels while the block stays small.
    sizes = np.diff(level_ptr)
    block_ptr = [0]
    current = 0
    for size in sizes.tolist():
        if current and current + size > MERGE_TARGET:
            block_ptr.append(block_ptr[-1] + current)
            current = 0
        current += size
    block_ptr.append(n)
    starts = np.array(block_ptr, dtype=np.int64)
    block_of = np.empty(n, dtype=np.int64)
    block_of[order] = np.repeat(np.arange(len(starts) - 1), np.diff(starts))
    block_r, block_c = block_of[r], block_of[c]
    forward = block_c > block_r
    backward = block_c < block_r
    # Vertices of a block that meet the next block go last in it.
    meets_next = np.zeros(n, dtype=bool)
    meets_next[r[forward]] = True
    meets_next[c[backward]] = True
    arranged = order[np.lexsort((meets_next[order], block_of[order]))]
    position = np.empty(n, dtype=np.int64)
    position[arranged] = np.arange(n) - starts[block_of[arranged]]
    plan.largest = int(np.diff(starts).max())

    kind = np.where(forward, 2, np.where(backward, 1, 0))
    sort = np.lexsort((position[c], position[r], kind, block_r))
    bounds = np.searchsorted(block_r[sort] * 3 + kind[sort], np.arange(3 * (len(starts) - 1) + 1))
    for b in range(len(starts) - 1):
        size = int(starts[b + 1] - starts[b])
        tail = int(np.count_nonzero(meets_next[arranged[starts[b] : starts[b + 1]]]))
        own = sort[bounds[3 * b] : bounds[3 * b + 1]]
        back = sort[bounds[3 * b + 1] : bounds[3 * b + 2]]
        ahead = sort[bounds[3 * b + 2] : bounds[3 * b + 3]]
        block: dict[str, Any] = {"size": size, "tail": tail, "own": own}
        block["own_rows"] = position[r[own]]
        block["own_cols"] = position[c[own]]
        if b:
            previous = int(starts[b] - starts[b - 1])
            previous_tail = plan.blocks[-1]["tail"]
            # Rows of this block meeting the previous one, as CSR over the previous tail.
            rows_here = position[r[back]]
            block["back"] = back
            block["back_rows"], block["back_ptr"] = _compress(rows_here)
            block["back_cols"] = position[c[back]] - (previous - previous_tail)
        if b + 1 < len(starts) - 1:
            # Columns of the next block met by this block, as CSC over this block's tail.
            cols_next = position[c[ahead]]
            reorder = np.argsort(cols_next, kind="stable")
            ahead = ahead[reorder]
            block["ahead"] = ahead
            block["ahead_cols"], block["ahead_ptr"] = _compress(cols_next[reorder])
            block["ahead_rows"] = position[r[ahead]] - (size - tail)
        plan.blocks.append(block)
    for earlier, later in zip(plan.blocks, plan.blocks[1:], strict=False):
        later["back_exact"] = earlier["ahead_exact"] = None
        back_values = [plan.values[e] for e in later["back"].tolist()]
        ahead_values = [plan.values[e] for e in earlier["ahead"].tolist()]
        if max(map(abs, back_values + ahead_values), default=0) >= 1 << 30:
            continue
        row_sums = np.bincount(
            np.repeat(np.arange(len(later["back_rows"])), np.diff(later["back_ptr"])),
            weights=np.abs(np.array(back_values, dtype=np.float64)),
        )
        col_sums = np.bincount(
            np.repeat(np.arange(len(earlier["ahead_cols"])), np.diff(earlier["ahead_ptr"])),
            weights=np.abs(np.array(ahead_values, dtype=np.float64)),
        )
        # Products of G (residues below P_MAX) by B and C then stay exact in float64.
        if row_sums.max(initial=0) * col_sums.max(initial=0) * P_MAX < 2.0**52:
            later["back_exact"] = np.array([back_values], dtype=np.float64)
            earlier["ahead_exact"] = np.array([ahead_values], dtype=np.float64)
    return plan


def _compress(sorted_index: Any) -> tuple[Any, Any]:
    """Distinct values of a sorted index array and the pointer to each run."""
    import numpy as np

    if len(sorted_index) == 0:
        return np.zeros(0, dtype=np.int64), np.zeros(1, dtype=np.int64)
    change = np.flatnonzero(np.diff(sorted_index)) + 1
    starts = np.concatenate(([0], change))
    pointer = np.concatenate((starts, [len(sorted_index)])).astype(np.int64)
    return sorted_index[starts].astype(np.int64), pointer


def _sweep(plan: _Plan, residues: Any, p: Any, merge: bool = False) -> tuple[Any, Any]:
    """The block sweep for one batch of primes: (determinant residues, decided flags).

    With ``merge`` (one prime only), a singular ``S_i`` is not eliminated: it is kept, bordered
    by block ``i + 1``, as the next dense block (still block tridiagonal, so the sweep goes
    on); the prime is undecided only if that dense block would exceed the memory budget.
    """
    import numpy as np

    kernels = _kernels()
    ops = _Arithmetic(p, plan.symmetric)
    W = len(p)
    det = np.ones(W, dtype=np.float64)
    ok = np.ones(W, dtype=bool)
    limit = max(plan.largest, int((MEMORY_BUDGET / 80) ** 0.5))
    S = _assemble(plan.blocks[0], residues, W)
    for b, block in enumerate(plan.blocks):
        tail = block["tail"]
        size = S.shape[1]
        last = b + 1 == len(plan.blocks)
        if last or tail == 0:
            d = ops.determinant(S)
            good = np.ones(W, dtype=bool)
            G = None
        else:
            G, d, good = ops.tail_inverse(S, size - tail)
        following = None if last else plan.blocks[b + 1]
        if merge and not good[0] and following is not None:
            if size + following["size"] > limit:
                return det, np.zeros(W, dtype=bool)
            S = _bordered(S, tail, block, following, residues)
            continue
        det = ops.reduce(det * d)
        ok &= good
        if following is None:
            break
        S = _assemble(following, residues, W)
        if G is not None and len(following["back"]) and len(block["ahead"]):
            exact = following["back_exact"] is not None
            kernels.coupling_update(
                S, G,
                following["back_rows"], following["back_ptr"], following["back_cols"],
                following["back_exact"] if exact else np.ascontiguousarray(residues[:, following["back"]]),
                block["ahead_cols"], block["ahead_ptr"], block["ahead_rows"],
                block["ahead_exact"] if exact else np.ascontiguousarray(residues[:, block["ahead"]]),
                p, ops.pinv, exact, plan.symmetric,
            )
    return det.astype(np.int64), ok


def _bordered(S: Any, tail: int, block: dict[str, Any], following: dict[str, Any], residues: Any) -> Any:
    """``[[S, A_{i,i+1}], [A_{i+1,i}, A_{i+1,i+1}]]`` with block ``i``'s tail last in ``S``."""
    import numpy as np

    W, size = S.shape[0], S.shape[1]
    merged = np.zeros((W, size + following["size"], size + following["size"]), dtype=np.float64)
    merged[:, :size, :size] = S
    merged[:, size:, size:] = _assemble(following, residues, W)
    start = size - tail
    back_rows = np.repeat(following["back_rows"], np.diff(following["back_ptr"]))
    merged[:, size + back_rows, start + following["back_cols"]] = residues[:, following["back"]]
    ahead_cols = np.repeat(block["ahead_cols"], np.diff(block["ahead_ptr"]))
    merged[:, start + block["ahead_rows"], size + ahead_cols] = residues[:, block["ahead"]]
    return merged


def _assemble(block: dict[str, Any], residues: Any, W: int) -> Any:
    import numpy as np

    size = block["size"]
    S = np.zeros((W, size, size), dtype=np.float64)
    S[:, block["own_rows"], block["own_cols"]] = residues[:, block["own"]]
    return S


class _Arithmetic:
    """Batched dense arithmetic modulo the primes of one batch (arrays ``(W, a, b)``)."""

    def __init__(self, p: Any, symmetric: bool) -> None:
        self.p = p
        self.pinv = 1.0 / p
        self.symmetric = symmetric
        self.kernels = _kernels()

    def reduce(self, x: Any) -> Any:
        import numpy as np

        r = x - self.p * np.floor(x * self.pinv)
        r = np.where(r < 0, r + self.p, r)
        return np.where(r >= self.p, r - self.p, r)

    def product(self, X: Any, Y: Any) -> Any:
        """``X @ Y`` as nonnegative floats below ``2^53`` (not yet reduced)."""
        inner = X.shape[2]
        if inner <= CHUNK:
            return X @ Y
        total = None
        for s in range(0, inner, CHUNK):
            part = X[:, :, s : s + CHUNK] @ Y[:, s : s + CHUNK, :]
            self.kernels.reduce_inplace(part, self.p, self.pinv)
            total = part if total is None else total + part
        return total

    def difference(self, M: Any, row: int, col: int, X: Any, Y: Any) -> Any:
        """``(D - X @ Y) mod p`` for the block ``D`` of ``M`` starting at ``(row, col)``."""
        T = self.product(X, Y)
        self.kernels.subtract_from(T, M, row, col, self.p, self.pinv)
        return T

    def negated(self, X: Any, Y: Any) -> Any:
        """``(-X @ Y) mod p``."""
        T = self.product(X, Y)
        self.kernels.negate_inplace(T, self.p, self.pinv)
        return T

    def reduced(self, X: Any, Y: Any) -> Any:
        """``(X @ Y) mod p``."""
        T = self.product(X, Y)
        self.kernels.reduce_inplace(T, self.p, self.pinv)
        return T

    def _pivoting_inverse(self, M: Any, which: Any) -> tuple[Any, Any, Any]:
        import numpy as np

        sub = np.ascontiguousarray(M[which])
        inverse = np.zeros_like(sub)
        det = np.zeros(len(sub), dtype=np.float64)
        good = np.zeros(len(sub), dtype=np.bool_)
        self.kernels.gauss_jordan(sub, self.p[which], self.pinv[which], inverse, det, good)
        return inverse, det, good

    def _small_inverse(self, M: Any) -> tuple[Any, Any, Any]:
        """Inverse of a small block: all primes together without pivoting, then the primes
        that met a zero pivot again one by one with row pivoting."""
        import numpy as np

        W, size = M.shape[0], M.shape[1]
        inverse = np.empty((W, size, size), dtype=np.float64)
        det = np.empty(W, dtype=np.float64)
        good = np.empty(W, dtype=np.bool_)
        self.kernels.gauss_jordan_across(M, self.p, self.pinv, inverse, det, good)
        if not good.all():
            bad = np.flatnonzero(~good)
            inverse[bad], det[bad], good[bad] = self._pivoting_inverse(M, bad)
        return inverse, det, good

    def inverse(self, M: Any) -> tuple[Any, Any, Any]:
        """``(M^-1, det M, invertible)``; a prime not invertible has ``det 0``, a zero inverse."""
        import numpy as np

        size = M.shape[1]
        if size <= BASE:
            return self._small_inverse(M)
        h = size // 2
        Ai, dA, okA, T1, Si, dS, okS = self._halves(M, h)
        F = self.negated(Si, T1)
        if self.symmetric:
            E = F.transpose(0, 2, 1)
        else:
            E = self.negated(self.reduced(Ai, M[:, :h, h:]), Si)
        inverse = np.empty_like(M)
        inverse[:, :h, :h] = self.difference(Ai, 0, 0, E, T1)
        inverse[:, :h, h:] = E
        inverse[:, h:, :h] = F
        inverse[:, h:, h:] = Si
        det = self.reduce(dA * dS)
        ok = okA & okS
        bad = np.flatnonzero(~okA)
        if len(bad):
            inverse[bad], det[bad], ok[bad] = self._pivoting_inverse(M, bad)
        if not ok.all():
            inverse[~ok] = 0
        return inverse, det, ok

    def _halves(self, M: Any, h: int) -> tuple[Any, ...]:
        """Inverse of the leading ``h`` block, ``C A^-1``, the Schur complement's inverse."""
        Ai, dA, okA = self.inverse(M[:, :h, :h])
        T1 = self.reduced(M[:, h:, :h], Ai)
        S = self.difference(M, h, h, T1, M[:, :h, h:])
        Si, dS, okS = self.inverse(S)
        return Ai, dA, okA, T1, Si, dS, okS

    def tail_inverse(self, M: Any, m: int) -> tuple[Any, Any, Any]:
        """Inverse of the trailing ``l - m`` block of ``M^-1`` (= inverse of the Schur
        complement of the leading ``m`` block), ``det M`` and whether ``M`` is invertible."""
        import numpy as np

        if m == 0:
            return self.inverse(M)
        M = np.ascontiguousarray(M)
        _, dA, okA, _, Si, dS, okS = self._halves(M, m)
        det = self.reduce(dA * dS)
        ok = okA & okS
        bad = np.flatnonzero(~okA)
        if len(bad):
            inverse, det[bad], ok[bad] = self._pivoting_inverse(M, bad)
            Si[bad] = inverse[:, m:, m:]
        return Si, det, ok

    def determinant(self, M: Any) -> Any:
        """``det M`` modulo each prime (always decided)."""
        import numpy as np

        W, size = M.shape[0], M.shape[1]
        if size <= BASE_DETERMINANT:
            det = np.zeros(W, dtype=np.float64)
            self.kernels.gauss_determinant(np.ascontiguousarray(M), self.p, self.pinv, det)
            return det
        M = np.ascontiguousarray(M)
        h = size // 2
        Ai, dA, okA = self.inverse(M[:, :h, :h])
        T1 = self.reduced(M[:, h:, :h], Ai)
        S = self.difference(M, h, h, T1, M[:, :h, h:])
        det = self.reduce(dA * self.determinant(S))
        bad = np.flatnonzero(~okA)
        if len(bad):
            redo = np.zeros(len(bad), dtype=np.float64)
            self.kernels.gauss_determinant(
                np.ascontiguousarray(M[bad]), self.p[bad], self.pinv[bad], redo
            )
            det[bad] = redo
        return det


_KERNELS: list[Any] = []
np: Any = None  # numpy, bound on first use: the compiled kernels read it as a global


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
                level_structure=jit(_level_structure),
                gauss_jordan=jit(_gauss_jordan),
                gauss_jordan_across=jit(_gauss_jordan_across),
                gauss_determinant=jit(_gauss_determinant),
                coupling_update=jit(_coupling_update),
                reduce_inplace=jit(_reduce_inplace),
                subtract_from=jit(_subtract_from),
                negate_inplace=jit(_negate_inplace),
            )
        )
    return _KERNELS[0]


# The kernels below are compiled by numba (see _kernels); helpers are written inline because a
# compiled function can only call compiled functions.  Residues are float64 integers in [0, p);
# ``x - p * floor(x / p)`` (with one correction either way) reduces any |x| < 2^53 exactly.


def _level_structure(indptr: Any, indices: Any, n: int) -> tuple[Any, Any]:
    """Vertex order by components, each by BFS levels from a pseudo-peripheral vertex, and the
    start of every level in that order (George and Liu 1981, algorithm of section 4.3)."""
    order = np.empty(n, dtype=np.int64)
    level_ptr = np.empty(n + 1, dtype=np.int64)
    placed = np.zeros(n, dtype=np.bool_)
    stamp = np.zeros(n, dtype=np.int64)
    level = np.zeros(n, dtype=np.int64)
    queue = np.empty(n, dtype=np.int64)
    run = 0
    filled = 0
    levels = 0
    for seed in range(n):
        if placed[seed]:
            continue
        root = seed
        previous_root = seed
        eccentricity = -1
        depth = 0
        tail = 0
        while True:
            run += 1
            stamp[root] = run
            level[root] = 0
            queue[0] = root
            head = 0
            tail = 1
            while head < tail:
                v = queue[head]
                head += 1
                for e in range(indptr[v], indptr[v + 1]):
                    u = indices[e]
                    if stamp[u] != run:
                        stamp[u] = run
                        level[u] = level[v] + 1
                        queue[tail] = u
                        tail += 1
            depth = level[queue[tail - 1]]
            if depth <= eccentricity:
                break
            eccentricity = depth
            best = -1
            best_degree = n + 1
            for t in range(tail):
                v = queue[t]
                if level[v] == depth and indptr[v + 1] - indptr[v] < best_degree:
                    best = v
                    best_degree = indptr[v + 1] - indptr[v]
            if best == root:
                break
            previous_root = root
            root = best
        if depth < eccentricity:
            # The last candidate was no better: redo the search from the previous root.
            root = previous_root
            run += 1
            stamp[root] = run
            level[root] = 0
            queue[0] = root
            head = 0
            tail = 1
            while head < tail:
                v = queue[head]
                head += 1
                for e in range(indptr[v], indptr[v + 1]):
                    u = indices[e]
                    if stamp[u] != run:
                        stamp[u] = run
                        level[u] = level[v] + 1
                        queue[tail] = u
                        tail += 1
        for t in range(tail):
            v = queue[t]
            placed[v] = True
            if t == 0 or level[v] != level[queue[t - 1]]:
                level_ptr[levels] = filled + t
                levels += 1
            order[filled + t] = v
        filled += tail
    level_ptr[levels] = n
    return order, level_ptr[: levels + 1].copy()


def _gauss_jordan(M: Any, p: Any, pinv: Any, inverse: Any, det: Any, good: Any) -> None:
    """Inverse and determinant of every ``M[w]`` modulo ``p[w]`` by in-place Gauss-Jordan
    elimination with row pivoting (the row swaps are undone as column swaps at the end, as in
    Press et al., Numerical Recipes, section 2.1); a singular ``M[w]`` gets ``good[w] = False``,
    ``det[w] = 0`` and a zero inverse."""
    W = M.shape[0]
    size = M.shape[1]
    work = np.empty((size, size), dtype=np.float64)
    pivot_row = np.empty(size, dtype=np.float64)
    swapped = np.empty(size, dtype=np.int64)
    for w in range(W):
        pw = p[w]
        pi = pinv[w]
        for i in range(size):
            for j in range(size):
                work[i, j] = M[w, i, j]
        d = 1.0
        singular = False
        for c in range(size):
            r = -1
            for i in range(c, size):
                if work[i, c] != 0.0:
                    r = i
                    break
            if r < 0:
                singular = True
                break
            swapped[c] = r
            if r != c:
                for j in range(size):
                    t = work[r, j]
                    work[r, j] = work[c, j]
                    work[c, j] = t
                d = pw - d if d != 0.0 else 0.0
            pivot = work[c, c]
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
            work[c, c] = 1.0
            for j in range(size):
                x = work[c, j] * scale
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                x = x - pw if x >= pw else x
                work[c, j] = x
                pivot_row[j] = x
            for i in range(size):
                f = work[i, c]
                if i == c or f == 0.0:
                    continue
                work[i, c] = 0.0
                for j in range(size):
                    x = work[i, j] - f * pivot_row[j]
                    x -= pw * np.floor(x * pi)
                    x = x + pw if x < 0.0 else x
                    x = x - pw if x >= pw else x
                    work[i, j] = x
        if singular:
            det[w] = 0.0
            good[w] = False
            for i in range(size):
                for j in range(size):
                    inverse[w, i, j] = 0.0
            continue
        for c in range(size - 1, -1, -1):
            r = swapped[c]
            if r != c:
                for i in range(size):
                    t = work[i, r]
                    work[i, r] = work[i, c]
                    work[i, c] = t
        det[w] = d
        good[w] = True
        for i in range(size):
            for j in range(size):
                inverse[w, i, j] = work[i, j]


def _gauss_jordan_across(M: Any, p: Any, pinv: Any, inverse: Any, det: Any, good: Any) -> None:
    """Inverse and determinant of every ``M[w]`` modulo ``p[w]`` by in-place Gauss-Jordan
    elimination without pivoting, all primes in step (the innermost loops run over the primes,
    so they vectorize even for tiny blocks).  Pivot inverses are ``x^(p-2)`` (Fermat).  A prime
    that meets a zero pivot gets ``good[w] = False`` (its other outputs are meaningless)."""
    W = M.shape[0]
    size = M.shape[1]
    work = np.empty((size, size, W), dtype=np.float64)
    for w in range(W):
        for i in range(size):
            for j in range(size):
                work[i, j, w] = M[w, i, j]
    exponent = np.empty(W, dtype=np.int64)
    bits = 0
    for w in range(W):
        exponent[w] = np.int64(p[w]) - 2
        while (exponent[w] >> bits) > 0:
            bits += 1
    d = np.ones(W, dtype=np.float64)
    scale = np.empty(W, dtype=np.float64)
    base = np.empty(W, dtype=np.float64)
    factor = np.empty(W, dtype=np.float64)
    for w in range(W):
        good[w] = True
    for c in range(size):
        for w in range(W):
            pivot = work[c, c, w]
            if pivot == 0.0:
                good[w] = False
                pivot = 1.0
            x = d[w] * pivot
            x -= p[w] * np.floor(x * pinv[w])
            x = x + p[w] if x < 0.0 else x
            d[w] = x - p[w] if x >= p[w] else x
            base[w] = pivot
            scale[w] = 1.0
        for bit in range(bits):
            for w in range(W):
                pw = p[w]
                pi = pinv[w]
                if (exponent[w] >> bit) & 1:
                    x = scale[w] * base[w]
                    x -= pw * np.floor(x * pi)
                    x = x + pw if x < 0.0 else x
                    scale[w] = x - pw if x >= pw else x
                x = base[w] * base[w]
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                base[w] = x - pw if x >= pw else x
        for w in range(W):
            work[c, c, w] = 1.0
        for j in range(size):
            for w in range(W):
                pw = p[w]
                x = work[c, j, w] * scale[w]
                x -= pw * np.floor(x * pinv[w])
                x = x + pw if x < 0.0 else x
                work[c, j, w] = x - pw if x >= pw else x
        for i in range(size):
            if i == c:
                continue
            for w in range(W):
                factor[w] = work[i, c, w]
                work[i, c, w] = 0.0
            for j in range(size):
                for w in range(W):
                    pw = p[w]
                    x = work[i, j, w] - factor[w] * work[c, j, w]
                    x -= pw * np.floor(x * pinv[w])
                    x = x + pw if x < 0.0 else x
                    work[i, j, w] = x - pw if x >= pw else x
    for w in range(W):
        det[w] = d[w]
        for i in range(size):
            for j in range(size):
                inverse[w, i, j] = work[i, j, w]


def _gauss_determinant(M: Any, p: Any, pinv: Any, det: Any) -> None:
    """Determinant of every ``M[w]`` modulo ``p[w]`` by elimination with row pivoting."""
    W = M.shape[0]
    size = M.shape[1]
    work = np.empty((size, size), dtype=np.float64)
    pivot_row = np.empty(size, dtype=np.float64)
    for w in range(W):
        pw = p[w]
        pi = pinv[w]
        for i in range(size):
            for j in range(size):
                work[i, j] = M[w, i, j]
        d = 1.0
        for c in range(size):
            r = -1
            for i in range(c, size):
                if work[i, c] != 0.0:
                    r = i
                    break
            if r < 0:
                d = 0.0
                break
            if r != c:
                for j in range(size):
                    t = work[r, j]
                    work[r, j] = work[c, j]
                    work[c, j] = t
                d = pw - d if d != 0.0 else 0.0
            pivot = work[c, c]
            x = d * pivot
            x -= pw * np.floor(x * pi)
            x = x + pw if x < 0.0 else x
            d = x - pw if x >= pw else x
            a = np.int64(pivot)
            m = np.int64(pw)
            s0 = np.int64(1)
            s1 = np.int64(0)
            while m != 0:
                q = a // m
                a, m = m, a - q * m
                s0, s1 = s1, s0 - q * s1
            scale = float(s0 % np.int64(pw))
            for j in range(size):
                pivot_row[j] = work[c, j]
            for i in range(c + 1, size):
                f = work[i, c]
                if f == 0.0:
                    continue
                x = f * scale
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                f = x - pw if x >= pw else x
                for j in range(size):
                    x = work[i, j] - f * pivot_row[j]
                    x -= pw * np.floor(x * pi)
                    x = x + pw if x < 0.0 else x
                    x = x - pw if x >= pw else x
                    work[i, j] = x
        det[w] = d


def _coupling_update(
    S: Any, G: Any,
    b_rows: Any, b_ptr: Any, b_cols: Any, b_values: Any,
    c_cols: Any, c_ptr: Any, c_rows: Any, c_values: Any,
    p: Any, pinv: Any, exact: bool, mirror: bool,
) -> None:
    """``S -= B G C`` modulo each prime, for sparse ``B`` (rows ``b_rows`` of ``S``, CSR over the
    rows of ``G``) and sparse ``C`` (columns ``c_cols`` of ``S``, CSC over the columns of ``G``).

    Values are per-prime residues ``(W, nnz)``, or with ``exact`` the signed integers
    themselves, shape ``(1, nnz)``, small enough that ``|B| |G| |C|`` stays below ``2^53``, so
    that only the result needs reducing.  With ``mirror`` (a symmetric matrix: ``C = B^T``,
    ``G`` and ``S`` symmetric, ``b_rows == c_cols``) only the upper triangle of ``B G C`` is
    formed and copied to the lower one."""
    W = S.shape[0]
    k = G.shape[1]
    n_cols = len(c_cols)
    n_rows = len(b_rows)
    chunk = 511
    row = np.empty(k, dtype=np.float64)
    for w in range(W):
        pw = p[w]
        pi = pinv[w]
        wb = w if b_values.shape[0] > 1 else 0
        wc = w if c_values.shape[0] > 1 else 0
        for a in range(n_rows):
            for t in range(k):
                row[t] = 0.0
            count = 0
            for e in range(b_ptr[a], b_ptr[a + 1]):
                v = b_values[wb, e]
                source = b_cols[e]
                for t in range(k):
                    row[t] += v * G[w, source, t]
                count += 1
                if not exact and (count == chunk or e + 1 == b_ptr[a + 1]):
                    count = 0
                    for t in range(k):
                        x = row[t]
                        x -= pw * np.floor(x * pi)
                        x = x + pw if x < 0.0 else x
                        row[t] = x - pw if x >= pw else x
            target = b_rows[a]
            for b in range(a if mirror else 0, n_cols):
                total = 0.0
                count = 0
                for e in range(c_ptr[b], c_ptr[b + 1]):
                    total += c_values[wc, e] * row[c_rows[e]]
                    count += 1
                    if not exact and count == chunk:
                        count = 0
                        total -= pw * np.floor(total * pi)
                x = S[w, target, c_cols[b]] - total
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                x = x - pw if x >= pw else x
                S[w, target, c_cols[b]] = x
                if mirror:
                    S[w, c_cols[b], target] = x


def _reduce_inplace(X: Any, p: Any, pinv: Any) -> None:
    """``X mod p`` in place, for a C-contiguous ``X`` of nonnegative floats below ``2^53``,
    ``X[w]`` modulo ``p[w]``."""
    flat = X.reshape(X.shape[0], -1)
    for w in range(flat.shape[0]):
        pw = p[w]
        pi = pinv[w]
        for j in range(flat.shape[1]):
            x = flat[w, j]
            x -= pw * np.floor(x * pi)
            x = x + pw if x < 0.0 else x
            flat[w, j] = x - pw if x >= pw else x


def _subtract_from(T: Any, M: Any, row: int, col: int, p: Any, pinv: Any) -> None:
    """``T <- (M[:, row:, col:] - T) mod p`` in place, for residues ``M`` and nonnegative
    ``T < 2^53`` (``T`` C-contiguous; ``M`` may be a strided view, whose rows are first copied
    to a buffer so that the arithmetic loop runs on unit-stride data)."""
    buffer = np.empty(T.shape[2], dtype=np.float64)
    for w in range(T.shape[0]):
        pw = p[w]
        pi = pinv[w]
        for i in range(T.shape[1]):
            for j in range(T.shape[2]):
                buffer[j] = M[w, row + i, col + j]
            for j in range(T.shape[2]):
                x = T[w, i, j]
                x -= pw * np.floor(x * pi)
                x = x + pw if x < 0.0 else x
                x = x - pw if x >= pw else x
                x = buffer[j] - x
                T[w, i, j] = x + pw if x < 0.0 else x


def _negate_inplace(T: Any, p: Any, pinv: Any) -> None:
    """``T <- (-T) mod p`` in place, for a C-contiguous ``T`` of nonnegative floats below
    ``2^53``."""
    flat = T.reshape(T.shape[0], -1)
    for w in range(flat.shape[0]):
        pw = p[w]
        pi = pinv[w]
        for j in range(flat.shape[1]):
            x = flat[w, j]
            x -= pw * np.floor(x * pi)
            x = x + pw if x < 0.0 else x
            x = x - pw if x >= pw else x
            flat[w, j] = pw - x if x != 0.0 else 0.0
