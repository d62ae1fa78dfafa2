"""Sparse elimination with unit pivots: the cheap first stage of every normal form here.

If an entry ``a[i][j]`` of an integer matrix is ``+1`` or ``-1``, row operations clear column
``j`` and column operations clear row ``i`` (all unimodular), so row ``i`` and column ``j`` can
be dropped: the Schur complement of that entry has the same cokernel and the same Smith form,
less one invariant factor ``1``.  Pivots are chosen Markowitz-style (short rows first, then the
unit entry in the shortest column) to keep the fill-in small, so graph Laplacians, whose
off-diagonal entries are ``-1``, shrink to a small dense core.

Two implementations take the same pivots in the same order: a Python loop over dict rows with a
heap (any entry size), and for matrices of moderate size a numba kernel over a dense ``int64``
copy (:mod:`graphinv.normalform._unit_kernel`, two to four times quicker on graph Laplacians of
a few hundred vertices).  The kernel hands its state over to the Python loop before an entry
could leave ``int64``, so the result is exact either way; ``COMPILED`` forces one or the other.

References
----------
H. M. Markowitz, "The elimination form of the inverse and its application to linear
programming", Management Science 3 (1957).
J.-G. Dumas, B. D. Saunders, G. Villard, "On efficient sparse integer matrix Smith normal form
computations", J. Symbolic Comput. 32 (2001).
"""

from __future__ import annotations

import heapq
from collections.abc import Callable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from itertools import chain
from operator import mul
from typing import Any, Generic, TypeVar, overload

__all__ = [
    "Deferred",
    "PivotBlock",
    "UnitReduction",
    "dense_rows",
    "eliminate_unit_pivots",
    "extend_solution",
    "sparse_rows",
]


Item = TypeVar("Item")


class Deferred(Sequence[Item], Generic[Item]):
    """A read-only list whose items are built on first use (its length is known at once).

    The compiled elimination leaves its rows in a NumPy array; turning them into dicts costs
    about a millisecond per few thousand entries, and callers often need only the count.

    Examples
    --------
    >>> rows = Deferred(2, lambda: [{0: 3}, {1: -1}])
    >>> len(rows), rows == [{0: 3}, {1: -1}], rows[-1]
    (2, True, {1: -1})

    References
    ----------
    Dumas, Saunders, Villard, J. Symbolic Comput. 32 (2001).
    """

    __slots__ = ("_build", "_items", "_length")

    def __init__(self, length: int, build: Callable[[], list[Item]]) -> None:
        self._length = length
        self._build: Callable[[], list[Item]] | None = build
        self._items: list[Item] | None = None

    def _list(self) -> list[Item]:
        if self._items is None:
            assert self._build is not None
            self._items = self._build()
            self._build = None
        return self._items

    def __len__(self) -> int:
        return self._length

    @overload
    def __getitem__(self, index: int) -> Item: ...

    @overload
    def __getitem__(self, index: slice) -> list[Item]: ...

    def __getitem__(self, index: int | slice) -> Item | list[Item]:
        return self._list()[index]

    def __iter__(self) -> Iterator[Item]:
        return iter(self._list())

    def __reversed__(self) -> Iterator[Item]:
        return reversed(self._list())

    def __eq__(self, other: object) -> bool:
        if isinstance(other, Deferred):
            other = other._list()
        return isinstance(other, list) and self._list() == other

    __hash__ = None  # type: ignore[assignment]  # equal to a list, so unhashable like one

    def __repr__(self) -> str:
        return repr(self._list())

    def __reduce__(self) -> tuple[Any, tuple[list[Item]]]:
        return list, (self._list(),)  # pickles and copies as the plain list it stands for


class PivotBlock:
    """The pivot rows left by the compiled elimination, kept compact for back-substitution.

    Parameters
    ----------
    columns : numpy.ndarray
        The pivot column of each pivot row, in elimination order.
    block : numpy.ndarray
        ``int64`` array, row ``t`` the ``t``-th pivot row as it was when chosen.

    Examples
    --------
    >>> import numpy
    >>> block = PivotBlock(numpy.array([1]), numpy.array([[2, -1, 0]]))
    >>> block.rows(), block.flat()
    ([(1, {0: 2, 1: -1})], ([1], [-1], [0, 1], [2, -1], [2]))

    References
    ----------
    Dumas, Saunders, Villard, J. Symbolic Comput. 32 (2001).
    """

    __slots__ = ("_flat", "block", "columns")

    def __init__(self, columns: Any, block: Any) -> None:
        self.columns = columns
        self.block = block
        self._flat: tuple[list[int], list[int], list[int], list[int], list[int]] | None = None

    def flat(self) -> tuple[list[int], list[int], list[int], list[int], list[int]]:
        """``(pivot columns, pivot entries, entry columns, entry values, row ends)``: row ``t``
        is ``entry columns[ends[t-1]:ends[t]]`` with the matching values, increasing columns."""
        if self._flat is None:
            import numpy as np

            row_index, column_index = np.nonzero(self.block)
            ends = np.searchsorted(row_index, np.arange(1, len(self.block) + 1))
            pivot_entries = self.block[np.arange(len(self.block)), self.columns]
            self._flat = (
                self.columns.tolist(),
                pivot_entries.tolist(),
                column_index.tolist(),
                self.block[row_index, column_index].tolist(),
                ends.tolist(),
            )
        return self._flat

    def rows(self) -> list[tuple[int, dict[int, int]]]:
        """``(pivot column, {column: value})`` for each pivot row, in elimination order."""
        pivot_columns, _, columns, values, ends = self.flat()
        rows = []
        start = 0
        for j, stop in zip(pivot_columns, ends, strict=True):
            rows.append((j, dict(zip(columns[start:stop], values[start:stop], strict=True))))
            start = stop
        return rows


@dataclass(frozen=True)
class UnitReduction:
    """What is left after unit-pivot elimination.

    Attributes
    ----------
    pivots : int
        How many unit pivots were eliminated (each an invariant factor 1).
    rows : sequence of dict
        The nonzero remaining rows, ``{column: value}`` with columns renumbered ``0..k-1`` (a
        list, or a :class:`Deferred` list built on first use).
    n_columns : int
        The number of remaining columns (some may be empty: free summands of the cokernel).
    n_rows : int
        The number of remaining rows, zero rows included.
    pivot_rows : sequence of (int, dict)
        With ``keep_pivots=True``: each pivot's column and its row as it was when chosen (in
        the original column numbering), in elimination order.  Row ``t`` has no entry in the
        columns of earlier pivots, so these rows are an upper triangular block with ``+-1`` on
        its diagonal: back-substitution through them extends a solution of the core to one of
        the whole matrix.  (A list, or a :class:`Deferred` list built on first use.)
    kept_columns : list of int
        With ``keep_pivots=True``: the original number of each remaining column.
    dense, matrix : list of lists of int, python-flint ``fmpz_mat``, or None
        After an early stop at a dense remainder: the remaining rows in dense form, as Python
        ints and (after the Python loop, whose probe built it) as an ``fmpz_mat``; the modular
        finish reuses them.
    pivot_block : PivotBlock or None
        With ``keep_pivots=True`` after the compiled elimination: the pivot rows in compact
        form (``pivot_rows`` is built from it), read by :func:`extend_solution`.
    pivot_positions : list of (int, int)
        With ``keep_pivots=True``: each pivot's ``(row, column)`` in the input, in elimination
        order (a determinant can be recomputed along them, see
        :mod:`graphinv.normalform._pivot_replay`).
    array : numpy.ndarray or None
        After an early stop in the compiled elimination: the dense remainder as ``int64``
        (``matrix`` is then left for the consumer to build, if it needs one).
    """

    pivots: int
    rows: Sequence[dict[int, int]]
    n_columns: int
    n_rows: int
    pivot_rows: Sequence[tuple[int, dict[int, int]]] = field(default_factory=list)
    kept_columns: list[int] = field(default_factory=list)
    dense: list[list[int]] | None = None
    matrix: Any = None
    pivot_block: PivotBlock | None = None
    pivot_positions: list[tuple[int, int]] = field(default_factory=list)
    array: Any = None


def sparse_rows(rows: list[list[int]]) -> list[dict[int, int]]:
    """Dense nested lists to ``{column: value}`` rows.

    Examples
    --------
    >>> sparse_rows([[0, 2], [-1, 0]])
    [{1: 2}, {0: -1}]
    """
    return [{j: v for j, v in enumerate(row) if v} for row in rows]


def dense_rows(rows: Sequence[Mapping[int, int]], n_columns: int) -> list[list[int]]:
    """``{column: value}`` rows to dense nested lists with ``n_columns`` columns."""
    dense = []
    for row in rows:
        line = [0] * n_columns
        for j, v in row.items():
            line[j] = v
        dense.append(line)
    return dense


def eliminate_unit_pivots(
    rows: list[dict[int, int]],
    n_columns: int,
    *,
    keep_pivots: bool = False,
    dense_stop: bool = False,
) -> UnitReduction:
    """Eliminate ``+-1`` pivots until none is left; the input rows are consumed.

    Parameters
    ----------
    rows : list of dict
        Sparse rows ``{column: nonzero value}``; modified in place.
    n_columns : int
        Number of columns of the matrix.
    keep_pivots : bool
        Keep the pivot rows (for :func:`extend_solution`).
    dense_stop : bool
        Stop early once the rest is dense (every row at least ``DENSE_ROW`` long and a
        ``DENSE_SHARE`` of the remaining columns) when the group looks nearly cyclic there
        (at most ``NEARLY_CYCLIC`` invariant factors divisible by 2 and by 3, read off the rank
        modulo 2 and 3).  Unit pivots on dense rows of big integers cost more in Python than the
        modular finish spends on the larger core; for groups of large rank (grids, cubes) the
        finish works harder per prime, so elimination continues.

    Returns
    -------
    UnitReduction

    Notes
    -----
    Matrices with ``COMPILED_ENTRIES[0] <= rows * columns <= COMPILED_ENTRIES[1]`` (the lower
    end ``COMPILED_ENTRIES[2]`` until numba is loaded) go to the compiled kernel of
    :mod:`graphinv.normalform._unit_kernel`, which makes the same choices as the Python loop;
    its remaining rows and pivot rows are then :class:`Deferred` lists, turned into dicts on
    first use, and the pivot rows also come as a compact :class:`PivotBlock`.  Entries that do
    not fit the kernel (``|entry| >= 2^62``) are left to Python integers.

    Examples
    --------
    >>> r = eliminate_unit_pivots([{0: 2, 1: -1}, {0: -1, 1: 2}], 2)
    >>> r.pivots, r.rows, r.n_columns
    (1, [{0: 3}], 1)

    References
    ----------
    Markowitz, Management Science 3 (1957); Dumas, Saunders, Villard, J. Symbolic Comput. 32
    (2001).
    """
    if _compiled_fits(len(rows), n_columns):
        reduction = _compiled_elimination(rows, n_columns, keep_pivots, dense_stop)
        if reduction is not None:
            return reduction
    return _python_elimination(rows, n_columns, keep_pivots, dense_stop)


@dataclass
class _Progress:
    """Pivots already taken (by the compiled kernel) when the Python loop takes over: their
    number, their rows, which rows and columns they removed, and which rows are on the heap."""

    pivots: int
    kept: list[tuple[int, dict[int, int]]]
    positions: list[tuple[int, int]]
    dead_row: list[bool]
    dead_column: list[bool]
    waiting: list[bool]


def _python_elimination(
    rows: list[dict[int, int]],
    n_columns: int,
    keep_pivots: bool,
    probe: bool,
    progress: _Progress | None = None,
) -> UnitReduction:
    """:func:`eliminate_unit_pivots` with Python integers and dict rows (any entry size),
    from scratch or continuing after ``progress`` (dead rows of ``rows`` empty, live rows
    zero in the dead columns); ``probe`` says whether the early stop is still to be tried."""
    n_rows = len(rows)
    columns: list[set[int]] = [set() for _ in range(n_columns)]
    for i, row in enumerate(rows):
        for j in row:
            columns[j].add(i)
    if progress is None:
        progress = _Progress(0, [], [], [False] * n_rows, [False] * n_columns, [True] * n_rows)
    dead_row = progress.dead_row
    dead_column = progress.dead_column
    heap = [(len(row), i) for i, row in enumerate(rows) if row and progress.waiting[i]]
    heapq.heapify(heap)
    pivots = progress.pivots
    kept = progress.kept
    positions = progress.positions
    cyclic, dense, matrix = False, None, None
    while heap:
        length, i = heapq.heappop(heap)
        row = rows[i]
        if dead_row[i] or length != len(row):
            continue  # stale entry; the row was pushed again when it changed
        if probe and length >= DENSE_ROW and length >= DENSE_SHARE * (n_columns - pivots):
            probe = False
            live = [rows[r] for r in range(n_rows) if not dead_row[r] and rows[r]]
            cyclic, dense, matrix = _nearly_cyclic(
                live, [j for j in range(n_columns) if not dead_column[j]]
            )
            if cyclic:
                break
        best_column = -1
        best_count = n_rows + 1
        for j, v in row.items():
            if v == 1 or v == -1:
                count = len(columns[j])
                if count < best_count:
                    best_column, best_count = j, count
                    if count == 1:
                        break
        if best_column < 0:
            continue
        a = row[best_column]
        if keep_pivots:
            kept.append((best_column, row))
            positions.append((i, best_column))
        dead_row[i] = True
        dead_column[best_column] = True
        pivots += 1
        for j in row:
            columns[j].discard(i)
        # The pivot column itself always clears (a * a = 1); the rest of the row is the update.
        others = [(j, v) for j, v in row.items() if j != best_column]
        for r in columns[best_column]:
            target = rows[r]
            factor = target.pop(best_column) * a
            for j, v in others:
                old = target.get(j)
                if old is None:
                    target[j] = -factor * v
                    columns[j].add(r)
                else:
                    new = old - factor * v
                    if new:
                        target[j] = new
                    else:
                        del target[j]
                        columns[j].discard(r)
            heapq.heappush(heap, (len(target), r))
        columns[best_column] = set()
        rows[i] = {}
    renumber: dict[int, int] = {}
    for j in range(n_columns):
        if not dead_column[j]:
            renumber[j] = len(renumber)
    left = [
        {renumber[j]: v for j, v in rows[i].items()}
        for i in range(n_rows)
        if not dead_row[i] and rows[i]
    ]
    stopped = cyclic  # the loop ended at the probe, on exactly these rows and columns
    return UnitReduction(
        pivots,
        left,
        len(renumber),
        n_rows - pivots,
        kept,
        list(renumber) if keep_pivots else [],
        dense if stopped else None,
        matrix if stopped else None,
        pivot_positions=positions if keep_pivots else [],
    )


DENSE_ROW = 40
DENSE_SHARE = 0.12
NEARLY_CYCLIC = 8


def _nearly_cyclic(live: list[dict[int, int]], columns: list[int]) -> tuple[bool, Any, Any]:
    """Whether at most ``NEARLY_CYCLIC`` invariant factors of the remaining matrix are divisible
    by 2 or by 3 (its corank modulo each prime; square remainders only), with the remainder as
    dense rows and as an ``fmpz_mat`` (kept for the modular finish when the answer is yes)."""
    import flint

    if len(live) != len(columns):
        return False, None, None
    position = {j: k for k, j in enumerate(columns)}
    dense = [[0] * len(columns) for _ in live]
    for line, row in zip(dense, live, strict=True):
        for j, v in row.items():
            line[position[j]] = v
    matrix = flint.fmpz_mat(dense)  # one conversion; the reductions modulo p are in C
    ok = all(len(live) - flint.nmod_mat(matrix, p).rank() <= NEARLY_CYCLIC for p in (2, 3))
    return ok, dense, matrix


COMPILED: bool | None = None
"""Which elimination :func:`eliminate_unit_pivots` runs: ``None`` chooses by size (see
``COMPILED_ENTRIES``), ``True`` the compiled kernel whenever its dense work array is within
``COMPILED_ENTRIES[1]``, ``False`` always the Python loop.  Either way the result is exact:
entries too large for the kernel are left to Python integers."""

COMPILED_ENTRIES = (500, 1 << 22, 4_900)
"""Matrix sizes (rows times columns) for the compiled kernel: from the first number on once the
kernels are loaded in this process, from the third number on in any case, never above the
second.  Below the first, converting to and from the dense array costs more than the Python
loop saves (measured crossover near 20 x 20).  Loading numba costs about a second once per
process; from about 70 x 70 on the modular finish and the determinant certificate load it
anyway.  Above the second the work arrays (12 bytes per entry, 48 MiB there) are too large."""


def _compiled_fits(n_rows: int, n_columns: int) -> bool:
    size = n_rows * n_columns
    if COMPILED is False or size > COMPILED_ENTRIES[1]:
        return False
    if COMPILED is True or size >= COMPILED_ENTRIES[2]:
        return True
    # Loading numba and the cached kernels takes about a second once per process: paid for
    # small matrices only when it is paid already.
    from graphinv.normalform._unit_kernel import kernels_loaded

    return size >= COMPILED_ENTRIES[0] and kernels_loaded()


def _compiled_elimination(
    rows: list[dict[int, int]], n_columns: int, keep_pivots: bool, dense_stop: bool
) -> UnitReduction | None:
    """:func:`eliminate_unit_pivots` by the compiled kernel of
    :mod:`graphinv.normalform._unit_kernel` on a dense ``int64`` copy; ``None`` (with ``rows``
    untouched) when an input entry is out of the kernel's range.  A step the kernel cannot take
    exactly hands the state over to the Python loop."""
    import numpy as np

    from graphinv.normalform._unit_kernel import DENSE, DONE, UnitState, ranks_mod_two_and_three

    n_rows = len(rows)
    arrays = _dense_arrays(rows, n_columns)
    if arrays is None:
        return None
    A, order, total = arrays
    state = UnitState(A, order, next_stamp=total)
    probe = dense_stop
    status = state.run(probe_length=DENSE_ROW, probe_share=DENSE_SHARE, probe=probe)
    dense: list[list[int]] | None = None
    matrix = None
    if status == DENSE:
        # The test of _nearly_cyclic on the int64 remainder (ranks by the bit-packed kernels);
        # the Python ints and the fmpz_mat are built only for a remainder that is kept.
        probe = False
        live_rows, live_columns = state.live_rows(), state.live_columns()
        if len(live_rows) == len(live_columns):
            core = A[np.ix_(live_rows, live_columns)]
            if all(len(core) - r <= NEARLY_CYCLIC for r in ranks_mod_two_and_three(core)):
                dense = core.tolist()  # the fmpz_mat is left to the finish, which rarely needs it
        if dense is None:
            status = state.run(probe_length=DENSE_ROW, probe_share=DENSE_SHARE, probe=False)
    pivots = state.pivots
    live_rows, live_columns = state.live_rows(), state.live_columns()
    block = None
    positions: list[tuple[int, int]] = []
    if keep_pivots:
        block = PivotBlock(state.pivot_column[:pivots].copy(), A[state.pivot_row[:pivots]])
        positions = list(
            zip(state.pivot_row[:pivots].tolist(), state.pivot_column[:pivots].tolist(), strict=True)
        )
    if status != DONE and dense is None:
        # OVERFLOW: the entries outgrew int64; Python integers take over from here, with the
        # rows in their dict order and the heap as the Python loop would hold it.
        remaining: list[dict[int, int]] = [{} for _ in range(n_rows)]
        for i, row in zip(
            live_rows.tolist(), _dict_rows(A[live_rows], order[live_rows]), strict=True
        ):
            remaining[i] = row
        progress = _Progress(
            pivots,
            block.rows() if block is not None else [],
            positions,
            state.dead_row.tolist(),
            state.dead_column.tolist(),
            state.waiting.tolist(),
        )
        return _python_elimination(remaining, n_columns, keep_pivots, probe, progress)
    core = A[np.ix_(live_rows, live_columns)]
    return UnitReduction(
        pivots,
        Deferred(len(live_rows), lambda: _dict_rows(core)),
        len(live_columns),
        n_rows - pivots,
        Deferred(pivots, block.rows) if block is not None else [],
        live_columns.tolist() if keep_pivots else [],
        dense,
        matrix,
        block,
        positions,
        core if dense is not None else None,
    )


def _dense_arrays(rows: list[dict[int, int]], n_columns: int) -> tuple[Any, Any, int] | None:
    """The rows as a dense ``int64`` array, the ``int32`` stamps of their entries in dict
    order, and the number of entries; ``None`` if an entry is out of the kernel's range."""
    import numpy as np

    from graphinv.normalform._unit_kernel import ENTRY_LIMIT

    n_rows = len(rows)
    lengths = np.fromiter(map(len, rows), dtype=np.int64, count=n_rows)
    total = int(lengths.sum())
    try:
        values = np.fromiter(
            chain.from_iterable(map(dict.values, rows)), dtype=np.int64, count=total
        )
    except OverflowError:
        return None
    if np.any((values >= ENTRY_LIMIT) | (values <= -ENTRY_LIMIT)):
        return None
    where = (
        np.repeat(np.arange(n_rows), lengths),
        np.fromiter(chain.from_iterable(rows), dtype=np.int64, count=total),
    )
    A = np.zeros((n_rows, n_columns), dtype=np.int64)
    A[where] = values
    order = np.zeros((n_rows, n_columns), dtype=np.int32)
    order[where] = np.arange(total, dtype=np.int32)  # each row's dict order breaks ties
    return A, order, total


def _dict_rows(block: Any, order: Any = None) -> list[dict[int, int]]:
    """The rows of a 2-d ``int64`` array as ``{column: value}`` dicts of the nonzero entries,
    each in increasing column order or, with ``order`` (stamps of the same shape), in
    increasing stamp order."""
    import numpy as np

    row_index, column_index = np.nonzero(block)
    if order is not None:
        by_stamp = np.lexsort((order[row_index, column_index], row_index))
        row_index, column_index = row_index[by_stamp], column_index[by_stamp]
    columns = column_index.tolist()
    values = block[row_index, column_index].tolist()
    ends = np.searchsorted(row_index, np.arange(1, block.shape[0] + 1)).tolist()
    rows = []
    start = 0
    for stop in ends:
        rows.append(dict(zip(columns[start:stop], values[start:stop], strict=True)))
        start = stop
    return rows


def extend_solution(reduction: UnitReduction, core_vector: list[int], n_columns: int) -> list[int]:
    """Extend ``y`` with ``C y = c`` (``C`` the core) to ``x`` with ``A x = E^{-1} (0, c)``.

    The elimination is ``E A = [[T, X], [0, C]]`` with ``E`` unimodular and ``T`` the upper
    triangular block of pivot rows (``+-1`` diagonal), so ``x`` agrees with ``y`` on the kept
    columns and the pivot columns follow by back-substitution in reverse pivot order.  Integer
    in, integer out: for a rational ``y = w / s`` pass ``w``; then ``A x = s b`` with ``b``
    integral.

    Examples
    --------
    >>> r = eliminate_unit_pivots([{0: 2, 1: -1}, {0: -1, 1: 2}], 2, keep_pivots=True)
    >>> r.rows, r.kept_columns
    ([{0: 3}], [0])
    >>> extend_solution(r, [1], 2)  # A (1, 2) = (0, 3): the core equation 3 * 1 = 3
    [1, 2]

    References
    ----------
    Dumas, Saunders, Villard, J. Symbolic Comput. 32 (2001).
    """
    x = [0] * n_columns
    for j, value in zip(reduction.kept_columns, core_vector, strict=True):
        x[j] = value
    if reduction.pivot_block is not None:
        pivot_columns, pivot_entries, columns, values, ends = reduction.pivot_block.flat()
        for t in range(len(pivot_columns) - 1, -1, -1):
            start = ends[t - 1] if t else 0
            # x is still 0 at the row's own pivot column, so the whole row can be summed.
            total = sum(
                map(mul, values[start : ends[t]], map(x.__getitem__, columns[start : ends[t]]))
            )
            x[pivot_columns[t]] = -pivot_entries[t] * total
        return x
    for j, row in reversed(reduction.pivot_rows):
        a = row[j]
        total = 0
        for c, v in row.items():
            if c != j:
                total += v * x[c]
        x[j] = -a * total  # a = +-1 is its own inverse
    return x


def small_pivots(A: list[list[int]]) -> tuple[int, list[int]]:
    """Unit-pivot elimination for tiny matrices (no heap, no column index), then the classical
    dense elimination on what is left.

    Returns ``(number of unit pivots, absolute values of the other pivots)``: the rank is the
    total count, and the gcd/lcm normalization of the pivots is the Smith diagonal.

    Examples
    --------
    >>> small_pivots([[2, -1, -1], [-1, 2, -1], [-1, -1, 2]])
    (1, [3])
    """
    from graphinv.normalform._dense import dense_pivots

    rows = [r for r in ({j: v for j, v in enumerate(line) if v} for line in A) if r]
    units = 0
    while rows:
        chosen = -1
        column = -1
        shortest = 1 << 30
        for index, row in enumerate(rows):
            if len(row) < shortest:
                for j, v in row.items():
                    if v == 1 or v == -1:
                        chosen, column, shortest = index, j, len(row)
                        break
        if chosen < 0:
            break
        pivot_row = rows.pop(chosen)
        a = pivot_row[column]
        units += 1
        for row in rows:
            c = row.get(column)
            if c:
                factor = c * a
                for j, v in pivot_row.items():
                    new = row.get(j, 0) - factor * v
                    if new:
                        row[j] = new
                    else:
                        del row[j]
        rows = [row for row in rows if row]
    if not rows:
        return units, []
    columns = sorted({j for row in rows for j in row})
    return units, dense_pivots([[row.get(j, 0) for j in columns] for row in rows])
