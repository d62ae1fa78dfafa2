"""Unit-pivot elimination: the compiled kernel against the Python loop, and ``critical_group``.

For each case the reduced Laplacian (last vertex deleted) of a graph goes to
``eliminate_unit_pivots(..., keep_pivots=True, dense_stop=True)`` as ``critical_group`` calls
it, once with ``COMPILED = False`` (the Python loop) and once with ``COMPILED = True`` (the numba
kernel); the time is the best of ``--repeat`` calls on fresh copies of the rows, after a warm-up
call (kernels already loaded).  Both paths take the same pivots, so the table also checks that
they return the same pivot count and core.  The target is a speed-up of at least
``TARGET_SPEEDUP`` for the elimination on graphs of a few hundred vertices (a ratio, so that it
holds on a shared machine too); the last two columns time ``critical_group`` with each setting.

Usage::

    python benchmarks/bench_unit_elimination.py [--cases rr3-400,rr4-400] [--repeat 7]
"""

from __future__ import annotations

import argparse
import sys
import time
from collections.abc import Callable
from functools import partial
from typing import Any

import networkx as nx

TARGET_SPEEDUP = 2.0
"""Python loop time over compiled time, aimed at for the random graphs (``rr*``, ``gnp-*``).  Not
for grids: their last few hundred pivots make entries beyond ``int64``, and that tail, where
nearly all of the time goes, runs in Python integers on both paths."""

CASES: dict[str, Callable[[], nx.Graph]] = {
    "rr3-400": lambda: nx.random_regular_graph(3, 400, seed=20261201),
    "rr4-400": lambda: nx.random_regular_graph(4, 400, seed=20261201),
    "rr4-1000": lambda: nx.random_regular_graph(4, 1000, seed=20261201),
    "gnp-300": lambda: nx.gnp_random_graph(300, 0.02, seed=20261201),
    "grid30": lambda: nx.grid_2d_graph(30, 30),
    "rr3-60": lambda: nx.random_regular_graph(3, 60, seed=20261201),
}


def reduced_laplacian(G: nx.Graph) -> list[dict[int, int]]:
    """Sparse rows of the Laplacian of ``G`` without its last vertex."""
    from graphinv.matrices import laplacian_matrix

    rows = laplacian_matrix(G).to_rows()
    n = len(rows) - 1
    return [{j: v for j, v in row.items() if j < n} for row in rows[:n]]


def best_seconds(call: Callable[[], Any], repeat: int) -> float:
    call()
    best = float("inf")
    for _ in range(max(1, repeat)):
        start = time.perf_counter()
        call()
        best = min(best, time.perf_counter() - start)
    return best


def _eliminate(sparse: Any, rows: list[dict[int, int]]) -> Any:
    """The elimination as ``critical_group`` runs it, on a fresh copy of ``rows``."""
    copy = [dict(row) for row in rows]
    return sparse.eliminate_unit_pivots(copy, len(rows), keep_pivots=True, dense_stop=True)


def main(argv: list[str] | None = None) -> None:
    """Print the benchmark table (see the module docstring for the options)."""
    import graphinv.normalform._sparse as sparse
    from graphinv import critical_group

    parser = argparse.ArgumentParser(prog="bench_unit_elimination")
    parser.add_argument("--cases", default="rr3-400,rr4-400,gnp-300,grid30,rr3-60")
    parser.add_argument("--repeat", type=int, default=7, help="timed calls per case (best kept)")
    args = parser.parse_args(argv)
    header = ["case", "rows", "pivots", "core", "early stop", "python ms", "compiled ms",
              f"speed-up (target {TARGET_SPEEDUP:g})", "same", "group python ms",
              "group compiled ms"]
    print(" | ".join(header))
    print(" | ".join("---" for _ in header))
    saved = sparse.COMPILED
    try:
        for case in args.cases.split(","):
            case = case.strip()
            if case not in CASES:
                print(f"unknown case {case!r}; known: {', '.join(CASES)}", file=sys.stderr)
                continue
            G = CASES[case]()
            rows = reduced_laplacian(G)
            results, times, group_times = [], [], []
            for mode in (False, True):
                sparse.COMPILED = mode
                eliminate = partial(_eliminate, sparse, rows)
                results.append(eliminate())
                times.append(best_seconds(eliminate, args.repeat))
                group_times.append(best_seconds(partial(critical_group, G), args.repeat))
            python, compiled = results
            same = (python.pivots, list(python.rows)) == (compiled.pivots, list(compiled.rows))
            print(" | ".join([
                case, str(len(rows)), str(compiled.pivots), str(len(compiled.rows)),
                "yes" if compiled.dense is not None else "no",
                f"{times[0] * 1e3:.2f}", f"{times[1] * 1e3:.2f}", f"{times[0] / times[1]:.1f}",
                "yes" if same else "NO",
                f"{group_times[0] * 1e3:.1f}", f"{group_times[1] * 1e3:.1f}",
            ]), flush=True)
    finally:
        sparse.COMPILED = saved


if __name__ == "__main__":
    main()
