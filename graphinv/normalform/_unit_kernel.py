"""Compiled unit-pivot elimination on a dense ``int64`` work array.

The same elimination as :func:`graphinv.normalform._sparse.eliminate_unit_pivots`, step for
step, run by a numba kernel over a dense copy of the matrix.  The Python loop keeps a heap of
``(row length, row number)``: it pops the shortest row (ties to the lowest number), skips it if
it holds no ``+-1`` entry (until it changes again), and otherwise pivots on its unit entry whose
column has the fewest live rows, ties to the entry met first in the row's dict order (the input
order, with fill-in appended as it appears).  The kernel takes the same decisions: it scans for
the shortest row still "waiting" (live, and changed since it was last skipped), and it keeps for
every entry an order stamp (its place in the input dict, or a counter value when fill-in created
it), processing the pivot row in stamp order so that fill-in is stamped as the dict would append
it.  Stamps are ``int32``; when the counter reaches ``STAMP_LIMIT`` every live row's stamps are
renumbered in their order.  Per row the kernel also keeps the number of nonzero and of ``+-1``
entries, per column the number of live rows, and it keeps a list of the live rows, so a step
costs one pass over the live rows to choose the pivot and one to find the rows to update, one
scan of the pivot row, and one multiply-subtract per nonzero entry of the pivot row and row to
update.  A pivot row is never written after it is chosen (it is dead), so the pivot rows are read
back from the array at the end, as they were when chosen.

The early-stop probe needs the ranks modulo 2 and 3 of the dense remainder; they are computed
here too, on rows packed into 64-bit words (:func:`ranks_mod_two_and_three`).

Exactness: every entry is kept below ``ENTRY_LIMIT = 2^62`` in absolute value.  Before a step
the kernel bounds its updates by ``max|factor| * max|pivot row entry| + max|entry|``; if that
bound stays below ``2^62`` (compared in float64 with a margin far above its rounding error) no
product or difference can overflow ``int64``.  Otherwise every update of the step is first
computed and checked (a product is formed only when its float64 estimate is below ``2^62``), and
a step that would leave the range is not taken: the kernel returns ``OVERFLOW`` with the state
as it was before that step, and the caller finishes the elimination with Python integers.

The kernel also stops, before pivoting, with ``DENSE`` once the chosen row is dense (the early
stop rule of the caller) while the probe is on; the caller inspects the remainder and either
keeps it or resumes with the probe off.  All state lives in the arrays passed in, so a resumed
call continues where the last one stopped.

The kernels are compiled on first use (numba, ``cache=True``: later processes load them from
``__pycache__``); importing this module compiles nothing.

References
----------
H. M. Markowitz, "The elimination form of the inverse and its application to linear
programming", Management Science 3 (1957).
J.-G. Dumas, B. D. Saunders, G. Villard, "On efficient sparse integer matrix Smith normal form
computations", J. Symbolic Comput. 32 (2001).
T. J. Boothby, R. W. Bradshaw, "Bitslicing and the method of four Russians over larger finite
fields", preprint (2009) (bit-sliced arithmetic modulo 3).
"""

from __future__ import annotations

import threading
from typing import Any

__all__ = [
    "DENSE",
    "DONE",
    "ENTRY_LIMIT",
    "OVERFLOW",
    "STAMP_LIMIT",
    "UnitState",
    "kernels_loaded",
    "ranks_mod_two_and_three",
    "unit_kernels",
]

ENTRY_LIMIT = 1 << 62
"""Entries of the work array stay strictly below this in absolute value."""

DONE = 0
"""Kernel status: no live row holds a ``+-1`` entry any more."""
DENSE = 1
"""Kernel status: the probe is on and the next pivot row is dense; nothing was changed."""
OVERFLOW = 2
"""Kernel status: the next step could make an entry reach ``ENTRY_LIMIT``; it was not taken."""

STAMP_LIMIT = (1 << 31) - 1
"""Order stamps are ``int32``: below this (renumbered when the counter gets there)."""

_KERNELS: list[Any] = []
_KERNELS_LOCK = threading.Lock()
np: Any = None  # numpy, bound on first use: the compiled kernels read it as a global


def unit_kernels() -> Any:
    """The compiled kernels ``count``, ``eliminate`` and ``packed_rank`` (numba, cached on disk).

    Examples
    --------
    >>> import numpy
    >>> state = UnitState(numpy.array([[2, -1], [-1, 2]], dtype=numpy.int64))
    >>> state.run(probe_length=0, probe_share=0.0, probe=False) == DONE
    True
    >>> state.pivots, state.pivot_row[:1].tolist(), state.pivot_column[:1].tolist()
    (1, [0], [1])
    >>> int(state.A[1, 0])  # row 1 plus twice row 0: -1 + 2 * 2
    3

    References
    ----------
    Markowitz, Management Science 3 (1957); Dumas, Saunders, Villard, J. Symbolic Comput. 32
    (2001).
    """
    global np
    with _KERNELS_LOCK:
        if not _KERNELS:
            from types import SimpleNamespace

            import numba
            import numpy as np

            jit = numba.njit(cache=True, nogil=True)
            _KERNELS.append(
                SimpleNamespace(
                    count=jit(_count),
                    eliminate=jit(_eliminate),
                    packed_rank=jit(_packed_rank),
                )
            )
    return _KERNELS[0]


def kernels_loaded() -> bool:
    """Whether :func:`unit_kernels` has already run in this process (no loading cost left).

    Examples
    --------
    >>> unit_kernels() is not None and kernels_loaded()
    True

    References
    ----------
    Markowitz, Management Science 3 (1957).
    """
    return bool(_KERNELS)


def ranks_mod_two_and_three(A: Any) -> tuple[int, int]:
    """The ranks of an ``int64`` matrix modulo 2 and modulo 3.

    Rows are packed into 64-bit words, one bit per entry modulo 2 and two bit planes per entry
    modulo 3 ("is 1", "is 2"), so a row operation is a few logical operations per 64 entries;
    the elimination is Gaussian, column by column.

    Examples
    --------
    >>> import numpy
    >>> ranks_mod_two_and_three(numpy.array([[2, -1, -1], [-1, 2, -1], [-1, -1, 2]]))
    (2, 1)

    References
    ----------
    T. J. Boothby, R. W. Bradshaw, "Bitslicing and the method of four Russians over larger
    finite fields", preprint (2009) (bit-sliced arithmetic modulo 3).
    """
    kernels = unit_kernels()
    A = np.ascontiguousarray(A, dtype=np.int64)
    return int(kernels.packed_rank(A, 2)), int(kernels.packed_rank(A, 3))


class UnitState:
    """A dense ``int64`` matrix under unit-pivot elimination, with its bookkeeping arrays.

    Parameters
    ----------
    A : numpy.ndarray
        ``m x n`` C-contiguous ``int64`` array, entries below ``ENTRY_LIMIT`` in absolute
        value; it is eliminated in place.
    order : numpy.ndarray, optional
        ``m x n`` ``int32`` order stamps of the nonzero entries (smaller first; the tie-break
        among equally good pivot columns of a row), all below ``next_stamp``; by default the
        column number.  Updated in place as fill-in appears.
    next_stamp : int, optional
        The stamp of the first fill-in; default ``n`` (for the default ``order``).
    stamp_limit : int
        Stamps stay below this: when the counter reaches it, the stamps of every live row are
        renumbered ``0, 1, ...`` in their order and counting resumes at ``n``.  It must exceed
        ``next_stamp`` and ``n``; small values are for tests.

    Attributes
    ----------
    A : numpy.ndarray
        The work array.  Live rows hold the current remainder (zero in every dead column);
        dead row ``pivot_row[t]`` holds pivot ``t``'s row as it was when chosen.
    order : numpy.ndarray
        The order stamps; meaningful where ``A`` is nonzero.
    dead_row, dead_column, waiting : numpy.ndarray of bool
        ``waiting`` marks the live rows the Python loop's heap would still pop.
    row_length : numpy.ndarray of int64
        Nonzero entries of each live row.
    pivot_row, pivot_column : numpy.ndarray of int64
        Row and column of pivot ``t`` for ``t < pivots``, in elimination order.
    pivots : int
        The number of pivots eliminated so far.

    Examples
    --------
    >>> import numpy
    >>> state = UnitState(numpy.array([[3, 1, 0], [1, 3, 1], [0, 1, 3]], dtype=numpy.int64))
    >>> state.run(probe_length=0, probe_share=0.0, probe=False) == DONE, state.pivots
    (True, 2)
    >>> state.live_rows().tolist(), state.live_columns().tolist(), int(state.A[2, 0])
    ([2], [0], 21)

    References
    ----------
    Markowitz, Management Science 3 (1957); Dumas, Saunders, Villard, J. Symbolic Comput. 32
    (2001).
    """

    def __init__(
        self,
        A: Any,
        order: Any = None,
        *,
        next_stamp: int | None = None,
        stamp_limit: int = STAMP_LIMIT,
    ) -> None:
        kernels = unit_kernels()
        m, n = A.shape
        if order is None:
            order = np.empty((m, n), dtype=np.int32)
            order[:] = np.arange(n, dtype=np.int32)
        if next_stamp is None:
            next_stamp = n
        if stamp_limit <= max(next_stamp, n):
            raise ValueError(
                f"Argument 'stamp_limit' must exceed next_stamp and n, not {stamp_limit}."
            )
        self.A = A
        self.order = order
        self.dead_row = np.zeros(m, dtype=np.bool_)
        self.dead_column = np.zeros(n, dtype=np.bool_)
        self.waiting = np.zeros(m, dtype=np.bool_)
        self.row_length = np.zeros(m, dtype=np.int64)
        self.unit_count = np.zeros(m, dtype=np.int64)
        self.column_count = np.zeros(n, dtype=np.int64)
        self.pivot_row = np.zeros(min(m, n), dtype=np.int64)
        self.pivot_column = np.zeros(min(m, n), dtype=np.int64)
        # The live rows, unordered, and each row's place in that list.
        self._live = np.arange(m, dtype=np.int64)
        self._place = np.arange(m, dtype=np.int64)
        # Scalars shared with the kernel: pivots taken, a bound on |entry|, the next stamp, the
        # stamp limit, the number of live rows.
        self._done = np.array([0, 1, next_stamp, stamp_limit, m], dtype=np.int64)
        self._scratch = np.empty((3, n), dtype=np.int64)
        self._targets = np.empty(m, dtype=np.int64)
        self._kernels = kernels
        kernels.count(
            A, self.row_length, self.unit_count, self.column_count, self.waiting, self._done
        )

    @property
    def pivots(self) -> int:
        """The number of pivots eliminated so far."""
        return int(self._done[0])

    def run(self, *, probe_length: int, probe_share: float, probe: bool) -> int:
        """Eliminate until ``DONE``, ``DENSE`` (only with ``probe``) or ``OVERFLOW``."""
        return int(
            self._kernels.eliminate(
                self.A,
                self.order,
                self.row_length,
                self.unit_count,
                self.column_count,
                self.dead_row,
                self.dead_column,
                self.waiting,
                self._live,
                self._place,
                self.pivot_row,
                self.pivot_column,
                self._done,
                probe_length,
                probe_share,
                probe,
                self._scratch,
                self._targets,
            )
        )

    def live_rows(self) -> Any:
        """Numbers of the live nonzero rows, increasing."""
        return np.flatnonzero(~self.dead_row & (self.row_length > 0))

    def live_columns(self) -> Any:
        """Numbers of the columns not eliminated (empty ones included), increasing."""
        return np.flatnonzero(~self.dead_column)


# The kernels below are compiled by numba (see unit_kernels).


def _count(
    A: Any, row_length: Any, unit_count: Any, column_count: Any, waiting: Any, done: Any
) -> None:
    """Nonzero and ``+-1`` entries per row, nonzero entries per column, rows on the heap (the
    nonzero ones), a bound on ``|entry|``."""
    m, n = A.shape
    largest = done[1]
    for i in range(m):
        length = 0
        units = 0
        for j in range(n):
            v = A[i, j]
            if v != 0:
                length += 1
                column_count[j] += 1
                if v == 1 or v == -1:
                    units += 1
                elif abs(v) > largest:
                    largest = abs(v)
        row_length[i] = length
        unit_count[i] = units
        waiting[i] = length > 0
    done[1] = largest


def _eliminate(
    A: Any,
    order: Any,
    row_length: Any,
    unit_count: Any,
    column_count: Any,
    dead_row: Any,
    dead_column: Any,
    waiting: Any,
    live: Any,
    place: Any,
    pivot_row: Any,
    pivot_column: Any,
    done: Any,
    probe_length: int,
    probe_share: float,
    probe: bool,
    scratch: Any,
    targets: Any,
) -> int:
    """Unit pivots until none is left (``DONE = 0``), the probe point (``DENSE = 1``) or an
    entry out of range (``OVERFLOW = 2``, returned before the step that would cause it).
    ``done`` holds the number of pivots, a bound on ``|entry|``, the next order stamp, the
    stamp limit and the number of live rows (``live[:count]``, ``place`` their positions)."""
    m, n = A.shape
    limit = 1 << 62
    safe = 4.6e18  # below 2^62 by far more than float64 rounding of the bound
    pivots = done[0]
    largest = done[1]
    stamp = done[2]
    stamp_limit = done[3]
    alive = done[4]
    while True:
        # The heap's next row: the shortest waiting row, ties to the lowest number.
        best = -1
        best_length = n + 1
        for position in range(alive):
            i = live[position]
            if waiting[i]:
                length = row_length[i]
                if length < best_length or (length == best_length and i < best):
                    best = i
                    best_length = length
        if best < 0:
            return 0
        if probe and best_length >= probe_length and best_length >= probe_share * (n - pivots):
            return 1
        if unit_count[best] == 0:
            waiting[best] = False  # skipped until an update changes it
            continue
        # The row's nonzero entries in stamp order (dead columns are zero in a live row), and
        # its unit entry in the column with the fewest live rows, ties to the smallest stamp.
        count = 0
        for j in range(n):
            if A[best, j] != 0:
                scratch[2, count] = j
                count += 1
        ranks = np.argsort(order[best, scratch[2, :count]], kind="mergesort")
        column = -1
        fewest = m + 1
        value_bound = 0
        for t in range(count):
            j = scratch[2, ranks[t]]
            v = A[best, j]
            scratch[0, t] = j
            scratch[1, t] = v
            if abs(v) > value_bound:
                value_bound = abs(v)
            if (v == 1 or v == -1) and column_count[j] < fewest:
                column = j
                fewest = column_count[j]
        a = A[best, column]
        k = 0
        factor_bound = 0
        for position in range(alive):
            r = live[position]
            f = A[r, column]
            if f != 0 and r != best:
                targets[k] = r
                k += 1
                if abs(f) > factor_bound:
                    factor_bound = abs(f)
        if float(factor_bound) * float(value_bound) + float(largest) >= safe:
            # The bound allows an overflow: check every update exactly before changing anything.
            for s in range(k):
                r = targets[s]
                factor = A[r, column] * a
                for t in range(count):
                    if abs(float(factor) * float(scratch[1, t])) >= safe:
                        return 2
                    new = A[r, scratch[0, t]] - factor * scratch[1, t]
                    if new >= limit or new <= -limit:
                        return 2
        dead_row[best] = True
        dead_column[column] = True
        waiting[best] = False
        alive -= 1
        moved = live[alive]
        live[place[best]] = moved
        place[moved] = place[best]
        done[4] = alive
        pivot_row[pivots] = best
        pivot_column[pivots] = column
        pivots += 1
        done[0] = pivots
        for t in range(count):
            column_count[scratch[0, t]] -= 1
        for s in range(k):
            r = targets[s]
            # Every |old|, |factor * value|, |new| is below 2^62 (checked above): no int64
            # overflow.  The pivot column itself clears (a * a = 1).
            factor = A[r, column] * a
            length = row_length[r]
            units = unit_count[r]
            for t in range(count):
                j = scratch[0, t]
                old = A[r, j]
                new = old - factor * scratch[1, t]
                if old == 0:
                    length += 1
                    column_count[j] += 1
                    if stamp >= stamp_limit:
                        # Renumber every live row's stamps 0, 1, ... in their order (this row
                        # included, its new entry not yet written), so fill-in keeps going last.
                        for position in range(alive):
                            i = live[position]
                            c = 0
                            for q in range(n):
                                if A[i, q] != 0:
                                    scratch[2, c] = q
                                    c += 1
                            ranks = np.argsort(order[i, scratch[2, :c]], kind="mergesort")
                            for q in range(c):
                                order[i, scratch[2, ranks[q]]] = q
                        stamp = n
                    order[r, j] = stamp  # fill-in goes to the end of the row's order
                    stamp += 1
                elif old == 1 or old == -1:
                    units -= 1
                if new == 0:
                    length -= 1
                    column_count[j] -= 1
                elif new == 1 or new == -1:
                    units += 1
                elif abs(new) > largest:
                    largest = abs(new)
                A[r, j] = new
            row_length[r] = length
            unit_count[r] = units
            waiting[r] = True
        done[1] = largest
        done[2] = stamp


def _packed_rank(A: Any, modulus: int) -> int:
    """Rank modulo ``modulus`` (2 or 3), Gaussian elimination on rows packed into 64-bit words.

    Bit ``j`` of ``L[i]`` says ``a_ij = 1``, of ``H[i]`` that ``a_ij = 2`` (modulo 3; ``H`` stays
    zero modulo 2).  Modulo 2 a row operation is a xor.  Modulo 3 the sum of ``(al, ah)`` and
    ``(bl, bh)`` is ``sl = ((al ^ bl) & ~(ah | bh)) | (ah & bh)``,
    ``sh = ((ah ^ bh) & ~(al | bl)) | (al & bl)`` (check the nine cases), and ``-b`` swaps the
    planes."""
    k, n = A.shape
    words = (n + 63) // 64
    L = np.zeros((k, words), dtype=np.uint64)
    H = np.zeros((k, words), dtype=np.uint64)
    one = np.uint64(1)
    for i in range(k):
        for j in range(n):
            if modulus == 2:
                residue = A[i, j] & 1
            else:
                residue = A[i, j] % 3  # a constant divisor compiles to a multiplication
                if residue < 0:
                    residue += 3
            if residue == 1:
                L[i, j >> 6] |= one << np.uint64(j & 63)
            elif residue == 2:
                H[i, j >> 6] |= one << np.uint64(j & 63)
    rank = 0
    for c in range(n):
        w = c >> 6
        bit = one << np.uint64(c & 63)
        pivot = -1
        for r in range(rank, k):
            if (L[r, w] | H[r, w]) & bit:
                pivot = r
                break
        if pivot < 0:
            continue
        if pivot != rank:
            for x in range(w, words):
                L[pivot, x], L[rank, x] = L[rank, x], L[pivot, x]
                H[pivot, x], H[rank, x] = H[rank, x], H[pivot, x]
        pivot_is_one = (L[rank, w] & bit) != 0
        for r in range(rank + 1, k):
            if not (L[r, w] | H[r, w]) & bit:
                continue
            if modulus == 2:
                for x in range(w, words):
                    L[r, x] ^= L[rank, x]
                continue
            # Subtract q times the pivot row, q = entry / pivot entry: for q = 1 add the
            # negated pivot row (planes swapped), for q = 2 add the pivot row (-2 = 1).
            same = ((L[r, w] & bit) != 0) == pivot_is_one
            for x in range(w, words):
                al = L[r, x]
                ah = H[r, x]
                if same:
                    bl = H[rank, x]
                    bh = L[rank, x]
                else:
                    bl = L[rank, x]
                    bh = H[rank, x]
                L[r, x] = ((al ^ bl) & ~(ah | bh)) | (ah & bh)
                H[r, x] = ((ah ^ bh) & ~(al | bl)) | (al & bl)
        rank += 1
        if rank == k:
            break
    return rank
