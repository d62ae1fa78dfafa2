"""Graph checks shared by every layer above the normal-form core.

A graph is a networkx ``Graph``, ``MultiGraph``, ``DiGraph`` or ``MultiDiGraph``.  The edge
attribute ``weight``, when present, is an edge *multiplicity*: a positive integer (default 1).
Parallel edges of a multigraph add up.  Self-loops never change a Laplacian and are skipped.
"""

from __future__ import annotations

from collections.abc import Hashable, Iterable, Iterator, Sequence
from numbers import Integral
from typing import Any

import networkx as nx

from graphinv.errors import InvalidGraphError, InvalidWeightError

__all__ = [
    "as_multiplicity",
    "require_nonempty",
    "vertex_order",
    "weighted_edges",
]


def as_multiplicity(value: Any, *, edge: tuple[Hashable, Hashable] | None = None) -> int:
    """Return ``value`` as a positive Python int, or raise :class:`InvalidWeightError`.

    Integral floats such as ``2.0`` (as produced by many readers) are accepted.

    Examples
    --------
    >>> as_multiplicity(3), as_multiplicity(2.0)
    (3, 2)
    >>> as_multiplicity(0.5, edge=("a", "b"))
    Traceback (most recent call last):
    ...
    graphinv.errors.InvalidWeightError: edge ('a', 'b'): weight must be a positive integer multiplicity, not 0.5
    """
    where = f"edge {edge!r}: " if edge is not None else ""
    if isinstance(value, bool):
        raise InvalidWeightError(
            f"{where}weight must be a positive integer multiplicity, not {value!r}"
        )
    if isinstance(value, Integral) or (isinstance(value, float) and value.is_integer()):
        number = int(value)
    else:
        raise InvalidWeightError(
            f"{where}weight must be a positive integer multiplicity, not {value!r}"
        )
    if number <= 0:
        raise InvalidWeightError(
            f"{where}weight must be a positive integer multiplicity, not {value!r}"
        )
    return number


def weighted_edges(G: nx.Graph) -> Iterator[tuple[Hashable, Hashable, int]]:
    """Yield ``(u, v, multiplicity)`` once per adjacent pair, loops skipped.

    For an undirected graph each unordered pair appears once; for a directed graph each ordered
    pair ``u -> v`` appears once.  Parallel edges of a multigraph are summed.

    Examples
    --------
    >>> G = nx.MultiGraph([(0, 1), (0, 1), (1, 2), (2, 2)])
    >>> sorted(weighted_edges(G))
    [(0, 1, 2), (1, 2, 1)]
    """
    if G.is_multigraph():
        totals: dict[tuple[Hashable, Hashable], int] = {}
        for u, v, data in G.edges(data=True):
            if u == v:
                continue
            m = as_multiplicity(data.get("weight", 1), edge=(u, v))
            key = (u, v)
            if not G.is_directed() and (v, u) in totals:
                key = (v, u)
            totals[key] = totals.get(key, 0) + m
        for (u, v), m in totals.items():
            yield u, v, m
    else:
        for u, v, data in G.edges(data=True):
            if u == v:
                continue
            w = data.get("weight", 1)
            # The common case first: a plain positive int needs no further checks.
            yield u, v, (w if type(w) is int and w > 0 else as_multiplicity(w, edge=(u, v)))


def require_nonempty(G: nx.Graph) -> None:
    """Raise :class:`InvalidGraphError` if ``G`` has no vertices.

    Examples
    --------
    >>> require_nonempty(nx.Graph())
    Traceback (most recent call last):
    ...
    graphinv.errors.InvalidGraphError: the graph has no vertices; expected at least one
    """
    if not isinstance(G, nx.Graph):
        raise InvalidGraphError(f"expected a networkx graph, not {type(G).__name__}")
    if G.number_of_nodes() == 0:
        raise InvalidGraphError("the graph has no vertices; expected at least one")


def vertex_order(
    G: nx.Graph, vertices: Sequence[Hashable] | Iterable[Hashable] | None
) -> list[Hashable]:
    """Return the explicit vertex order: ``vertices`` if given (checked), else ``list(G)``.

    Examples
    --------
    >>> vertex_order(nx.path_graph(3), [2, 0, 1])
    [2, 0, 1]
    """
    if vertices is None:
        return list(G)
    order = list(vertices)
    if len(order) != G.number_of_nodes() or set(order) != set(G):
        raise InvalidGraphError("the vertex order must list every vertex of the graph exactly once")
    return order
