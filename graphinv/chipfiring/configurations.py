"""Chip configurations on a graph with a chosen sink.

A :class:`ChipGraph` fixes a graph, its sink and the order of the other vertices, and holds the
sparse integer data that chip-firing needs.  A :class:`Configuration` is an exact integer vector
of chips in that order; it converts to and from a ``dict`` vertex -> chips.

Conventions
-----------
Edge weights are multiplicities (see :mod:`graphinv._graphs`); loops are skipped.  Firing a
vertex ``v`` sends one chip along every edge leaving ``v`` (``m`` chips along an edge of
multiplicity ``m``), so ``v`` loses its out-degree ``deg(v)`` (edges to the sink included) and
chips reaching the sink vanish.  In matrix form firing the vector ``x`` changes ``c`` into
``c - L~^T x``, with ``L~`` the reduced out-degree Laplacian
(:func:`graphinv.matrices.reduced_laplacian_matrix`).  A directed graph needs a *global sink*:
every vertex must have a directed path to it.

References
----------
N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999);
A. E. Holroyd, L. Levine, K. Mészáros, Y. Peres, J. Propp, D. B. Wilson, "Chip-firing and
rotor-routing on directed graphs", In and Out of Equilibrium 2, Progr. Probab. 60 (2008).
"""

from __future__ import annotations

import functools
from collections.abc import Hashable, Iterable, Mapping
from dataclasses import dataclass, field
from numbers import Integral
from typing import TYPE_CHECKING, Any

import networkx as nx
import numpy as np

from graphinv._graphs import as_multiplicity, require_nonempty, weighted_edges
from graphinv.errors import (
    DisconnectedGraphError,
    GraphFormatError,
    GraphInvError,
    InvalidGraphError,
)

if TYPE_CHECKING:
    import scipy.sparse

__all__ = [
    "ChipGraph",
    "Configuration",
    "ConfigurationError",
    "chip_graph",
    "parse_configuration",
    "vertex_by_name",
]

#: Entries of int64 chip vectors stay below this, so a few sums of them cannot overflow.
INT64_SAFE = 2**62


class ConfigurationError(GraphInvError, ValueError):
    """A chip configuration is not of the kind an operation needs.

    Raised for an unknown vertex, chips on the sink, a wrong length, a non-integer count, or
    negative chips, a non-stable or non-recurrent configuration where the operation needs one.
    """


def as_chip_vector(values: Iterable[Any]) -> np.ndarray:
    """Exact chip vector: ``int64`` while every entry fits comfortably, else Python ints.

    Examples
    --------
    >>> as_chip_vector([1, 2]).dtype, as_chip_vector([2**70, 0]).dtype
    (dtype('int64'), dtype('O'))

    References
    ----------
    NumPy ``int64`` arithmetic is exact below ``2**63``; Python ints are exact always.
    """
    items = []
    for value in values:
        if isinstance(value, bool) or not isinstance(value, Integral):
            if isinstance(value, float) and value.is_integer():
                value = int(value)
            else:
                raise ConfigurationError(f"chip counts must be integers, not {value!r}")
        items.append(int(value))
    if all(-INT64_SAFE < v < INT64_SAFE for v in items):
        return np.array(items, dtype=np.int64)
    vector = np.empty(len(items), dtype=object)
    vector[:] = items
    return vector


def fits_int64(vector: np.ndarray, factor: int = 1) -> bool:
    """Whether ``factor * |entries|`` stays below :data:`INT64_SAFE`.

    Examples
    --------
    >>> fits_int64(np.array([3, -2**40]), 2**20), fits_int64(np.array([3, -2**40]), 2**30)
    (True, False)

    References
    ----------
    NumPy ``int64`` arithmetic is exact below ``2**63``.
    """
    if vector.size == 0:
        return True
    largest = max(abs(int(vector.max())), abs(int(vector.min())))
    return largest * max(factor, 1) < INT64_SAFE


@dataclass(frozen=True, eq=False)
class ChipGraph:
    """A graph prepared for chip-firing: the sink, the vertex order and the firing data.

    Build one with :func:`chip_graph`.  Two chip graphs are equal only if they are the same
    object; configurations of different chip graphs never mix.

    Attributes
    ----------
    graph : networkx graph
        The graph itself (not copied; do not change it while the chip graph is in use).
    sink : hashable
        The sink vertex; chips reaching it vanish and it never fires.
    vertices : tuple
        The non-sink vertices in configuration order (``list(G)`` order, sink left out).
    degree : numpy.ndarray
        ``int64`` out-degree of each non-sink vertex, edges to the sink included: the number of
        chips a vertex needs to fire.
    sink_edges : numpy.ndarray
        ``int64`` number of edges from each non-sink vertex to the sink.
    laplacian : scipy.sparse.csr_array
        ``L~^T``: firing the vector ``x`` changes the configuration ``c`` into ``c - L~^T x``.
    directed : bool
        Whether the graph is directed.

    References
    ----------
    Holroyd et al. (2008), §2; Biggs, J. Algebraic Combin. 9 (1999).
    """

    graph: nx.Graph
    sink: Hashable
    vertices: tuple[Hashable, ...]
    degree: np.ndarray
    sink_edges: np.ndarray
    laplacian: scipy.sparse.csr_array
    directed: bool
    index: dict[Hashable, int] = field(repr=False)
    cache: dict[str, Any] = field(default_factory=dict, repr=False, compare=False)
    """Derived data computed once per chip graph (factorizations, identity, group)."""

    def __len__(self) -> int:
        return len(self.vertices)

    @functools.cached_property
    def max_stable(self) -> np.ndarray:
        """``deg - 1``: the largest stable configuration, as a read-only ``int64`` vector."""
        vector = self.degree - 1
        vector.flags.writeable = False
        return vector

    @functools.cached_property
    def transfer(self) -> scipy.sparse.csr_array:
        """``diag(deg) - L~^T``: entry ``[w, v]`` is the number of edges ``v -> w`` (int64)."""
        import scipy.sparse

        if not len(self):
            return scipy.sparse.csr_array((0, 0), dtype=np.int64)
        matrix = (scipy.sparse.diags_array(self.degree, dtype=np.int64) - self.laplacian).tocsr()
        matrix.eliminate_zeros()
        return matrix.astype(np.int64)

    @functools.cached_property
    def row_weight(self) -> int:
        """``max_v sum_w |L~^T[v, w]|``: bounds ``|L~^T x|`` by ``row_weight * max|x|``."""
        if not len(self):
            return 0
        absolute = abs(self.laplacian)
        return int(np.asarray(absolute.sum(axis=1)).max())

    def configuration(self, chips: Mapping[Hashable, Any] | None = None) -> Configuration:
        """The configuration with the given chips (missing vertices get none).

        Examples
        --------
        >>> cg = chip_graph(nx.path_graph(3), sink=0)
        >>> cg.configuration({2: 5}).to_dict()
        {1: 0, 2: 5}
        """
        return Configuration.from_dict(self, chips or {})

    def zero(self) -> Configuration:
        """The configuration with no chips."""
        return Configuration(self, np.zeros(len(self), dtype=np.int64))

    def maximal_stable(self) -> Configuration:
        """The maximal stable configuration ``c_max = deg - 1`` (always recurrent).

        Examples
        --------
        >>> chip_graph(nx.cycle_graph(4), sink=0).maximal_stable().to_dict()
        {1: 1, 2: 1, 3: 1}
        """
        return Configuration(self, np.array(self.max_stable))

    def to_record(self) -> dict[str, Any]:
        """JSON-ready description: the sink, the vertex order and the degrees."""
        return {
            "sink": _label(self.sink),
            "vertices": [_label(v) for v in self.vertices],
            "degrees": [int(d) for d in self.degree],
            "directed": self.directed,
        }


def _label(vertex: Hashable) -> Any:
    """A vertex as JSON can hold it: numbers and strings stay, anything else becomes a string."""
    if isinstance(vertex, (int, str)) and not isinstance(vertex, bool):
        return vertex
    return str(vertex)


def _default_sink(G: nx.Graph) -> Hashable:
    if not G.is_directed():
        return next(iter(G))
    candidates = [v for v in G if all(w == v for w in G.successors(v))]
    if len(candidates) == 1:
        return candidates[0]
    raise InvalidGraphError(
        "a directed graph needs a sink: give sink=...; "
        f"{len(candidates)} vertices have no outgoing edges"
    )


def _check_reaches_sink(G: nx.Graph, sink: Hashable) -> None:
    if G.is_directed():
        reach = nx.ancestors(G, sink) | {sink}
    else:
        reach = nx.node_connected_component(G, sink)
    if len(reach) != G.number_of_nodes():
        stray = next(v for v in G if v not in reach)
        raise DisconnectedGraphError(
            f"no path from vertex {stray!r} to the sink {sink!r}; chip-firing needs every "
            "vertex to reach the sink (else stabilization may never end)"
        )


def chip_graph(G: nx.Graph | ChipGraph, *, sink: Hashable | None = None) -> ChipGraph:
    """Prepare a graph for chip-firing with the given sink.

    Parameters
    ----------
    G : networkx Graph, MultiGraph, DiGraph or MultiDiGraph, or a ChipGraph
        Edge attribute ``weight`` is a positive integer multiplicity (default 1).  A
        ``ChipGraph`` is returned unchanged (its sink must agree with ``sink`` if given).
    sink : hashable, optional
        Default: the first vertex of an undirected graph; for a directed graph the only vertex
        with no outgoing edges.

    Returns
    -------
    ChipGraph

    Raises
    ------
    InvalidGraphError
        Empty graph, a sink that is not a vertex, or a directed graph without a clear sink.
    DisconnectedGraphError
        Some vertex has no (directed) path to the sink.

    Examples
    --------
    >>> cg = chip_graph(nx.cycle_graph(4), sink=0)
    >>> cg.vertices, cg.degree.tolist(), cg.sink_edges.tolist()
    ((1, 2, 3), [2, 2, 2], [1, 0, 1])
    >>> chip_graph(nx.DiGraph([(1, 0), (1, 2)]), sink=0)
    Traceback (most recent call last):
    ...
    graphinv.errors.DisconnectedGraphError: no path from vertex 2 to the sink 0; ...

    References
    ----------
    Holroyd et al., "Chip-firing and rotor-routing on directed graphs", 2008, §2.
    """
    if isinstance(G, ChipGraph):
        if sink is not None and sink != G.sink:
            raise InvalidGraphError(f"this chip graph has sink {G.sink!r}, not {sink!r}")
        return G
    require_nonempty(G)
    if sink is None:
        sink = _default_sink(G)
    elif sink not in G:
        raise InvalidGraphError(f"the sink {sink!r} is not a vertex of the graph")
    _check_reaches_sink(G, sink)
    vertices = tuple(v for v in G if v != sink)
    index = {v: i for i, v in enumerate(vertices)}
    degree, sink_edges, laplacian = _firing_matrices(G, sink, index)
    return ChipGraph(
        graph=G,
        sink=sink,
        vertices=vertices,
        degree=degree,
        sink_edges=sink_edges,
        laplacian=laplacian,
        directed=G.is_directed(),
        index=index,
    )


def _edges(G: nx.Graph) -> Iterable[tuple[Hashable, Hashable, int]]:
    """``weighted_edges`` with a fast path for simple graphs whose weights are plain ints."""
    if G.is_multigraph():
        yield from weighted_edges(G)
        return
    for u, v, m in G.edges(data="weight", default=1):
        if u == v:
            continue
        if type(m) is not int or m <= 0:
            m = as_multiplicity(m, edge=(u, v))
        yield u, v, m


def _firing_matrices(
    G: nx.Graph, sink: Hashable, index: dict[Hashable, int]
) -> tuple[np.ndarray, np.ndarray, scipy.sparse.csr_array]:
    """Degrees, edges to the sink, and ``L~^T`` (int64), built straight from the edge list."""
    import scipy.sparse

    n = len(index)
    tails: list[int] = []
    heads: list[int] = []
    counts: list[int] = []
    directed = G.is_directed()
    for u, v, m in _edges(G):
        arcs = ((u, v),) if directed else ((u, v), (v, u))
        for source, target in arcs:
            if source == sink:
                continue
            tails.append(index[source])
            heads.append(index[target] if target != sink else n)
            counts.append(m)
    if counts and max(counts) * len(counts) >= INT64_SAFE:
        raise InvalidGraphError(
            "edge multiplicities too large for chip-firing (degrees must stay below 2^62)"
        )
    tail = np.array(tails, dtype=np.int64)
    head = np.array(heads, dtype=np.int64)
    multiplicity = np.array(counts, dtype=np.int64)
    degree = np.zeros(n, dtype=np.int64)
    np.add.at(degree, tail, multiplicity)
    sink_edges = np.zeros(n, dtype=np.int64)
    to_sink = head == n
    np.add.at(sink_edges, tail[to_sink], multiplicity[to_sink])
    inner = ~to_sink
    # row = receiving vertex, column = firing vertex: firing x changes c by -(L~^T x)
    rows = np.concatenate([head[inner], np.arange(n, dtype=np.int64)])
    columns = np.concatenate([tail[inner], np.arange(n, dtype=np.int64)])
    values = np.concatenate([-multiplicity[inner], degree])
    laplacian = scipy.sparse.csr_array((values, (rows, columns)), shape=(n, n), dtype=np.int64)
    laplacian.sum_duplicates()
    laplacian.eliminate_zeros()
    laplacian.sort_indices()
    return degree, sink_edges, laplacian


@dataclass(frozen=True, eq=False)
class Configuration:
    """Chips on the non-sink vertices of a :class:`ChipGraph`, in its vertex order.

    Attributes
    ----------
    graph : ChipGraph
    chips : numpy.ndarray
        Read-only exact counts: ``int64`` while they fit, else Python ints (``object``).
        Negative counts are allowed here (divisors need them); operations that need a
        nonnegative, stable or recurrent configuration check for it.

    Examples
    --------
    >>> cg = chip_graph(nx.complete_graph(3), sink=0)
    >>> c = Configuration.from_dict(cg, {1: 1, 2: 0})
    >>> c.to_dict(), c[1], c.total
    ({1: 1, 2: 0}, 1, 1)
    >>> (c + c).to_dict()
    {1: 2, 2: 0}

    References
    ----------
    Biggs, J. Algebraic Combin. 9 (1999) (configurations and firing).
    """

    graph: ChipGraph
    chips: np.ndarray

    def __post_init__(self) -> None:
        chips = self.chips
        if not isinstance(chips, np.ndarray) or chips.dtype not in (np.int64, object):
            chips = as_chip_vector(list(np.asarray(chips, dtype=object).ravel()))
        elif chips.dtype == object:
            chips = as_chip_vector(chips.tolist())
        if chips.shape != (len(self.graph),):
            raise ConfigurationError(
                f"a configuration needs {len(self.graph)} chip counts (one per non-sink "
                f"vertex), not {chips.size}"
            )
        if chips.flags.writeable:
            chips = chips.copy()
            chips.flags.writeable = False
        object.__setattr__(self, "chips", chips)

    @classmethod
    def from_dict(cls, graph: ChipGraph, chips: Mapping[Hashable, Any]) -> Configuration:
        """The configuration with ``chips[v]`` chips on ``v`` (missing vertices get none).

        Raises
        ------
        ConfigurationError
            A key that is not a vertex, the sink as a key, or a non-integer count.
        """
        values: list[Any] = [0] * len(graph)
        for vertex, count in chips.items():
            position = graph.index.get(vertex)
            if position is None:
                if vertex == graph.sink:
                    raise ConfigurationError(
                        f"vertex {vertex!r} is the sink; the sink holds no chips"
                    )
                raise ConfigurationError(f"unknown vertex {vertex!r}: not in the graph")
            values[position] = count
        return cls(graph, as_chip_vector(values))

    def to_dict(self) -> dict[Hashable, int]:
        """``{vertex: chips}`` over the non-sink vertices, in configuration order."""
        return dict(zip(self.graph.vertices, (int(v) for v in self.chips.tolist()), strict=True))

    def __getitem__(self, vertex: Hashable) -> int:
        position = self.graph.index.get(vertex)
        if position is None:
            raise ConfigurationError(f"unknown vertex {vertex!r}: not a non-sink vertex")
        return int(self.chips[position])

    @property
    def total(self) -> int:
        """The number of chips (exact)."""
        return sum(int(v) for v in self.chips.tolist())

    def is_nonnegative(self) -> bool:
        """Whether no vertex has a negative count."""
        return bool((self.chips >= 0).all())

    def is_stable(self) -> bool:
        """Whether no vertex can fire: ``c(v) < deg(v)`` everywhere.

        Examples
        --------
        >>> cg = chip_graph(nx.path_graph(3), sink=0)
        >>> cg.configuration({1: 1}).is_stable(), cg.configuration({1: 2}).is_stable()
        (True, False)
        """
        return bool((self.chips < self.graph.degree).all())

    def _other(self, other: object) -> np.ndarray:
        if not isinstance(other, Configuration):
            raise TypeError(f"cannot combine a configuration with {type(other).__name__}")
        if other.graph is not self.graph:
            raise ConfigurationError("the configurations belong to different chip graphs")
        return other.chips

    def _combine(self, values: np.ndarray) -> Configuration:
        if values.dtype != object and not fits_int64(values):
            values = as_chip_vector(values.tolist())
        return Configuration(self.graph, values)

    def __add__(self, other: Configuration) -> Configuration:
        """Pointwise sum (no stabilization)."""
        theirs = self._other(other)
        if (
            self.chips.dtype == object
            or theirs.dtype == object
            or not (fits_int64(self.chips, 2) and fits_int64(theirs, 2))
        ):
            return Configuration(self.graph, self.chips.astype(object) + theirs.astype(object))
        return self._combine(self.chips + theirs)

    def __sub__(self, other: Configuration) -> Configuration:
        """Pointwise difference (no stabilization)."""
        theirs = self._other(other)
        if (
            self.chips.dtype == object
            or theirs.dtype == object
            or not (fits_int64(self.chips, 2) and fits_int64(theirs, 2))
        ):
            return Configuration(self.graph, self.chips.astype(object) - theirs.astype(object))
        return self._combine(self.chips - theirs)

    def scaled(self, factor: int) -> Configuration:
        """``factor`` times every count (no stabilization)."""
        if self.chips.dtype != object and fits_int64(self.chips, abs(int(factor)) + 1):
            return self._combine(self.chips * int(factor))
        return Configuration(self.graph, self.chips.astype(object) * int(factor))

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Configuration):
            return NotImplemented
        return other.graph is self.graph and self.chips.tolist() == other.chips.tolist()

    def __hash__(self) -> int:
        return hash((id(self.graph), tuple(self.chips.tolist())))

    def __repr__(self) -> str:
        return f"Configuration({self.to_dict()!r})"

    def to_record(self) -> dict[str, Any]:
        """JSON-ready: ``{"sink": ..., "chips": {vertex: count}, "total": ...}``."""
        return {
            "sink": _label(self.graph.sink),
            "chips": {str(_label(v)): int(n) for v, n in self.to_dict().items()},
            "total": self.total,
        }


def _integer(value: Any) -> int | None:
    """``value`` as an int if it is one (an int, an integral float, or decimal text), else None."""
    if isinstance(value, bool):
        return None
    if isinstance(value, int):
        return value
    if isinstance(value, float):
        return int(value) if value.is_integer() else None
    try:
        return int(str(value))
    except ValueError:
        return None


def vertex_by_name(G: nx.Graph, name: str) -> Hashable:
    """The vertex of ``G`` whose ``str()`` is ``name`` (how vertices are typed on a command line).

    Raises
    ------
    ConfigurationError
        No vertex, or more than one, prints as ``name``.

    Examples
    --------
    >>> vertex_by_name(nx.path_graph(3), "2")
    2
    >>> vertex_by_name(nx.Graph([((0, 1), "sink")]), "(0, 1)")
    (0, 1)

    References
    ----------
    The graph file formats of :mod:`graphinv.io` (vertex names as text).
    """
    matches = [v for v in G if str(v) == name]
    if len(matches) == 1:
        return matches[0]
    if not matches:
        raise ConfigurationError(f"unknown vertex {name!r}: not in the graph")
    raise ConfigurationError(f"vertex name {name!r} is ambiguous: {len(matches)} vertices print so")


def parse_configuration(
    text: str, graph: ChipGraph, *, source: str = "<string>", nonnegative: bool = True
) -> Configuration:
    """Read a configuration: one ``VERTEX COUNT`` (or ``VERTEX=COUNT``) pair per line, or JSON.

    Blank lines and lines starting with ``#`` are skipped; a vertex may appear more than once
    (counts add up).  Text starting with ``{`` is read as a JSON object ``{"vertex": count}``.
    Vertex names are matched against ``str(vertex)``.

    Parameters
    ----------
    text : str
    graph : ChipGraph
    source : str, optional
        File name for error messages.
    nonnegative : bool, optional
        Reject negative counts (default).

    Raises
    ------
    GraphFormatError
        A malformed line, an unknown vertex, the sink, or a negative count (with file and line).

    Examples
    --------
    >>> cg = chip_graph(nx.path_graph(4), sink=0)
    >>> parse_configuration("# demo\\n1 2\\n3=5\\n1 1\\n", cg).to_dict()
    {1: 3, 2: 0, 3: 5}
    >>> parse_configuration("2 -1", cg, source="chips.txt")
    Traceback (most recent call last):
    ...
    graphinv.errors.GraphFormatError: chips.txt, line 1: negative chip count -1 for vertex '2'

    References
    ----------
    The ``VERTEX COUNT`` line format follows the edge-list format of :mod:`graphinv.io`.
    """
    import json

    G = graph.graph
    stripped = text.lstrip()
    pairs: list[tuple[int | None, str, Any]] = []
    if stripped.startswith("{"):
        try:
            data = json.loads(text)
        except json.JSONDecodeError as exc:
            raise GraphFormatError(
                f"not valid JSON: {exc.msg}", source=source, line=exc.lineno
            ) from None
        if not isinstance(data, dict):
            raise GraphFormatError("expected a JSON object {vertex: count}", source=source)
        pairs = [(None, str(k), v) for k, v in data.items()]
    else:
        for number, raw in enumerate(text.splitlines(), start=1):
            line = raw.split("#", 1)[0].strip()
            if not line:
                continue
            parts = line.replace("=", " ").split()
            if len(parts) != 2:
                raise GraphFormatError(
                    f"expected 'VERTEX COUNT', not {raw.strip()!r}", source=source, line=number
                )
            pairs.append((number, parts[0], parts[1]))
    totals: dict[Hashable, int] = {}
    for where, name, raw_count in pairs:
        count = _integer(raw_count)
        if count is None:
            raise GraphFormatError(
                f"chip count must be an integer, not {raw_count!r}", source=source, line=where
            )
        if nonnegative and count < 0:
            raise GraphFormatError(
                f"negative chip count {count} for vertex {name!r}", source=source, line=where
            )
        try:
            vertex = vertex_by_name(G, name)
        except ConfigurationError as exc:
            raise GraphFormatError(str(exc), source=source, line=where) from None
        if vertex == graph.sink:
            raise GraphFormatError(
                f"vertex {name!r} is the sink; the sink holds no chips", source=source, line=where
            )
        totals[vertex] = totals.get(vertex, 0) + count
    return Configuration.from_dict(graph, totals)
