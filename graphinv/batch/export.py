"""Exporting a batch store: JSON Lines, CSV and Parquet, one record per input graph.

Every export holds, for each stored graph in input order: ``input`` (the input's identity),
``index`` (0-based position in its input stream), ``line`` (1-based line for graph6/sparse6),
``graph`` (the content key: graph6/sparse6 text, file name or family member), the size, the
results and ``error`` (null, or the message of a graph that failed).

=========================  ===============================  =========================
column                     JSON Lines / Parquet             CSV
=========================  ===============================  =========================
``critical_group``         list of decimal strings (> 1)    ``2,10,10``
``spanning_trees``         decimal string                   decimal text
polynomials, Smith forms   list of decimal strings          comma-separated integers
``degrees``                list of integers                 comma-separated integers
=========================  ===============================  =========================

Integers that may exceed 2^53 are always decimal strings, so no reader rounds them.

References
----------
JSON Lines, https://jsonlines.org; RFC 4180 (CSV); Apache Parquet format specification.
"""

from __future__ import annotations

import csv
import os
import sys
from collections.abc import Iterator
from typing import IO, Any

from graphinv.batch.invariants import RESULT_COLUMNS
from graphinv.batch.store import INTEGER_LIST_COLUMNS, BatchStore, decode_value
from graphinv.errors import GraphInvError

__all__ = ["EXPORT_COLUMNS", "EXPORT_FORMATS", "export_records", "export_store"]

EXPORT_FORMATS = ("jsonl", "csv", "parquet")

#: The exported columns, in order.
EXPORT_COLUMNS: tuple[str, ...] = ("input", "index", "line", "graph", *RESULT_COLUMNS, "error")

_STORE_COLUMNS = ("source", "position", "line", "content", *RESULT_COLUMNS, "error")


def export_records(store: str | os.PathLike[str] | BatchStore) -> Iterator[dict[str, Any]]:
    """The JSON-ready export record of every stored graph, streamed in input order.

    Examples
    --------
    >>> import tempfile, os
    >>> from graphinv.batch.engine import run_batch
    >>> path = os.path.join(tempfile.mkdtemp(), "k.db")
    >>> _ = run_batch(["complete:4"], store=path, workers=1, invariants="critical-group")
    >>> record = next(export_records(path))
    >>> record["index"], record["critical_group"], record["spanning_trees"], record["error"]
    (0, ['4', '4'], None, None)

    References
    ----------
    JSON Lines, https://jsonlines.org.
    """
    db = store if isinstance(store, BatchStore) else BatchStore(store, create=False)
    try:
        for row in db.rows(_STORE_COLUMNS):
            record: dict[str, Any] = {
                "input": row["source"],
                "index": row["position"],
                "line": row["line"],
                "graph": row["content"],
            }
            for name in RESULT_COLUMNS:
                record[name] = decode_value(name, row[name])
            record["error"] = row["error"]
            yield record
    finally:
        if db is not store:
            db.close()


def export_store(
    store: str | os.PathLike[str],
    *,
    format: str = "jsonl",
    output: str | os.PathLike[str] | None = None,
    stream: IO[str] | None = None,
) -> int:
    """Write every stored graph of a batch store as JSON Lines, CSV or Parquet.

    Parameters
    ----------
    store : path
        The batch store (read only).
    format : {"jsonl", "csv", "parquet"}
        The output format.  Parquet needs pyarrow (``pip install 'graphinv[parquet]'``).
    output : path, optional
        The file to write; default standard output (not for Parquet).
    stream : text stream, optional
        Write JSON Lines or CSV here instead (used when ``output`` is None).

    Returns
    -------
    int
        How many records were written.

    Raises
    ------
    GraphInvError
        For an unknown format, Parquet without pyarrow or without an output file, or a store
        that cannot be read.

    Examples
    --------
    >>> import tempfile, os, io
    >>> from graphinv.batch.engine import run_batch
    >>> path = os.path.join(tempfile.mkdtemp(), "c.db")
    >>> _ = run_batch(["cycle:5"], store=path, workers=1, invariants="critical-group,spanning-trees")
    >>> out = io.StringIO()
    >>> export_store(path, format="csv", stream=out)
    1
    >>> out.getvalue().splitlines()[1].split(",")[:4]
    ['cycle:5', '0', '', 'cycle:5']

    References
    ----------
    JSON Lines, https://jsonlines.org; RFC 4180 (CSV); Apache Parquet format specification.
    """
    name = format.lower().strip()
    if name not in EXPORT_FORMATS:
        raise GraphInvError(
            f"unknown export format {format!r}; expected one of: {', '.join(EXPORT_FORMATS)}"
        )
    db = BatchStore(store, create=False)
    try:
        if name == "parquet":
            if output is None:
                raise GraphInvError("Parquet is binary: give an output file with -o FILE")
            return _write_parquet(db, os.fspath(output))
        if output is not None:
            with open(output, "w", encoding="utf-8", newline="") as handle:
                return _write_text(db, name, handle)
        return _write_text(db, name, stream if stream is not None else sys.stdout)
    finally:
        db.close()


def _write_text(db: BatchStore, name: str, handle: IO[str]) -> int:
    if name == "jsonl":
        from graphinv.report.jsonl import to_json_line

        count = 0
        for record in export_records(db):
            handle.write(to_json_line(record))
            handle.write("\n")
            count += 1
        return count
    writer = csv.writer(handle, lineterminator="\n")
    writer.writerow(EXPORT_COLUMNS)
    count = 0
    for row in db.rows(_STORE_COLUMNS):
        writer.writerow(["" if row[c] is None else row[c] for c in _STORE_COLUMNS])
        count += 1
    return count


def _write_parquet(db: BatchStore, path: str) -> int:
    try:
        import pyarrow as pa
        import pyarrow.parquet as pq
    except ImportError:
        raise GraphInvError(
            "Parquet export needs pyarrow: pip install 'graphinv[parquet]' (or use jsonl/csv)"
        ) from None
    types: dict[str, Any] = {
        "input": pa.string(),
        "index": pa.int64(),
        "line": pa.int64(),
        "graph": pa.string(),
        "vertices": pa.int64(),
        "edges": pa.int64(),
        "components": pa.int64(),
        "group_rank": pa.int64(),
        "spanning_trees": pa.string(),
        "canonical_key": pa.string(),
        "degrees": pa.list_(pa.int64()),
        "error": pa.string(),
    }
    for column in INTEGER_LIST_COLUMNS:
        types.setdefault(column, pa.list_(pa.string()))
    schema = pa.schema([(column, types[column]) for column in EXPORT_COLUMNS])
    count = 0
    batch: list[dict[str, Any]] = []
    with pq.ParquetWriter(path, schema) as writer:
        for record in export_records(db):
            if isinstance(record["edges"], str):
                raise GraphInvError(
                    f"graph {record['index']} of {record['input']} has {record['edges']} edges, "
                    "beyond Parquet's 64-bit integers; export it as jsonl or csv"
                )
            batch.append(record)
            if len(batch) == 65536:
                writer.write_batch(pa.RecordBatch.from_pylist(batch, schema=schema))
                count += len(batch)
                batch = []
        if batch or count == 0:
            writer.write_batch(pa.RecordBatch.from_pylist(batch, schema=schema))
            count += len(batch)
    return count
