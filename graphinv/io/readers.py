"""Reading graphs from files, standard input and family specs, lazily.

A *source* is a path, ``"-"`` for standard input, an open text stream, or a family spec such as
``grid:4x4`` (see :mod:`graphinv.io.families`) when no file of that name exists.  The format
comes from the file suffix, from ``format=``, or, for standard input and unknown suffixes, from
a look at the first line:

==========  ===========================================  ==============================
format      suffixes                                      graphs per file
==========  ===========================================  ==============================
edges       ``.txt .edges .edgelist .csv .tsv``           one (:mod:`~graphinv.io.edgelist`)
graph6      ``.g6``                                       one per line, streamed
sparse6     ``.s6``                                       one per line, streamed
graphml     ``.graphml``                                  one (read through networkx)
gml         ``.gml``                                      one (read through networkx)
matrix      ``.mat .adj``                                 one (:mod:`~graphinv.io.adjacency`)
==========  ===========================================  ==============================

A further ``.gz`` suffix is read through gzip.  Every graph is a networkx ``Graph`` whose
integer edge attribute ``weight`` is the multiplicity; ``G.graph`` holds ``name`` (the file
stem, ``stem#i`` for the i-th graph of a file holding several, or the family spec),
``source`` (the file name, ``<stdin>`` or the spec) and, for graph6/sparse6, ``line``.

References
----------
B. D. McKay, formats.txt (graph6 and sparse6).  U. Brandes et al., "GraphML progress report",
Graph Drawing 2001.  M. Himsolt, "GML: A portable graph file format", Universität Passau, 1997.
"""

from __future__ import annotations

import gzip
import itertools
import os
import re
import sys
import warnings
from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import IO, Any

import networkx as nx

from graphinv._graphs import as_multiplicity
from graphinv.errors import GraphFormatError, InvalidWeightError
from graphinv.io.adjacency import parse_adjacency_matrix
from graphinv.io.edgelist import parse_edgelist, parse_label
from graphinv.io.families import (
    count_family_graphs,
    family_graphs,
    family_names,
    is_family_spec,
)
from graphinv.io.graph6 import (
    GRAPH6_HEADER,
    SPARSE6_HEADER,
    graph6_length,
    graph_from_edges,
    parse_graph6,
    parse_sparse6,
)

__all__ = [
    "FORMATS",
    "GraphRecord",
    "GraphSourceLike",
    "infer_format",
    "iter_records",
    "read_graph",
    "read_graphs",
    "sniff_format",
]

FORMATS = ("edges", "graph6", "sparse6", "graphml", "gml", "matrix")

_SUFFIXES = {
    ".txt": "edges",
    ".edges": "edges",
    ".edgelist": "edges",
    ".csv": "edges",
    ".tsv": "edges",
    ".g6": "graph6",
    ".s6": "sparse6",
    ".graphml": "graphml",
    ".gml": "gml",
    ".mat": "matrix",
    ".adj": "matrix",
}
_STREAMED = ("graph6", "sparse6")

GraphSourceLike = str | os.PathLike[str] | IO[str]


@dataclass(frozen=True)
class GraphRecord:
    """One item of a graph stream: a graph, or the reason it could not be read.

    Attributes
    ----------
    index : int
        0-based position in the stream.
    line : int or None
        1-based line in the file (graph6/sparse6 lines; for other formats the line of the
        error, if any).
    name : str
        ``stem``, ``stem#index`` or the family spec.
    graph : networkx.Graph or None
        The graph, or None when it could not be read.
    error : str or None
        The full error message (naming file, line and problem), or None.
    """

    index: int
    line: int | None
    name: str
    graph: nx.Graph | None
    error: str | None

    @property
    def ok(self) -> bool:
        """Whether the graph was read."""
        return self.error is None

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready summary (no graph): index, line, name, size and error.

        Examples
        --------
        >>> next(iter_records("cycle:4")).to_record()
        {'index': 0, 'line': None, 'name': 'cycle:4', 'vertices': 4, 'edges': 4, 'error': None}
        """
        G = self.graph
        return {
            "index": self.index,
            "line": self.line,
            "name": self.name,
            "vertices": None if G is None else G.number_of_nodes(),
            "edges": None if G is None else G.number_of_edges(),
            "error": self.error,
        }


@dataclass
class _Item:
    index: int
    line: int | None
    name: str
    graph: nx.Graph | None
    error: GraphFormatError | None


def infer_format(path: str | os.PathLike[str]) -> str | None:
    """The format a file suffix stands for (a final ``.gz`` is looked through), or None.

    Examples
    --------
    >>> infer_format("campus.edges"), infer_format("small.g6.gz"), infer_format("notes.doc")
    ('edges', 'graph6', None)
    """
    suffixes = [s.lower() for s in Path(path).suffixes]
    if suffixes and suffixes[-1] == ".gz":
        suffixes.pop()
    return _SUFFIXES.get(suffixes[-1]) if suffixes else None


def _check_format(format: str | None) -> str | None:
    if format is None:
        return None
    name = format.lower().strip()
    aliases = {
        "edgelist": "edges",
        "edge": "edges",
        "g6": "graph6",
        "s6": "sparse6",
        "adj": "matrix",
    }
    name = aliases.get(name, name)
    if name not in FORMATS:
        raise GraphFormatError(f"unknown format {format!r}; expected one of {', '.join(FORMATS)}")
    return name


def _stem(path: Path) -> str:
    name = path.name
    if name.lower().endswith(".gz"):
        name = name[:-3]
    return Path(name).stem or name


def _first_undecodable_line(path: Path) -> tuple[int, str] | None:
    """Line number and offending bytes of the first line of ``path`` that is not UTF-8."""
    opener = gzip.open if path.suffix.lower() == ".gz" else open
    with opener(path, "rb") as raw:
        for number, line in enumerate(raw, start=1):
            try:
                line.decode("utf-8")
            except UnicodeDecodeError as exc:
                return number, repr(line[exc.start : exc.end])
    return None


def _checked_lines(stream: Iterable[str], label: str, path: Path | None = None) -> Iterator[str]:
    """Lines of a text stream; undecodable bytes become a GraphFormatError naming the line."""
    iterator = iter(stream)
    number = 0
    while True:
        try:
            line = next(iterator)
        except StopIteration:
            return
        except UnicodeDecodeError:
            # Text files decode in blocks, so find the line in the raw bytes.
            found = _first_undecodable_line(path) if path is not None else None
            where, what = found if found is not None else (number + 1, "")
            raise GraphFormatError(
                f"the bytes {what} are not UTF-8 text; expected a UTF-8 (or ASCII) text file"
                if what
                else "not UTF-8 text; expected a UTF-8 (or ASCII) text file",
                source=label,
                line=where,
            ) from None
        except (EOFError, OSError) as exc:
            raise GraphFormatError(
                f"cannot read the file after line {number} ({exc})", source=label, line=number + 1
            ) from None
        number += 1
        yield line


def _looks_graph6(token: str) -> bool:
    return all(63 <= ord(c) <= 126 for c in token) and graph6_length(token) == len(token)


def sniff_format(first_line: str) -> str:
    """Guess the format from the first non-blank, non-comment line.

    Examples
    --------
    >>> sniff_format(">>graph6<<Bw"), sniff_format(":Bd"), sniff_format("Bw"), sniff_format("a b")
    ('graph6', 'sparse6', 'graph6', 'edges')
    """
    text = first_line.strip()
    if text.startswith(GRAPH6_HEADER):
        return "graph6"
    if text.startswith(SPARSE6_HEADER) or text.startswith(":"):
        return "sparse6"
    if text.startswith("<?xml") or text.startswith("<graphml"):
        return "graphml"
    if re.match(r"(graph\s*\[|Creator\b|Version\b)", text):
        return "gml"
    if len(text.split()) == 1 and _looks_graph6(text):
        return "graph6"
    return "edges"


def _sniff(lines: Iterator[str]) -> tuple[str, Iterator[str]]:
    seen: list[str] = []
    for line in lines:
        seen.append(line)
        text = line.strip()
        if text and not text.startswith("#"):
            return sniff_format(text), itertools.chain(seen, lines)
    return "edges", iter(seen)


def _opened(source: GraphSourceLike, format: str | None) -> tuple[IO[str], str, str, str | None]:
    """Open a path or ``-``: (stream, label for messages, stem for names, format from suffix)."""
    if not isinstance(source, (str, os.PathLike)):
        label = str(getattr(source, "name", "<stream>"))
        return source, label, Path(label).stem if label[:1] != "<" else "stream", None
    text = os.fspath(source)
    if text == "-":
        return sys.stdin, "<stdin>", "stdin", None
    path = Path(text)
    if path.is_dir():
        raise GraphFormatError("is a directory; expected a graph file", source=text)
    if not path.exists():
        raise GraphFormatError(
            "no such file; expected a graph file, '-' for standard input, "
            "or a family spec such as grid:4x4",
            source=text,
        )
    if path.suffix.lower() == ".gz":
        stream: IO[str] = gzip.open(path, "rt", encoding="utf-8-sig")  # noqa: SIM115 - closed by _items
    else:
        stream = open(path, encoding="utf-8-sig")  # noqa: SIM115 - closed by _items
    return stream, text, _stem(path), infer_format(path)


def _is_family_source(source: GraphSourceLike) -> bool:
    """A string that is no file and reads as ``name:params``.

    A missing ``data/run:3.txt`` is a missing file, not an unknown family: a name that is no
    family and text that looks like a path are left to the file checks.
    """
    if not isinstance(source, str) or source == "-" or not is_family_spec(source):
        return False
    if Path(source).exists():
        return False
    name = source.strip().split(":", 1)[0].lower()
    return name in family_names() or not ("/" in source or infer_format(source) is not None)


def _items(
    source: GraphSourceLike, format: str | None, directed: bool = False
) -> Iterator[_Item]:
    """Check the source now (format, file, family name), then read it lazily."""
    fmt = _check_format(format)
    if _is_family_source(source):
        assert isinstance(source, str)
        count_family_graphs(source)  # an unknown family or malformed spec fails here
        return _family_items(source)
    if isinstance(source, (str, os.PathLike)) and os.fspath(source) != "-":
        _opened(source, fmt)[0].close()  # a missing file or a directory fails here
    return _file_items(source, fmt, directed)


def _family_items(spec: str) -> Iterator[_Item]:
    for index, G in enumerate(family_graphs(spec)):
        yield _Item(index, None, G.graph["name"], G, None)


def _file_items(
    source: GraphSourceLike, fmt: str | None, directed: bool = False
) -> Iterator[_Item]:
    stream, label, stem, suffix_format = _opened(source, fmt)
    owned = stream is not sys.stdin and isinstance(source, (str, os.PathLike))
    path = Path(label) if owned else None
    try:
        lines = _checked_lines(stream, label, path)
        chosen = fmt or suffix_format
        if chosen is None:
            chosen, lines = _sniff(lines)
        if chosen in _STREAMED:
            yield from _coded_items(lines, label, stem)
        else:
            yield _single_item(chosen, lines, label, stem, directed)
    finally:
        if owned:
            stream.close()


def _data_lines(lines: Iterable[str]) -> Iterator[tuple[int, str]]:
    """Non-blank, non-comment lines of a graph6/sparse6 file, headers removed."""
    for number, line in enumerate(lines, start=1):
        text = line.strip()
        for header in (GRAPH6_HEADER, SPARSE6_HEADER):
            if text.startswith(header):
                text = text[len(header) :]
        if text and not text.startswith("#"):
            yield number, text


def _coded_items(lines: Iterable[str], label: str, stem: str) -> Iterator[_Item]:
    entries = _data_lines(lines)
    first = next(entries, None)
    if first is None:
        raise GraphFormatError("no graph found (no graph6 or sparse6 lines)", source=label)
    second = next(entries, None)
    single = second is None
    head = [first] if second is None else [first, second]
    # The graph of the line before, for incremental sparse6 lines (';'), which list only the
    # edges toggled from it; None after a line that could not be read.
    previous: tuple[int, list[tuple[int, int]]] | None = None
    for index, (number, text) in enumerate(itertools.chain(head, entries)):
        name = stem if single else f"{stem}#{index}"
        try:
            coded_sparse = text[0] in ":;"
            if coded_sparse:
                n, edges = parse_sparse6(text, previous=previous)
            else:
                n, edges = parse_graph6(text)
            previous = (n, edges)
        except GraphFormatError as exc:
            previous = None
            error = GraphFormatError(exc.message, source=label, line=number, graph_index=index)
            yield _Item(index, number, name, None, error)
            continue
        G, loops = graph_from_edges(n, edges, simple=not coded_sparse)
        if loops:
            warnings.warn(
                f"{label}, line {number}: {loops} loop(s) dropped "
                "(loops do not change the Laplacian)",
                stacklevel=3,
            )
        G.graph.update(name=name, source=label, line=number)
        yield _Item(index, number, name, G, None)


def _single_item(
    fmt: str, lines: Iterator[str], label: str, stem: str, directed: bool = False
) -> _Item:
    try:
        if fmt == "edges":
            G = parse_edgelist(lines, source=label)
        elif fmt == "matrix":
            G = parse_adjacency_matrix(lines, source=label)
        else:
            G = _parse_with_networkx(fmt, "".join(lines), label, directed)
    except GraphFormatError as exc:
        return _Item(0, exc.line, stem, None, exc)
    G.graph["name"] = stem
    G.graph["source"] = label
    return _Item(0, None, stem, G, None)


def _parse_with_networkx(fmt: str, text: str, label: str, directed: bool = False) -> nx.Graph:
    if not text.strip():
        raise GraphFormatError("no graph found (the file is empty)", source=label)
    try:
        if fmt == "graphml":
            H = nx.parse_graphml(text)
        else:
            try:
                H = nx.parse_gml(text, label="label")
            except nx.NetworkXError:
                H = nx.parse_gml(text, label="id")
    except Exception as exc:  # the XML and GML parsers raise many kinds of error
        position = getattr(exc, "position", None)
        line = position[0] if isinstance(position, tuple) else None
        raise GraphFormatError(
            f"cannot read {fmt.upper() if fmt == 'gml' else 'GraphML'}: {exc}",
            source=label,
            line=line,
        ) from None
    return _from_networkx(H, label, directed)


def _from_networkx(H: nx.Graph, label: str, directed: bool = False) -> nx.Graph:
    """A ``Graph`` with integer multiplicities from any networkx graph read from ``label``; a
    ``DiGraph`` when ``directed`` is asked for and the file declares its edges directed."""
    keep = directed and H.is_directed()
    if H.is_directed() and not keep:
        warnings.warn(
            f"{label}: directed graph read as undirected (edge directions ignored)", stacklevel=4
        )
    G = nx.DiGraph() if keep else nx.Graph()
    rename = {v: parse_label(v) if isinstance(v, str) else v for v in H}
    G.add_nodes_from(rename.values())
    loops = 0
    seen_directed: set[tuple[Any, Any]] = set()
    for u, v, data in H.edges(data=True):
        a, b = rename[u], rename[v]
        if a == b:
            loops += 1
            continue
        try:
            m = as_multiplicity(data.get("weight", 1), edge=(a, b))
        except InvalidWeightError as exc:
            raise GraphFormatError(str(exc), source=label) from None
        if H.is_directed() and not H.is_multigraph() and not keep:
            # An antiparallel pair u->v, v->u is one undirected edge, not two.
            if (b, a) in seen_directed:
                continue
            seen_directed.add((a, b))
        if G.has_edge(a, b):
            G[a][b]["weight"] += m
        else:
            G.add_edge(a, b, weight=m)
    if loops:
        warnings.warn(
            f"{label}: {loops} loop(s) dropped (loops do not change the Laplacian)", stacklevel=4
        )
    if G.number_of_nodes() == 0:
        raise GraphFormatError("no graph found (no vertices)", source=label)
    return G


def read_graphs(
    source: GraphSourceLike, *, format: str | None = None, directed: bool = False
) -> Iterator[nx.Graph]:
    """Read every graph of a source, lazily.

    Parameters
    ----------
    source : str, path or text stream
        A file, ``"-"`` for standard input, or a family spec such as ``"cycle:3..6"``.
    format : str, optional
        One of ``edges``, ``graph6``, ``sparse6``, ``graphml``, ``gml``, ``matrix``; by default
        from the suffix, or guessed from the first line.
    directed : bool
        Keep the directions of a GraphML or GML file that declares its edges directed (a
        ``DiGraph`` with ``weight`` multiplicities, for the sandpile group with a sink).  By
        default, and for the other formats, graphs are undirected.

    Yields
    ------
    networkx.Graph
        With ``weight`` multiplicities and ``G.graph["name"]``, ``["source"]`` (and ``["line"]``
        for graph6/sparse6).

    Raises
    ------
    GraphFormatError
        On the first graph that cannot be read (naming file, line and graph index), for a
        missing file, an unknown format, an empty file or a bad family spec.

    Examples
    --------
    >>> import io
    >>> [G.graph["name"] for G in read_graphs(io.StringIO("Bw\\nCF\\n"), format="graph6")]
    ['stream#0', 'stream#1']
    >>> [G.number_of_nodes() for G in read_graphs("wheel:3..5")]
    [4, 5, 6]

    References
    ----------
    B. D. McKay, formats.txt (graph6 and sparse6).
    """
    return _graphs(_items(source, format, directed))


def _graphs(items: Iterator[_Item]) -> Iterator[nx.Graph]:
    for item in items:
        if item.error is not None:
            raise item.error
        assert item.graph is not None
        yield item.graph


def iter_records(source: GraphSourceLike, *, format: str | None = None) -> Iterator[GraphRecord]:
    """Read a source as :class:`GraphRecord` items; a bad graph becomes a record with its error.

    Only problems with the source as a whole raise: a missing file, an unknown format, an
    empty file or a bad family spec.  Batch runs use this to keep going past a malformed line.

    Examples
    --------
    >>> import io
    >>> records = list(iter_records(io.StringIO("Bw\\nB!\\n"), format="graph6"))
    >>> [(r.index, r.line, r.name, r.error) for r in records]
    ... # doctest: +NORMALIZE_WHITESPACE
    [(0, 1, 'stream#0', None),
     (1, 2, 'stream#1', "<stream>, line 2, graph 1: malformed graph6: character '!' at position 2;
      expected characters '?' to '~' (ASCII 63-126)")]

    References
    ----------
    B. D. McKay, formats.txt (graph6 and sparse6).
    """
    return _records(_items(source, format))


def _records(items: Iterator[_Item]) -> Iterator[GraphRecord]:
    for item in items:
        error = None if item.error is None else str(item.error)
        yield GraphRecord(item.index, item.line, item.name, item.graph, error)


def _count_graphs(source: GraphSourceLike, format: str | None, rest: Iterator[_Item]) -> int:
    """How many graphs the source holds, counting lines rather than decoding where possible."""
    if _is_family_source(source):
        assert isinstance(source, str)
        return count_family_graphs(source)
    if isinstance(source, (str, os.PathLike)) and os.fspath(source) != "-":
        stream, label, _, suffix_format = _opened(source, format)
        with stream:
            lines = _checked_lines(stream, label)
            chosen = _check_format(format) or suffix_format
            if chosen is None:
                chosen, lines = _sniff(lines)
            if chosen in _STREAMED:
                return sum(1 for _ in _data_lines(lines))
    return 2 + sum(1 for _ in rest)


def read_graph(
    source: GraphSourceLike, *, format: str | None = None, directed: bool = False
) -> nx.Graph:
    """Read exactly one graph (``directed`` as in :func:`read_graphs`).

    Raises
    ------
    GraphFormatError
        If the source holds no graph, more than one (the message gives the count), or the
        graph cannot be read.

    Examples
    --------
    >>> read_graph("bipartite:2,3").number_of_edges()
    6
    >>> read_graph("cycle:3..5")
    Traceback (most recent call last):
    ...
    graphinv.errors.GraphFormatError: cycle:3..5: expected exactly one graph, found 3

    References
    ----------
    B. D. McKay, formats.txt (graph6 and sparse6).
    """
    items = _items(source, format, directed)
    first = next(items)
    if first.error is not None:
        raise first.error
    second = next(items, None)
    if second is not None:
        count = _count_graphs(source, format, items)
        label = source if isinstance(source, str) else getattr(source, "name", "<stream>")
        raise GraphFormatError(
            f"expected exactly one graph, found {count}",
            source="<stdin>" if label == "-" else str(label),
        )
    assert first.graph is not None
    return first.graph
