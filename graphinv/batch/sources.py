"""What a batch reads: graph6/sparse6 streams, folders of graph files, and family specs.

Each command-line input becomes one or more :class:`BatchInput` streams.  A stream has a stable
identity (``source``), so that a rerun of the same command finds the rows it stored before, and
yields its graphs as light task items: raw text lines for graph6/sparse6 (parsed later, in the
workers), file paths for a folder, ready ``(n, edges)`` for generated families.

Positions follow :func:`graphinv.io.iter_records`: blank lines, ``#`` comments and the
``>>graph6<<``/``>>sparse6<<`` headers are not graphs, and the ``index``-th remaining line is
the graph at position ``index`` (0-based), reported with its 1-based line number.

References
----------
B. D. McKay, "Description of graph6, sparse6 and digraph6 encodings" (nauty documentation).
"""

from __future__ import annotations

import gzip
import os
import sys
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import IO

from graphinv.batch.invariants import TaskItem, graph_edges
from graphinv.errors import GraphFormatError

__all__ = ["BatchInput", "resolve_inputs"]

_STREAMED = ("graph6", "sparse6")
_HEADERS = (">>graph6<<", ">>sparse6<<")


@dataclass(frozen=True)
class BatchInput:
    """One input stream of a batch.

    Attributes
    ----------
    source : str
        The identity stored in the ``inputs`` table: an absolute path, ``stdin:LABEL``, or the
        family spec.
    kind : {"lines", "files", "family"}
        graph6/sparse6 lines, files holding one graph each, or a generated family.
    format : str or None
        The input format (``graph6``, ``sparse6``, ``edges``, ...) or None to decide per line
        or per file.
    paths : tuple of str
        The files of a ``files`` input, in position order.
    """

    source: str
    kind: str
    format: str | None = None
    paths: tuple[str, ...] = ()

    @property
    def display(self) -> str:
        """A short name for progress and messages."""
        if self.source.startswith("stdin:"):
            return "<stdin>"
        return os.path.basename(self.source) or self.source

    def count(self) -> int | None:
        """How many graphs the input holds, if that is cheap to know (None for stdin)."""
        if self.kind == "files":
            return len(self.paths)
        if self.kind == "family":
            from graphinv.io.families import count_family_graphs

            return int(count_family_graphs(self.source))
        if self.source.startswith("stdin:"):
            return None
        count = 0
        with _open_binary(self.source) as stream:
            while block := stream.read(1 << 20):
                count += block.count(b"\n")
        return count

    def items(self) -> Iterator[TaskItem]:
        """The task items, streamed in position order."""
        if self.kind == "lines":
            yield from self._lines()
        elif self.kind == "files":
            base = Path(self.source)
            for position, path in enumerate(self.paths):
                name = str(Path(path).relative_to(base)) if base.is_dir() else Path(path).name
                yield (position, None, name, _file_payload(path))
        else:
            yield from self._family()

    def _lines(self) -> Iterator[TaskItem]:
        if self.source.startswith("stdin:"):
            stream: IO[str] = sys.stdin
            if hasattr(stream, "reconfigure"):
                stream.reconfigure(errors="replace")
            yield from _data_lines(stream)
            return
        with _open_text(self.source) as stream:
            yield from _data_lines(stream)

    def _family(self) -> Iterator[TaskItem]:
        from graphinv.io import iter_records

        for record in iter_records(self.source):
            if record.graph is None:
                yield (record.index, record.line, record.name, record.error or "unreadable")
            else:
                yield (record.index, record.line, record.name, graph_edges(record.graph))


def _data_lines(stream: IO[str]) -> Iterator[TaskItem]:
    """The graph lines as task items; an incremental sparse6 line (``;``) is expanded here, in
    order, into the full sparse6 line of its graph (workers parse lines independently), or
    carries the reason it cannot be (then the worker reports it as that line's error)."""
    position = 0
    before: str | None = None  # the previous graph line (full form), parsed only when needed
    graph: tuple[int, list[tuple[int, int]]] | None = None  # its graph, once parsed
    for number, raw in enumerate(stream, start=1):
        text = raw.strip()
        if text[:2] == ">>":
            for header in _HEADERS:
                if text.startswith(header):
                    text = text[len(header) :]
        if not text or text[0] == "#":
            continue
        payload = None
        if text[0] == ";":
            text, graph, payload = _expanded(text, before, graph)
        else:
            graph = None
        before = text if payload is None else None
        yield (position, number, text, payload)
        position += 1


def _expanded(
    text: str, before: str | None, graph: tuple[int, list[tuple[int, int]]] | None
) -> tuple[str, tuple[int, list[tuple[int, int]]] | None, str | None]:
    """``(full sparse6 line, its graph, None)`` for an incremental line, or ``(text, None,
    reason)`` when the graph before it is missing or unreadable."""
    from graphinv.errors import GraphFormatError
    from graphinv.io.graph6 import encode_sparse6, parse_graph6, parse_sparse6

    try:
        if graph is None and before is not None:
            graph = parse_sparse6(before) if before[0] == ":" else parse_graph6(before)
        n, edges = parse_sparse6(text, previous=graph)
    except GraphFormatError as exc:
        return text, None, exc.message
    return encode_sparse6(n, edges), (n, edges), None


def _file_payload(path: str) -> tuple[str | None, str, str] | str:
    """What a worker needs to read one graph file: its suffix format, name and text."""
    from graphinv.io.readers import infer_format

    try:
        with _open_binary(path) as stream:
            data = stream.read()
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        return f"{path}: not UTF-8 text ({exc.reason} at byte {exc.start})"
    except OSError as exc:
        return f"{path}: cannot read ({exc.strerror or exc})"
    return (infer_format(path), path, text)


def _open_binary(path: str) -> IO[bytes]:
    if path.lower().endswith(".gz"):
        return gzip.open(path, "rb")  # type: ignore[return-value]
    return open(path, "rb")


def _open_text(path: str) -> IO[str]:
    # A corrupted byte must cost one graph (an error row), not the whole stream.
    if path.lower().endswith(".gz"):
        return gzip.open(path, "rt", encoding="utf-8", errors="replace")
    return open(path, encoding="utf-8", errors="replace")


def _streamed_format(path: Path, format: str | None) -> str | None:
    """The format of a file if it is a graph6/sparse6 stream, else None."""
    from graphinv.io.readers import infer_format, sniff_format

    chosen = format or infer_format(path)
    if chosen is None:
        with _open_text(str(path)) as stream:
            for line in stream:
                if line.strip() and not line.lstrip().startswith("#"):
                    chosen = sniff_format(line)
                    break
    return chosen if chosen in _STREAMED else None


def resolve_inputs(
    inputs: Sequence[str], *, format: str | None = None, label: str | None = None
) -> list[BatchInput]:
    """Turn command-line inputs into batch input streams.

    Parameters
    ----------
    inputs : sequence of str
        Files, folders, ``"-"`` for standard input, or family specs (``gnp:30,0.5,seed=1..9``).
    format : str, optional
        The format of files and standard input when suffixes do not tell.
    label : str, optional
        The name under which standard input is stored (default ``default``); give each
        different stream piped into the same store its own label.

    Returns
    -------
    list of BatchInput
        A folder gives one ``files`` input for its single-graph files (sorted by name, hidden
        files skipped) plus one ``lines`` input per graph6/sparse6 file in it.

    Raises
    ------
    GraphFormatError
        For a path that does not exist and is not a family spec, or an empty folder.

    Examples
    --------
    >>> [(i.source, i.kind) for i in resolve_inputs(["cycle:3..5", "-"])]
    [('cycle:3..5', 'family'), ('stdin:default', 'lines')]

    References
    ----------
    B. D. McKay, formats.txt (graph6 and sparse6 streams).
    """
    from graphinv.io.families import is_family_spec

    resolved: list[BatchInput] = []
    for raw in inputs:
        if raw == "-":
            resolved.append(BatchInput(f"stdin:{label or 'default'}", "lines", format))
            continue
        path = Path(raw)
        if path.is_dir():
            resolved.extend(_folder(path, format))
        elif path.is_file():
            streamed = _streamed_format(path, format)
            absolute = str(path.resolve())
            if streamed is not None:
                resolved.append(BatchInput(absolute, "lines", format and streamed))
            else:
                resolved.append(BatchInput(absolute, "files", format, (absolute,)))
        elif is_family_spec(raw):
            resolved.append(BatchInput(raw.strip(), "family"))
        else:
            raise GraphFormatError(
                "no such file or folder; expected a graph file, a folder, '-' for standard "
                "input, or a family spec such as gnp:30,0.5,seed=1..100",
                source=raw,
            )
    return resolved


def _folder(path: Path, format: str | None) -> list[BatchInput]:
    files = sorted(
        entry for entry in path.iterdir() if entry.is_file() and not entry.name.startswith(".")
    )
    if not files:
        raise GraphFormatError("the folder holds no graph files", source=str(path))
    single: list[str] = []
    streams: list[BatchInput] = []
    for entry in files:
        streamed = _streamed_format(entry, format)
        if streamed is not None:
            streams.append(BatchInput(str(entry.resolve()), "lines", format and streamed))
        else:
            single.append(str(entry.resolve()))
    result = [BatchInput(str(path.resolve()), "files", format, tuple(single))] if single else []
    return result + streams
