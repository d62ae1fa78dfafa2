"""Exact integer matrices of a graph, with an explicit vertex order.

Each function returns a :class:`LabelledMatrix`: the nonzero entries as exact integers (NumPy
``int64`` while they fit, Python ints otherwise), the row and column labels, and conversions to
a SciPy sparse array, nested Python lists, python-flint ``fmpz_mat`` and SymPy ``Matrix``.  The
sparse form is what large networks use; the dense forms are for small graphs.

Edge weights are multiplicities (see :mod:`graphinv._graphs`).  For a directed graph the
Laplacian is the out-degree Laplacian ``L = D_out - A`` with ``A[u, v]`` the number of edges
``u -> v``, so the rows of ``L`` are the chip-firing moves.

References
----------
N. Biggs, *Algebraic Graph Theory*, 2nd ed., Cambridge University Press, 1993 (Laplacian,
incidence matrix, ``L = B B^T``).
"""

from __future__ import annotations

from collections.abc import Hashable, Iterable
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import networkx as nx
import numpy as np

from graphinv._graphs import require_nonempty, vertex_order, weighted_edges
from graphinv.errors import DisconnectedGraphError, InvalidGraphError

if TYPE_CHECKING:
    import flint
    import scipy.sparse
    import sympy

__all__ = [
    "LabelledMatrix",
    "adjacency_matrix",
    "distance_matrix",
    "incidence_matrix",
    "laplacian_matrix",
    "reduced_laplacian_matrix",
    "signless_laplacian_matrix",
]

_INT64_LIMIT = 2**62  # headroom so that sums of a few entries still fit


@dataclass(frozen=True, eq=False)
class LabelledMatrix:
    """A sparse exact integer matrix with labelled rows and columns.

    Attributes
    ----------
    kind : str
        What the matrix is (``"laplacian"``, ``"adjacency"``, ...).
    row_labels, column_labels : tuple
        The vertex (or edge) each row and column stands for, in order.
    rows, columns : numpy.ndarray
        Indices of the nonzero entries (``int64``), sorted by row then column.
    values : numpy.ndarray
        The nonzero entries: ``int64`` while every entry fits, else ``object`` (Python ints).
    """

    kind: str
    row_labels: tuple[Hashable, ...]
    column_labels: tuple[Hashable, ...]
    rows: np.ndarray
    columns: np.ndarray
    values: np.ndarray

    @property
    def shape(self) -> tuple[int, int]:
        """``(number of rows, number of columns)``."""
        return (len(self.row_labels), len(self.column_labels))

    @property
    def nnz(self) -> int:
        """Number of stored nonzero entries."""
        return int(self.values.shape[0])

    def entries(self) -> list[tuple[int, int, int]]:
        """The nonzero entries as ``(row, column, value)`` triples of Python ints."""
        return [
            (int(i), int(j), int(v))
            for i, j, v in zip(
                self.rows.tolist(), self.columns.tolist(), self.values.tolist(), strict=True
            )
        ]

    def to_lists(self) -> list[list[int]]:
        """Dense nested lists of Python ints (row-major).

        Examples
        --------
        >>> laplacian_matrix(nx.path_graph(3)).to_lists()
        [[1, -1, 0], [-1, 2, -1], [0, -1, 1]]
        """
        n, m = self.shape
        dense = [[0] * m for _ in range(n)]
        for i, j, v in self.entries():
            dense[i][j] = v
        return dense

    def to_rows(self) -> list[dict[int, int]]:
        """Sparse rows ``{column: value}`` of Python ints: the input of
        :func:`graphinv.normalform.sparse_cokernel` and
        :func:`graphinv.normalform.sparse_determinant`.

        Examples
        --------
        >>> laplacian_matrix(nx.path_graph(3)).to_rows()
        [{0: 1, 1: -1}, {0: -1, 1: 2, 2: -1}, {1: -1, 2: 1}]
        """
        rows: list[dict[int, int]] = [{} for _ in self.row_labels]
        for i, j, v in self.entries():
            rows[i][j] = v
        return rows

    def to_scipy(self) -> scipy.sparse.csr_array:
        """A SciPy CSR array with ``int64`` entries.

        Raises
        ------
        OverflowError
            If an entry does not fit in ``int64``; use :meth:`to_lists` or :meth:`to_flint`.
        """
        import scipy.sparse

        if self.values.dtype == object:
            raise OverflowError(
                f"{self.kind} matrix has entries beyond int64; use to_lists() or to_flint()"
            )
        return scipy.sparse.csr_array(
            (self.values, (self.rows, self.columns)), shape=self.shape, dtype=np.int64
        )

    def to_flint(self) -> flint.fmpz_mat:
        """A python-flint ``fmpz_mat`` (dense, exact)."""
        import flint

        return (
            flint.fmpz_mat(self.to_lists()) if self.shape[0] else flint.fmpz_mat(0, self.shape[1])
        )

    def to_sympy(self) -> sympy.Matrix:
        """A SymPy ``Matrix`` (dense, exact)."""
        import sympy

        return sympy.Matrix(self.to_lists()) if self.shape[0] else sympy.zeros(0, self.shape[1])


def _from_triples(
    kind: str,
    row_labels: Iterable[Hashable],
    column_labels: Iterable[Hashable],
    triples: dict[tuple[int, int], int],
) -> LabelledMatrix:
    items = sorted((key, value) for key, value in triples.items() if value != 0)
    rows = np.fromiter((k[0] for k, _ in items), dtype=np.int64, count=len(items))
    columns = np.fromiter((k[1] for k, _ in items), dtype=np.int64, count=len(items))
    raw = [v for _, v in items]
    if all(-_INT64_LIMIT < v < _INT64_LIMIT for v in raw):
        values = np.array(raw, dtype=np.int64)
    else:
        values = np.empty(len(raw), dtype=object)
        values[:] = raw
    return LabelledMatrix(kind, tuple(row_labels), tuple(column_labels), rows, columns, values)


def _adjacency_triples(G: nx.Graph, index: dict[Hashable, int]) -> dict[tuple[int, int], int]:
    triples: dict[tuple[int, int], int] = {}
    directed = G.is_directed()
    for u, v, m in weighted_edges(G):
        i, j = index[u], index[v]
        triples[(i, j)] = triples.get((i, j), 0) + m
        if not directed:
            triples[(j, i)] = triples.get((j, i), 0) + m
    return triples


def adjacency_matrix(G: nx.Graph, vertices: Iterable[Hashable] | None = None) -> LabelledMatrix:
    """The adjacency matrix: entry ``(u, v)`` is the number of edges ``u``-``v`` (loops skipped).

    Parameters
    ----------
    G : networkx graph
        Edge attribute ``weight`` is a positive integer multiplicity (default 1).
    vertices : iterable, optional
        Row and column order; default ``list(G)``.

    Returns
    -------
    LabelledMatrix

    Examples
    --------
    >>> adjacency_matrix(nx.cycle_graph(3)).to_lists()
    [[0, 1, 1], [1, 0, 1], [1, 1, 0]]

    References
    ----------
    Biggs, *Algebraic Graph Theory*, 1993, ch. 2.
    """
    require_nonempty(G)
    order = vertex_order(G, vertices)
    index = {v: i for i, v in enumerate(order)}
    return _from_triples("adjacency", order, order, _adjacency_triples(G, index))


def _laplacian(G: nx.Graph, order: list[Hashable], sign: int, kind: str) -> LabelledMatrix:
    index = {v: i for i, v in enumerate(order)}
    triples = _adjacency_triples(G, index)
    degree = [0] * len(order)
    for (i, j), m in list(triples.items()):
        degree[i] += m
        triples[(i, j)] = sign * m
    for i, d in enumerate(degree):
        if d:
            triples[(i, i)] = d
    return _from_triples(kind, order, order, triples)


def laplacian_matrix(G: nx.Graph, vertices: Iterable[Hashable] | None = None) -> LabelledMatrix:
    """The Laplacian ``L = D - A`` (out-degrees for a directed graph).

    Examples
    --------
    >>> laplacian_matrix(nx.star_graph(2)).to_lists()
    [[2, -1, -1], [-1, 1, 0], [-1, 0, 1]]
    >>> laplacian_matrix(nx.DiGraph([(0, 1), (1, 0), (1, 2)])).to_lists()
    [[1, -1, 0], [-1, 2, -1], [0, 0, 0]]

    References
    ----------
    Biggs, *Algebraic Graph Theory*, 1993; Kirchhoff 1847 (matrix-tree theorem).
    """
    require_nonempty(G)
    return _laplacian(G, vertex_order(G, vertices), -1, "laplacian")


def signless_laplacian_matrix(
    G: nx.Graph, vertices: Iterable[Hashable] | None = None
) -> LabelledMatrix:
    """The signless Laplacian ``Q = D + A`` (undirected graphs).

    Examples
    --------
    >>> signless_laplacian_matrix(nx.path_graph(2)).to_lists()
    [[1, 1], [1, 1]]

    References
    ----------
    D. Cvetković, P. Rowlinson, S. Simić, "Signless Laplacians of finite graphs",
    Linear Algebra Appl. 423 (2007).
    """
    require_nonempty(G)
    if G.is_directed():
        raise InvalidGraphError("the signless Laplacian is defined here for undirected graphs only")
    return _laplacian(G, vertex_order(G, vertices), 1, "signless_laplacian")


def reduced_laplacian_matrix(
    G: nx.Graph,
    removed: Iterable[Hashable] | None = None,
    *,
    sink: Hashable | None = None,
) -> LabelledMatrix:
    """The Laplacian with one vertex of each connected component removed (row and column).

    For an undirected graph the cokernel of the reduced Laplacian is the critical group (it is
    the torsion of the cokernel of the full Laplacian).  For a directed graph give ``sink``; the
    cokernel of the reduced out-degree Laplacian is the sandpile group with that sink.

    Parameters
    ----------
    G : networkx graph
    removed : iterable, optional
        The vertices to remove, one per component; default: the first vertex of each component
        in ``list(G)`` order.
    sink : hashable, optional
        For a directed graph, the global sink to remove (required there).

    Examples
    --------
    >>> M = reduced_laplacian_matrix(nx.cycle_graph(4))
    >>> M.row_labels, M.to_lists()
    ((1, 2, 3), [[2, -1, 0], [-1, 2, -1], [0, -1, 2]])

    References
    ----------
    Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999).
    """
    require_nonempty(G)
    if G.is_directed():
        if sink is None:
            raise InvalidGraphError(
                "a directed graph needs an explicit sink for the reduced Laplacian"
            )
        if sink not in G:
            raise InvalidGraphError(f"the sink {sink!r} is not a vertex of the graph")
        drop = {sink}
    elif sink is not None:
        if sink not in G:
            raise InvalidGraphError(f"the sink {sink!r} is not a vertex of the graph")
        if removed is None and nx.is_connected(G):
            drop = {sink}
        else:
            raise InvalidGraphError("give either one sink (connected graph) or 'removed'")
    elif removed is None:
        position = {v: i for i, v in enumerate(G)}
        drop = {min(c, key=position.__getitem__) for c in nx.connected_components(G)}
    else:
        drop = set(removed)
        components = list(nx.connected_components(G))
        if any(v not in G for v in drop) or any(len(c & drop) != 1 for c in components):
            raise InvalidGraphError(
                "'removed' must hold exactly one vertex of each connected component"
            )
    full = laplacian_matrix(G)
    keep = [v for v in full.row_labels if v not in drop]
    return _restrict(full, keep)


def _restrict(M: LabelledMatrix, keep: list[Hashable]) -> LabelledMatrix:
    position = {v: i for i, v in enumerate(M.row_labels)}
    new_index = {position[v]: k for k, v in enumerate(keep)}
    triples = {
        (new_index[i], new_index[j]): v
        for i, j, v in M.entries()
        if i in new_index and j in new_index
    }
    return _from_triples("reduced_laplacian", keep, keep, triples)


def incidence_matrix(G: nx.Graph, vertices: Iterable[Hashable] | None = None) -> LabelledMatrix:
    """The oriented vertex-edge incidence matrix ``B``, so that ``L = B B^T``.

    Each edge (each unit of multiplicity) is a column, oriented from the earlier vertex in the
    vertex order to the later one (+1 at the tail, -1 at the head).  Column labels are
    ``(u, v, k)`` with ``k`` counting parallel edges from 0.  For a directed graph the columns
    follow the edge directions.

    Examples
    --------
    >>> B = incidence_matrix(nx.path_graph(3))
    >>> B.column_labels, B.to_lists()
    (((0, 1, 0), (1, 2, 0)), [[1, 0], [-1, 1], [0, -1]])

    References
    ----------
    Biggs, *Algebraic Graph Theory*, 1993, Prop. 4.8.
    """
    require_nonempty(G)
    order = vertex_order(G, vertices)
    index = {v: i for i, v in enumerate(order)}
    edges: list[tuple[int, int, int]] = []
    for u, v, m in weighted_edges(G):
        i, j = index[u], index[v]
        if not G.is_directed() and i > j:
            i, j = j, i
        edges.append((i, j, m))
    edges.sort()
    triples: dict[tuple[int, int], int] = {}
    labels: list[tuple[Any, Any, int]] = []
    for i, j, m in edges:
        for k in range(m):
            column = len(labels)
            labels.append((order[i], order[j], k))
            triples[(i, column)] = 1
            triples[(j, column)] = -1
    return _from_triples("incidence", order, labels, triples)


def distance_matrix(G: nx.Graph, vertices: Iterable[Hashable] | None = None) -> LabelledMatrix:
    """The distance matrix of a connected undirected graph (path lengths in edges).

    Multiplicities do not change distances.

    Raises
    ------
    DisconnectedGraphError
        If the graph is not connected (some distance is infinite).

    Examples
    --------
    >>> distance_matrix(nx.path_graph(3)).to_lists()
    [[0, 1, 2], [1, 0, 1], [2, 1, 0]]

    References
    ----------
    R. L. Graham, H. O. Pollak, "On the addressing problem for loop switching",
    Bell System Tech. J. 50 (1971).
    """
    require_nonempty(G)
    if G.is_directed():
        raise InvalidGraphError("the distance matrix is defined here for undirected graphs only")
    if not nx.is_connected(G):
        raise DisconnectedGraphError(
            "the distance matrix needs a connected graph; this one has "
            f"{nx.number_connected_components(G)} components"
        )
    order = vertex_order(G, vertices)
    index = {v: i for i, v in enumerate(order)}
    triples: dict[tuple[int, int], int] = {}
    for source, lengths in nx.all_pairs_shortest_path_length(G):
        i = index[source]
        for target, d in lengths.items():
            triples[(i, index[target])] = d
    return _from_triples("distance", order, order, triples)
