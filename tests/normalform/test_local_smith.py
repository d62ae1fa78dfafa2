"""Local Smith forms modulo prime powers, against python-flint's Smith normal form.

The valuation at p of each invariant factor of an integer matrix is read off python-flint's
``fmpz_mat.snf()`` (exact); modulo p^e a factor divisible by p^e shows as e (Newman, *Integral
Matrices*, 1972, II.15).
"""

from __future__ import annotations

import random

import flint
import numpy as np
import pytest

from graphinv.normalform._local_smith import local_valuations


def flint_valuations(rows: list[list[int]], p: int, precision: int) -> list[int]:
    S = flint.fmpz_mat(rows).snf()
    found = []
    for i in range(len(rows)):
        d = abs(int(S[i, i]))
        v = 0
        while d and d % p == 0 and v < precision:
            d //= p
            v += 1
        found.append(precision if d == 0 else v)
    return sorted(found)


@pytest.mark.parametrize("seed", range(60))
def test_valuations_match_flint(seed):
    # Products of random matrices with many small factors give deep p-parts.
    rng = random.Random(seed)
    k = rng.randrange(1, 30)
    p = rng.choice([2, 2, 3, 5, 7])
    precision = rng.choice([3, 6, 12]) if p == 2 else rng.choice([2, 4, 8])
    precision = min(precision, 30 if p == 2 else 11)
    entries = [0, 0, p, p * p, 1, -1, p**3, 2 * p]
    A = flint.fmpz_mat([[rng.choice(entries) for _ in range(k)] for _ in range(k)])
    B = flint.fmpz_mat([[rng.choice(entries) for _ in range(k)] for _ in range(k)])
    rows = [[int(x) for x in row] for row in (A * B).tolist()]
    assert sorted(local_valuations(rows, p, precision)) == flint_valuations(rows, p, precision)


@pytest.mark.parametrize("precision", [5, 27])
def test_float_and_integer_arithmetic_agree_with_flint(precision):
    # p^5 takes the float64 kernel, 2^27 the int64 one; both against python-flint.
    rng = random.Random(precision)
    k = 40
    rows = [[rng.choice([0, 0, 2, 4, 8, 1, -6]) for _ in range(k)] for _ in range(k)]
    want = flint_valuations(rows, 2, precision)
    assert sorted(local_valuations(rows, 2, precision)) == want
    assert sorted(local_valuations(np.array(rows, dtype=np.int64), 2, precision)) == want


def test_rejects_a_modulus_beyond_a_word():
    with pytest.raises(ValueError, match="2\\^31"):
        local_valuations([[1]], 2, 31)
