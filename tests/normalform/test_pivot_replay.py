"""Determinants modulo primes along a recorded order of unit pivots, against python-flint.

Reference values: python-flint ``fmpz_mat.det`` (exact) reduced modulo each prime; Kirchhoff's
matrix-tree theorem with Cayley's formula n^(n-2) for complete graphs (Cayley 1889) and the
count n for the cycle C_n (common fact).
"""

from __future__ import annotations

import random

import flint
import networkx as nx
import pytest

from graphinv.matrices import laplacian_matrix
from graphinv.normalform import _pivot_replay
from graphinv.normalform._level_determinant import float_primes
from graphinv.normalform._pivot_replay import replay_determinant

PRIMES = float_primes(4)


def unit_order(rows: list[dict[int, int]], n: int, steps: int) -> list[tuple[int, int]]:
    """Up to ``steps`` unit pivots chosen like the exact elimination: shortest row first, then
    the unit entry whose column is shortest (a plain Python loop, for the tests only)."""
    work = [dict(r) for r in rows]
    live = set(range(n))
    order: list[tuple[int, int]] = []
    while len(order) < steps:
        counts: dict[int, int] = {}
        for i in live:
            for j in work[i]:
                counts[j] = counts.get(j, 0) + 1
        choice = None
        for i in sorted(live, key=lambda i: (len(work[i]), i)):
            units = [j for j, v in work[i].items() if v in (1, -1)]
            if units:
                choice = (i, min(units, key=lambda j: (counts[j], j)))
                break
        if choice is None:
            break
        i, j = choice
        a = work[i][j]
        order.append(choice)
        live.discard(i)
        for r in live:
            f = work[r].get(j)
            if f:
                for c, v in work[i].items():
                    x = work[r].get(c, 0) - f * a * v
                    if x:
                        work[r][c] = x
                    else:
                        work[r].pop(c, None)
    return order


def flint_residues(rows: list[dict[int, int]], n: int) -> list[int]:
    det = int(flint.fmpz_mat([[r.get(j, 0) for j in range(n)] for r in rows]).det())
    return [det % p for p in PRIMES]


@pytest.mark.parametrize("seed", range(80))
def test_random_matrices_match_flint(seed):
    # Reference: python-flint's exact determinant, reduced modulo each prime.
    rng = random.Random(seed)
    n = rng.randrange(1, 40)
    rows = []
    for _ in range(n):
        picks = rng.sample(range(n), min(n, rng.randrange(1, 5)))
        rows.append({j: rng.choice([1, -1, 1, -1, 2, -3, 7]) for j in picks})
    order = unit_order(rows, n, rng.randrange(0, n + 1))
    assert replay_determinant(rows, order, PRIMES) == flint_residues(rows, n)


@pytest.mark.parametrize(
    "G, trees",
    [(nx.complete_graph(9), 9**7), (nx.cycle_graph(30), 30)],
    ids=["K9", "C30"],
)
def test_reduced_laplacians_count_spanning_trees(G, trees):
    # Kirchhoff: det of the reduced Laplacian; Cayley n^(n-2) for K_n, n for C_n (common fact).
    L = laplacian_matrix(G).to_rows()
    n = len(L) - 1
    rows = [{j: v for j, v in row.items() if j < n} for row in L[:n]]
    order = unit_order(rows, n, n)
    assert replay_determinant(rows, order, PRIMES) == [trees % p for p in PRIMES]


def test_random_regular_graph_with_a_dense_rest():
    # A core of about a third of the rows is left dense; reference: python-flint.
    G = nx.random_regular_graph(4, 120, seed=3)
    L = laplacian_matrix(G).to_rows()
    n = len(L) - 1
    rows = [{j: v for j, v in row.items() if j < n} for row in L[:n]]
    order = unit_order(rows, n, 80)
    assert replay_determinant(rows, order, PRIMES) == flint_residues(rows, n)


def test_declines_what_it_cannot_replay(monkeypatch):
    rows = [{0: 2, 1: -1}, {0: -1, 1: 2, 2: -1}, {1: -1, 2: 2}]
    assert replay_determinant(rows, [(0, 0)], PRIMES) is None  # entry 2 is no unit pivot
    assert replay_determinant(rows, [(0, 1), (0, 2)], PRIMES) is None  # row used twice
    assert replay_determinant([{0: 1 << 40}], [], PRIMES) is None  # entry too large
    # Growth past 2^31 during the replay: row 1 gains 2^30 * 4 in column 1.
    big = [{0: 1, 1: 4}, {0: 1 << 30, 1: 1}]
    assert replay_determinant(big, [(0, 0)], PRIMES) is None
    monkeypatch.setattr(_pivot_replay, "REPLAY_LIMIT", 2)
    assert replay_determinant(rows, [], PRIMES) is None


@pytest.mark.parametrize("scale", [10, 1 << 40])
def test_float_residues_match_python_remainders(scale):
    # Reference: Python's integer % (common fact: the result lies in [0, p)).
    import numpy as np

    from graphinv.normalform._level_determinant import float_residues

    rng = random.Random(scale)
    values = [[rng.randrange(-scale, scale) for _ in range(7)] for _ in range(5)]
    got = float_residues(np.array(values, dtype=np.float64), PRIMES)
    assert got.tolist() == [[[float(v % p) for v in row] for row in values] for p in PRIMES]


def test_primes_in_batches_give_the_same_residues(monkeypatch):
    # Reference: python-flint's exact determinant; one prime per batch changes nothing.
    G = nx.random_regular_graph(4, 90, seed=8)
    L = laplacian_matrix(G).to_rows()
    n = len(L) - 1
    rows = [{j: v for j, v in row.items() if j < n} for row in L[:n]]
    order = unit_order(rows, n, 50)
    monkeypatch.setattr(_pivot_replay, "BATCH_ENTRIES", 1)
    assert replay_determinant(rows, order, PRIMES) == flint_residues(rows, n)


def test_float_residues_exact_next_to_multiples_up_to_2_53():
    # The floor of A / p is exact below 2^53 (the rounding error is under 1/p); the values
    # next to multiples of p are where an inexact floor would show.  Reference: Python's %.
    import numpy as np

    from graphinv.normalform._level_determinant import float_residues

    p = PRIMES[0]
    values = []
    for n in (1, 12345, (1 << 52) // p - 1, (1 << 53) // p - 1):
        for f in (-1, 0, 1, p - 1):
            values.extend([n * p + f, -(n * p + f)])
    values = [v for v in values if abs(v) < 1 << 53]
    got = float_residues(np.array([values], dtype=np.float64), [p])
    assert got.tolist() == [[[float(v % p) for v in values]]]
