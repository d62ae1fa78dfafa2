"""Chip-firing speed: the identity of large wired grids and a big central pile.

Run ``python benchmarks/bench_chipfiring.py`` (or ``make bench``); ``--quick`` shrinks the cases.

Targets (2-core machine):

* the identity of the 100 x 100 grid with its boundary wired to the sink in under 10 s
  (graph construction included);
* stabilizing 10^6 chips dropped on the centre of the 256 x 256 wired grid in under 30 s.

Measured in the same run, so ratios are fair on a shared machine:

* graphinv's stabilizer (certified least-action head start, colour-class sweeps);
* plain vectorised rounds (every unstable vertex fires ``floor(c/deg)`` times per round, sparse
  matrix product, no head start) -- the textbook vectorisation;
* the one-vertex-at-a-time reference in pure Python (a work queue), on a smaller grid.

Each result is checked: the identity against the published small cases and for symmetry, the
big pile by ``c - L~^T u = final`` with ``final`` stable (exact integers).
"""

from __future__ import annotations

import argparse
import sys
import time
from collections import deque
from collections.abc import Callable, Sequence
from typing import Any

TARGET_IDENTITY_SECONDS = 10.0
TARGET_PILE_SECONDS = 30.0


def _timed(function: Callable[[], Any]) -> tuple[float, Any]:
    start = time.perf_counter()
    value = function()
    return time.perf_counter() - start, value


def _plain_rounds(graph: Any, chips: Any) -> tuple[Any, Any]:
    """Textbook vectorisation: all unstable vertices fire floor(c/deg) times per round."""
    import numpy as np

    c = np.array(chips, dtype=np.int64)
    firings = np.zeros_like(c)
    while True:
        fire = c // graph.degree
        np.maximum(fire, 0, out=fire)
        if not fire.any():
            return c, firings
        firings += fire
        c -= graph.laplacian @ fire


def _queue_toppling(graph: Any, chips: Sequence[int]) -> list[int]:
    """Pure-Python reference: one vertex at a time from a work queue."""
    transfer = graph.transfer.tocsc()
    out = [
        list(
            zip(
                transfer.indices[transfer.indptr[v] : transfer.indptr[v + 1]].tolist(),
                transfer.data[transfer.indptr[v] : transfer.indptr[v + 1]].tolist(),
                strict=True,
            )
        )
        for v in range(len(graph))
    ]
    degree = graph.degree.tolist()
    c = [int(x) for x in chips]
    queue = deque(v for v in range(len(c)) if c[v] >= degree[v])
    while queue:
        v = queue.popleft()
        times = c[v] // degree[v]
        if times <= 0:
            continue
        c[v] -= times * degree[v]
        for w, m in out[v]:
            before = c[w]
            c[w] += times * m
            if before < degree[w] <= c[w]:
                queue.append(w)
    return c


def identity_case(n: int, *, compare: bool) -> dict[str, Any]:
    import numpy as np

    from graphinv.chipfiring import WIRED_SINK, chip_graph, recurrent_identity, wired_grid

    seconds, identity = _timed(lambda: recurrent_identity(wired_grid(n), WIRED_SINK))
    grid = np.array([[identity[(r, c)] for c in range(n)] for r in range(n)])
    symmetric = bool((grid == grid.T).all() and (grid == grid[::-1]).all())
    row: dict[str, Any] = {"case": f"identity {n}x{n}", "graphinv_s": seconds, "check": symmetric}
    if compare:
        graph = chip_graph(wired_grid(n), sink=WIRED_SINK)
        twice = 2 * (graph.degree - 1)

        def plain() -> Any:
            first, _ = _plain_rounds(graph, twice)
            return _plain_rounds(graph, twice - first)[0]

        plain_seconds, plain_identity = _timed(plain)
        row["plain_rounds_s"] = plain_seconds
        row["check"] = row["check"] and plain_identity.tolist() == [
            identity[v] for v in graph.vertices
        ]
    return row


def pile_case(n: int, chips: int) -> dict[str, Any]:
    import numpy as np

    from graphinv.chipfiring import WIRED_SINK, chip_graph, stabilize, wired_grid

    def run() -> Any:
        graph = chip_graph(wired_grid(n), sink=WIRED_SINK)
        return stabilize(graph.configuration({(n // 2, n // 2): chips}))

    seconds, result = _timed(run)
    graph = result.stable.graph
    start = np.zeros(len(graph), dtype=np.int64)
    start[graph.index[(n // 2, n // 2)]] = chips
    exact = (start - graph.laplacian @ result.firings).tolist() == result.stable.chips.tolist()
    return {
        "case": f"{chips:.0e} chips, {n}x{n}",
        "graphinv_s": seconds,
        "rounds": result.rounds,
        "topplings": result.topplings,
        "check": exact and result.stable.is_stable(),
    }


def queue_case(n: int) -> dict[str, Any]:
    from graphinv.chipfiring import WIRED_SINK, chip_graph, stabilize, wired_grid

    graph = chip_graph(wired_grid(n), sink=WIRED_SINK)
    twice = 2 * (graph.degree - 1)
    ours, result = _timed(lambda: stabilize(type(graph.zero())(graph, twice)))
    reference, final = _timed(lambda: _queue_toppling(graph, twice.tolist()))
    return {
        "case": f"stab(2 c_max) {n}x{n}",
        "graphinv_s": ours,
        "python_queue_s": reference,
        "check": final == result.stable.chips.tolist(),
    }


def _warm_up() -> None:
    """Import and exercise the code once so the first case does not pay for imports."""
    from graphinv.chipfiring import WIRED_SINK, chip_graph, stabilize, wired_grid

    graph = chip_graph(wired_grid(25), sink=WIRED_SINK)
    stabilize(graph.configuration({(12, 12): 10_000}))


def main(argv: Sequence[str] | None = None) -> int:
    """Run the chip-firing benchmarks and print one line per case; exit 1 if a check fails."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="smaller cases (a smoke run)")
    options, _unknown = parser.parse_known_args(argv)  # a runner may pass its own options
    quick = options.quick
    _warm_up()
    rows = [
        queue_case(20 if quick else 40),
        identity_case(30 if quick else 100, compare=True),
        identity_case(60 if quick else 200, compare=False),
        pile_case(64 if quick else 256, 10**4 if quick else 10**6),
    ]
    failed = False
    for row in rows:
        parts = [f"{row['case']:<26}", f"graphinv {row['graphinv_s']:7.2f} s"]
        for key, label in (("plain_rounds_s", "plain rounds"), ("python_queue_s", "python queue")):
            if key in row:
                parts.append(f"{label} {row[key]:7.2f} s (x{row[key] / row['graphinv_s']:.1f})")
        if "rounds" in row:
            parts.append(f"{row['rounds']} sweeps, {row['topplings']} firings")
        parts.append("ok" if row["check"] else "CHECK FAILED")
        failed |= not row["check"]
        print("  ".join(parts))
    if not quick:
        identity_seconds = rows[1]["graphinv_s"]
        pile_seconds = rows[3]["graphinv_s"]
        print(
            f"targets: identity 100x100 {identity_seconds:.2f} s (< {TARGET_IDENTITY_SECONDS} s), "
            f"10^6 chips on 256x256 {pile_seconds:.2f} s (< {TARGET_PILE_SECONDS} s)"
        )
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
