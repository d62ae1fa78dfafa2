"""Run the speed benchmarks: every ``benchmarks/bench_*.py`` module that defines ``main()``.

Usage::

    python benchmarks/run.py                 # all benchmark modules
    python benchmarks/run.py critical_group  # only modules whose name contains the filter
    python benchmarks/run.py critical_group -- --cases grid20,grid30 --cap 60

Arguments after ``--`` are passed to each module's ``main(argv)``.
"""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent


def discover(filters: list[str]) -> list[Path]:
    """The benchmark modules whose file name contains one of ``filters`` (all when empty)."""
    modules = sorted(HERE.glob("bench_*.py"))
    if filters:
        modules = [m for m in modules if any(f in m.stem for f in filters)]
    return modules


def main(argv: list[str] | None = None) -> int:
    args = list(sys.argv[1:] if argv is None else argv)
    passthrough: list[str] = []
    if "--" in args:
        cut = args.index("--")
        args, passthrough = args[:cut], args[cut + 1 :]
    modules = discover(args)
    if not modules:
        print(f"no benchmark module matches {args}", file=sys.stderr)
        return 2
    for path in modules:
        spec = importlib.util.spec_from_file_location(path.stem, path)
        if spec is None or spec.loader is None:
            continue
        module = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(module)
        entry = getattr(module, "main", None)
        if entry is None:
            continue
        print(f"== {path.stem}", flush=True)
        entry(passthrough)
    return 0


if __name__ == "__main__":
    sys.exit(main())
