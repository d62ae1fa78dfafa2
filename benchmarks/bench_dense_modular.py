"""Dense determinants modulo many primes: batched recursive LU against python-flint.

For each case ``k:bits:W`` a seeded random ``k x k`` matrix with entries of ``bits`` bits (both
signs) is given to ``dense_determinants`` with ``W`` primes below ``2^22`` from
``float_primes``; the time is the best of ``--repeat`` calls after one warm-up call (compiled
kernels loaded), and includes reducing the Python-int entries.  The reference is python-flint:
``nmod_mat(C, p).det()`` on an ``fmpz_mat`` ``C`` built before the clock starts, for enough
62-bit primes to cover the same number of bits (``ceil(W * 22 / 62)``), and the ratio is taken
per bit of modulus covered.  With ``--compile`` two fresh subprocesses share an empty numba
cache directory: the first call in the first one includes compiling the kernels, the first call
in the second one loading them from the cache.

Usage::

    python benchmarks/bench_dense_modular.py [--cases 260:60:30,520:60:30,900:60:100]
        [--repeat 5] [--compile]
"""

from __future__ import annotations

import argparse
import json
import math
import os
import random
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from functools import partial
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent

DEFAULT_CASES = "260:60:30,520:60:30,520:1000:30,900:60:100"


def random_rows(k: int, bits: int, seed: int = 20261202) -> list[list[int]]:
    """A seeded random ``k x k`` matrix with entries in ``(-2^bits, 2^bits)``."""
    rnd = random.Random(seed)
    return [[rnd.randrange(-(1 << bits) + 1, 1 << bits) for _ in range(k)] for _ in range(k)]


def _first_call() -> None:
    """In a subprocess: time the first call (kernels compiled or loaded from the cache)."""
    from graphinv.normalform._dense_modular import dense_determinants
    from graphinv.normalform._level_determinant import float_primes

    rows = random_rows(260, 60)
    primes = float_primes(30)
    start = time.perf_counter()
    dense_determinants(rows, primes)
    print(json.dumps({"seconds": time.perf_counter() - start}), flush=True)


def _first_call_seconds(cache_dir: str) -> float:
    env = dict(os.environ, PYTHONPATH=str(ROOT), NUMBA_CACHE_DIR=cache_dir)
    out = subprocess.run(
        [sys.executable, __file__, "--first-call"],
        capture_output=True, text=True, env=env, check=True,
    )
    return float(json.loads(out.stdout.strip().splitlines()[-1])["seconds"])


def _flint_determinants(C: Any, primes: list[int]) -> list[int]:
    import flint

    return [int(flint.nmod_mat(C, q).det()) for q in primes]


def _best(function: Callable[[], object], repeat: int) -> float:
    best = math.inf
    for _ in range(repeat):
        start = time.perf_counter()
        function()
        best = min(best, time.perf_counter() - start)
    return best


def main(argv: list[str] | None = None) -> None:
    """Print the benchmark table (see the module docstring for the options)."""
    import flint

    from graphinv.normalform._dense_modular import dense_determinants
    from graphinv.normalform._level_determinant import float_primes
    from graphinv.normalform._modular import word_primes

    parser = argparse.ArgumentParser(prog="bench_dense_modular")
    parser.add_argument("--cases", default=DEFAULT_CASES, help="comma-separated k:bits:primes")
    parser.add_argument("--repeat", type=int, default=5, help="timed calls per case (best kept)")
    parser.add_argument("--compile", action="store_true", help="also time compiling/loading")
    parser.add_argument("--first-call", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args(argv)
    if args.first_call:
        _first_call()
        return
    if args.compile:
        with tempfile.TemporaryDirectory() as cache:
            compiled = _first_call_seconds(cache)
            loaded = _first_call_seconds(cache)
        print(f"first call k=260, 30 primes: {compiled:.2f} s compiling the kernels, "
              f"{loaded:.2f} s importing numba and loading them from its cache")
    header = ["k", "bits", "primes", "dense ms", "flint primes", "flint ms", "flint/dense per bit",
              "agree"]
    print(" | ".join(header))
    print(" | ".join("---" for _ in header))
    for case in args.cases.split(","):
        k, bits, W = (int(part) for part in case.split(":"))
        rows = random_rows(k, bits)
        primes = float_primes(W)
        ours = dense_determinants(rows, primes)
        ours_seconds = _best(partial(dense_determinants, rows, primes), args.repeat)
        big_primes = word_primes(-(-W * 22 // 62))
        C = flint.fmpz_mat(rows)
        flint_seconds = _best(partial(_flint_determinants, C, big_primes), 1)
        check = [int(flint.nmod_mat(C, q).det()) for q in primes[:3]]
        agree = check == ours[:3]
        bits_ours = sum(math.log2(q) for q in primes)
        bits_flint = sum(math.log2(q) for q in big_primes)
        ratio = (flint_seconds / bits_flint) / (ours_seconds / bits_ours)
        print(f"{k} | {bits} | {W} | {1000 * ours_seconds:.1f} | {len(big_primes)} | "
              f"{1000 * flint_seconds:.1f} | {ratio:.2f} | {'yes' if agree else 'NO'}", flush=True)


if __name__ == "__main__":
    main(sys.argv[1:])
