"""Critical groups: graphinv against general-purpose Smith normal forms of the full Laplacian.

Each measurement runs in its own subprocess (so a reference can be stopped at the time cap and
peak memory is per run).  References: python-flint ``fmpz_mat.snf()``, SymPy
``smith_normal_form``, and PARI/GP ``matsnf`` when ``gp`` is on the PATH.  Only the normal-form
call is timed (the Laplacian is built before the clock starts); graphinv's time is the whole
``critical_group`` call, certificate included.  Like the references' compiled code, graphinv's
compiled kernels are loaded before the clock starts: one warm-up call on a small graph (the
numba kernels load from the on-disk cache, about a second once per process; the first run after
installation compiles them).  That one-time cost is printed in its own column ("load s").
Every tool whose first run takes under 5 s is run five times and its best time kept.

Usage::

    python benchmarks/bench_critical_group.py [--cases grid20,rr3-1000] [--cap SECONDS]
        [--no-references]
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import subprocess
import sys
import time
from collections.abc import Callable
from pathlib import Path

import networkx as nx

ROOT = Path(__file__).resolve().parent.parent


def _regular(d: int, n: int) -> Callable[[], nx.Graph]:
    return lambda: nx.random_regular_graph(d, n, seed=20261201)


def _giant(n: int) -> Callable[[], nx.Graph]:
    def build() -> nx.Graph:
        G = nx.gnp_random_graph(n, 4 / n, seed=20261201)
        return G.subgraph(max(nx.connected_components(G), key=len)).copy()

    return build


CASES: dict[str, Callable[[], nx.Graph]] = {
    "grid20": lambda: nx.grid_2d_graph(20, 20),
    "grid30": lambda: nx.grid_2d_graph(30, 30),
    "grid50": lambda: nx.grid_2d_graph(50, 50),
    "grid100": lambda: nx.grid_2d_graph(100, 100),
    "rr3-400": _regular(3, 400),
    "rr3-1000": _regular(3, 1000),
    "rr3-2000": _regular(3, 2000),
    "rr4-400": _regular(4, 400),
    "rr4-1000": _regular(4, 1000),
    "rr4-2000": _regular(4, 2000),
    "gnp-800": _giant(800),
    "gnp-2000": _giant(2000),
    "Q10": lambda: nx.hypercube_graph(10),
    "K200": lambda: nx.complete_graph(200),
}

# References are not started on graphs this large: a dense Smith form of the full Laplacian
# would not finish within any reasonable cap (it is printed as "not run").
REFERENCE_LIMIT = 2500


def _peak_megabytes() -> float:
    import resource

    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


REPEAT_BELOW = 5.0
"""A tool whose first timed run takes less than this many seconds is run up to ``REPEATS``
times and the best time is kept (the same rule for every tool, as ``timeit`` does)."""
REPEATS = 5


def _best_of(call: Callable[[], object]) -> tuple[float, object]:
    best, value = float("inf"), None
    for attempt in range(REPEATS):
        start = time.perf_counter()
        value = call()
        elapsed = time.perf_counter() - start
        best = min(best, elapsed)
        if attempt == 0 and elapsed >= REPEAT_BELOW:
            break
    return best, value


def _worker(tool: str, case: str) -> None:
    """Run one measurement and print a JSON line (in the subprocess)."""
    from graphinv import critical_group, laplacian_matrix

    G = CASES[case]()
    result: dict[str, object] = {"vertices": G.number_of_nodes()}
    if tool == "graphinv":
        start = time.perf_counter()
        critical_group(nx.random_regular_graph(3, 600, seed=1))  # loads every compiled kernel
        result["load_seconds"] = time.perf_counter() - start
        result["seconds"], K = _best_of(lambda: critical_group(G))
        result["rank"] = K.rank  # type: ignore[attr-defined]
        result["order_bits"] = K.order.bit_length()  # type: ignore[attr-defined]
    elif tool == "flint":
        import flint

        M = flint.fmpz_mat(laplacian_matrix(G).to_lists())
        result["seconds"], _ = _best_of(M.snf)
    elif tool == "sympy":
        from sympy import ZZ
        from sympy.matrices.normalforms import smith_normal_form

        S = laplacian_matrix(G).to_sympy()
        result["seconds"], _ = _best_of(lambda: smith_normal_form(S, domain=ZZ))
    elif tool == "pari":
        rows = laplacian_matrix(G).to_lists()
        text = "[" + ";".join(",".join(map(str, row)) for row in rows) + "]"
        script = f"M={text};\nt=getabstime();\nmatsnf(M);\nprint(getabstime()-t);\n\\q\n"
        out = subprocess.run(
            ["gp", "-q", "-s", "2000000000"], input=script, capture_output=True, text=True,
            check=True,
        )
        result["seconds"] = float(out.stdout.strip().splitlines()[-1]) / 1000.0
    result["peak_mb"] = _peak_megabytes()
    print(json.dumps(result), flush=True)


def _measure(tool: str, case: str, cap: float) -> dict[str, object] | None:
    """Run the worker in a subprocess; ``None`` when it hits the cap."""
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    try:
        out = subprocess.run(
            [sys.executable, __file__, "--worker", tool, case],
            capture_output=True, text=True, timeout=cap, env=env, check=False,
        )
    except subprocess.TimeoutExpired:
        return None
    if out.returncode != 0:
        return {"error": out.stderr.strip().splitlines()[-1] if out.stderr.strip() else "failed"}
    return json.loads(out.stdout.strip().splitlines()[-1])


def _format_seconds(value: float | None, cap: float) -> str:
    return f"> {cap:.0f}" if value is None else f"{value:.2f}"


def main(argv: list[str] | None = None) -> None:
    """Print the benchmark table (see the module docstring for the options)."""
    parser = argparse.ArgumentParser(prog="bench_critical_group")
    parser.add_argument("--cases", default=",".join(CASES), help="comma-separated case names")
    parser.add_argument("--cap", type=float, default=300.0, help="time cap per reference run (s)")
    parser.add_argument("--own-cap", type=float, default=600.0, help="time cap for graphinv (s)")
    parser.add_argument("--no-references", action="store_true")
    args = parser.parse_args(argv)
    tools = [] if args.no_references else ["flint", "sympy"]
    if not args.no_references and shutil.which("gp"):
        tools.append("pari")
    print(f"time cap per reference run: {args.cap:.0f} s; times in seconds; ratio = fastest "
          "reference / graphinv (a lower bound when the reference hit the cap)")
    header = ["case", "n", "graphinv", "load s", "peak MB", *tools, "ratio"]
    print(" | ".join(header))
    print(" | ".join("---" for _ in header))
    for case in args.cases.split(","):
        case = case.strip()
        if case not in CASES:
            print(f"unknown case {case!r}; known: {', '.join(CASES)}", file=sys.stderr)
            continue
        own = _measure("graphinv", case, args.own_cap)
        if own is not None and "error" in own:
            print(f"{case}: graphinv failed: {own['error']}", file=sys.stderr)
        own_seconds = own.get("seconds") if own else None
        n = own.get("vertices", "?") if own else "?"
        cells = [case, str(n), _format_seconds(own_seconds, args.own_cap),  # type: ignore[arg-type]
                 f"{own['load_seconds']:.2f}" if own and "load_seconds" in own else "?",
                 f"{own['peak_mb']:.0f}" if own and "peak_mb" in own else "?"]
        best: float | None = None
        bounded = False
        for tool in tools:
            if isinstance(n, int) and n > REFERENCE_LIMIT:
                cells.append("not run")
                continue
            ref = _measure(tool, case, args.cap)
            if ref is None:
                cells.append(f"> {args.cap:.0f}")
                if best is None:
                    best, bounded = args.cap, True
                continue
            if "error" in ref:
                cells.append("error")
                continue
            seconds = float(ref["seconds"])  # type: ignore[arg-type]
            cells.append(f"{seconds:.2f}")
            if best is None or bounded or seconds < best:
                best, bounded = seconds, False
        if best is not None and isinstance(own_seconds, float) and own_seconds > 0:
            cells.append(f"{'> ' if bounded else ''}{best / own_seconds:.0f}x")
        else:
            cells.append("-")
        print(" | ".join(cells), flush=True)


if __name__ == "__main__":
    if len(sys.argv) == 4 and sys.argv[1] == "--worker":
        _worker(sys.argv[2], sys.argv[3])
    else:
        main(sys.argv[1:])
