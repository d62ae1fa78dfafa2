"""The short determinant certificate: a divisor proven by a rational solution, then few primes.

Reference library: python-flint (``fmpz_mat.det``, ``fmpz_mat.snf``) on seeded random matrices
and Laplacians; the divisibility argument is Cramer's rule (Abbott, Bronstein, Mulders, ISSAC
1999).
"""

from __future__ import annotations

import math
import random

import flint
import networkx as nx
import pytest

from graphinv import critical_group
from graphinv.matrices import laplacian_matrix
from graphinv.normalform._sparse import eliminate_unit_pivots, extend_solution
from graphinv.normalform.cokernel import sparse_cokernel_witness
from graphinv.normalform.determinant import (
    confirm_determinant,
    determinant_divisor,
    subgroup_order,
)


def reduced_laplacian(G: nx.Graph) -> list[dict[int, int]]:
    """Sparse rows of the Laplacian of ``G`` with its last vertex deleted."""
    rows = laplacian_matrix(G).to_rows()
    n = len(rows) - 1
    return [{j: v for j, v in row.items() if j < n} for row in rows[:n]]


def sparse_unit_matrix(rng: random.Random, n: int) -> list[dict[int, int]]:
    """A nonsingular-looking sparse matrix with unit and larger entries (not symmetric)."""
    rows = []
    for i in range(n):
        row = {i: rng.choice([2, 3, 5, 7, -4])}
        for _ in range(3):
            row[rng.randrange(n)] = rng.choice([1, -1, 1, -1, 2, -3])
        rows.append(row)
    return rows


def flint_det(rows: list[dict[int, int]]) -> int:
    n = len(rows)
    return int(flint.fmpz_mat([[row.get(j, 0) for j in range(n)] for row in rows]).det())


def product_bound(rows: list[dict[int, int]]) -> int:
    bound = 1
    for row in rows:
        bound *= sum(v * v for v in row.values())
    return math.isqrt(bound) + 1


@pytest.mark.parametrize("seed", range(12))
def test_extended_solution_solves_the_whole_matrix(seed):
    # E A = [[T, X], [0, C]] with E unimodular: if C y = c then A x = E^{-1} (0, c).  Reference:
    # python-flint solves C y = c exactly; w = s y is integral, so A (extended w) must be
    # divisible by s, and the pivot rows must annihilate the extension.
    rng = random.Random(seed)
    rows = sparse_unit_matrix(rng, 30)
    reduction = eliminate_unit_pivots([dict(r) for r in rows], 30, keep_pivots=True)
    k = reduction.n_columns
    C = flint.fmpz_mat([[r.get(j, 0) for j in range(k)] for r in reduction.rows])
    if len(reduction.rows) != k or C.det() == 0:
        pytest.skip("singular draw")
    y = C.solve(flint.fmpz_mat([[rng.randrange(-5, 6)] for _ in range(k)]))
    s = math.lcm(*(int(y[i, 0].denom()) for i in range(k)))
    w = [int(y[i, 0].numer()) * (s // int(y[i, 0].denom())) for i in range(k)]
    x = extend_solution(reduction, w, 30)
    assert [x[j] for j in reduction.kept_columns] == w
    for _, row in reduction.pivot_rows:
        assert sum(v * x[c] for c, v in row.items()) == 0
    assert all(sum(v * x[j] for j, v in row.items()) % s == 0 for row in rows)
    # A wrong back-substitution (one pivot value off by one) breaks it.
    broken = list(x)
    broken[reduction.pivot_rows[-1][0]] += 1
    assert any(sum(v * broken[j] for j, v in row.items()) % s for row in rows) or s == 1


@pytest.mark.parametrize("seed", range(8))
def test_witness_divides_the_determinant(seed):
    # Cramer's rule: the exact denominator of a rational solution of A x = b divides det A;
    # det A from python-flint.
    G = nx.random_regular_graph(3, 240 + 10 * seed, seed=seed)  # cores above SMALL_CORE
    rows = reduced_laplacian(G)
    group, witness = sparse_cokernel_witness([dict(r) for r in rows], n_columns=len(rows))
    assert witness is not None
    orders, vectors = witness
    s = subgroup_order(rows, orders, vectors)
    assert s % determinant_divisor(rows, orders[0], vectors[0]) == 0
    det = flint_det(rows)
    assert det % s == 0
    factors = group.invariant_factors
    top = factors[-1] * (factors[-2] if len(factors) > 1 else 1)
    assert top % s == 0  # a subgroup with two generators: its factors divide d_{k-1}, d_k
    assert top // s < 100  # two random solutions: nearly all of it
    assert group.torsion_order == det  # Kirchhoff: det of the reduced Laplacian


def test_a_tampered_solution_is_refused():
    G = nx.random_regular_graph(3, 150, seed=7)
    rows = reduced_laplacian(G)
    _, witness = sparse_cokernel_witness([dict(r) for r in rows], n_columns=len(rows))
    assert witness is not None
    s, w = witness[0][0], witness[1][0]
    bad = list(w)
    bad[3] += 1
    with pytest.raises(ArithmeticError, match="not divisible"):
        determinant_divisor(rows, s, bad)


@pytest.mark.parametrize("seed", range(10))
def test_confirm_determinant_decides_exactly(seed):
    # Reference: python-flint fmpz_mat.det.  Wrong claims that agree with the truth modulo the
    # divisor (det + s, det + 2 s) or share its size must be rejected.
    rng = random.Random(100 + seed)
    rows = sparse_unit_matrix(rng, 90)
    det = flint_det(rows)
    if det == 0:
        pytest.skip("singular draw")
    bound = product_bound(rows)
    assert confirm_determinant(rows, det, bound=bound)
    assert not confirm_determinant(rows, det + 1, bound=bound)
    divisor = abs(math.gcd(det, 2 * 3 * 5 * 7 * 11)) or 1
    assert confirm_determinant(rows, det, bound=bound, divisor=divisor)
    assert not confirm_determinant(rows, det + divisor, bound=bound, divisor=divisor)
    assert not confirm_determinant(rows, -det, bound=bound, divisor=divisor)


@pytest.mark.parametrize(("d", "n", "seed"), [(3, 160, 1), (4, 140, 2), (5, 100, 3)])
def test_medium_regular_graphs_agree_with_flint(d, n, seed):
    # Reference: python-flint fmpz_mat.snf of the full Laplacian; these cores take the modular
    # finish and the short certificate.
    G = nx.random_regular_graph(d, n, seed=seed)
    L = nx.laplacian_matrix(G, nodelist=sorted(G)).toarray().tolist()
    S = flint.fmpz_mat(L).snf()
    expected = tuple(int(S[i, i]) for i in range(n) if int(S[i, i]) > 1)
    group = critical_group(G)
    assert group.invariant_factors == expected
    assert group.certificate.spanning_trees == group.order


def test_early_dense_stop_agrees_with_flint():
    # The unit elimination stops at a dense, nearly cyclic remainder (101 rows here instead of
    # 77); the group must not change.  Reference: python-flint fmpz_mat.snf of the Laplacian.
    G = nx.random_regular_graph(4, 300, seed=5)
    rows = reduced_laplacian(G)
    early = eliminate_unit_pivots([dict(r) for r in rows], len(rows), dense_stop=True)
    full = eliminate_unit_pivots([dict(r) for r in rows], len(rows))
    assert len(early.rows) > len(full.rows)
    L = nx.laplacian_matrix(G, nodelist=sorted(G)).toarray().tolist()
    S = flint.fmpz_mat(L).snf()
    expected = tuple(int(S[i, i]) for i in range(300) if int(S[i, i]) > 1)
    assert critical_group(G).invariant_factors == expected


@pytest.mark.parametrize(
    "G",
    [nx.circular_ladder_graph(60), nx.circular_ladder_graph(91), nx.hypercube_graph(7),
     nx.grid_2d_graph(12, 12)],
    ids=["prism60", "prism91", "Q7", "grid12"],
)
def test_groups_with_two_large_factors_agree_with_flint(G, monkeypatch):
    # The second invariant factor of the subgroup spanned by two solutions settles the primes
    # it shares only with d_{k-1}; reference: python-flint fmpz_mat.snf of the Laplacian.
    import graphinv.normalform._modular as modular

    seen: list[int] = []
    original = modular._second_invariant

    def spy(*args):
        seen.append(original(*args))
        return seen[-1]

    monkeypatch.setattr(modular, "_second_invariant", spy)
    L = nx.laplacian_matrix(G, nodelist=list(G)).toarray().tolist()
    S = flint.fmpz_mat(L).snf()
    expected = tuple(int(S[i, i]) for i in range(len(L)) if int(S[i, i]) > 1)
    assert critical_group(G).invariant_factors == expected
    assert seen and max(seen) > 1


def test_subgroup_order_of_two_solutions_against_flint():
    # Lagrange: the subgroup spanned by two solutions has an order dividing det A; for the
    # 20 x 20 grid (two large invariant factors) it is d_{k-1} d_k.  Reference: python-flint.
    G = nx.grid_2d_graph(20, 20)
    rows = reduced_laplacian(G)
    group, witness = sparse_cokernel_witness([dict(r) for r in rows], n_columns=len(rows))
    assert witness is not None
    order = subgroup_order(rows, *witness)
    assert flint_det(rows) % order == 0
    top = group.invariant_factors[-1] * group.invariant_factors[-2]
    assert top % order == 0 and top // order < 100
    with pytest.raises(ValueError, match="one or two"):
        subgroup_order(rows, [1, 1, 1], [[0] * len(rows)] * 3)


def test_pair_subgroup_order_counts_the_subgroup():
    # Direct count (common fact: |<x, y>| is the number of distinct a x + b y in (Q/Z)^n) on
    # 1500 seeded small cases, with common denominators that need not be exact.
    from fractions import Fraction

    from graphinv.normalform._modular import pair_subgroup_order

    rng = random.Random(5)
    for _ in range(1500):
        n = rng.randrange(1, 4)
        orders = [rng.randrange(1, 13), rng.randrange(1, 13)]
        vectors = [[rng.randrange(-20, 20) for _ in range(n)] for _ in range(2)]
        elements = {
            tuple(
                (Fraction(a * vectors[0][i], orders[0]) + Fraction(b * vectors[1][i], orders[1]))
                % 1
                for i in range(n)
            )
            for a in range(orders[0])
            for b in range(orders[1])
        }
        assert pair_subgroup_order(vectors, orders) == len(elements)


def test_confirm_along_replayed_pivots_against_flint(monkeypatch):
    # The certificate replays the exact elimination's pivot order on L's own entries.
    # Reference: python-flint's exact determinant of the reduced Laplacian.
    import graphinv.normalform._pivot_replay as replay
    from graphinv.normalform.cokernel import sparse_cokernel_certified

    rows = reduced_laplacian(nx.random_regular_graph(4, 200, seed=11))
    _, witness = sparse_cokernel_certified([dict(r) for r in rows], n_columns=len(rows))
    assert witness is not None and witness.pivots
    det = flint_det(rows)
    bound = product_bound(rows)
    s = subgroup_order(rows, witness.orders, witness.vectors)
    answers: list[object] = []
    original = replay.replay_determinant

    def spy(*args):
        answers.append(original(*args))
        return answers[-1]

    monkeypatch.setattr(replay, "replay_determinant", spy)
    assert confirm_determinant(rows, det, bound=bound, divisor=s, pivots=witness.pivots)
    assert answers and answers[-1] is not None  # the replay itself decided
    assert not confirm_determinant(rows, det + s, bound=bound, divisor=s, pivots=witness.pivots)
    assert not confirm_determinant(rows, -det, bound=bound, divisor=s, pivots=witness.pivots)
    # An order that does not replay (L[0][0] is no unit) falls back to the level sweep.
    assert confirm_determinant(rows, det, bound=bound, divisor=s, pivots=[(0, 0)])
    assert answers[-1] is None


def test_no_replay_of_a_large_dense_rest(monkeypatch):
    # With no unit pivots (every edge doubled) the rest is the whole matrix: the level sweep
    # decides instead.  Reference: Kirchhoff with doubled edges multiplies the count by
    # 2^(n-1); the cycle C_n has n spanning trees (common fact).
    import importlib

    import graphinv.normalform._pivot_replay as replay

    determinant = importlib.import_module("graphinv.normalform.determinant")
    n = 40
    rows = [{j: 2 * v for j, v in row.items()} for row in reduced_laplacian(nx.cycle_graph(n))]
    calls: list[int] = []
    monkeypatch.setattr(replay, "replay_determinant", lambda *a: calls.append(1))
    monkeypatch.setattr(determinant, "REPLAY_WORK", 10)
    trees = n * 2 ** (n - 1)
    assert confirm_determinant(rows, trees, bound=4 ** (n - 1) * 2, divisor=1, pivots=[])
    assert not calls
