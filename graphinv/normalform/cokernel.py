"""The cokernel of an integer matrix, and the fast route to Smith diagonals.

For an ``m`` by ``n`` integer matrix ``A`` the cokernel is ``Z^n / L``, where ``L`` is the
lattice spanned by the rows of ``A``:  ``Z^n / L = Z/d_1 + ... + Z/d_r + Z^f`` with the
invariant factors ``d_i > 1``, ``d_i | d_{i+1}``, and free rank ``f = n - rank A``.

The route, used by :func:`cokernel` and :func:`graphinv.normalform.smith_diagonal`:

1. Sparse elimination with ``+-1`` pivots, Markowitz order
   (:mod:`graphinv.normalform._sparse`): the Schur complement of a unit pivot has the same
   cokernel (Dumas, Saunders, Villard 2001).  Graph Laplacians shrink to a small dense core.
2. The dense core, if small, by the classical elimination (Kannan, Bachem 1979); otherwise by
   the modular finish of :mod:`graphinv.normalform._modular`: the determinant by CRT, the largest
   invariant factor from rational solutions of random systems (Eberly, Giesbrecht, Villard 2000;
   Pan 1988), and local Smith forms modulo ``p^e`` for the few primes where the group is not
   cyclic (Saunders, Wan 2004; Iliopoulos 1989 for elimination modulo a multiple of the
   determinant).  Each step is exact: a random choice only changes the work, never the answer.

References
----------
Dumas, Saunders, Villard, "On efficient sparse integer matrix Smith normal form computations",
J. Symbolic Comput. 32 (2001).
Eberly, Giesbrecht, Villard, "On computing the determinant and Smith form of an integer
matrix", FOCS 2000.
Saunders, Wan, "Smith normal form of dense integer matrices, fast algorithms into practice",
ISSAC 2004.
Iliopoulos, "Worst-case complexity bounds on algorithms for computing the canonical structure of
finite abelian groups and the Hermite and Smith normal forms of an integer matrix",
SIAM J. Comput. 18 (1989).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import reduce
from operator import mul
from typing import Any

from graphinv.normalform._dense import dense_pivots
from graphinv.normalform._matrix import (
    as_int_rows,
    as_sparse_int_rows,
    chain_normalize,
)
from graphinv.normalform._sparse import (
    UnitReduction,
    dense_rows,
    eliminate_unit_pivots,
    small_pivots,
    sparse_rows,
)

__all__ = [
    "Cokernel",
    "cokernel",
    "diagonal_of_rows",
    "sparse_cokernel",
    "sparse_cokernel_witness",
]

# Dense cores up to this size go to the classical elimination; larger ones to the modular finish.
SMALL_CORE = 24


@dataclass(frozen=True)
class Cokernel:
    """A finitely generated abelian group ``Z/d_1 + ... + Z/d_r + Z^f``.

    Attributes
    ----------
    invariant_factors : tuple of int
        ``d_1 | d_2 | ... | d_r``, each greater than 1.
    free_rank : int
        ``f``, the rank of the free part.
    """

    invariant_factors: tuple[int, ...]
    free_rank: int

    @property
    def torsion_order(self) -> int:
        """The order of the torsion part (product of the invariant factors)."""
        return reduce(mul, self.invariant_factors, 1)

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict (invariant factors as decimal strings).

        Examples
        --------
        >>> Cokernel((2, 6), 1).to_record()
        {'invariant_factors': ['2', '6'], 'free_rank': 1, 'torsion_order': '12'}
        """
        return {
            "invariant_factors": [str(d) for d in self.invariant_factors],
            "free_rank": self.free_rank,
            "torsion_order": str(self.torsion_order),
        }


def _core(
    reduction: UnitReduction, bound: int
) -> tuple[list[int], tuple[list[int], list[list[int]]] | None]:
    """Nonzero Smith invariants (ones included, chain order) of the core left by unit-pivot
    elimination, and the modular finish's two rational solutions when it ran (see
    :func:`graphinv.normalform._modular.modular_core`).  A dense remainder built by the
    elimination's probe is reused, not rebuilt."""
    k = min(len(reduction.rows), reduction.n_columns)
    if k == 0:
        return [], None
    dense = reduction.dense or dense_rows(reduction.rows, reduction.n_columns)
    if k <= SMALL_CORE:
        return chain_normalize(dense_pivots(dense)), None
    from graphinv.normalform._modular import modular_core

    return modular_core(dense, bound=bound, matrix=reduction.matrix, array=reduction.array)


def _reduced_invariants(rows: list[dict[int, int]], n_columns: int) -> tuple[int, list[int]]:
    """``(number of unit pivots, nonzero invariants of the core)``; ``rows`` is consumed.

    Hadamard's bound of the input bounds the product of its nonzero invariant factors, which is
    the determinant of a nonsingular core; it is far tighter than the core's own bound.
    """
    from graphinv.normalform._modular import hadamard_bound

    bound = hadamard_bound([row for row in rows if row])
    reduction = eliminate_unit_pivots(rows, n_columns, dense_stop=True)
    return reduction.pivots, _core(reduction, bound)[0]


# Matrices with at most this many entries skip the sparse bookkeeping (the batch engine calls
# the core hundreds of thousands of times on graphs of about ten vertices).
TINY = 400


def _tiny_invariants(rows: list[list[int]]) -> tuple[int, list[int]]:
    units, pivots = small_pivots(rows)
    return units, chain_normalize(pivots)


def _flint_diagonal(rows: list[list[int]], m: int, n: int) -> tuple[int, ...]:
    """Smith diagonal of a tiny nonempty matrix through FLINT's exact ``fmpz_mat_snf``.

    On matrices of about ten rows FLINT's compiled elimination is several times quicker than
    any Python loop; results are exact integers either way (and tested against each other).
    """
    import flint

    S = flint.fmpz_mat(rows).snf()
    return tuple(abs(int(S[i, i])) for i in range(min(m, n)))


def diagonal_of_rows(rows: list[list[int]], m: int, n: int) -> tuple[int, ...]:
    """The Smith diagonal of checked dense rows (see :func:`smith_diagonal`)."""
    if m * n <= TINY and m and n:
        return _flint_diagonal(rows, m, n)
    if m * n <= TINY:
        pivots, core = _tiny_invariants(rows)
    else:
        pivots, core = _reduced_invariants(sparse_rows(rows), n)
    nonzero = [1] * pivots + core
    return tuple(nonzero + [0] * (min(m, n) - len(nonzero)))


@dataclass(frozen=True)
class CoreWitness:
    """What the modular finish leaves for a determinant certificate (see
    :func:`sparse_cokernel_witness`).

    Attributes
    ----------
    orders : list of int
    vectors : list of list of int
        ``A w_j = 0 (mod o_j)`` for the whole matrix ``A``.
    pivots : list of (int, int)
        The unit pivots' positions ``(row, column)`` in elimination order.
    """

    orders: list[int]
    vectors: list[list[int]]
    pivots: list[tuple[int, int]]


def sparse_cokernel_certified(
    rows: Sequence[Mapping[int, int]], *, n_columns: int, bound: int | None = None
) -> tuple[Cokernel, CoreWitness | None]:
    """:func:`sparse_cokernel_witness` with the pivot positions as well (a
    :class:`CoreWitness`), for :func:`graphinv.normalform.determinant.confirm_determinant`.

    Examples
    --------
    >>> n = 40  # the cycle C_40 with its last vertex deleted: Z/40
    >>> A = [{j: v for j, v in {i: 2, i + 1: -1, i - 1: -1}.items() if 0 <= j < n - 1}
    ...      for i in range(n - 1)]
    >>> group, witness = sparse_cokernel_certified(A, n_columns=n - 1)
    >>> group.invariant_factors, witness is None  # a core this small is finished directly
    ((40,), True)

    References
    ----------
    Abbott, Bronstein, Mulders, ISSAC 1999; Dumas, Saunders, Villard, J. Symbolic Comput. 32
    (2001).
    """
    from graphinv.normalform._modular import hadamard_bound
    from graphinv.normalform._sparse import extend_solution

    checked = as_sparse_int_rows(rows, n_columns)
    hadamard = hadamard_bound([row for row in checked if row])
    bound = hadamard if bound is None else min(bound, hadamard)
    reduction = eliminate_unit_pivots(checked, n_columns, keep_pivots=True, dense_stop=True)
    core, solution = _core(reduction, bound)
    witness = None
    if solution is not None:  # the core was square and nonsingular
        orders, numerators = solution
        vectors = [extend_solution(reduction, w, n_columns) for w in numerators]
        witness = CoreWitness(orders, vectors, list(reduction.pivot_positions))
    rank = reduction.pivots + len(core)
    return Cokernel(tuple(d for d in core if d > 1), n_columns - rank), witness


def sparse_cokernel_witness(
    rows: Sequence[Mapping[int, int]], *, n_columns: int, bound: int | None = None
) -> tuple[Cokernel, tuple[list[int], list[list[int]]] | None]:
    """:func:`sparse_cokernel`, with solutions that prove a divisor of the determinant.

    For a square nonsingular matrix whose core took the modular route, also
    ``(orders, vectors)`` with ``A w_j = 0 (mod o_j)``: the core's two rational solutions,
    extended through the unit pivots by back-substitution.  Check them with
    :func:`graphinv.normalform.determinant.subgroup_order`.  ``None`` otherwise.  ``bound``
    may give a known bound on ``|det A|`` tighter than Hadamard's (for a reduced Laplacian, the
    product of its diagonal entries); it sets how many primes the core's determinant needs.

    Examples
    --------
    >>> from graphinv.normalform.determinant import determinant_divisor
    >>> n = 40  # the cycle C_40: Z/40
    >>> A = [{i: 2, (i + 1) % n: -1, (i - 1) % n: -1} for i in range(n - 1)]
    >>> A = [{j: v for j, v in row.items() if j < n - 1} for row in A]
    >>> group, witness = sparse_cokernel_witness(A, n_columns=n - 1)
    >>> group.invariant_factors, witness is None
    ((40,), True)

    References
    ----------
    Abbott, Bronstein, Mulders, ISSAC 1999; Dumas, Saunders, Villard, J. Symbolic Comput. 32
    (2001).
    """
    group, found = sparse_cokernel_certified(rows, n_columns=n_columns, bound=bound)
    return group, None if found is None else (found.orders, found.vectors)


def sparse_cokernel(rows: Sequence[Mapping[int, int]], *, n_columns: int) -> Cokernel:
    """The cokernel of a sparse integer matrix given as rows ``{column: value}``.

    This is the entry point for large sparse matrices (graph Laplacians with thousands of rows),
    where a dense copy would not fit in memory.

    Parameters
    ----------
    rows : sequence of mappings
        Row ``i`` maps column indices ``0 <= j < n_columns`` to integer entries.
    n_columns : int
        The number of columns.

    Returns
    -------
    Cokernel

    Examples
    --------
    >>> sparse_cokernel([{0: 2, 1: -1}, {0: -1, 1: 2}], n_columns=2)
    Cokernel(invariant_factors=(3,), free_rank=0)

    References
    ----------
    Dumas, Saunders, Villard, J. Symbolic Comput. 32 (2001).
    """
    checked = as_sparse_int_rows(rows, n_columns)
    pivots, core = _reduced_invariants(checked, n_columns)
    rank = pivots + len(core)
    return Cokernel(tuple(d for d in core if d > 1), n_columns - rank)


def cokernel(matrix: Sequence[Sequence[int]] | Any) -> Cokernel:
    """The cokernel ``Z^n / (row lattice)`` of an ``m`` by ``n`` integer matrix.

    Parameters
    ----------
    matrix : sequence of sequences of int

    Returns
    -------
    Cokernel
        Invariant factors greater than 1 and the free rank ``n - rank``.

    Examples
    --------
    The Laplacian of the 4-cycle: ``Z/4 + Z``.

    >>> cokernel([[2, -1, 0, -1], [-1, 2, -1, 0], [0, -1, 2, -1], [-1, 0, -1, 2]])
    Cokernel(invariant_factors=(4,), free_rank=1)

    References
    ----------
    Dumas, Saunders, Villard, J. Symbolic Comput. 32 (2001).
    """
    rows, m, n = as_int_rows(matrix)
    if m * n <= TINY and m and n:
        diagonal = _flint_diagonal(rows, m, n)
        rank = sum(1 for d in diagonal if d)
        return Cokernel(tuple(d for d in diagonal if d > 1), n - rank)
    if m * n <= TINY:
        units, core = _tiny_invariants(rows)
        return Cokernel(tuple(d for d in core if d > 1), n - units - len(core))
    return sparse_cokernel(sparse_rows(rows), n_columns=n)
