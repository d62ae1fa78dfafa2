"""Adjacency-matrix text: a square, symmetric matrix of nonnegative integers.

Row ``i`` and column ``j`` hold the number of edges between vertices ``i`` and ``j``
(vertices are ``0 .. n-1`` in row order).  Entries are separated by spaces, tabs or commas;
``#`` starts a comment and blank lines are skipped.  A nonzero diagonal entry is a loop, which
does not change the Laplacian: it is dropped with a warning.

References
----------
N. Biggs, *Algebraic Graph Theory*, 2nd ed., 1993, ch. 2 (adjacency matrix of a multigraph).
"""

from __future__ import annotations

import re
import warnings
from collections.abc import Iterable
from pathlib import Path
from typing import IO

import networkx as nx

from graphinv._graphs import weighted_edges
from graphinv.errors import GraphFormatError, InvalidGraphError

__all__ = ["parse_adjacency_matrix", "write_adjacency_matrix"]

_SEPARATORS = re.compile(r"[\s,]+")
_NONNEGATIVE = re.compile(r"\+?\d+")


def parse_adjacency_matrix(lines: Iterable[str], *, source: str = "<string>") -> nx.Graph:
    """Build a graph from the text of a square integer adjacency matrix.

    Parameters
    ----------
    lines : iterable of str
    source : str
        The file name used in error messages.

    Returns
    -------
    networkx.Graph
        Vertices ``0 .. n-1``; ``weight`` is the entry (the multiplicity).

    Raises
    ------
    GraphFormatError
        For a ragged row, a non-integer or negative entry, a matrix that is not square or not
        symmetric, or no rows at all; the message names the line.

    Examples
    --------
    >>> G = parse_adjacency_matrix(["0 2 1", "2 0 0", "1 0 0"])
    >>> sorted(G.edges(data="weight"))
    [(0, 1, 2), (0, 2, 1)]
    >>> parse_adjacency_matrix(["0 1", "0 0"], source="m.adj")
    Traceback (most recent call last):
    ...
    graphinv.errors.GraphFormatError: m.adj, line 2: not symmetric: entry (1, 0) is 0 but entry (0, 1) is 1; expected equal entries

    References
    ----------
    Biggs, *Algebraic Graph Theory*, 1993.
    """
    rows: list[list[int]] = []
    row_lines: list[int] = []
    for number, line in enumerate(lines, start=1):
        text = line.split("#", 1)[0].strip()
        if not text:
            continue
        tokens = [token for token in _SEPARATORS.split(text) if token]
        entries = []
        for token in tokens:
            if not _NONNEGATIVE.fullmatch(token):
                raise GraphFormatError(
                    f"bad matrix entry {token!r}; expected a nonnegative integer",
                    source=source,
                    line=number,
                )
            entries.append(int(token))
        if rows and len(entries) != len(rows[0]):
            raise GraphFormatError(
                f"ragged matrix: this row has {len(entries)} entries, the first row has "
                f"{len(rows[0])}; expected every row to have the same length",
                source=source,
                line=number,
            )
        rows.append(entries)
        row_lines.append(number)
    if not rows:
        raise GraphFormatError("no graph found (no matrix rows)", source=source)
    n = len(rows[0])
    if len(rows) != n:
        raise GraphFormatError(
            f"not square: {len(rows)} rows of {n} entries; expected {n} rows",
            source=source,
            line=row_lines[-1],
        )
    G = nx.Graph()
    G.add_nodes_from(range(n))
    for i in range(n):
        for j in range(i):
            if rows[i][j] != rows[j][i]:
                raise GraphFormatError(
                    f"not symmetric: entry ({i}, {j}) is {rows[i][j]} but entry ({j}, {i}) is "
                    f"{rows[j][i]}; expected equal entries",
                    source=source,
                    line=row_lines[i],
                )
            if rows[i][j]:
                G.add_edge(j, i, weight=rows[i][j])
        if rows[i][i]:
            warnings.warn(
                f"{source}, line {row_lines[i]}: diagonal entry {rows[i][i]} (a loop at {i}) "
                "dropped (loops do not change the Laplacian)",
                stacklevel=2,
            )
    return G


def write_adjacency_matrix(G: nx.Graph, target: str | Path | IO[str]) -> list[object]:
    """Write the adjacency matrix of ``G`` as text; return the vertex order used (``list(G)``).

    Examples
    --------
    >>> import io
    >>> out = io.StringIO(); write_adjacency_matrix(nx.path_graph(3), out)
    [0, 1, 2]
    >>> print(out.getvalue(), end="")
    0 1 0
    1 0 1
    0 1 0

    References
    ----------
    Biggs, *Algebraic Graph Theory*, 1993.
    """
    if G.is_directed():
        raise InvalidGraphError("adjacency-matrix text holds undirected graphs only")
    order = list(G)
    index = {v: i for i, v in enumerate(order)}
    rows = [[0] * len(order) for _ in order]
    for u, v, m in weighted_edges(G):
        rows[index[u]][index[v]] += m
        rows[index[v]][index[u]] += m
    text = "".join(" ".join(map(str, row)) + "\n" for row in rows)
    if isinstance(target, (str, Path)):
        Path(target).write_text(text, encoding="utf-8")
    else:
        target.write(text)
    return order
