"""Batch throughput: every connected graph on 9 vertices through the full invariant set.

Run ``python benchmarks/bench_batch.py`` (or ``make bench``).  It needs ``nauty-geng`` (Debian
package ``nauty``) for the graph families and skips with a message without it.

Two measurements, taken in the same run so that the ratios are fair on a shared machine:

1. Per-graph rates of the kernel (one process): each stage of
   :func:`graphinv.batch.invariants.process_chunk` on a sample of 9- and 10-vertex graphs,
   repeated to show the noise, next to python-flint's ``fmpz_mat.snf`` on the same matrices
   (the reference library for Smith forms) and the whole kernel with the Smith forms done by
   python-flint instead of graphinv's core.
2. End to end: ``nauty-geng -c 9 | graphinv batch - --store ...`` with all cores, wall time,
   graphs per second, and the peak resident memory of the whole process tree (sampled).

From the per-graph rates it projects the cost of the 11,716,571 connected graphs on 10
vertices (OEIS A001349) on this machine and on a 32-worker Dask cluster of similar cores.

Options: ``--mod K`` runs 1/K of the 9-vertex family end to end (default 1: all 261,080);
``--sample N`` sets the per-graph sample size; ``--skip-end-to-end``.
"""

from __future__ import annotations

import argparse
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import threading
import time
from collections.abc import Callable, Sequence
from typing import Any

CONNECTED_10 = 11_716_571  # connected graphs on 10 vertices, OEIS A001349
CONNECTED_9 = 261_080  # OEIS A001349


def _geng(n: int, res: int = 0, mod: int = 1) -> list[str]:
    out = subprocess.run(
        ["nauty-geng", "-cq", str(n), f"{res}/{mod}"], check=True, capture_output=True, text=True
    ).stdout
    return out.split()


def _matrices(lines: Sequence[str]) -> tuple[list[Any], list[Any], list[Any]]:
    from graphinv.batch.invariants import adjacency_rows
    from graphinv.io.graph6 import parse_graph6

    As, Ls, Qs = [], [], []
    for text in lines:
        n, edges = parse_graph6(text)
        A = adjacency_rows(n, edges)
        degrees = [sum(row) for row in A]
        L = [[degrees[i] if i == j else -A[i][j] for j in range(n)] for i in range(n)]
        Q = [[degrees[i] if i == j else A[i][j] for j in range(n)] for i in range(n)]
        As.append(A)
        Ls.append(L)
        Qs.append(Q)
    return As, Ls, Qs


# Per-graph figures use process CPU time: on a machine shared with other work, wall-clock time
# mostly measures the other work.
_clock = time.process_time


def _per_graph(function: Callable[[Any], Any], items: Sequence[Any], repeats: int) -> list[float]:
    """CPU microseconds per item, one value per repeat."""
    times = []
    for _ in range(repeats):
        start = _clock()
        for item in items:
            function(item)
        times.append((_clock() - start) / len(items) * 1e6)
    return times


def _chunk_rate(lines: Sequence[str], repeats: int) -> list[float]:
    from graphinv.batch.invariants import KernelSettings, process_chunk

    items = [(i, i + 1, text, None) for i, text in enumerate(lines)]
    settings = KernelSettings()
    times = []
    for _ in range(repeats):
        start = _clock()
        for first in range(0, len(items), 1000):
            process_chunk(items[first : first + 1000], settings)
        times.append((_clock() - start) / len(items) * 1e6)
    return times


def _with_flint_smith(lines: Sequence[str], repeats: int) -> list[float]:
    """The whole kernel, with Smith forms by python-flint (the reference) instead of the core."""
    import flint

    import graphinv.batch.invariants as kernel
    from graphinv.normalform import determinant
    from graphinv.spectrum import charpoly_of_rows

    def smith(rows: Any) -> tuple[int, ...]:
        if not rows:
            return ()
        snf = flint.fmpz_mat(rows).snf()
        return tuple(int(snf[i, i]) for i in range(len(rows)))

    original = kernel._core
    kernel._core = lambda: (smith, determinant, charpoly_of_rows)  # type: ignore[assignment]
    try:
        return _chunk_rate(lines, repeats)
    finally:
        kernel._core = original  # type: ignore[assignment]


def _describe(times: Sequence[float]) -> str:
    return (
        f"{statistics.median(times):8.1f} us  (min {min(times):.1f}, max {max(times):.1f}, "
        f"{len(times)} repeats)"
    )


def _tree(root: int) -> tuple[int, dict[int, float]]:
    """Resident memory (KiB) of ``root`` and its descendants, and CPU seconds of each."""
    parents: dict[int, int] = {}
    rss: dict[int, int] = {}
    cpu: dict[int, float] = {}
    ticks = os.sysconf("SC_CLK_TCK")
    for entry in os.listdir("/proc"):
        if not entry.isdigit():
            continue
        try:
            with open(f"/proc/{entry}/status") as handle:
                fields = dict(line.split(":", 1) for line in handle if ":" in line)
            with open(f"/proc/{entry}/stat") as handle:
                stat = handle.read().rsplit(")", 1)[1].split()
        except OSError:
            continue
        pid = int(entry)
        parents[pid] = int(fields.get("PPid", "0").strip())
        rss[pid] = int(fields.get("VmRSS", "0 kB").split()[0])
        cpu[pid] = (int(stat[11]) + int(stat[12])) / ticks  # utime + stime
    total = 0
    seconds: dict[int, float] = {}
    for pid in rss:
        current = pid
        while current and current != root:
            current = parents.get(current, 0)
        if current == root:
            total += rss[pid]
            seconds[pid] = cpu[pid]
    return total, seconds


def _end_to_end(mod: int, workers: int | None) -> dict[str, Any]:
    folder = tempfile.mkdtemp(prefix="bench-batch-")
    store = os.path.join(folder, "connected9.db")
    geng = subprocess.Popen(
        ["nauty-geng", "-cq", "9", f"0/{mod}"], stdout=subprocess.PIPE, stderr=subprocess.DEVNULL
    )
    command = [sys.executable, "-m", "graphinv", "batch", "-", "--store", store, "--quiet"]
    if workers is not None:
        command += ["--workers", str(workers)]
    start = time.perf_counter()
    batch = subprocess.Popen(command, stdin=geng.stdout, stdout=subprocess.PIPE, text=True)
    assert geng.stdout is not None
    geng.stdout.close()
    peak = 0
    cpu: dict[int, float] = {}
    done = threading.Event()

    def sample() -> None:
        nonlocal peak
        while not done.is_set():
            memory, seconds = _tree(batch.pid)
            peak = max(peak, memory)
            cpu.update(seconds)
            time.sleep(0.5)

    sampler = threading.Thread(target=sample, daemon=True)
    sampler.start()
    output, _ = batch.communicate()
    seconds = time.perf_counter() - start
    done.set()
    sampler.join()
    geng.wait()
    import sqlite3

    connection = sqlite3.connect(store)
    rows, failed = connection.execute("SELECT COUNT(*), COUNT(error) FROM graphs").fetchone()
    connection.close()
    shutil.rmtree(folder, ignore_errors=True)
    return {
        "graphs": rows,
        "failed": failed,
        "seconds": seconds,
        "rate": rows / seconds,
        "peak_rss_mib": peak / 1024,
        "cpu_seconds": sum(cpu.values()),
        "exit": batch.returncode,
        "output": output.strip(),
    }


def _duration(seconds: float) -> str:
    if seconds < 120:
        return f"{seconds:.0f} s"
    if seconds < 7200:
        return f"{seconds / 60:.1f} min"
    return f"{seconds / 3600:.2f} h"


def main(argv: Sequence[str] | None = None) -> int:
    """Run the batch benchmark and print its figures."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--mod", type=int, default=1, help="end-to-end on 1/MOD of the family")
    parser.add_argument("--sample", type=int, default=2000, help="graphs per per-graph sample")
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--workers", type=int, default=None)
    parser.add_argument("--skip-end-to-end", action="store_true")
    # Called from a runner without arguments: the defaults, not the runner's command line.
    args = parser.parse_args([] if argv is None else list(argv))
    if shutil.which("nauty-geng") is None:
        print("bench_batch: nauty-geng not found (Debian package nauty); skipped")
        return 0
    import flint

    from graphinv.batch.invariants import _smith_of_rows as smith_rows
    from graphinv.normalform import cokernel, smith_diagonal

    cores = os.cpu_count() or 1
    print(f"bench_batch: {cores} cores; per-graph figures are CPU time (min/max show the noise)")
    rates: dict[int, float] = {}
    for n, mod in (
        (9, max(1, CONNECTED_9 // args.sample)),
        (10, max(1, CONNECTED_10 // args.sample)),
    ):
        lines = _geng(n, 0, mod)
        As, Ls, Qs = _matrices(lines)
        print(
            f"\nper graph, {len(lines)} connected graphs on {n} vertices (nauty-geng -c {n} 0/{mod}):"
        )
        kernel = _chunk_rate(lines, args.repeats)
        rates[n] = statistics.median(kernel)
        print(f"  whole kernel (graphinv)               {_describe(kernel)}")
        stages = [
            ("core cokernel(L) [public]", cokernel, Ls),
            ("core smith_diagonal(A) [public]", smith_diagonal, As),
            ("core smith_diagonal(Q) [public]", smith_diagonal, Qs),
            ("core diagonal_of_rows(L~) [batch]", lambda m: smith_rows([r[1:] for r in m[1:]]), Ls),
            ("core diagonal_of_rows(A) [batch]", smith_rows, As),
            ("core diagonal_of_rows(Q) [batch]", smith_rows, Qs),
            ("python-flint snf(L) [reference]", lambda m: flint.fmpz_mat(m).snf(), Ls),
            ("python-flint snf(A) [reference]", lambda m: flint.fmpz_mat(m).snf(), As),
            ("python-flint snf(Q) [reference]", lambda m: flint.fmpz_mat(m).snf(), Qs),
        ]
        medians = {}
        for name, function, items in stages:
            times = _per_graph(function, items, args.repeats)
            medians[name] = statistics.median(times)
            print(f"  {name:<37} {_describe(times)}")
        core = sum(v for k, v in medians.items() if k.endswith("[batch]"))
        reference = sum(v for k, v in medians.items() if "reference" in k)
        print(f"  core Smith forms (batch route) / python-flint snf:  {core / reference:.1f}x")
        flint_kernel = _with_flint_smith(lines, args.repeats)
        print(f"  kernel with python-flint Smith forms  {_describe(flint_kernel)}")
        print(
            f"  graphinv kernel / that kernel:        {rates[n] / statistics.median(flint_kernel):.1f}x"
        )
    workers = args.workers or cores
    for label, count, n in (
        ("261,080 on 9 vertices", CONNECTED_9, 9),
        ("11,716,571 on 10 vertices", CONNECTED_10, 10),
    ):
        here = count * rates[n] / 1e6 / workers
        cluster = count * rates[n] / 1e6 / 32
        print(
            f"\nprojection, {label}: {_duration(here)} with {workers} workers here, "
            f"{_duration(cluster)} on 32 Dask workers of similar speed "
            "(kernel CPU time; the one writer adds ~20 us per graph)"
        )
    if args.skip_end_to_end:
        return 0
    expected = CONNECTED_9 if args.mod == 1 else None
    print(
        f"\nend to end: nauty-geng -c 9 0/{args.mod} | graphinv batch - --store ... "
        f"(workers: {workers})"
    )
    result = _end_to_end(args.mod, args.workers)
    print(
        f"  {result['graphs']} graphs, {result['failed']} failed, {result['seconds']:.1f} s, "
        f"{result['rate']:,.0f} graphs/s, peak RSS of the process tree "
        f"{result['peak_rss_mib']:.0f} MiB (sampled every 0.5 s)"
    )
    cores_used = min(workers, cores)
    print(
        f"  CPU time of the process tree {result['cpu_seconds']:.0f} s (sampled), so "
        f"{result['cpu_seconds'] / cores_used:.0f} s of wall time on {cores_used} idle cores; "
        f"{result['cpu_seconds'] / max(1, result['graphs']) * 1e6:.0f} us CPU per graph"
    )
    if expected is not None:
        verdict = "met" if result["seconds"] < 60 else "NOT met"
        print(f"  target: all {expected:,} in under 60 s: {verdict} (wall clock)")
    print(f"  target: memory under 500 MiB: {'met' if result['peak_rss_mib'] < 500 else 'NOT met'}")
    return 0 if result["exit"] == 0 else 1


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
