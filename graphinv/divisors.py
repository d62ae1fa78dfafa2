"""Divisors on a finite graph: degree, linear equivalence, reduced divisors and rank.

A *divisor* is an integer on each vertex of a connected undirected (multi)graph, given as a
mapping ``{vertex: integer}`` (missing vertices count 0).  Two divisors are *linearly
equivalent* when their difference is ``L x`` for an integer vector ``x`` (``L`` the Laplacian):
chip-firing moves, with debt allowed.  For a vertex ``q``, a divisor is *q-reduced* when it is
nonnegative off ``q`` and that part is superstable; every divisor is equivalent to exactly one
q-reduced divisor, and ``D`` is equivalent to an effective divisor iff its q-reduced divisor is
nonnegative at ``q``.  The rank ``r(D)`` is ``-1`` if ``D`` is not equivalent to an effective
divisor, else the largest ``k`` such that ``D - E`` is, for every effective ``E`` of degree
``k``.  The Riemann-Roch theorem reads ``r(D) - r(K - D) = deg D + 1 - g``.

Edge weights are multiplicities; loops are skipped (as everywhere in graphinv), so the genus
and the canonical divisor are those of the loopless multigraph.

References
----------
M. Baker, S. Norine, "Riemann-Roch and Abel-Jacobi theory on a finite graph", Adv. Math. 215
(2007); D. Dhar, Phys. Rev. Lett. 64 (1990) (burning algorithm); S. Corry, D. Perkinson,
*Divisors and Sandpiles*, AMS 2018.
"""

from __future__ import annotations

from collections.abc import Hashable, Mapping
from numbers import Integral
from typing import Any

import networkx as nx

from graphinv._graphs import require_nonempty, weighted_edges
from graphinv.chipfiring.configurations import (
    ChipGraph,
    ConfigurationError,
    as_chip_vector,
    chip_graph,
)
from graphinv.chipfiring.recurrents import _out_lists, _recurrent_of, _topple_small
from graphinv.errors import DisconnectedGraphError, GraphInvError, InvalidGraphError

__all__ = [
    "DivisorError",
    "canonical_divisor",
    "divisor_degree",
    "divisor_rank",
    "equivalent_effective",
    "genus",
    "is_linearly_equivalent",
    "reduced_divisor",
]


class DivisorError(ConfigurationError):
    """A divisor names an unknown vertex or holds a non-integer value."""


def _require_graph(G: nx.Graph) -> None:
    require_nonempty(G)
    if G.is_directed():
        raise InvalidGraphError("divisors are defined here for undirected graphs only")
    if not nx.is_connected(G):
        raise DisconnectedGraphError(
            "divisor theory needs a connected graph; this one has "
            f"{nx.number_connected_components(G)} components"
        )


def _values(G: nx.Graph, D: Mapping[Hashable, Any]) -> dict[Hashable, int]:
    full = dict.fromkeys(G, 0)
    for vertex, value in D.items():
        if vertex not in full:
            raise DivisorError(f"unknown vertex {vertex!r}: not in the graph")
        if isinstance(value, bool) or not isinstance(value, Integral):
            raise DivisorError(f"divisor values must be integers, not {value!r} at {vertex!r}")
        full[vertex] = int(value)
    return full


def divisor_degree(D: Mapping[Hashable, int]) -> int:
    """The degree ``sum_v D(v)``.

    Examples
    --------
    >>> divisor_degree({0: 2, 1: -1, 2: 0})
    1

    References
    ----------
    Baker, Norine, Adv. Math. 215 (2007), §1.
    """
    return sum(int(v) for v in D.values())


def genus(G: nx.Graph) -> int:
    """The genus (cyclomatic number) ``g = |E| - |V| + 1`` of a connected multigraph.

    Edges are counted with multiplicity; loops are skipped.

    Examples
    --------
    >>> genus(nx.complete_graph(4)), genus(nx.cycle_graph(5)), genus(nx.path_graph(3))
    (3, 1, 0)

    References
    ----------
    Baker, Norine, Adv. Math. 215 (2007), §1.
    """
    _require_graph(G)
    edges = sum(m for _, _, m in weighted_edges(G))
    return edges - G.number_of_nodes() + 1


def canonical_divisor(G: nx.Graph) -> dict[Hashable, int]:
    """The canonical divisor ``K(v) = deg(v) - 2`` (degree with multiplicity, loops skipped).

    Its degree is ``2g - 2``.

    Examples
    --------
    >>> canonical_divisor(nx.complete_graph(4))
    {0: 1, 1: 1, 2: 1, 3: 1}

    References
    ----------
    Baker, Norine, Adv. Math. 215 (2007), §1.
    """
    _require_graph(G)
    degree = dict.fromkeys(G, 0)
    for u, v, m in weighted_edges(G):
        degree[u] += m
        degree[v] += m
    return {v: d - 2 for v, d in degree.items()}


class _Reducer:
    """q-reduction through the chip-firing duality, keeping the class as a recurrent.

    The part of ``D`` off ``q`` is a chip vector ``c``; its q-reduced form is ``c_max - r``
    with ``r`` the recurrent equivalent to ``c_max - c``, and ``D(q)`` takes the rest of the
    degree.  Subtracting a chip at ``v != q`` turns ``r`` into ``stab(r + e_v)``.
    """

    def __init__(self, G: nx.Graph, q: Hashable | None) -> None:
        _require_graph(G)
        self.G = G
        self.graph: ChipGraph = chip_graph(G, sink=q if q is not None else next(iter(G)))
        self.q = self.graph.sink
        self.maximal = [int(v) for v in self.graph.max_stable.tolist()]
        self.capacity = sum(self.maximal)
        self.degree = self.graph.degree.tolist()
        self.neighbours = _out_lists(self.graph)

    def recurrent(self, D: dict[Hashable, int]) -> tuple[int, ...]:
        chips = as_chip_vector(
            [m - D[v] for m, v in zip(self.maximal, self.graph.vertices, strict=True)]
        )
        return tuple(int(x) for x in _recurrent_of(self.graph, chips).tolist())

    def at_q(self, recurrent: tuple[int, ...], degree: int) -> int:
        """``D(q)`` of the reduced divisor of the class ``(recurrent, degree)``."""
        return degree - (self.capacity - sum(recurrent))

    def divisor(self, recurrent: tuple[int, ...], degree: int) -> dict[Hashable, int]:
        result = dict.fromkeys(self.G, 0)
        for v, m, r in zip(self.graph.vertices, self.maximal, recurrent, strict=True):
            result[v] = m - r
        result[self.q] = self.at_q(recurrent, degree)
        return result

    def minus(self, recurrent: tuple[int, ...], position: int) -> tuple[int, ...]:
        chips = list(recurrent)
        chips[position] += 1
        _topple_small(chips, position, self.degree, self.neighbours)
        return tuple(chips)


def reduced_divisor(
    G: nx.Graph, D: Mapping[Hashable, int], *, q: Hashable | None = None
) -> dict[Hashable, int]:
    """The unique q-reduced divisor linearly equivalent to ``D``.

    Parameters
    ----------
    G : networkx Graph or MultiGraph
        Connected; ``weight`` is an integer multiplicity.
    D : mapping vertex -> int
    q : hashable, optional
        Default: the first vertex of ``G``.

    Returns
    -------
    dict
        ``{vertex: value}`` over all vertices in ``G`` order.

    Examples
    --------
    >>> reduced_divisor(nx.cycle_graph(4), {2: 1}, q=0)
    {0: 0, 1: 0, 2: 1, 3: 0}
    >>> reduced_divisor(nx.cycle_graph(4), {1: 1, 3: 1}, q=0)
    {0: 2, 1: 0, 2: 0, 3: 0}

    References
    ----------
    Baker, Norine (2007), Prop. 3.1; Dhar (1990).
    """
    reducer = _Reducer(G, q)
    values = _values(G, D)
    return reducer.divisor(reducer.recurrent(values), divisor_degree(values))


def is_linearly_equivalent(
    G: nx.Graph, D: Mapping[Hashable, int], E: Mapping[Hashable, int]
) -> bool:
    """Whether ``D - E`` lies in the image of the Laplacian (firing moves with debt).

    Examples
    --------
    >>> G = nx.cycle_graph(4)
    >>> is_linearly_equivalent(G, {1: 1, 3: 1}, {0: 2}), is_linearly_equivalent(G, {1: 1}, {0: 1})
    (True, False)

    References
    ----------
    Baker, Norine (2007), §1.
    """
    _require_graph(G)
    first, second = _values(G, D), _values(G, E)
    if divisor_degree(first) != divisor_degree(second):
        return False
    reducer = _Reducer(G, None)
    return reducer.recurrent(first) == reducer.recurrent(second)


def equivalent_effective(
    G: nx.Graph, D: Mapping[Hashable, int], *, q: Hashable | None = None
) -> dict[Hashable, int] | None:
    """An effective divisor equivalent to ``D`` (its q-reduced form), or ``None`` if none is.

    Examples
    --------
    >>> equivalent_effective(nx.cycle_graph(3), {0: 2, 1: -1}, q=0)
    {0: 0, 1: 0, 2: 1}
    >>> equivalent_effective(nx.cycle_graph(3), {1: 1, 2: -1}) is None
    True

    References
    ----------
    Baker, Norine (2007), Prop. 3.1.
    """
    reduced = reduced_divisor(G, D, q=q)
    return reduced if all(v >= 0 for v in reduced.values()) else None


def divisor_rank(G: nx.Graph, D: Mapping[Hashable, int], *, max_classes: int = 2_000_000) -> int:
    """The Baker-Norine rank of a divisor, exactly (for small graphs).

    Uses ``r(D) = -1`` if ``D`` is not equivalent to an effective divisor, else
    ``r(D) = 1 + min_v r(D - v)``, which follows from the definition.  Each divisor class is
    kept as its q-reduced form (a recurrent configuration and a degree) and memoised, so the
    search visits each class of degree ``deg D, deg D - 1, ..., deg D - r(D) - 1`` at most once:
    at most ``(r(D) + 2)`` times the number of spanning trees.

    Parameters
    ----------
    max_classes : int, optional
        Stop with an error after visiting this many divisor classes.

    Raises
    ------
    GraphInvError
        More than ``max_classes`` classes would be visited.

    Examples
    --------
    >>> G = nx.complete_graph(4)                     # genus 3
    >>> K = canonical_divisor(G)
    >>> divisor_rank(G, K), divisor_rank(G, {0: 1}), divisor_rank(G, {0: 1, 1: -1})
    (2, 0, -1)

    References
    ----------
    Baker, Norine, Adv. Math. 215 (2007), §1 and Lemma 2.7.
    """
    reducer = _Reducer(G, None)
    values = _values(G, D)
    start = (reducer.recurrent(values), divisor_degree(values))
    memo: dict[tuple[tuple[int, ...], int], int] = {}
    n = len(reducer.graph)

    def rank(key: tuple[tuple[int, ...], int]) -> int:
        recurrent, degree = key
        if reducer.at_q(recurrent, degree) < 0:
            return -1
        found = memo.get(key)
        if found is not None:
            return found
        if len(memo) >= max_classes:
            raise GraphInvError(
                f"the rank search passed {max_classes} divisor classes; raise max_classes"
            )
        best = rank((recurrent, degree - 1))  # remove a chip at q
        for position in range(n):
            if best == -1:
                break
            best = min(best, rank((reducer.minus(recurrent, position), degree - 1)))
        memo[key] = best + 1
        return best + 1

    return rank(start)
