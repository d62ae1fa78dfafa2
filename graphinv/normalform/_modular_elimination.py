"""Sparse Gaussian elimination modulo many word-size primes at once (for determinants).

Each matrix entry is a NumPy vector of residues, one per prime ``p < 2^31`` (so that products
fit in ``int64``), and one elimination sweep, with pivots chosen by minimum degree on the
sparsity pattern, serves all primes.  A prime for which a pivot vanishes is dropped (its residue
would need another pivot).  When the remaining Schur complement is dense it is handed, prime by
prime, to python-flint's ``nmod_mat.det``.  The determinant follows by the Chinese remainder
theorem once the product of the surviving primes exceeds twice a bound on ``|det|``.

This is deliberately a different route from the unit-pivot integer elimination of the Smith
form: different arithmetic (residues, not integers), different pivots (any nonzero residue,
not only ``+-1``), so that agreement of the two is evidence.

References
----------
Collins, "The calculation of multivariate polynomial resultants", J. ACM 18 (1971).
Tinney, Walker, "Direct solutions of sparse network equations by optimally ordered triangular
factorization", Proc. IEEE 55 (1967) (minimum-degree ordering).
"""

from __future__ import annotations

import heapq
from typing import Any

from graphinv.normalform._modular import crt_signed, largest_primes

__all__ = ["determinant_residues", "level_residues", "modular_determinant"]

_DENSE_MIN_FILL = 0.5


def _primes31(count: int) -> list[int]:
    return largest_primes(31, count)


def _small_or_dense(rows: list[dict[int, int]]) -> bool:
    """Matrices for which python-flint's exact dense determinant beats any residue route."""
    n = len(rows)
    return n <= 64 or sum(len(row) for row in rows) >= _DENSE_MIN_FILL * n * n


def _flint_determinant(rows: list[dict[int, int]]) -> int:
    import flint

    n = len(rows)
    dense = [[0] * n for _ in range(n)]
    for i, row in enumerate(rows):
        for j, v in row.items():
            dense[i][j] = v
    return int(flint.fmpz_mat(dense).det())


def _inverse(a: Any, primes: Any) -> Any:
    """Elementwise inverse of ``a`` modulo ``primes`` (``a`` nonzero modulo each)."""
    import numpy as np

    if len(primes) <= 256:
        return np.array(
            [pow(x, -1, p) for x, p in zip(a.tolist(), primes.tolist(), strict=True)],
            dtype=np.int64,
        )
    return _fermat_inverse(a, primes)


def _fermat_inverse(a: Any, primes: Any) -> Any:
    """Elementwise ``a^(p-2) mod p`` (Fermat), vectorized."""
    import numpy as np

    result = np.ones_like(a)
    base = a % primes
    exponent = primes - 2
    while exponent.any():
        odd = (exponent & 1).astype(bool)
        result = np.where(odd, result * base % primes, result)
        base = base * base % primes
        exponent = exponent >> 1
    return result


class _Fenwick:
    """Counts of alive indices below a position (for the sign of each pivot)."""

    def __init__(self, n: int) -> None:
        self.n = n
        self.tree = [0] * (n + 1)
        for i in range(1, n + 1):
            self.tree[i] += 1
            parent = i + (i & -i)
            if parent <= n:
                self.tree[parent] += self.tree[i]

    def remove(self, i: int) -> None:
        i += 1
        while i <= self.n:
            self.tree[i] -= 1
            i += i & -i

    def before(self, i: int) -> int:
        total = 0
        while i > 0:
            total += self.tree[i]
            i -= i & -i
        return total


def modular_determinant(rows: list[dict[int, int]], bound: int) -> int:
    """``det A`` for a square sparse matrix with ``|det A| <= bound``.

    Examples
    --------
    >>> modular_determinant([{0: 2, 1: -1}, {0: -1, 1: 2}], 5)
    3
    """
    if not rows:
        return 1
    if _small_or_dense(rows):
        return _flint_determinant(rows)
    by_levels = level_residues(rows, 2 * bound + 1)
    if by_levels is not None:
        return crt_signed(by_levels)
    needed_bits = (2 * bound + 1).bit_length() + 1
    count = needed_bits // 30 + 3
    while True:
        residues, primes = _eliminate(rows, _primes31(count))
        if residues is None:
            return 0
        modulus = 1
        for p in primes:
            modulus *= p
        if modulus > 2 * bound:
            break
        count += count // 2 + 2
    return crt_signed(dict(zip(primes, residues, strict=True)))


def determinant_residues(
    rows: list[dict[int, int]], limit: int, *, avoid: int = 1
) -> dict[int, int]:
    """``{p: det A mod p}`` for primes ``p`` not dividing ``avoid`` whose product exceeds
    ``limit`` (every residue exact; a prime whose elimination could not decide is replaced).

    Examples
    --------
    >>> residues = determinant_residues([{0: 2, 1: -1}, {0: -1, 1: 2}], 10)
    >>> all(r == 3 % p for p, r in residues.items())
    True
    """
    if _small_or_dense(rows):
        # python-flint's exact determinant is quicker than many residues here.
        value = _flint_determinant(rows) if rows else 1
        count = limit.bit_length() // 30 + 1
        usable = [p for p in _primes31(count + 16) if avoid % p][:count]
        return {p: value % p for p in usable}
    by_levels = level_residues(rows, limit, avoid=avoid)
    if by_levels is not None:
        return by_levels
    found: dict[int, int] = {}
    product = 1
    count = limit.bit_length() // 30 + 2
    offset = 0
    while product <= limit:
        candidates = [p for p in _primes31(offset + count)[offset:] if avoid % p]
        offset += count
        residues, primes = _eliminate(rows, candidates)
        if residues is None:
            return {p: 0 for p in candidates}
        for r, p in zip(residues, primes, strict=True):
            found[p] = r
            product *= p
        count = max(2, (limit // product).bit_length() // 30 + 2)
    return found


def level_residues(
    rows: list[dict[int, int]], limit: int, *, avoid: int = 1
) -> dict[int, int] | None:
    """Like :func:`determinant_residues`, by the level-block sweep of
    :mod:`graphinv.normalform._level_determinant` over primes below ``2^22`` (exact float BLAS);
    ``None`` when a round of primes decides nothing (the caller takes the elimination route).

    Examples
    --------
    >>> residues = level_residues([{0: 2, 1: -1}, {0: -1, 1: 2}], 10**9)
    >>> all(r == 3 % p for p, r in residues.items())
    True
    """
    from graphinv.normalform._level_determinant import float_primes, level_determinant

    found: dict[int, int] = {}
    product = 1
    offset = 0
    count = limit.bit_length() // 21 + 2
    while product <= limit:
        candidates = [p for p in float_primes(offset + count)[offset:] if avoid % p]
        offset += count
        decided = 0
        for p, r in zip(candidates, level_determinant(rows, candidates), strict=True):
            if r is not None:
                found[p] = r
                product *= p
                decided += 1
        if not decided:
            return None
        count = max(2, (limit // product).bit_length() // 21 + 2)
    return found


class _Pool:
    """Residue vectors stored as rows of one growing 2-D array, so that all the updates of a
    pivot step are one vectorized operation."""

    def __init__(self, width: int, capacity: int) -> None:
        import numpy as np

        self.data = np.zeros((max(capacity, 16), width), dtype=np.int64)
        self.free: list[int] = []
        self.top = 0

    def allocate(self) -> int:
        if self.free:
            return self.free.pop()
        if self.top == self.data.shape[0]:
            import numpy as np

            grown = np.zeros((2 * self.data.shape[0], self.data.shape[1]), dtype=np.int64)
            grown[: self.top] = self.data[: self.top]
            self.data = grown
        self.top += 1
        return self.top - 1


def _eliminate(
    original: list[dict[int, int]], prime_list: list[int]
) -> tuple[list[int] | None, list[int]]:
    """Residues of the determinant modulo the primes that survived (``None``: exactly 0)."""
    import flint
    import numpy as np

    primes = np.array(prime_list, dtype=np.int64)
    width = len(prime_list)
    n = len(original)
    pool = _Pool(width, 2 * sum(len(row) for row in original))
    R: list[dict[int, int]] = []
    for row in original:
        slots = {}
        for j, v in row.items():
            k = pool.allocate()
            if -(1 << 62) < v < (1 << 62):
                pool.data[k] = np.int64(v) % primes
            else:
                pool.data[k] = [v % p for p in prime_list]
            slots[j] = k
        R.append(slots)
    columns: list[set[int]] = [set() for _ in range(n)]
    for i, row in enumerate(R):
        for j in row:
            columns[j].add(i)
    valid = np.ones(width, dtype=bool)
    accumulated = np.ones(width, dtype=np.int64)
    negative = False
    alive_rows = _Fenwick(n)
    alive_columns = _Fenwick(n)
    row_dead = [False] * n
    heap = [(len(row), i) for i, row in enumerate(R)]
    heapq.heapify(heap)
    remaining = n
    nnz = sum(len(row) for row in R)
    while remaining:
        if remaining <= 64 or (
            remaining <= 2000 and nnz >= _DENSE_MIN_FILL * remaining * remaining
        ):
            break
        length, i = heapq.heappop(heap)
        row = R[i]
        if row_dead[i] or length != len(row):
            continue
        pivot_column = -1
        while row:
            # Minimum degree: the diagonal when it is as short as any, else the shortest column.
            best = min(row, key=lambda j: (len(columns[j]), j != i))
            if pool.data[row[best]][valid].any():
                pivot_column = best
                break
            pool.free.append(row.pop(best))  # an exact zero (it vanishes modulo every prime)
            columns[best].discard(i)
            nnz -= 1
        if pivot_column < 0:
            return None, []
        j = pivot_column
        pivot = pool.data[row[j]]
        vanishing = pivot == 0
        if (vanishing & valid).any():
            valid &= ~vanishing
        safe = np.where(vanishing, 1, pivot)
        inverse = _inverse(safe, primes)
        accumulated = accumulated * safe % primes
        if (alive_rows.before(i) + alive_columns.before(j)) % 2:
            negative = not negative
        alive_rows.remove(i)
        alive_columns.remove(j)
        row_dead[i] = True
        remaining -= 1
        for c in row:
            columns[c].discard(i)
        nnz -= len(row)
        targets = list(columns[j])
        if targets:
            pivot_columns = [c for c in row if c != j]
            U = pool.data[[row[c] for c in pivot_columns]]
            F = pool.data[[R[r][j] for r in targets]] * inverse % primes
            destination = np.empty((len(targets), len(pivot_columns)), dtype=np.int64)
            fresh: list[int] = []
            for a, r in enumerate(targets):
                target = R[r]
                pool.free.append(target.pop(j))
                line = destination[a]
                for b, c in enumerate(pivot_columns):
                    slot = target.get(c)
                    if slot is None:
                        slot = pool.allocate()
                        target[c] = slot
                        columns[c].add(r)
                        fresh.append(slot)
                    line[b] = slot
                heapq.heappush(heap, (len(target), r))
            nnz += len(fresh) - len(targets)
            if fresh:
                pool.data[fresh] = 0
            if pivot_columns:
                update = F[:, None, :] * U[None, :, :] % primes
                pool.data[destination] = (pool.data[destination] - update) % primes
        for c in row.values():
            pool.free.append(c)
        columns[j] = set()
        R[i] = {}
    survivors = [k for k in range(width) if valid[k]]
    results: list[int] = []
    if remaining:
        alive = [i for i in range(n) if not row_dead[i]]
        alive_cols = sorted({c for i in alive for c in R[i]})
        if len(alive_cols) < len(alive):
            return None, []
        position = {c: k for k, c in enumerate(alive_cols)}
        row_index = []
        column_index = []
        slot_list: list[int] = []
        for a, i in enumerate(alive):
            for c, k in R[i].items():
                row_index.append(a)
                column_index.append(position[c])
                slot_list.append(k)
        values = pool.data[slot_list]
        dense = np.zeros((remaining, remaining), dtype=np.int64)
        # Two residues fit in one int64 by the Chinese remainder theorem (p, q < 2^31), which
        # halves the slow conversion of Python ints into flint matrices.
        for pair in range(0, len(survivors), 2):
            ks = survivors[pair : pair + 2]
            p = primes[ks[0]]
            if len(ks) == 2:
                q = primes[ks[1]]
                lift = (values[:, ks[1]] - values[:, ks[0]]) % q * (pow(int(p), -1, int(q))) % q
                dense[row_index, column_index] = values[:, ks[0]] + p * lift
            else:
                dense[row_index, column_index] = values[:, ks[0]]
            packed = flint.fmpz_mat(dense.tolist())
            for k in ks:
                prime = int(primes[k])
                d = int(flint.nmod_mat(packed, prime).det())
                results.append(d * int(accumulated[k]) % prime)
    else:
        results = [int(accumulated[k]) for k in survivors]
    if negative:
        results = [(-r) % int(primes[k]) for r, k in zip(results, survivors, strict=True)]
    return results, [int(primes[k]) for k in survivors]
