"""Writing graphs: graph6 and sparse6 streams, edge lists, and conversion between formats."""

from __future__ import annotations

import contextlib
import os
import sys
from collections.abc import Callable, Iterable, Iterator
from pathlib import Path
from typing import IO

import networkx as nx

from graphinv.errors import GraphFormatError
from graphinv.io.edgelist import write_edgelist
from graphinv.io.graph6 import to_graph6, to_sparse6
from graphinv.io.readers import GraphSourceLike, read_graphs

__all__ = ["OUTPUT_FORMATS", "convert_graphs", "write_graph6", "write_sparse6"]

OUTPUT_FORMATS = ("graph6", "sparse6", "edges")


@contextlib.contextmanager
def _target_stream(target: str | os.PathLike[str] | IO[str]) -> Iterator[IO[str]]:
    if isinstance(target, (str, os.PathLike)):
        if os.fspath(target) == "-":
            yield sys.stdout
            return
        with open(Path(target), "w", encoding="utf-8") as stream:
            yield stream
    else:
        yield target


def _write_lines(
    graphs: nx.Graph | Iterable[nx.Graph],
    target: str | os.PathLike[str] | IO[str],
    encode: Callable[[nx.Graph], str],
) -> int:
    """Write one encoded graph per line, as the graphs come; return how many."""
    count = 0
    with _target_stream(target) as stream:
        for G in [graphs] if isinstance(graphs, nx.Graph) else graphs:
            stream.write(encode(G) + "\n")
            count += 1
    return count


def write_graph6(
    graphs: nx.Graph | Iterable[nx.Graph], target: str | os.PathLike[str] | IO[str]
) -> int:
    """Write graphs as graph6, one per line (no header); return how many were written.

    Each graph's vertices are numbered in ``list(G)`` order.  Graphs are written as they come,
    so a generator of millions of graphs never sits in memory.

    Raises
    ------
    InvalidGraphError
        For a multiplicity above 1 (graph6 stores simple graphs; use :func:`write_sparse6`).

    Examples
    --------
    >>> import io
    >>> out = io.StringIO()
    >>> write_graph6([nx.complete_graph(3), nx.path_graph(4)], out)
    2
    >>> print(out.getvalue(), end="")
    Bw
    Ch

    References
    ----------
    B. D. McKay, formats.txt (graph6).
    """
    return _write_lines(graphs, target, to_graph6)


def write_sparse6(
    graphs: nx.Graph | Iterable[nx.Graph], target: str | os.PathLike[str] | IO[str]
) -> int:
    """Write graphs as sparse6, one per line; multiplicities become parallel edges.

    Examples
    --------
    >>> import io
    >>> out = io.StringIO()
    >>> write_sparse6(nx.Graph([(0, 1, {"weight": 2})]), out)
    1
    >>> print(out.getvalue(), end="")
    :Ab

    References
    ----------
    B. D. McKay, formats.txt (sparse6).
    """
    return _write_lines(graphs, target, to_sparse6)


def convert_graphs(
    source: GraphSourceLike,
    *,
    to: str,
    target: str | os.PathLike[str] | IO[str],
    format: str | None = None,
) -> int:
    """Read every graph of ``source`` and write it to ``target`` in the format ``to``.

    Parameters
    ----------
    source : str, path or text stream
        As for :func:`graphinv.io.read_graphs` (files, ``"-"``, family specs with ranges).
    to : {"graph6", "sparse6", "edges"}
        The output format.  An edge list holds one graph, so ``edges`` needs a single graph.
    target : path, ``"-"`` or text stream
    format : str, optional
        Input format, as for :func:`graphinv.io.read_graphs`.

    Returns
    -------
    int
        The number of graphs written.

    Examples
    --------
    >>> import io
    >>> out = io.StringIO()
    >>> convert_graphs("cycle:3..5", to="graph6", target=out)
    3
    >>> out.getvalue().split()
    ['Bw', 'Cl', 'Dhc']

    References
    ----------
    B. D. McKay, formats.txt (graph6 and sparse6).
    """
    if to not in OUTPUT_FORMATS:
        raise GraphFormatError(
            f"unknown output format {to!r}; expected one of {', '.join(OUTPUT_FORMATS)}"
        )
    graphs = read_graphs(source, format=format)
    if to == "graph6":
        return write_graph6(graphs, target)
    if to == "sparse6":
        return write_sparse6(graphs, target)
    first = next(graphs)
    if next(graphs, None) is not None:
        raise GraphFormatError(
            "an edge list holds one graph but the source holds several; "
            "expected a single graph (or convert to graph6/sparse6)",
            source=str(source) if isinstance(source, (str, os.PathLike)) else None,
        )
    with _target_stream(target) as stream:
        write_edgelist(first, stream)
    return 1
