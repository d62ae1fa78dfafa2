"""The compiled unit-pivot elimination, against python-flint and against the Python loop.

Reference library: python-flint (``fmpz_mat.snf`` for invariant factors, ``fmpz_mat.solve`` for
exact rational solutions) on seeded random sparse matrices and reduced Laplacians.  A unit pivot
removes one invariant factor 1 and keeps the rest (Dumas, Saunders, Villard, J. Symbolic Comput.
32 (2001)), so the pivots' ones and the Smith form of the core must give the input's Smith form.
Most tests run twice, once through the compiled kernel and once through the Python loop.
"""

from __future__ import annotations

import math
import pickle
import random
from dataclasses import replace
from functools import cache

import flint
import networkx as nx
import numpy as np
import pytest

import graphinv.normalform._sparse as sparse
from graphinv.matrices import laplacian_matrix
from graphinv.normalform._sparse import (
    UnitReduction,
    dense_rows,
    eliminate_unit_pivots,
    extend_solution,
)
from graphinv.normalform._unit_kernel import (
    DONE,
    OVERFLOW,
    STAMP_LIMIT,
    UnitState,
    ranks_mod_two_and_three,
)

Rows = list[dict[int, int]]


@pytest.fixture(params=[True, False], ids=["compiled", "python"])
def compiled(request: pytest.FixtureRequest, monkeypatch: pytest.MonkeyPatch) -> bool:
    monkeypatch.setattr(sparse, "COMPILED", request.param)
    return bool(request.param)


def flint_invariants(rows: Rows, n_columns: int) -> list[int]:
    """The nonzero Smith diagonal, from python-flint's ``fmpz_mat.snf``."""
    if not rows or n_columns == 0:
        return []
    S = flint.fmpz_mat(dense_rows(rows, n_columns)).snf()
    diagonal = (abs(int(S[i, i])) for i in range(min(len(rows), n_columns)))
    return [d for d in diagonal if d]


def reduction_invariants(reduction: UnitReduction) -> list[int]:
    """The pivots' ones and the core's nonzero Smith diagonal (python-flint), in order."""
    return sorted([1] * reduction.pivots + flint_invariants(reduction.rows, reduction.n_columns))


def check_pivot_rows(reduction: UnitReduction, n_columns: int) -> None:
    """Pivot row ``t`` is zero in the columns of earlier pivots and ``+-1`` in its own, and the
    pivot and kept columns split the columns (the triangular block of ``extend_solution``)."""
    assert len(reduction.pivot_rows) == reduction.pivots
    earlier: set[int] = set()
    for column, row in reduction.pivot_rows:
        assert row[column] in (1, -1)
        assert not earlier & row.keys()
        assert all(v for v in row.values())
        earlier.add(column)
    assert reduction.kept_columns == sorted(reduction.kept_columns)
    assert len(reduction.kept_columns) == reduction.n_columns
    assert sorted(earlier | set(reduction.kept_columns)) == list(range(n_columns))
    # The recorded positions name the same pivot columns, each input row at most once.
    positions = reduction.pivot_positions
    assert [c for _, c in positions] == [c for c, _ in reduction.pivot_rows]
    assert len({r for r, _ in positions}) == len(positions)


def random_sparse(rng: random.Random, m: int, n: int) -> Rows:
    """Sparse rows with units, larger entries up to 100 and some empty rows and columns."""
    values = [1, -1, 1, -1, 2, -2, 3, -5, 7, 100, -100]
    rows = []
    for _ in range(m):
        row: dict[int, int] = {}
        for _ in range(rng.choice([0, 1, 2, 3, 3, 4, 6])):
            j = rng.randrange(n - n // 7)  # the last columns stay empty
            row[j] = rng.choice(values) if rng.random() < 0.8 else rng.randint(-100, 100)
        rows.append({j: v for j, v in row.items() if v})
    return rows


def reduced_laplacian(G: nx.Graph) -> Rows:
    """Sparse rows of the Laplacian of ``G`` with its last vertex deleted."""
    rows = laplacian_matrix(G).to_rows()
    n = len(rows) - 1
    return [{j: v for j, v in row.items() if j < n} for row in rows[:n]]


@pytest.mark.parametrize("seed", range(64))
def test_random_sparse_matrices_keep_flint_smith_form(seed: int, compiled: bool) -> None:
    # Reference: python-flint fmpz_mat.snf of the input and of the core.
    rng = random.Random(seed)
    m = rng.randint(5, 45)
    n = m if seed % 2 else rng.randint(5, 45)  # odd seeds square, even seeds rectangular
    rows = random_sparse(rng, m, n)
    expected = flint_invariants(rows, n)
    for dense_stop in (False, True):
        reduction = eliminate_unit_pivots(
            [dict(r) for r in rows], n, keep_pivots=True, dense_stop=dense_stop
        )
        assert reduction_invariants(reduction) == expected
        assert reduction.n_rows == m - reduction.pivots
        assert all(reduction.rows)
        check_pivot_rows(reduction, n)


GRAPHS = {
    "3-regular-30": lambda: nx.random_regular_graph(3, 30, seed=1),
    "4-regular-90": lambda: nx.random_regular_graph(4, 90, seed=2),
    "5-regular-120": lambda: nx.random_regular_graph(5, 120, seed=3),
    "gnp-60": lambda: nx.gnp_random_graph(60, 0.08, seed=4),
    "gnp-150": lambda: nx.gnp_random_graph(150, 0.04, seed=5),
    "3-regular-250": lambda: nx.random_regular_graph(3, 250, seed=6),
    "4-regular-400": lambda: nx.random_regular_graph(4, 400, seed=7),
}


@cache
def laplacian_case(name: str) -> tuple[Rows, list[int]]:
    rows = reduced_laplacian(GRAPHS[name]())
    return rows, flint_invariants(rows, len(rows))


@pytest.mark.parametrize("name", list(GRAPHS))
def test_reduced_laplacians_keep_flint_smith_form(name: str, compiled: bool) -> None:
    # Reference: python-flint fmpz_mat.snf of the reduced Laplacian (whose product of invariant
    # factors is the spanning-tree count, Kirchhoff's matrix-tree theorem).
    rows, expected = laplacian_case(name)
    for keep_pivots in (False, True):
        for dense_stop in (False, True):
            reduction = eliminate_unit_pivots(
                [dict(r) for r in rows], len(rows), keep_pivots=keep_pivots, dense_stop=dense_stop
            )
            if dense_stop and reduction.dense is not None:
                # An early stop keeps the probe's dense remainder for the modular finish.
                assert reduction.dense == dense_rows(reduction.rows, reduction.n_columns)
                # The Python loop's probe built an fmpz_mat; the kernel keeps its int64 array.
                if reduction.array is None:
                    assert reduction.matrix == flint.fmpz_mat(reduction.dense)
                else:
                    assert reduction.array.tolist() == reduction.dense
            else:
                assert reduction.dense is None and reduction.matrix is None
            assert reduction_invariants(reduction) == expected
            assert pickle.loads(pickle.dumps(reduction.rows)) == list(reduction.rows)
            if keep_pivots:
                check_pivot_rows(reduction, len(rows))
            else:
                assert reduction.pivot_rows == [] and reduction.kept_columns == []


def test_early_stop_happens_on_both_paths(monkeypatch: pytest.MonkeyPatch) -> None:
    # The early-stop rule itself (no outside value): on this 4-regular graph both paths stop at
    # the same dense core, smaller than the full elimination's; its Smith form is checked
    # against python-flint above.
    rows, _ = laplacian_case("4-regular-400")
    sizes = []
    for mode in (True, False):
        monkeypatch.setattr(sparse, "COMPILED", mode)
        early = eliminate_unit_pivots([dict(r) for r in rows], len(rows), dense_stop=True)
        full = eliminate_unit_pivots([dict(r) for r in rows], len(rows))
        assert early.dense is not None and full.dense is None
        assert len(early.rows) > len(full.rows)
        sizes.append(len(early.rows))
    assert sizes[0] == sizes[1]


def chain(size: int, link: int) -> Rows:
    """Rows ``e_i + link e_{i+1}`` and a last row ``2 e_0 + 3 e_{size-1}``: eliminating the
    unit diagonal carries ``2 (-link)^t`` along the last row."""
    rows: Rows = [{i: 1, i + 1: link} for i in range(size - 1)]
    rows.append({0: 2, size - 1: 3})
    return rows


def test_entries_beyond_int64_are_finished_by_python(compiled: bool) -> None:
    # The last row reaches 2 * 1000^7 > 2^62: the kernel must hand over to Python integers.
    # Reference: python-flint fmpz_mat.snf; the core is the 1 x 1 Schur complement
    # 3 - 2 (-1000)^10 * 1000 (expanding the bidiagonal rows by hand).
    rows = chain(12, 1000)
    reduction = eliminate_unit_pivots([dict(r) for r in rows], 12, keep_pivots=True)
    assert reduction_invariants(reduction) == flint_invariants(rows, 12)
    assert reduction.rows == [{0: 3 - 2 * 1000**11}]
    check_pivot_rows(reduction, 12)


def test_the_kernel_stops_before_an_out_of_range_step() -> None:
    # The kernel itself: the chain overflows after a few pivots, and the state it returns is
    # the one before the refused step (every live row still as eliminated so far).
    A = np.array([[row.get(j, 0) for j in range(12)] for row in chain(12, 1000)], dtype=np.int64)
    state = UnitState(A)
    assert state.run(probe_length=0, probe_share=0.0, probe=False) == OVERFLOW
    t = state.pivots
    assert 0 < t < 11
    assert A[11].tolist() == [0] * t + [2 * (-1000) ** t] + [0] * (10 - t) + [3]


@pytest.mark.parametrize(
    ("entry", "status"), [(2**61 - 1, DONE), (2**61, OVERFLOW)], ids=["fits", "overflows"]
)
def test_range_limit_is_exact(entry: int, status: int, compiled: bool) -> None:
    # [[1, e], [1, -2^61]] leaves -2^61 - e: 2^62 - 1 fits below the kernel's limit 2^62, 2^62
    # does not.  Reference: python-flint fmpz_mat.snf (diagonal 1, 2^61 + e).
    rows = [{0: 1, 1: entry}, {0: 1, 1: -(2**61)}]
    A = np.array([[1, entry], [1, -(2**61)]], dtype=np.int64)
    assert UnitState(A).run(probe_length=0, probe_share=0.0, probe=False) == status
    reduction = eliminate_unit_pivots([dict(r) for r in rows], 2)
    assert reduction_invariants(reduction) == flint_invariants(rows, 2) == [1, 2**61 + entry]


def test_huge_input_entries_take_the_python_loop(compiled: bool) -> None:
    # Entries of 2^70 never enter the int64 array.  Reference: python-flint fmpz_mat.snf.
    rng = random.Random(11)
    rows = random_sparse(rng, 30, 30)
    rows[3][5] = 2**70
    rows[7][1] = -(3**50)
    reduction = eliminate_unit_pivots([dict(r) for r in rows], 30, keep_pivots=True)
    assert reduction_invariants(reduction) == flint_invariants(rows, 30)
    check_pivot_rows(reduction, 30)


@pytest.mark.parametrize("seed", range(6))
def test_extended_solution_solves_the_whole_matrix(seed: int, compiled: bool) -> None:
    # As in test_determinant_certificate: python-flint solves the core C y = c exactly;
    # w = s y is integral, its extension x must satisfy the pivot rows and A x = 0 (mod s).
    rng = random.Random(500 + seed)
    if seed % 2:
        rows = reduced_laplacian(nx.random_regular_graph(4, 160 + 20 * seed, seed=seed))
    else:
        rows = random_sparse(rng, 60, 60)
        for i, row in enumerate(rows):
            row[i] = rng.choice([2, 3, 5, -4])  # a nonzero diagonal: nonsingular draws
    n = len(rows)
    reduction = eliminate_unit_pivots([dict(r) for r in rows], n, keep_pivots=True, dense_stop=True)
    k = reduction.n_columns
    C = flint.fmpz_mat(dense_rows(reduction.rows, k))
    if len(reduction.rows) != k or k == 0 or C.det() == 0:
        pytest.skip("singular or empty core")
    y = C.solve(flint.fmpz_mat([[rng.randrange(-5, 6)] for _ in range(k)]))
    s = math.lcm(*(int(y[i, 0].denom()) for i in range(k)))
    w = [int(y[i, 0].numer()) * (s // int(y[i, 0].denom())) for i in range(k)]
    x = extend_solution(reduction, w, n)
    assert [x[j] for j in reduction.kept_columns] == w
    # The compact pivot block (compiled path) and the dict rows give the same extension.
    assert compiled == (reduction.pivot_block is not None)
    assert extend_solution(replace(reduction, pivot_block=None), w, n) == x
    for _, row in reduction.pivot_rows:
        assert sum(v * x[c] for c, v in row.items()) == 0
    assert all(sum(v * x[j] for j, v in row.items()) % s == 0 for row in rows)
    broken = list(x)
    broken[reduction.pivot_rows[-1][0]] += 1
    assert any(sum(v * broken[j] for j, v in row.items()) % s for row in rows) or s == 1


def same_reduction(rows: Rows, n_columns: int, monkeypatch: pytest.MonkeyPatch, **options: bool):
    """Both paths on copies of ``rows``; they take the same pivots, so all fields agree."""
    found = []
    for mode in (True, False):
        monkeypatch.setattr(sparse, "COMPILED", mode)
        r = eliminate_unit_pivots([dict(row) for row in rows], n_columns, **options)
        found.append(
            (
                r.pivots,
                r.rows,
                r.n_columns,
                r.n_rows,
                r.pivot_rows,
                r.kept_columns,
                r.dense,
                r.pivot_positions,
            )
        )
    assert found[0] == found[1]


@pytest.mark.parametrize("seed", range(16))
def test_both_paths_take_the_same_pivots(seed: int, monkeypatch: pytest.MonkeyPatch) -> None:
    # The kernel copies the Python loop's choices (heap order, dict-order ties), so the two
    # reductions are equal field by field; their Smith forms are checked against python-flint
    # above.  Inputs: random sparse matrices, Laplacians of G(n, p) and a grid (many ties).
    rng = random.Random(900 + seed)
    m, n = rng.randint(20, 60), rng.randint(20, 60)
    same_reduction(random_sparse(rng, m, n), n, monkeypatch, keep_pivots=True)
    G = nx.gnp_random_graph(40 + 10 * seed, 5 / (40 + 10 * seed), seed=seed)
    rows = reduced_laplacian(G)
    rng.shuffle(rows)  # rows in any order, and each row's dict in a shuffled order
    rows = [dict(rng.sample(list(row.items()), len(row))) for row in rows]
    for dense_stop in (False, True):
        same_reduction(rows, len(rows), monkeypatch, keep_pivots=True, dense_stop=dense_stop)
    if seed < 2:
        grid = reduced_laplacian(nx.grid_2d_graph(10 + seed, 12))
        same_reduction(grid, len(grid), monkeypatch, keep_pivots=True, dense_stop=True)
        same_reduction(chain(12 + seed, 999), 12 + seed, monkeypatch, keep_pivots=True)


@pytest.mark.parametrize("seed", range(4))
def test_stamp_renumbering_keeps_the_pivots(seed: int, monkeypatch: pytest.MonkeyPatch) -> None:
    # The order stamps are int32 and get renumbered when the counter reaches its limit; with a
    # limit just above n that happens every few fill-ins, and the pivots must stay those of the
    # Python loop (the reference for the pivot order; its result is checked against
    # python-flint above).
    rng = random.Random(40 + seed)
    rows = reduced_laplacian(nx.random_regular_graph(3 + seed % 2, 70, seed=seed))
    rows = [dict(rng.sample(list(row.items()), len(row))) for row in rows]
    n = len(rows)
    monkeypatch.setattr(sparse, "COMPILED", False)
    python = eliminate_unit_pivots([dict(r) for r in rows], n, keep_pivots=True)
    arrays = sparse._dense_arrays(rows, n)
    assert arrays is not None
    A, order, total = arrays
    for limit in (total + 1 + seed, STAMP_LIMIT):
        state = UnitState(A.copy(), order.copy(), next_stamp=total, stamp_limit=limit)
        status = state.run(probe_length=0, probe_share=0.0, probe=False)
        if status == OVERFLOW:
            pytest.skip("entries outgrew the kernel")
        pivots = state.pivots
        assert status == DONE and pivots == python.pivots
        assert state.pivot_column[:pivots].tolist() == [c for c, _ in python.pivot_rows]
        assert int(state.order.max()) < limit
    with pytest.raises(ValueError, match="stamp_limit"):
        UnitState(A.copy(), order.copy(), next_stamp=total, stamp_limit=n)


@pytest.mark.parametrize("seed", range(40))
def test_ranks_modulo_two_and_three_match_flint(seed: int) -> None:
    # Reference: python-flint nmod_mat(., p).rank() on the same integer matrix.  Planted
    # dependencies (a column sum, a multiple of 3 of a row, a row sum) make the ranks drop, and
    # sizes around 64 and 128 exercise the word boundaries of the bit packing.
    rng = np.random.default_rng(seed)
    k, n = (int(x) for x in rng.integers(1, 150, size=2))
    if seed % 4 == 0:
        k = n = int(rng.choice([63, 64, 65, 128, 129]))
    A = rng.integers(-200, 201, size=(k, n))
    if n > 2:
        A[:, 2] = A[:, 0] - 2 * A[:, 1]
    if k > 3:
        A[3] = 3 * A[0] + (A[1] if seed % 2 else 0)
    if seed % 5 == 0:
        A[:, :] = rng.integers(-1, 2, size=(k, n)) * 6 + A % 2  # mostly even, rank mod 3 low
    F = flint.fmpz_mat(A.tolist())
    expected = (flint.nmod_mat(F, 2).rank(), flint.nmod_mat(F, 3).rank())
    assert ranks_mod_two_and_three(A) == expected


def test_size_rule(monkeypatch: pytest.MonkeyPatch) -> None:
    # The dispatch: never above the memory limit, and the switch forces either path.
    low, high, alone = sparse.COMPILED_ENTRIES
    monkeypatch.setattr(sparse, "COMPILED", None)
    assert sparse._compiled_fits(1, alone)
    assert not sparse._compiled_fits(1, high + 1)
    assert not sparse._compiled_fits(1, low - 1)
    eliminate_unit_pivots([{0: 1}], 1)  # loads nothing by itself: tiny
    monkeypatch.setattr(sparse, "COMPILED", True)
    assert sparse._compiled_fits(1, 1) and not sparse._compiled_fits(1, high + 1)
    monkeypatch.setattr(sparse, "COMPILED", False)
    assert not sparse._compiled_fits(1, alone)
