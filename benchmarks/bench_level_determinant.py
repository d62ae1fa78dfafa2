"""Determinants modulo many primes: level-block elimination against python-flint.

For each case, the reduced Laplacian (last vertex deleted) of a graph is given to
``level_determinant`` with ``W`` primes from ``float_primes``; the time is the best of
``--repeat`` calls after one warm-up call (compiled kernels already loaded).  The reference is
python-flint: ``nmod_mat(dense, p).det()`` for each of the same primes (the dense integer matrix
is built before the clock starts), run only up to ``REFERENCE_LIMIT`` rows.  With ``--compile``
two fresh subprocesses share an empty numba cache directory: the first call in the first one
includes compiling the kernels, the first call in the second one loading them from the cache.

BLAS threads matter on a busy machine: set ``OPENBLAS_NUM_THREADS=1`` when other jobs share
the cores.

Usage::

    python benchmarks/bench_level_determinant.py [--cases rr3-1000,grid50] [--repeat 5]
        [--compile] [--no-references]
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

import networkx as nx

ROOT = Path(__file__).resolve().parent.parent

REFERENCE_LIMIT = 1200

CASES: dict[str, tuple[Callable[[], nx.Graph], int]] = {
    "rr3-400": (lambda: nx.random_regular_graph(3, 400, seed=20261201), 8),
    "rr3-1000": (lambda: nx.random_regular_graph(3, 1000, seed=20261201), 20),
    "rr4-1000": (lambda: nx.random_regular_graph(4, 1000, seed=20261201), 20),
    "grid50": (lambda: nx.grid_2d_graph(50, 50), 100),
    "grid100": (lambda: nx.grid_2d_graph(100, 100), 100),
    "Q10": (lambda: nx.hypercube_graph(10), 40),
}


def reduced_laplacian(G: nx.Graph) -> list[dict[int, int]]:
    """Sparse rows of the Laplacian of ``G`` without its last vertex."""
    from graphinv.matrices import laplacian_matrix

    rows = laplacian_matrix(G).to_rows()
    n = len(rows) - 1
    return [{j: v for j, v in row.items() if j < n} for row in rows[:n]]


def _first_call(case: str) -> None:
    """In a subprocess: time the first call (kernels compiled or loaded from the cache)."""
    from graphinv.normalform._level_determinant import float_primes, level_determinant

    build, W = CASES[case]
    rows = reduced_laplacian(build())
    primes = float_primes(W)
    start = time.perf_counter()
    level_determinant(rows, primes)
    print(json.dumps({"seconds": time.perf_counter() - start}), flush=True)


def _first_call_seconds(case: str, cache_dir: str) -> float:
    env = dict(os.environ, PYTHONPATH=str(ROOT), NUMBA_CACHE_DIR=cache_dir)
    out = subprocess.run(
        [sys.executable, __file__, "--first-call", case],
        capture_output=True, text=True, env=env, check=True,
    )
    return float(json.loads(out.stdout.strip().splitlines()[-1])["seconds"])


def _flint_seconds(rows: list[dict[int, int]], primes: list[int]) -> tuple[float, list[int]]:
    import flint

    n = len(rows)
    dense = [[row.get(j, 0) for j in range(n)] for row in rows]
    start = time.perf_counter()
    residues = [int(flint.nmod_mat(dense, p).det()) for p in primes]
    return time.perf_counter() - start, residues


def main(argv: list[str] | None = None) -> None:
    """Print the benchmark table (see the module docstring for the options)."""
    from graphinv.normalform._level_determinant import float_primes, level_determinant

    parser = argparse.ArgumentParser(prog="bench_level_determinant")
    parser.add_argument("--cases", default="rr3-400,rr3-1000,grid50", help="comma-separated cases")
    parser.add_argument("--repeat", type=int, default=5, help="timed calls per case (best kept)")
    parser.add_argument("--compile", action="store_true", help="also time compiling/loading")
    parser.add_argument("--no-references", action="store_true")
    args = parser.parse_args(argv)
    if args.compile:
        with tempfile.TemporaryDirectory() as cache:
            compiled = _first_call_seconds("rr3-400", cache)
            loaded = _first_call_seconds("rr3-400", cache)
        print(f"first call rr3-400: {compiled:.2f} s compiling the kernels, "
              f"{loaded:.2f} s importing numba and loading them from its cache")
    header = ["case", "n", "primes", "level ms", "flint nmod_mat ms", "ratio", "agree"]
    print(" | ".join(header))
    print(" | ".join("---" for _ in header))
    for case in args.cases.split(","):
        case = case.strip()
        if case not in CASES:
            print(f"unknown case {case!r}; known: {', '.join(CASES)}", file=sys.stderr)
            continue
        build, W = CASES[case]
        rows = reduced_laplacian(build())
        primes = float_primes(W)
        ours = level_determinant(rows, primes)
        best = float("inf")
        for _ in range(max(1, args.repeat)):
            start = time.perf_counter()
            level_determinant(rows, primes)
            best = min(best, time.perf_counter() - start)
        cells = [case, str(len(rows)), str(W), f"{best * 1e3:.1f}"]
        if args.no_references or len(rows) > REFERENCE_LIMIT:
            cells += ["not run", "-", "-"]
        else:
            seconds, reference = _flint_seconds(rows, primes)
            cells += [f"{seconds * 1e3:.1f}", f"{seconds / best:.1f}x", str(reference == ours)]
        print(" | ".join(cells), flush=True)


if __name__ == "__main__":
    if len(sys.argv) == 3 and sys.argv[1] == "--first-call":
        _first_call(sys.argv[2])
    else:
        main(sys.argv[1:])
