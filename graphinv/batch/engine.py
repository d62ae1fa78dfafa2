"""Running a batch: chunks out to workers, result rows back to the one process that writes.

The coordinating process reads the inputs as a stream, cuts them into chunks, asks the store
which positions of each chunk are already finished, and sends only the rest to the workers —
a local process pool, the calling process itself (one worker), or a Dask cluster
(:mod:`graphinv.batch.distributed`).  Workers parse and compute
(:func:`graphinv.batch.invariants.process_chunk`) and return rows; the coordinator commits
finished chunks together, in one transaction about once a second.  At most a few chunks per worker are in flight, so memory stays flat
whatever the input size.

An interrupted batch (Ctrl-C, ``kill -9``, power loss) keeps every committed chunk; running the
same command again computes only what is missing.
"""

from __future__ import annotations

import os
import signal
import sys
import time
from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass
from itertools import islice
from typing import Any, Protocol

from graphinv.batch.invariants import (
    KernelSettings,
    ResultItem,
    TaskItem,
    parse_invariants,
    process_chunk,
)
from graphinv.batch.sources import BatchInput, resolve_inputs
from graphinv.batch.store import BatchStore
from graphinv.errors import GraphInvError, StoreError

__all__ = ["BatchResult", "ChunkExecutor", "LocalExecutor", "run_batch"]

ENGINES = ("local", "dask")

#: Commit finished rows at least this often (seconds) ...
COMMIT_SECONDS = 1.0
#: ... or once this many rows are waiting.
COMMIT_ROWS = 20000
#: Files of a folder input per task (their text travels with the task).
FILES_PER_CHUNK = 16


@dataclass(frozen=True)
class BatchResult:
    """What one run of a batch did.

    Attributes
    ----------
    store : str
        The store file.
    run_id : int
        The run's id in the store's ``runs`` table.
    computed : int
        Graphs computed by this run (including those that failed).
    failed : int
        Of those, graphs stored with an error.
    skipped : int
        Graphs already finished in the store, not computed again.
    seconds : float
        Wall-clock time of the run (a real number, from ``time.perf_counter``).
    status : str
        ``finished`` or ``interrupted``.
    """

    store: str
    run_id: int
    computed: int
    failed: int
    skipped: int
    seconds: float
    status: str = "finished"

    @property
    def rate(self) -> float:
        """Graphs computed per second (a float)."""
        return self.computed / self.seconds if self.seconds > 0 else 0.0

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict of the fields and the rate."""
        return {
            "store": self.store,
            "run_id": self.run_id,
            "status": self.status,
            "computed": self.computed,
            "failed": self.failed,
            "skipped": self.skipped,
            "seconds": round(self.seconds, 3),
            "graphs_per_second": round(self.rate, 1),
        }


class ChunkExecutor(Protocol):
    """Where chunks are computed: submit work, then collect finished chunks."""

    workers: int

    def submit(self, items: Sequence[TaskItem], settings: KernelSettings, kind: str) -> Any:
        """Start computing one chunk; return a handle."""

    def wait(self, handles: set[Any]) -> list[tuple[Any, list[ResultItem]]]:
        """Block until at least one handle is done; return the finished ones with their rows."""

    def close(self, *, cancel: bool) -> None:
        """Release the workers (cancelling pending chunks if asked)."""


def _ignore_interrupts() -> None:
    # Ctrl-C reaches the whole process group; only the coordinator decides what to do with it.
    signal.signal(signal.SIGINT, signal.SIG_IGN)


class LocalExecutor:
    """A pool of worker processes on this machine, or the calling process when ``workers == 1``.

    Parameters
    ----------
    workers : int, optional
        How many processes; default all cores (``os.cpu_count()``).

    Examples
    --------
    >>> from graphinv.batch.invariants import KernelSettings
    >>> executor = LocalExecutor(1)            # computes in this process
    >>> handle = executor.submit([(0, 1, "Bw", None)], KernelSettings(("spanning_trees",)), "lines")
    >>> [rows[0][8] for _, rows in executor.wait({handle})]   # the triangle: 3 spanning trees
    ['3']
    >>> executor.close(cancel=False)

    References
    ----------
    Python documentation, ``concurrent.futures.ProcessPoolExecutor``.
    """

    def __init__(self, workers: int | None = None) -> None:
        self.workers = max(1, workers if workers is not None else (os.cpu_count() or 1))
        self._pool: Any = None
        if self.workers > 1:
            import multiprocessing
            from concurrent.futures import ProcessPoolExecutor

            methods = multiprocessing.get_all_start_methods()
            context = multiprocessing.get_context(
                "forkserver" if "forkserver" in methods else "spawn"
            )
            self._pool = ProcessPoolExecutor(
                self.workers, mp_context=context, initializer=_ignore_interrupts
            )

    def submit(self, items: Sequence[TaskItem], settings: KernelSettings, kind: str) -> Any:
        """Start computing one chunk (inline, at once, with a single worker)."""
        if self._pool is None:
            return _Done(process_chunk(items, settings, kind=kind))
        return self._pool.submit(process_chunk, items, settings, kind=kind)

    def wait(self, handles: set[Any]) -> list[tuple[Any, list[ResultItem]]]:
        """Finished chunks (at least one)."""
        if self._pool is None:
            return [(handle, handle.rows) for handle in handles]
        from concurrent.futures import FIRST_COMPLETED
        from concurrent.futures import wait as wait_futures

        done, _ = wait_futures(handles, return_when=FIRST_COMPLETED)
        return [(future, future.result()) for future in done]

    def close(self, *, cancel: bool) -> None:
        """Shut the pool down."""
        if self._pool is not None:
            self._pool.shutdown(wait=not cancel, cancel_futures=cancel)
            self._pool = None


@dataclass(eq=False)
class _Done:
    rows: list[ResultItem]


def _chunks(
    source: BatchInput,
    store: BatchStore,
    input_id: int,
    settings: KernelSettings,
    chunk_size: int,
    retry_errors: bool,
    on_skip: Callable[[int], None],
) -> Iterator[list[TaskItem]]:
    """The unfinished items of an input, in chunks; finished ones are counted by ``on_skip``."""
    items = source.items()
    while True:
        chunk = list(islice(items, chunk_size))
        if not chunk:
            return
        stored = store.finished(
            input_id, chunk[0][0], chunk[-1][0], settings.invariants, retry_errors=retry_errors
        )
        if stored:
            pending = []
            for item in chunk:
                seen = stored.get(item[0])
                if seen is None:
                    pending.append(item)
                    continue
                if seen[0] != item[2]:
                    raise StoreError(
                        f"{store.path}: input {source.display} has changed since it was stored: "
                        f"graph {item[0]} was {seen[0]!r}, now {item[2]!r}; use a new store"
                        + (" or --label" if source.source.startswith("stdin:") else "")
                    )
                if not seen[1]:
                    pending.append(item)
            if len(pending) < len(chunk):
                on_skip(len(chunk) - len(pending))
            chunk = pending
        if chunk:
            yield chunk


def run_batch(
    inputs: Sequence[str],
    *,
    store: str | os.PathLike[str],
    invariants: str | Sequence[str] | None = None,
    workers: int | None = None,
    engine: str = "local",
    scheduler: str | None = None,
    chunk_size: int = 1000,
    max_vertices: int | None = None,
    format: str | None = None,
    label: str | None = None,
    retry_errors: bool = False,
    progress: bool | None = None,
    command: str | None = None,
    executor: ChunkExecutor | None = None,
    commit_seconds: float = COMMIT_SECONDS,
) -> BatchResult:
    """Compute invariants for every graph of the inputs into a store, resuming if interrupted.

    Parameters
    ----------
    inputs : sequence of str
        graph6/sparse6 files (``.gz`` too), ``"-"`` for standard input, folders of graph files
        (one graph per file), and family specs such as ``gnp:30,0.5,seed=1..2000``.
    store : path
        The SQLite store (created if missing).  Rerunning the same command on the same store
        computes only graphs not yet finished.
    invariants : str or sequence of str, optional
        A selection from :data:`graphinv.batch.invariants.INVARIANTS` (comma-separated text
        allowed); default all of them (without the canonical key, and with a warning, when
        pynauty is not installed).
    workers : int, optional
        Local worker processes (default all cores; 1 computes in this process), or the number
        of workers of a local Dask cluster.
    engine : {"local", "dask"}
        A local process pool, or Dask distributed.
    scheduler : str, optional
        With ``engine="dask"``: a scheduler address such as ``tcp://10.0.0.5:8786``; without
        it a ``LocalCluster`` is started for the run.
    chunk_size : int
        Graphs per task sent to a worker.
    max_vertices : int, optional
        Graphs with more vertices get an error row instead of results.
    format : str, optional
        Input format when suffixes do not tell (``graph6``, ``sparse6``, ``edges``, ...).
    label : str, optional
        Name under which standard input is stored (see
        :func:`graphinv.batch.sources.resolve_inputs`).
    retry_errors : bool
        Compute again graphs stored with an error (for example after raising
        ``max_vertices``).
    progress : bool, optional
        Show a progress bar; default only when standard error is a terminal.
    command : str, optional
        The command line to record in the store's ``runs`` table.
    executor : ChunkExecutor, optional
        Use this executor instead of building one from ``engine`` (it is not closed).
    commit_seconds : float
        Commit finished rows at least this often; 0 commits every finished chunk at once.
        An interruption loses at most this much finished work.

    Returns
    -------
    BatchResult

    Raises
    ------
    GraphInvError
        For an unknown engine or invariant, a missing input, an input that changed since it
        was stored, or an unusable store.  A bad graph never raises: it gets an error row.

    Examples
    --------
    >>> import tempfile, os
    >>> path = os.path.join(tempfile.mkdtemp(), "cycles.db")
    >>> result = run_batch(["cycle:3..6"], store=path, workers=1,
    ...                    invariants="critical-group,spanning-trees")
    >>> result.computed, result.failed, result.skipped
    (4, 0, 0)
    >>> run_batch(["cycle:3..6"], store=path, workers=1,
    ...           invariants="critical-group,spanning-trees").skipped
    4

    References
    ----------
    SQLite documentation, "Write-Ahead Logging" (sqlite.org); Dask distributed documentation,
    "Futures" (distributed.dask.org).
    """
    if engine not in ENGINES:
        raise GraphInvError(f"unknown engine {engine!r}; expected one of: {', '.join(ENGINES)}")
    if chunk_size < 1:
        raise GraphInvError(f"the chunk size must be a positive integer, not {chunk_size}")
    if workers is not None and workers < 1:
        raise GraphInvError(f"the number of workers must be a positive integer, not {workers}")
    if max_vertices is not None and max_vertices < 1:
        raise GraphInvError(f"the vertex limit must be a positive integer, not {max_vertices}")
    if not commit_seconds >= 0:
        raise GraphInvError(f"the commit interval must be 0 or more seconds, not {commit_seconds}")
    selected = parse_invariants(invariants if invariants is not None else None)
    if "canonical_key" in selected:
        try:
            import pynauty  # noqa: F401
        except ImportError:
            if invariants is not None:
                raise GraphInvError(
                    "the canonical key needs pynauty (pip install pynauty); leave "
                    "canonical-key out of --only to run without it"
                ) from None
            # The default set goes on without keys; queries then decide isomorphism inside
            # each polynomial class with networkx instead.
            import warnings

            warnings.warn(
                "pynauty is not installed: no canonical keys stored (pip install pynauty)",
                stacklevel=2,
            )
            selected = tuple(name for name in selected if name != "canonical_key")
    sources = resolve_inputs(inputs, format=format, label=label)
    started = time.perf_counter()
    own_executor = executor is None
    with BatchStore(store) as db:
        ids = [db.input_id(s.source, kind=s.kind, format=s.format) for s in sources]
        if executor is None:
            if engine == "dask":
                from graphinv.batch.distributed import DaskExecutor

                executor = DaskExecutor(scheduler=scheduler, workers=workers)
            else:
                executor = LocalExecutor(workers)
        run_id = db.start_run(
            command=command or " ".join(["graphinv batch", *inputs]),
            inputs=[s.source for s in sources],
            invariants=selected,
            engine=engine,
            workers=executor.workers,
        )
        counts = {"computed": 0, "failed": 0, "skipped": 0}
        status = "failed"
        bar = _Progress(progress if progress is not None else sys.stderr.isatty(), sources)
        try:
            with bar:
                _drive(
                    executor,
                    db,
                    sources,
                    ids,
                    run_id,
                    selected,
                    max_vertices,
                    chunk_size,
                    retry_errors,
                    counts,
                    bar,
                    commit_seconds,
                )
            status = "finished"
        except KeyboardInterrupt:
            status = "interrupted"
            raise
        finally:
            if own_executor:
                executor.close(cancel=status != "finished")
            db.finish_run(run_id, status=status, **counts)
    return BatchResult(
        os.fspath(store),
        run_id,
        counts["computed"],
        counts["failed"],
        counts["skipped"],
        time.perf_counter() - started,
        status,
    )


def _drive(
    executor: ChunkExecutor,
    db: BatchStore,
    sources: Sequence[BatchInput],
    ids: Sequence[int],
    run_id: int,
    selected: tuple[str, ...],
    max_vertices: int | None,
    chunk_size: int,
    retry_errors: bool,
    counts: dict[str, int],
    bar: _Progress,
    commit_seconds: float,
) -> None:
    limit = 2 * executor.workers + 2
    pending: dict[Any, int] = {}
    # Finished chunks wait here until a commit: one transaction (and one fsync) per
    # commit_seconds or per COMMIT_ROWS rows, instead of one per chunk.  Rows not yet committed are simply
    # computed again by a rerun.
    buffer: list[tuple[int, list[ResultItem]]] = []
    buffered = 0
    last_commit = time.monotonic()

    def commit() -> None:
        nonlocal buffered, last_commit
        if buffer:
            db.write_many(run_id, buffer)
            for _, rows in buffer:
                counts["computed"] += len(rows)
                counts["failed"] += sum(1 for row in rows if row[-1] is not None)
            buffer.clear()
            buffered = 0
        last_commit = time.monotonic()

    def collect() -> None:
        nonlocal buffered
        for handle, rows in executor.wait(set(pending)):
            buffer.append((pending.pop(handle), rows))
            buffered += len(rows)
            bar.advance(len(rows))
        if buffered >= COMMIT_ROWS or time.monotonic() - last_commit >= commit_seconds:
            commit()

    def skip(count: int) -> None:
        counts["skipped"] += count
        bar.advance(count)

    try:
        for source, input_id in zip(sources, ids, strict=True):
            settings = KernelSettings(selected, max_vertices, source.format)
            kind = "edges" if source.kind == "family" else source.kind
            # Whole files travel as text: smaller chunks keep the data in flight small.
            size = min(chunk_size, FILES_PER_CHUNK) if kind == "files" else chunk_size
            for chunk in _chunks(source, db, input_id, settings, size, retry_errors, skip):
                while len(pending) >= limit:
                    collect()
                pending[executor.submit(chunk, settings, kind)] = input_id
            while pending:
                collect()
            commit()
            total = db.connection.execute(
                "SELECT MAX(position) + 1 FROM graphs WHERE input_id = ?", (input_id,)
            ).fetchone()[0]
            db.set_total(input_id, int(total or 0))
    finally:
        commit()  # keep what was computed, also when interrupted


class _Progress:
    """A rich progress bar on standard error with rate and ETA, or nothing."""

    def __init__(self, enabled: bool, sources: Sequence[BatchInput]) -> None:
        self.enabled = enabled
        self._progress: Any = None
        self._task: Any = None
        if enabled:
            totals = [s.count() for s in sources]
            self.total = None if any(t is None for t in totals) else sum(t or 0 for t in totals)

    def __enter__(self) -> _Progress:
        if self.enabled:
            from rich.console import Console
            from rich.progress import (
                BarColumn,
                MofNCompleteColumn,
                Progress,
                TextColumn,
                TimeElapsedColumn,
                TimeRemainingColumn,
            )

            self._progress = Progress(
                TextColumn("[bold]batch"),
                BarColumn(),
                MofNCompleteColumn(),
                TextColumn("{task.fields[rate]} graphs/s"),
                TimeElapsedColumn(),
                TextColumn("ETA"),
                TimeRemainingColumn(),
                console=Console(stderr=True),
            )
            self._progress.__enter__()
            self._task = self._progress.add_task("batch", total=self.total, rate="-")
        return self

    def advance(self, count: int) -> None:
        if self._progress is not None:
            self._progress.advance(self._task, count)
            speed = self._progress.tasks[0].speed
            if speed:
                self._progress.update(self._task, rate=f"{speed:,.0f}")

    def __exit__(self, *exc: object) -> None:
        if self._progress is not None:
            if exc[0] is None:
                # The line count behind the total includes blank and comment lines.
                done = self._progress.tasks[0].completed
                self._progress.update(self._task, total=done)
            self._progress.__exit__(None, None, None)
