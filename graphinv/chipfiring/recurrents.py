"""Recurrent and superstable configurations, and the group the recurrents form.

A stable configuration is *recurrent* if it can be reached from any configuration by adding
chips and stabilizing; the recurrents form a group under ``a + b = stab(a + b)`` isomorphic to
the critical (sandpile) group ``Z^n / L~^T Z^n``, with exactly one recurrent in each class
(Dhar 1990; Biggs 1999).  A configuration ``c >= 0`` is *superstable* if no nonempty set of
vertices can fire at once without some vertex going negative; ``c`` is recurrent if and only if
``c_max - c`` is superstable (Holroyd et al. 2008).

References
----------
D. Dhar, Phys. Rev. Lett. 64 (1990); N. Biggs, "Chip-firing and the critical group of a graph",
J. Algebraic Combin. 9 (1999); E. R. Speer, "Asymmetric abelian sandpile models", J. Stat.
Phys. 71 (1993); Holroyd, Levine, Mészáros, Peres, Propp, Wilson, "Chip-firing and
rotor-routing on directed graphs" (2008); Y. Le Borgne, D. Rossin, "On the identity of the
sandpile group", Discrete Math. 256 (2002).
"""

from __future__ import annotations

import math
from collections import deque
from collections.abc import Hashable, Iterator

import networkx as nx
import numpy as np

from graphinv.chipfiring.configurations import (
    ChipGraph,
    Configuration,
    ConfigurationError,
    as_chip_vector,
    chip_graph,
)
from graphinv.chipfiring.stabilize import (
    _matvec_object,
    _solver,
    certified_lower_solution,
    relax,
)
from graphinv.errors import GraphInvError

__all__ = [
    "burning_configuration",
    "burning_script",
    "configuration_order",
    "equivalent_recurrent",
    "equivalent_superstable",
    "identity_configuration",
    "is_recurrent",
    "is_superstable",
    "recurrent_configurations",
    "recurrent_identity",
    "recurrent_negative",
    "recurrent_sum",
    "superstable_configurations",
]


def _stable(graph: ChipGraph, chips: np.ndarray) -> np.ndarray:
    return relax(graph, chips)[0]


def _script(graph: ChipGraph) -> np.ndarray:
    """Speer's burning script: the least ``sigma >= 1`` with ``L~^T sigma >= 0``."""
    if "script" in graph.cache:
        cached: np.ndarray = graph.cache["script"]
        return cached
    n = len(graph)
    sigma = np.ones(n, dtype=np.int64)
    if graph.directed and n:
        # Raising sigma where L~^T sigma < 0 keeps sigma below every solution, so the loop
        # ends at the least one.  Each pass fixes the deficit at those vertices in one step.
        degree = graph.degree
        while True:
            burning = graph.laplacian @ sigma
            short = burning < 0
            if not short.any():
                break
            sigma[short] += (-burning[short] + degree[short] - 1) // degree[short]
    graph.cache["script"] = sigma
    return sigma


def burning_script(G: nx.Graph | ChipGraph, *, sink: Hashable | None = None) -> dict[Hashable, int]:
    """Speer's burning script ``sigma_b``: the least ``sigma >= 1`` with ``L~^T sigma >= 0``.

    For an undirected graph it is all ones.  Firing it from the burning configuration
    ``b = L~^T sigma_b`` added to a recurrent ``c`` returns ``c``.

    Examples
    --------
    >>> burning_script(nx.path_graph(3), sink=0)
    {1: 1, 2: 1}
    >>> G = nx.DiGraph([(1, 2, {"weight": 3}), (2, 1), (2, 0)])
    >>> burning_script(G, sink=0), burning_configuration(G, sink=0).to_dict()
    ({1: 1, 2: 2}, {1: 1, 2: 1})

    References
    ----------
    E. R. Speer, J. Stat. Phys. 71 (1993); Holroyd et al. (2008), §2.
    """
    graph = chip_graph(G, sink=sink)
    return dict(zip(graph.vertices, (int(v) for v in _script(graph).tolist()), strict=True))


def burning_configuration(
    G: nx.Graph | ChipGraph, *, sink: Hashable | None = None
) -> Configuration:
    """The burning configuration ``b = L~^T sigma_b`` (equivalent to zero, nonnegative).

    For an undirected graph ``b(v)`` is the number of edges from ``v`` to the sink.

    Examples
    --------
    >>> burning_configuration(nx.path_graph(3), sink=0).to_dict()
    {1: 1, 2: 0}

    References
    ----------
    Dhar (1990); Speer (1993).
    """
    graph = chip_graph(G, sink=sink)
    return Configuration(graph, graph.laplacian @ _script(graph))


def _require(
    configuration: Configuration, *, stable: bool = False, recurrent: bool = False
) -> None:
    chips = configuration.chips
    graph = configuration.graph
    negative = np.flatnonzero(chips < 0)
    if negative.size:
        vertex = graph.vertices[int(negative[0])]
        raise ConfigurationError(
            f"negative chips ({int(chips[negative[0]])}) at vertex {vertex!r}; "
            "expected a nonnegative configuration"
        )
    if stable or recurrent:
        loaded = np.flatnonzero(chips >= graph.degree)
        if loaded.size:
            vertex = graph.vertices[int(loaded[0])]
            raise ConfigurationError(
                f"vertex {vertex!r} holds {int(chips[loaded[0]])} chips but has degree "
                f"{int(graph.degree[loaded[0]])}; expected a stable configuration"
            )
    if recurrent and not _recurrent_vector(graph, chips):
        raise ConfigurationError("the configuration is not recurrent")


def _recurrent_vector(graph: ChipGraph, chips: np.ndarray) -> bool:
    if not len(graph):
        return True
    if graph.directed:
        # Speer's criterion: stab(c + b) == c for the burning configuration b.
        burning = graph.laplacian @ _script(graph)
        return bool(np.array_equal(_stable(graph, chips + burning), chips))
    # Dhar's burning algorithm: fire spreads from the sink; a vertex burns once its chips
    # cover the edges to vertices not yet burnt.  Recurrent iff everything burns.
    unburnt = np.ones(len(graph), dtype=bool)
    to_unburnt = graph.degree - graph.sink_edges
    transfer = graph.transfer
    while True:
        burning = unburnt & (chips >= to_unburnt)
        if not burning.any():
            break
        unburnt &= ~burning
        to_unburnt = to_unburnt - transfer @ burning.astype(np.int64)
    return not bool(unburnt.any())


def is_recurrent(configuration: Configuration) -> bool:
    """Whether the configuration is recurrent (stable, nonnegative, in the recurrent class).

    Undirected graphs use Dhar's burning algorithm; directed graphs the general criterion
    ``stab(c + b) == c`` with Speer's burning configuration ``b``.

    Examples
    --------
    >>> cg = chip_graph(nx.cycle_graph(3), sink=0)
    >>> [is_recurrent(cg.configuration({1: a, 2: b})) for a, b in [(1, 1), (0, 1), (0, 0)]]
    [True, True, False]

    References
    ----------
    Dhar, Phys. Rev. Lett. 64 (1990); Speer, J. Stat. Phys. 71 (1993); Holroyd et al. (2008).
    """
    chips = configuration.chips
    if bool((chips < 0).any()) or not configuration.is_stable():
        return False
    return _recurrent_vector(configuration.graph, chips)


def is_superstable(configuration: Configuration) -> bool:
    """Whether no nonempty set of vertices can fire at once without a vertex going negative.

    Decided by the duality: ``c`` is superstable iff ``c_max - c`` is recurrent.

    Examples
    --------
    >>> cg = chip_graph(nx.cycle_graph(3), sink=0)
    >>> [is_superstable(cg.configuration({1: a, 2: b})) for a, b in [(0, 0), (1, 0), (1, 1)]]
    [True, True, False]

    References
    ----------
    Holroyd et al., "Chip-firing and rotor-routing on directed graphs" (2008), Lemma 4.6.
    """
    graph = configuration.graph
    chips = configuration.chips
    if bool((chips < 0).any()) or not configuration.is_stable():
        return False
    return _recurrent_vector(graph, graph.max_stable - chips)


def _lift(graph: ChipGraph, chips: np.ndarray, floor: np.ndarray) -> np.ndarray:
    """A configuration equivalent to ``chips`` with every entry at least ``floor``."""
    chips = chips.astype(object) if chips.dtype == object else chips
    need = floor.astype(object) - chips.astype(object)
    if not bool((need > 0).any()):
        return chips
    solver = _solver(graph)
    if solver is None or solver.green_bound is None:
        raise GraphInvError("cannot factor the reduced Laplacian of this graph")
    bound = solver.green_bound
    start = np.zeros(len(graph), dtype=np.int64)
    needed = as_chip_vector(need.tolist())
    if needed.dtype != object:
        low = certified_lower_solution(graph, needed)
        if low is not None:
            start = low
    lifted = chips.astype(object) + _matvec_object(graph, start.astype(object))
    shortfall = max(0, max(int(v) for v in (floor.astype(object) - lifted).tolist()))
    if shortfall:
        # L~^T bound >= 1 everywhere, so adding that many copies closes every gap.
        lifted = lifted + _matvec_object(graph, bound.astype(object) * shortfall)
    return as_chip_vector(lifted.tolist())


def _recurrent_of(graph: ChipGraph, chips: np.ndarray) -> np.ndarray:
    """The recurrent configuration equivalent to a chip vector."""
    if not len(graph):
        return chips.copy()
    lifted = _lift(graph, chips, np.asarray(graph.max_stable))
    return _stable(graph, lifted)


def equivalent_recurrent(configuration: Configuration) -> Configuration:
    """The unique recurrent configuration equivalent to ``configuration``.

    Any counts are allowed (negative ones too): an equivalent configuration at least
    ``c_max`` is found exactly and stabilized, which lands in the recurrent class.

    Examples
    --------
    >>> cg = chip_graph(nx.cycle_graph(4), sink=0)
    >>> equivalent_recurrent(cg.configuration({2: -1})).to_dict()   # -e2 = e2 in Z/4
    {1: 1, 2: 1, 3: 1}
    >>> equivalent_recurrent(cg.zero()).to_dict()                   # the identity
    {1: 1, 2: 0, 3: 1}

    References
    ----------
    Holroyd et al. (2008), Lemma 2.13 (one recurrent per class).
    """
    graph = configuration.graph
    return Configuration(graph, _recurrent_of(graph, configuration.chips))


def equivalent_superstable(configuration: Configuration) -> Configuration:
    """The unique superstable configuration equivalent to ``configuration``.

    Computed as ``c_max - r`` with ``r`` the recurrent equivalent to ``c_max - c``.

    Examples
    --------
    >>> cg = chip_graph(nx.cycle_graph(4), sink=0)
    >>> equivalent_superstable(cg.configuration({1: 1, 2: 1, 3: 1})).to_dict()
    {1: 0, 2: 1, 3: 0}

    References
    ----------
    Holroyd et al. (2008), Lemma 4.6 (duality).
    """
    graph = configuration.graph
    maximal = np.asarray(graph.max_stable)
    flipped = maximal.astype(object) - configuration.chips.astype(object)
    recurrent = _recurrent_of(graph, as_chip_vector(flipped.tolist()))
    return Configuration(graph, maximal - recurrent)


def _identity(graph: ChipGraph) -> np.ndarray:
    if "identity" not in graph.cache:
        twice = 2 * np.asarray(graph.max_stable)
        graph.cache["identity"] = _stable(graph, twice - _stable(graph, twice))
    identity: np.ndarray = graph.cache["identity"]
    return identity


def identity_configuration(
    G: nx.Graph | ChipGraph, *, sink: Hashable | None = None
) -> Configuration:
    """The identity of the group of recurrent configurations.

    ``e = stab(2 c_max - stab(2 c_max))``: the argument is at least ``c_max`` (so the result is
    recurrent) and equivalent to zero.

    Examples
    --------
    >>> identity_configuration(nx.cycle_graph(4), sink=0).to_dict()
    {1: 1, 2: 0, 3: 1}

    References
    ----------
    Y. Le Borgne, D. Rossin, "On the identity of the sandpile group", Discrete Math. 256
    (2002); M. Creutz, "Abelian sandpiles", Computers in Physics 5 (1991).
    """
    graph = chip_graph(G, sink=sink)
    return Configuration(graph, _identity(graph))


def recurrent_identity(
    G: nx.Graph | ChipGraph, sink: Hashable | None = None
) -> dict[Hashable, int]:
    """The identity recurrent configuration as ``{vertex: chips}`` (sink omitted).

    Parameters
    ----------
    G : networkx Graph, MultiGraph, DiGraph or MultiDiGraph
        Integer multiplicities in the ``weight`` attribute; a directed graph needs every vertex
        to reach the sink.
    sink : hashable, optional
        Default: the first vertex (undirected) or the only vertex without outgoing edges.

    Returns
    -------
    dict
        ``{vertex: chips}`` over the non-sink vertices.

    Examples
    --------
    >>> recurrent_identity(nx.complete_graph(4), 0)
    {1: 2, 2: 2, 3: 2}

    References
    ----------
    Le Borgne, Rossin, Discrete Math. 256 (2002).
    """
    return identity_configuration(G, sink=sink).to_dict()


def recurrent_sum(a: Configuration, b: Configuration) -> Configuration:
    """The group sum ``stab(a + b)`` of two recurrent configurations.

    Raises
    ------
    ConfigurationError
        If either argument is not recurrent, or they belong to different chip graphs.

    Examples
    --------
    >>> cg = chip_graph(nx.cycle_graph(3), sink=0)
    >>> a = cg.configuration({1: 0, 2: 1})
    >>> recurrent_sum(a, a).to_dict(), recurrent_sum(a, recurrent_sum(a, a)).to_dict()
    ({1: 1, 2: 0}, {1: 1, 2: 1})

    References
    ----------
    Biggs (1999), §2; Dhar (1990).
    """
    _require(a, recurrent=True)
    _require(b, recurrent=True)
    total = a + b
    return Configuration(a.graph, _stable(a.graph, total.chips))


def recurrent_negative(a: Configuration) -> Configuration:
    """The inverse of a recurrent configuration in the group of recurrents.

    Examples
    --------
    >>> cg = chip_graph(nx.cycle_graph(5), sink=0)
    >>> a = cg.configuration({1: 1, 2: 1, 3: 0, 4: 1})
    >>> recurrent_sum(a, recurrent_negative(a)) == identity_configuration(cg)
    True

    References
    ----------
    Biggs (1999).
    """
    _require(a, recurrent=True)
    graph = a.graph
    negated = a.chips.astype(object) * -1
    return Configuration(graph, _recurrent_of(graph, as_chip_vector(negated.tolist())))


def configuration_order(configuration: Configuration, *, max_vertices: int = 4000) -> int:
    """The order of the configuration's class in the critical group (any integer counts).

    The least ``k >= 1`` with ``k c`` in the image of ``L~^T``: the least common multiple of
    the denominators of ``(L~^T)^{-1} c``, solved exactly (dense, python-flint).

    Parameters
    ----------
    configuration : Configuration
        Any integer counts.
    max_vertices : int, optional
        Refuse larger graphs (the dense solve needs ``n^2`` memory) with a clear error.

    Raises
    ------
    GraphInvError
        More than ``max_vertices`` non-sink vertices.

    Examples
    --------
    >>> cg = chip_graph(nx.cycle_graph(6), sink=0)
    >>> configuration_order(cg.configuration({1: 1})), configuration_order(cg.configuration({3: 1}))
    (6, 2)

    References
    ----------
    Biggs (1999): the recurrents form a group isomorphic to ``Z^n / L~^T Z^n``.
    """
    graph = configuration.graph
    if not len(graph):
        return 1
    if len(graph) > max_vertices:
        raise GraphInvError(
            f"the order is found by an exact dense solve; this graph has {len(graph)} non-sink "
            f"vertices, more than max_vertices={max_vertices}"
        )
    import flint

    rows = graph.laplacian.toarray().tolist()
    matrix = flint.fmpz_mat(rows)
    column = flint.fmpz_mat([[int(v)] for v in configuration.chips.tolist()])
    solution = matrix.solve(column)
    order = 1
    for i in range(solution.nrows()):
        order = math.lcm(order, int(solution[i, 0].q))
    return order


def recurrent_configurations(
    G: nx.Graph | ChipGraph, *, sink: Hashable | None = None, limit: int = 1_000_000
) -> Iterator[Configuration]:
    """Every recurrent configuration, found by adding chips to ``c_max`` and stabilizing.

    Every recurrent can be reached from ``c_max`` by adding single chips and stabilizing, and
    nothing else can, so a search from ``c_max`` finds each exactly once.  Their number is the
    number of spanning trees (spanning arborescences into the sink for a directed graph).

    Parameters
    ----------
    limit : int, optional
        Stop with an error after this many configurations (the group may be huge).

    Raises
    ------
    GraphInvError
        More than ``limit`` recurrents.

    Examples
    --------
    >>> sorted(tuple(c.to_dict().values()) for c in recurrent_configurations(nx.cycle_graph(3)))
    [(0, 1), (1, 0), (1, 1)]

    References
    ----------
    Dhar (1990); Biggs (1999); Holroyd et al. (2008), Lemma 2.13.
    """
    graph = chip_graph(G, sink=sink)
    neighbours = _out_lists(graph)
    degree = graph.degree.tolist()
    start = tuple(int(v) for v in graph.max_stable.tolist())
    seen = {start}
    queue = deque([start])
    while queue:
        current = queue.popleft()
        yield Configuration(graph, np.array(current, dtype=np.int64))
        for v in range(len(graph)):
            chips = list(current)
            chips[v] += 1
            _topple_small(chips, v, degree, neighbours)
            found = tuple(chips)
            if found not in seen:
                if len(seen) >= limit:
                    raise GraphInvError(
                        f"more than {limit} recurrent configurations; raise limit to list them"
                    )
                seen.add(found)
                queue.append(found)


def superstable_configurations(
    G: nx.Graph | ChipGraph, *, sink: Hashable | None = None, limit: int = 1_000_000
) -> Iterator[Configuration]:
    """Every superstable configuration, as ``c_max - r`` over the recurrents ``r``.

    Examples
    --------
    >>> sorted(tuple(c.to_dict().values()) for c in superstable_configurations(nx.cycle_graph(3)))
    [(0, 0), (0, 1), (1, 0)]

    References
    ----------
    Holroyd et al. (2008), Lemma 4.6 (duality).
    """
    graph = chip_graph(G, sink=sink)
    maximal = np.asarray(graph.max_stable)
    for recurrent in recurrent_configurations(graph, limit=limit):
        yield Configuration(graph, maximal - recurrent.chips)


def _out_lists(graph: ChipGraph) -> list[list[tuple[int, int]]]:
    """For each non-sink vertex, ``(receiving vertex, multiplicity)`` pairs (sink left out)."""
    transfer = graph.transfer.tocsc()
    result: list[list[tuple[int, int]]] = []
    for v in range(len(graph)):
        lo, hi = transfer.indptr[v], transfer.indptr[v + 1]
        result.append(
            list(zip(transfer.indices[lo:hi].tolist(), transfer.data[lo:hi].tolist(), strict=True))
        )
    return result


def _topple_small(
    chips: list[int], start: int, degree: list[int], neighbours: list[list[tuple[int, int]]]
) -> None:
    """Stabilize in place after chips were added at ``start`` (a small avalanche, pure Python)."""
    stack = [start]
    while stack:
        v = stack.pop()
        times = chips[v] // degree[v]
        if times <= 0:
            continue
        chips[v] -= times * degree[v]
        for w, m in neighbours[v]:
            chips[w] += times * m
            if chips[w] >= degree[w]:
                stack.append(w)
