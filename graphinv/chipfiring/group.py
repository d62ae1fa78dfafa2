"""An explicit isomorphism between recurrent configurations and ``Z/d1 + ... + Z/dr``.

Let ``M = L~^T`` (firing ``x`` changes ``c`` into ``c - M x``) and let ``U M V = S`` be its Smith
normal form, ``U`` and ``V`` unimodular, ``S = diag(1, ..., 1, d1, ..., dr)``.  Because
``U M Z^n = U M V Z^n = S Z^n``, the map ``c -> U c`` sends ``Z^n / M Z^n`` isomorphically onto
``Z^n / S Z^n``: the *coordinates* of a configuration are ``(U c)_i mod d_i`` at the non-unit
positions.  The generators are the recurrents equivalent to the columns of ``U^{-1}`` at those
positions; the recurrent with coordinates ``a`` is the recurrent equivalent to
``sum_i a_i U^{-1} e_i``.

The Smith form with transforms comes from :func:`graphinv.normalform.smith_form`, whose
classical elimination is meant for matrices of up to a few hundred rows.

References
----------
N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999);
R. Kannan, A. Bachem, "Polynomial algorithms for computing the Smith and Hermite normal forms
of an integer matrix", SIAM J. Comput. 8 (1979).
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence
from dataclasses import dataclass
from typing import Any

import networkx as nx

from graphinv.chipfiring.configurations import (
    ChipGraph,
    Configuration,
    ConfigurationError,
    as_chip_vector,
    chip_graph,
)
from graphinv.chipfiring.recurrents import _identity, _recurrent_of
from graphinv.errors import GraphInvError

__all__ = [
    "MAX_COORDINATE_VERTICES",
    "RecurrentGroup",
    "coordinates",
    "from_coordinates",
    "group_generators",
    "recurrent_group",
]


@dataclass(frozen=True, eq=False)
class RecurrentGroup:
    """The group of recurrent configurations with explicit invariant-factor coordinates.

    Attributes
    ----------
    graph : ChipGraph
    invariant_factors : tuple of int
        ``d1 | d2 | ... | dr``, all greater than 1 (empty for the trivial group).
    generators : tuple of Configuration
        Recurrent configurations; the ``i``-th has coordinates ``e_i`` and order ``d_i``.
    identity : Configuration
        The identity recurrent (all coordinates zero).
    transform : tuple of tuple of int
        The rows of ``U`` at the non-unit positions: ``coordinates(c) = transform @ c mod d``.
    lift : tuple of tuple of int
        The columns of ``U^{-1}`` at the non-unit positions (chip vectors).

    References
    ----------
    Biggs (1999); Kannan, Bachem (1979).
    """

    graph: ChipGraph
    invariant_factors: tuple[int, ...]
    generators: tuple[Configuration, ...]
    identity: Configuration
    transform: tuple[tuple[int, ...], ...]
    lift: tuple[tuple[int, ...], ...]

    @property
    def order(self) -> int:
        """The number of recurrent configurations (the product of the invariant factors)."""
        result = 1
        for d in self.invariant_factors:
            result *= d
        return result

    def coordinates(self, configuration: Configuration) -> tuple[int, ...]:
        """The coordinates of any configuration's class, ``0 <= a_i < d_i``.

        Examples
        --------
        >>> group = recurrent_group(nx.cycle_graph(4), sink=0)
        >>> group.invariant_factors, group.coordinates(group.identity)
        ((4,), (0,))
        """
        if configuration.graph is not self.graph:
            raise ConfigurationError("the configuration belongs to a different chip graph")
        chips = [int(v) for v in configuration.chips.tolist()]
        return tuple(
            sum(u * c for u, c in zip(row, chips, strict=True)) % d
            for row, d in zip(self.transform, self.invariant_factors, strict=True)
        )

    def from_coordinates(self, values: Sequence[int]) -> Configuration:
        """The recurrent configuration with the given coordinates (taken modulo ``d_i``).

        Examples
        --------
        >>> group = recurrent_group(nx.cycle_graph(4), sink=0)
        >>> [group.coordinates(group.from_coordinates([a])) for a in range(4)]
        [(0,), (1,), (2,), (3,)]
        """
        values = list(values)
        if len(values) != len(self.invariant_factors):
            raise ConfigurationError(
                f"expected {len(self.invariant_factors)} coordinates (one per invariant "
                f"factor {list(self.invariant_factors)}), not {len(values)}"
            )
        n = len(self.graph)
        total = [0] * n
        for a, d, column in zip(values, self.invariant_factors, self.lift, strict=True):
            a = int(a) % d
            if a:
                for k in range(n):
                    total[k] += a * column[k]
        chips = _recurrent_of(self.graph, as_chip_vector(total))
        return Configuration(self.graph, chips)

    def to_record(self) -> dict[str, Any]:
        """JSON-ready: the invariant factors and the generators."""
        return {
            "invariant_factors": list(self.invariant_factors),
            "order": self.order,
            "generators": [g.to_record()["chips"] for g in self.generators],
        }


#: Default bound on non-sink vertices for explicit coordinates: the Smith form with transforms
#: is classical elimination on dense integer matrices (about 5 s at 200 vertices).
MAX_COORDINATE_VERTICES = 500


def recurrent_group(
    G: nx.Graph | ChipGraph,
    *,
    sink: Hashable | None = None,
    max_vertices: int = MAX_COORDINATE_VERTICES,
) -> RecurrentGroup:
    """The group of recurrents with its explicit invariant-factor coordinates.

    Parameters
    ----------
    G : networkx graph or ChipGraph
        Small enough for a Smith form with transforms (a few hundred non-sink vertices).
    sink : hashable, optional
    max_vertices : int, optional
        Refuse larger graphs with a clear error instead of a very long computation.

    Returns
    -------
    RecurrentGroup

    Raises
    ------
    GraphInvError
        More than ``max_vertices`` non-sink vertices.

    Examples
    --------
    >>> group = recurrent_group(nx.complete_graph(4), sink=0)
    >>> group.invariant_factors, group.order
    ((4, 4), 16)
    >>> [group.coordinates(g) for g in group.generators]
    [(1, 0), (0, 1)]

    References
    ----------
    Biggs, J. Algebraic Combin. 9 (1999); Kannan, Bachem, SIAM J. Comput. 8 (1979).
    """
    graph = chip_graph(G, sink=sink)
    cached = graph.cache.get("group")
    if cached is not None:
        return cached
    if len(graph) > max_vertices:
        raise GraphInvError(
            f"explicit coordinates need a Smith form with transforms; this graph has "
            f"{len(graph)} non-sink vertices, more than max_vertices={max_vertices}"
        )
    from graphinv.normalform import smith_form

    n = len(graph)
    identity = Configuration(graph, _identity(graph))
    if n == 0:
        group = RecurrentGroup(graph, (), (), identity, (), ())
        graph.cache["group"] = group
        return group
    rows = graph.laplacian.toarray().tolist()
    smith = smith_form(rows, transforms=True)
    assert smith.U is not None
    positions = [i for i, d in enumerate(smith.diagonal) if d != 1]
    if any(smith.diagonal[i] == 0 for i in positions):  # pragma: no cover - L~ is nonsingular
        raise ConfigurationError("the reduced Laplacian is singular; no sink is reachable")
    factors = tuple(int(smith.diagonal[i]) for i in positions)
    transform = tuple(tuple(int(x) for x in smith.U[i]) for i in positions)
    inverse = _unimodular_inverse(smith.U)
    lift = tuple(tuple(inverse[k][i] for k in range(n)) for i in positions)
    generators = tuple(
        Configuration(graph, _recurrent_of(graph, as_chip_vector(column))) for column in lift
    )
    group = RecurrentGroup(graph, factors, generators, identity, transform, lift)
    graph.cache["group"] = group
    return group


def _unimodular_inverse(U: Sequence[Sequence[int]]) -> list[list[int]]:
    """The exact integer inverse of a unimodular matrix."""
    import flint

    inverse = flint.fmpz_mat([[int(x) for x in row] for row in U]).inv()
    n = inverse.nrows()
    result = [[0] * n for _ in range(n)]
    for i in range(n):
        for j in range(n):
            entry = inverse[i, j]
            if entry.q != 1:  # pragma: no cover - U has determinant +-1
                raise ArithmeticError("the Smith transform is not unimodular")
            result[i][j] = int(entry.p)
    return result


def group_generators(
    G: nx.Graph | ChipGraph, *, sink: Hashable | None = None
) -> tuple[Configuration, ...]:
    """Recurrent configurations generating the group, one per invariant factor ``d_i > 1``.

    The ``i``-th generator has order ``d_i`` and the group is their direct sum.

    Examples
    --------
    >>> gens = group_generators(nx.cycle_graph(5), sink=0)
    >>> len(gens), coordinates(gens[0])
    (1, (1,))

    References
    ----------
    Biggs (1999); Kannan, Bachem (1979).
    """
    return recurrent_group(G, sink=sink).generators


def coordinates(configuration: Configuration) -> tuple[int, ...]:
    """The invariant-factor coordinates of a configuration's class.

    Examples
    --------
    >>> from graphinv.chipfiring import chip_graph
    >>> cg = chip_graph(nx.cycle_graph(5), sink=0)
    >>> a, b = cg.configuration({1: 1}), cg.configuration({2: 1})
    >>> coordinates(b) == tuple(2 * x % 5 for x in coordinates(a))  # 2 e1 - e2 fires vertex 1
    True

    References
    ----------
    Biggs (1999).
    """
    return recurrent_group(configuration.graph).coordinates(configuration)


def from_coordinates(
    G: nx.Graph | ChipGraph, values: Sequence[int], *, sink: Hashable | None = None
) -> Configuration:
    """The recurrent configuration with the given invariant-factor coordinates.

    Examples
    --------
    >>> from graphinv.chipfiring import chip_graph
    >>> cg = chip_graph(nx.complete_graph(4), sink=0)
    >>> coordinates(from_coordinates(cg, [3, 1]))
    (3, 1)

    References
    ----------
    Biggs (1999).
    """
    return recurrent_group(G, sink=sink).from_coordinates(values)
