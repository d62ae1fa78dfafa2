"""The embedded results store of a batch: one SQLite file, safe to interrupt at any moment.

Layout (schema version :data:`SCHEMA_VERSION`):

``meta``
    key/value pairs: ``schema_version``, ``created``, ``graphinv_version``.
``inputs``
    one row per input stream: ``input_id``, ``source`` (its identity: an absolute path, a
    family spec, or ``stdin:LABEL``), ``kind`` (``lines``, ``files`` or ``family``), ``format``,
    ``total`` (the number of graphs, once the stream has been read to its end).
``runs``
    one row per invocation: the command line, the inputs, the invariants, the engine, the
    worker count, start and end times, the status (``running``, ``finished``, ``interrupted``,
    ``failed``) and how many graphs it computed.
``graphs``
    one row per input graph, keyed by ``(input_id, position)`` (position = 0-based index in its
    input stream), with the 1-based ``line``, the ``content`` key (the graph6/sparse6 text, the
    file name, or the family member's name), the results (see
    :mod:`graphinv.batch.invariants`; big integers as decimal text), ``error`` and the
    ``run_id`` that wrote it.

Why it survives interruption: results are written only by the coordinating process, in
transactions of whole chunks, with SQLite's write-ahead log and ``synchronous=FULL`` (a committed
chunk is on disk; a chunk in flight is simply absent).  A rerun asks, chunk by chunk, which
positions are already finished and computes only the rest; the primary key makes every write an
upsert, so nothing is ever stored twice.  If the text at a stored position differs from the
input being read, the input has changed and the run stops rather than mix two streams.

References
----------
SQLite documentation, "Write-Ahead Logging" and "PRAGMA synchronous" (sqlite.org).
"""

from __future__ import annotations

import datetime as _dt
import json
import os
import sqlite3
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from graphinv.batch.invariants import INVARIANTS, RESULT_COLUMNS, ResultItem
from graphinv.errors import StoreError

__all__ = [
    "INTEGER_LIST_COLUMNS",
    "SCHEMA_VERSION",
    "BatchStore",
    "StoredInput",
    "decode_value",
]

SCHEMA_VERSION = 1

#: Result columns holding comma-separated integers (returned as lists of decimal strings).
INTEGER_LIST_COLUMNS = tuple(
    name for name in INVARIANTS if name not in ("spanning_trees", "canonical_key")
)

_SCHEMA = """
CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS inputs (
    input_id INTEGER PRIMARY KEY,
    source TEXT NOT NULL UNIQUE,
    kind TEXT NOT NULL,
    format TEXT,
    total INTEGER
);
CREATE TABLE IF NOT EXISTS runs (
    run_id INTEGER PRIMARY KEY,
    started TEXT NOT NULL,
    finished TEXT,
    status TEXT NOT NULL,
    command TEXT NOT NULL,
    inputs TEXT NOT NULL,
    invariants TEXT NOT NULL,
    engine TEXT NOT NULL,
    workers INTEGER,
    computed INTEGER NOT NULL DEFAULT 0,
    failed INTEGER NOT NULL DEFAULT 0,
    skipped INTEGER NOT NULL DEFAULT 0
);
CREATE TABLE IF NOT EXISTS graphs (
    input_id INTEGER NOT NULL REFERENCES inputs(input_id),
    position INTEGER NOT NULL,
    line INTEGER,
    content TEXT NOT NULL,
    vertices INTEGER,
    edges,  -- no affinity: an integer, or decimal text beyond 64 bits
    components INTEGER,
    critical_group TEXT,
    group_rank INTEGER,
    spanning_trees TEXT,
    laplacian_polynomial TEXT,
    signless_polynomial TEXT,
    adjacency_polynomial TEXT,
    adjacency_smith TEXT,
    signless_smith TEXT,
    degrees TEXT,
    canonical_key TEXT,
    error TEXT,
    run_id INTEGER REFERENCES runs(run_id),
    PRIMARY KEY (input_id, position)
) WITHOUT ROWID;
"""

_ROW_COLUMNS = ("position", "line", "content", *RESULT_COLUMNS, "error")
_UPSERT = (
    "INSERT INTO graphs (input_id, run_id, "
    + ", ".join(_ROW_COLUMNS)
    + ") VALUES (?, ?, "
    + ", ".join("?" for _ in _ROW_COLUMNS)
    + ") ON CONFLICT (input_id, position) DO UPDATE SET line = excluded.line, "
    "content = excluded.content, run_id = excluded.run_id, error = excluded.error, "
    + ", ".join(
        f"{c} = CASE WHEN excluded.error IS NULL THEN COALESCE(excluded.{c}, graphs.{c}) END"
        for c in RESULT_COLUMNS
    )
)


def _now() -> str:
    return _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds")


def decode_value(column: str, value: Any) -> Any:
    """A stored value in its JSON-ready form: integer lists become lists of decimal strings.

    Examples
    --------
    >>> decode_value("critical_group", "2,10,10"), decode_value("critical_group", "")
    (['2', '10', '10'], [])
    >>> decode_value("degrees", "3,3,2"), decode_value("spanning_trees", "16")
    ([3, 3, 2], '16')

    References
    ----------
    JSON Lines, https://jsonlines.org (integers beyond 2^53 as decimal strings).
    """
    if value is None:
        return None
    if column == "degrees":
        return [int(x) for x in value.split(",")] if value else []
    if column in INTEGER_LIST_COLUMNS:
        return value.split(",") if value else []
    return value


@dataclass(frozen=True)
class StoredInput:
    """One input stream recorded in a store."""

    input_id: int
    source: str
    kind: str
    format: str | None
    total: int | None

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict of the fields."""
        return {
            "input_id": self.input_id,
            "source": self.source,
            "kind": self.kind,
            "format": self.format,
            "total": self.total,
        }


class BatchStore:
    """A batch results store in one SQLite file.

    Parameters
    ----------
    path : str or os.PathLike
        The database file; created (with its schema) unless ``create`` is false.
    create : bool
        Whether a missing file may be created.

    Raises
    ------
    StoreError
        If the file is not a graphinv store, has a newer schema, or cannot be opened.

    Examples
    --------
    >>> import tempfile, os
    >>> path = os.path.join(tempfile.mkdtemp(), "demo.db")
    >>> with BatchStore(path) as store:
    ...     source = store.input_id("stdin:demo", kind="lines", format="graph6")
    ...     run = store.start_run(command="graphinv batch -", inputs=["-"],
    ...                           invariants=("spanning_trees",), engine="local", workers=1)
    ...     store.write(source, run, [(0, 1, "Bw", 3, 3, None, None, None, "3",
    ...                               None, None, None, None, None, None, None, None)])
    ...     store.count()
    1

    References
    ----------
    SQLite documentation, "Write-Ahead Logging" (sqlite.org).
    """

    def __init__(self, path: str | os.PathLike[str], *, create: bool = True) -> None:
        self.path = os.fspath(path)
        if not create and not Path(self.path).is_file():
            raise StoreError(f"{self.path}: no such store")
        try:
            self.connection = sqlite3.connect(self.path, timeout=60, isolation_level=None)
            self.connection.execute("PRAGMA journal_mode=WAL")
            self.connection.execute("PRAGMA synchronous=FULL")
            self._prepare(create)
        except sqlite3.DatabaseError as exc:
            raise StoreError(f"{self.path}: cannot open as a graphinv store ({exc})") from None

    def _prepare(self, create: bool) -> None:
        tables = {
            row[0]
            for row in self.connection.execute("SELECT name FROM sqlite_master WHERE type='table'")
        }
        if "meta" not in tables:
            if tables:
                raise StoreError(f"{self.path}: an SQLite file, but not a graphinv batch store")
            if not create:
                raise StoreError(f"{self.path}: empty file, not a graphinv batch store")
            from graphinv import __version__

            with self.transaction():
                for statement in _SCHEMA.split(";"):
                    if statement.strip():
                        self.connection.execute(statement)
                self.connection.executemany(
                    "INSERT INTO meta (key, value) VALUES (?, ?)",
                    [
                        ("schema_version", str(SCHEMA_VERSION)),
                        ("created", _now()),
                        ("graphinv_version", __version__),
                    ],
                )
            return
        row = self.connection.execute(
            "SELECT value FROM meta WHERE key = 'schema_version'"
        ).fetchone()
        version = int(row[0]) if row else 0
        if version != SCHEMA_VERSION:
            raise StoreError(
                f"{self.path}: store schema version {version}; this graphinv reads version "
                f"{SCHEMA_VERSION}"
            )

    # -- context management ------------------------------------------------------------------

    def __enter__(self) -> BatchStore:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def close(self) -> None:
        """Close the connection (committed data is already on disk)."""
        self.connection.close()

    def transaction(self) -> sqlite3.Connection:
        """A ``with`` block that commits on success and rolls back on error."""
        return _Transaction(self.connection)  # type: ignore[return-value]

    # -- writing -----------------------------------------------------------------------------

    def input_id(self, source: str, *, kind: str, format: str | None) -> int:
        """The id of the input ``source``, recording it on first use.

        Raises
        ------
        StoreError
            If the source was stored before as a different kind of input.
        """
        row = self.connection.execute(
            "SELECT input_id, kind FROM inputs WHERE source = ?", (source,)
        ).fetchone()
        if row is not None:
            if row[1] != kind:
                raise StoreError(
                    f"{self.path}: input {source!r} was stored as {row[1]}, not {kind}"
                )
            return int(row[0])
        with self.transaction():
            cursor = self.connection.execute(
                "INSERT INTO inputs (source, kind, format) VALUES (?, ?, ?)",
                (source, kind, format),
            )
        return int(cursor.lastrowid or 0)

    def set_total(self, input_id: int, total: int) -> None:
        """Record that the input holds ``total`` graphs (known once it was read to the end)."""
        with self.transaction():
            self.connection.execute(
                "UPDATE inputs SET total = ? WHERE input_id = ?", (total, input_id)
            )

    def start_run(
        self,
        *,
        command: str,
        inputs: Sequence[str],
        invariants: Sequence[str],
        engine: str,
        workers: int | None,
    ) -> int:
        """Record the start of a run; return its id."""
        with self.transaction():
            cursor = self.connection.execute(
                "INSERT INTO runs (started, status, command, inputs, invariants, engine, workers)"
                " VALUES (?, 'running', ?, ?, ?, ?, ?)",
                (
                    _now(),
                    command,
                    json.dumps(list(inputs)),
                    ",".join(invariants),
                    engine,
                    workers,
                ),
            )
        return int(cursor.lastrowid or 0)

    def finish_run(
        self, run_id: int, *, status: str, computed: int, failed: int, skipped: int
    ) -> None:
        """Record how a run ended."""
        with self.transaction():
            self.connection.execute(
                "UPDATE runs SET finished = ?, status = ?, computed = ?, failed = ?, skipped = ?"
                " WHERE run_id = ?",
                (_now(), status, computed, failed, skipped, run_id),
            )

    def write(self, input_id: int, run_id: int, rows: Sequence[ResultItem]) -> None:
        """Store result rows of one input in one transaction (an upsert per row)."""
        self.write_many(run_id, [(input_id, rows)])

    def write_many(self, run_id: int, batches: Sequence[tuple[int, Sequence[ResultItem]]]) -> None:
        """Store several ``(input_id, rows)`` batches in one transaction."""
        with self.transaction():
            for input_id, rows in batches:
                self.connection.executemany(_UPSERT, [(input_id, run_id, *row) for row in rows])

    # -- reading -----------------------------------------------------------------------------

    def finished(
        self,
        input_id: int,
        first: int,
        last: int,
        invariants: Sequence[str],
        *,
        retry_errors: bool = False,
    ) -> dict[int, tuple[str, bool]]:
        """Stored positions ``first..last`` of an input: ``{position: (content, finished)}``.

        A row is finished when it has every wanted invariant, or an error (unless
        ``retry_errors``).
        """
        wanted = [name for name in INVARIANTS if name in invariants]
        complete = " AND ".join(f"{name} IS NOT NULL" for name in wanted) or "1"
        error_done = "0" if retry_errors else "error IS NOT NULL"
        query = (
            f"SELECT position, content, ({error_done}) OR (error IS NULL AND {complete}) "
            "FROM graphs WHERE input_id = ? AND position BETWEEN ? AND ?"
        )
        return {
            int(position): (content, bool(done))
            for position, content, done in self.connection.execute(query, (input_id, first, last))
        }

    def inputs(self) -> list[StoredInput]:
        """Every input recorded in the store, in order of first use."""
        return [
            StoredInput(*row)
            for row in self.connection.execute(
                "SELECT input_id, source, kind, format, total FROM inputs ORDER BY input_id"
            )
        ]

    def runs(self) -> list[dict[str, Any]]:
        """Every run recorded in the store, oldest first, as dicts."""
        cursor = self.connection.execute("SELECT * FROM runs ORDER BY run_id")
        names = [d[0] for d in cursor.description]
        return [dict(zip(names, row, strict=True)) for row in cursor]

    def count(self, *, errors: bool | None = None) -> int:
        """How many graph rows the store holds (only failed ones, or only good ones)."""
        where = (
            ""
            if errors is None
            else (" WHERE error IS NOT NULL" if errors else " WHERE error IS NULL")
        )
        return int(self.connection.execute(f"SELECT COUNT(*) FROM graphs{where}").fetchone()[0])

    def rows(self, columns: Sequence[str] | None = None) -> Iterator[dict[str, Any]]:
        """Every graph row in input order (``input_id``, then position) as a dict of columns.

        The rows are streamed from the database, so memory stays flat for any store size.
        ``source`` (the input's identity) is included.
        """
        names = list(columns) if columns is not None else ["source", *_ROW_COLUMNS]
        selected = ", ".join("inputs.source" if n == "source" else f"graphs.{n}" for n in names)
        cursor = self.connection.execute(
            f"SELECT {selected} FROM graphs JOIN inputs USING (input_id) "
            "ORDER BY graphs.input_id, graphs.position"
        )
        while True:
            batch = cursor.fetchmany(4096)
            if not batch:
                return
            for row in batch:
                yield dict(zip(names, row, strict=True))


class _Transaction:
    """``BEGIN IMMEDIATE`` ... ``COMMIT`` (or ``ROLLBACK`` on error) on an autocommit connection."""

    def __init__(self, connection: sqlite3.Connection) -> None:
        self.connection = connection

    def __enter__(self) -> sqlite3.Connection:
        self.connection.execute("BEGIN IMMEDIATE")
        return self.connection

    def __exit__(self, kind: type[BaseException] | None, *rest: object) -> None:
        if kind is None:
            self.connection.execute("COMMIT")
        else:
            self.connection.execute("ROLLBACK")
