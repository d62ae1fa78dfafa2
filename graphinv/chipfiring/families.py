"""Graphs that chip-firing studies most: the grid with its boundary wired to a sink."""

from __future__ import annotations

import networkx as nx

from graphinv.errors import InvalidGraphError

__all__ = ["WIRED_SINK", "wired_grid"]

#: The label of the sink vertex of :func:`wired_grid`.
WIRED_SINK = "sink"


def wired_grid(rows: int, columns: int | None = None) -> nx.Graph:
    """The ``rows x columns`` grid with every boundary vertex joined to one sink vertex.

    Each grid vertex gets as many edges to the sink as it misses grid neighbours, so every
    grid vertex has degree 4: corners have 2 edges to the sink (a multiplicity in the
    ``weight`` attribute), other boundary vertices 1.  Grid vertices are ``(row, column)``
    pairs counted from 0; the sink is :data:`WIRED_SINK` (``"sink"``).  This is the planar dual
    of the ``(rows + 1) x (columns + 1)`` grid, so both have the same number of spanning trees.

    Parameters
    ----------
    rows : int
        At least 1.
    columns : int, optional
        Default ``rows``.

    Returns
    -------
    networkx.Graph

    Examples
    --------
    >>> G = wired_grid(3)
    >>> G.number_of_nodes(), G.degree((0, 0), weight="weight"), G[(0, 0)]["sink"]["weight"]
    (10, 4, 2)

    References
    ----------
    D. Dhar, Phys. Rev. Lett. 64 (1990) (the sandpile on a square with open boundary);
    OEIS A007341 (spanning trees of the n x n grid).
    """
    columns = rows if columns is None else columns
    for name, value in (("rows", rows), ("columns", columns)):
        if isinstance(value, bool) or not isinstance(value, int) or value < 1:
            raise InvalidGraphError(f"Argument '{name}' must be a positive integer, not {value!r}.")
    G = nx.Graph(name=f"wired grid {rows}x{columns}")
    G.add_node(WIRED_SINK)
    G.add_nodes_from((r, c) for r in range(rows) for c in range(columns))
    for r in range(rows):
        for c in range(columns):
            if r + 1 < rows:
                G.add_edge((r, c), (r + 1, c), weight=1)
            if c + 1 < columns:
                G.add_edge((r, c), (r, c + 1), weight=1)
            missing = (r == 0) + (r == rows - 1) + (c == 0) + (c == columns - 1)
            if missing:
                G.add_edge((r, c), WIRED_SINK, weight=missing)
    return G
