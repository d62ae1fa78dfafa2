"""The critical group of a graph, and its spanning-tree count by an independent route.

For a connected undirected multigraph ``G`` with Laplacian ``L`` the cokernel of ``L`` is
``Z ⊕ K(G)``; the finite part ``K(G)`` is the critical group (also sandpile group, Jacobian),
and its order is the number of spanning trees (Kirchhoff's matrix-tree theorem).  For a graph
with ``c`` components the cokernel of ``L`` is ``Z^c ⊕ K(G)`` with ``K(G)`` the direct sum of
the components' groups.

How it is computed
------------------
1. **Blocks.**  ``K(G)`` is the direct sum of the critical groups of the blocks (biconnected
   components) of ``G``, and so is the spanning-tree count a product over the blocks: a
   spanning tree is a choice of one spanning tree in every block.  A bridge of multiplicity
   ``m`` is a block with group ``Z/m``; pendant trees contribute nothing.
2. **Each block**: the reduced Laplacian (one vertex removed) is handed to the sparse
   cokernel route of :mod:`graphinv.normalform.cokernel` (unit-pivot elimination, then the
   modular finish on the dense core).
3. **Certificate.**  The product of each block's invariant factors must equal the determinant
   of its reduced Laplacian ``L`` (the block's spanning-tree count), established independently
   of the Smith form; otherwise :class:`CertificationError` is raised.  Small blocks: the
   determinant by multi-modular Gaussian elimination
   (:func:`graphinv.normalform.sparse_determinant`).  Large blocks (Abbott, Bronstein, Mulders
   1999): the modular finish leaves a rational solution of ``L x = b``; checking ``L (s x) =
   s b`` exactly proves that its denominator ``s`` divides ``det L`` (Cramer's rule), and
   ``det L`` is then compared with the product modulo primes until ``s`` times their product
   exceeds the Hadamard bound: equality is proven, with ``log(bound / s)`` instead of
   ``log(bound)`` bits of primes.  The residues come from ``L``'s own entries: the
   elimination's unit pivots replayed in plain integer arithmetic
   (:mod:`graphinv.normalform._pivot_replay`), or the level sweep of the multi-modular
   elimination when many primes are needed.

Directed graphs: the out-degree Laplacian ``L = D_out - A`` with an explicit ``sink``; the group
is the cokernel of ``L`` with the sink's row and column removed (the sandpile group), and the
count is the number of spanning arborescences directed into the sink (Tutte's matrix-tree
theorem).

References
----------
N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999).
D. Lorenzini, "A finite group attached to the Laplacian of a graph", Discrete Math. 91 (1991).
G. Kirchhoff, Ann. Phys. Chem. 72 (1847) (matrix-tree theorem); W. T. Tutte, *Graph Theory*
(1984) (directed version).
"""

from __future__ import annotations

import math
from collections.abc import Hashable
from dataclasses import dataclass, field
from functools import cached_property, reduce
from operator import mul
from typing import Any, Literal

import networkx as nx

from graphinv._graphs import require_nonempty, weighted_edges
from graphinv.errors import GraphInvError, InvalidGraphError
from graphinv.normalform import Cokernel, sparse_cokernel, sparse_determinant
from graphinv.normalform._matrix import chain_normalize
from graphinv.normalform.cokernel import sparse_cokernel_certified
from graphinv.normalform.determinant import confirm_determinant, subgroup_order

__all__ = [
    "CertificationError",
    "CriticalGroup",
    "LogTreeCount",
    "TreeCountCertificate",
    "critical_group",
    "log_spanning_tree_count",
    "matrix_cokernel",
    "spanning_tree_count",
]


class CertificationError(GraphInvError, ArithmeticError):
    """Two independent computations disagree (this signals a bug; please report it)."""


@dataclass(frozen=True)
class TreeCountCertificate:
    """Evidence attached to a critical group.

    Attributes
    ----------
    spanning_trees : int
        The product of the blocks' spanning-tree counts (for a connected graph, its number of
        spanning trees; for a directed graph, the number of arborescences into the sink), each
        a determinant established independently of the Smith form (module docstring, step 3).
    blocks : int
        How many blocks (biconnected components) were computed separately.
    checked : bool
        True when the product of the invariant factors equals ``spanning_trees`` block by
        block (always True on a returned group; a mismatch raises).
    """

    spanning_trees: int
    blocks: int
    checked: bool = True
    method: str = (
        "determinant of each block's reduced Laplacian: multi-modular elimination, above a "
        "divisor proven by an exact rational solution"
    )

    def to_record(self) -> dict[str, Any]:
        """JSON-ready dict (the count as a decimal string)."""
        return {
            "spanning_trees": str(self.spanning_trees),
            "blocks": self.blocks,
            "checked": self.checked,
            "method": self.method,
        }


def _factor(n: int) -> dict[int, int]:
    import flint

    return {int(p): int(e) for p, e in flint.fmpz(n).factor()}


@dataclass(frozen=True)
class CriticalGroup:
    """The critical group ``K(G)`` of a graph: a finite abelian group in invariant-factor form.

    Attributes
    ----------
    invariant_factors : tuple of int
        ``d_1 | d_2 | ... | d_r``, each greater than 1; ``K(G) = Z/d_1 ⊕ ... ⊕ Z/d_r``.
    free_rank : int
        The free rank of the cokernel of the Laplacian: the number of connected components
        (undirected); for a directed graph, the corank of the reduced Laplacian (0 when every
        vertex can reach the sink).
    order : int
        ``|K(G)|``, the product of the invariant factors.
    certificate : TreeCountCertificate
        The independently computed spanning-tree count that ``order`` was checked against.
    vertices, edges : int
        Size of the graph (edges counted with multiplicity, loops skipped).
    sink : hashable or None
        The sink, for a directed graph.

    Notes
    -----
    ``str(group)`` writes the torsion group only, e.g. ``Z/2 ⊕ Z/10``, and ``0`` for the
    trivial group; the free part is reported by ``free_rank``.
    """

    invariant_factors: tuple[int, ...]
    free_rank: int
    order: int
    certificate: TreeCountCertificate
    vertices: int = 0
    edges: int = 0
    sink: Hashable | None = field(default=None)

    @property
    def rank(self) -> int:
        """The minimum number of generators (number of invariant factors)."""
        return len(self.invariant_factors)

    @property
    def exponent(self) -> int:
        """The largest order of an element (the last invariant factor; 1 if trivial)."""
        return self.invariant_factors[-1] if self.invariant_factors else 1

    @property
    def is_cyclic(self) -> bool:
        """True when the group is cyclic (at most one invariant factor)."""
        return len(self.invariant_factors) <= 1

    @cached_property
    def primary_decomposition(self) -> dict[int, tuple[int, ...]]:
        """Elementary divisors grouped by prime: ``{p: (p^a, p^b, ...)}``, each tuple sorted.

        This factors the invariant factors, which may take long when they have huge prime
        factors.

        Examples
        --------
        >>> import networkx as nx
        >>> critical_group(nx.petersen_graph()).primary_decomposition
        {2: (2, 2, 2, 2), 5: (5, 5, 5)}
        """
        parts: dict[int, list[int]] = {}
        for d in self.invariant_factors:
            for p, e in _factor(d).items():
                parts.setdefault(p, []).append(p**e)
        return {p: tuple(sorted(parts[p])) for p in sorted(parts)}

    def p_rank(self, p: int) -> int:
        """The number of invariant factors divisible by the prime ``p`` (rank of the Sylow
        ``p``-subgroup).

        Examples
        --------
        >>> import networkx as nx
        >>> G = critical_group(nx.petersen_graph())
        >>> G.p_rank(2), G.p_rank(5), G.p_rank(3)
        (4, 3, 0)
        """
        if isinstance(p, bool) or not isinstance(p, int) or p < 2 or _factor(p) != {p: 1}:
            raise ValueError(f"Argument 'p' must be a prime, not {p!r}.")
        return sum(1 for d in self.invariant_factors if d % p == 0)

    def __str__(self) -> str:
        if not self.invariant_factors:
            return "0"
        return " ⊕ ".join(f"Z/{d}" for d in self.invariant_factors)

    def _grouped(self) -> list[tuple[int, int]]:
        groups: list[tuple[int, int]] = []
        for d in self.invariant_factors:
            if groups and groups[-1][0] == d:
                groups[-1] = (d, groups[-1][1] + 1)
            else:
                groups.append((d, 1))
        return groups

    def _repr_latex_(self) -> str:
        if not self.invariant_factors:
            return "$0$"
        terms = [
            rf"(\mathbb{{Z}}/{d})^{{{k}}}" if k > 1 else rf"\mathbb{{Z}}/{d}"
            for d, k in self._grouped()
        ]
        return "$" + r" \oplus ".join(terms) + "$"

    def _repr_html_(self) -> str:
        body = (
            " ⊕ ".join(
                f"(ℤ/{d})<sup>{k}</sup>" if k > 1 else f"ℤ/{d}" for d, k in self._grouped()
            )
            if self.invariant_factors
            else "0"
        )
        return (
            f"<span title='order {self.order}, rank {self.rank}, free rank "
            f"{self.free_rank}'>{body}</span>"
        )

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict; invariant factors, order and exponent as decimal strings.

        Examples
        --------
        >>> import networkx as nx
        >>> critical_group(nx.cycle_graph(5)).to_record()["invariant_factors"]
        ['5']
        """
        record: dict[str, Any] = {
            "vertices": self.vertices,
            "edges": self.edges,
            "invariant_factors": [str(d) for d in self.invariant_factors],
            "order": str(self.order),
            "rank": self.rank,
            "free_rank": self.free_rank,
            "exponent": str(self.exponent),
            "is_cyclic": self.is_cyclic,
            "group": str(self),
            "certificate": self.certificate.to_record(),
        }
        if self.sink is not None:
            record["sink"] = str(self.sink)
        return record


@dataclass(frozen=True)
class LogTreeCount:
    """The natural logarithm of a spanning-tree count, as an approximate float.

    Attributes
    ----------
    value : float
        Approximate ``log(tau(G))`` (``-inf`` when the count is 0).
    error_estimate : float
        An estimate of the absolute error of ``value`` (rounding in the sparse factorization).
    vertices : int
        Number of vertices.
    """

    value: float
    error_estimate: float
    vertices: int
    approximate: bool = True

    @property
    def log10(self) -> float:
        """``value / ln 10``: roughly the number of decimal digits of the count, less one."""
        return self.value / math.log(10)

    def to_record(self) -> dict[str, Any]:
        """JSON-ready dict (``-inf`` written as the string ``"-inf"``)."""
        finite = math.isfinite(self.value)
        return {
            "log_spanning_trees": self.value if finite else "-inf",
            "error_estimate": self.error_estimate,
            "approximate": True,
            "vertices": self.vertices,
        }

    def __str__(self) -> str:
        return f"log τ ≈ {self.value:.12g} (± {self.error_estimate:.1g}, approximate)"


# --------------------------------------------------------------------------------------------
# Graph structure


def _adjacency(G: nx.Graph) -> tuple[dict[Hashable, dict[Hashable, int]], int]:
    """``{u: {v: multiplicity}}`` with loops skipped (both directions for undirected graphs),
    and the total number of edges counted with multiplicity."""
    adjacency: dict[Hashable, dict[Hashable, int]] = {v: {} for v in G}
    total = 0
    directed = G.is_directed()
    for u, v, m in weighted_edges(G):
        total += m
        adjacency[u][v] = adjacency[u].get(v, 0) + m
        if not directed:
            adjacency[v][u] = adjacency[v].get(u, 0) + m
    return adjacency, total


def _reduced_rows(
    adjacency: dict[Hashable, dict[Hashable, int]], vertices: list[Hashable], removed: Hashable
) -> list[dict[int, int]]:
    """Sparse rows of the Laplacian on ``vertices`` with ``removed`` deleted.

    Only edges between two of ``vertices`` count (the Laplacian of the induced subgraph), which
    for a block is exactly the block's own Laplacian.
    """
    index = {v: i for i, v in enumerate(w for w in vertices if w != removed)}
    inside = set(vertices)
    rows: list[dict[int, int]] = []
    for v in vertices:
        if v == removed:
            continue
        row: dict[int, int] = {}
        degree = 0
        for u, m in adjacency[v].items():
            if u in inside:
                degree += m
                if u != removed:
                    row[index[u]] = -m
        if degree:
            row[index[v]] = degree
        rows.append(row)
    return rows


def _blocks(
    G: nx.Graph, adjacency: dict[Hashable, dict[Hashable, int]]
) -> tuple[list[list[Hashable]], int]:
    """The blocks with at least two vertices, and the number of connected components."""
    if type(G) is nx.Graph and nx.number_of_selfloops(G) == 0:
        H = G  # already the simple loopless graph the blocks are taken of
    else:
        H = nx.Graph()
        H.add_nodes_from(G)
        H.add_edges_from((u, v) for u, nbrs in adjacency.items() for v in nbrs)
    components = nx.number_connected_components(H)
    return [list(block) for block in nx.biconnected_components(H)], components


def _pick_removed(adjacency: dict[Hashable, dict[Hashable, int]], block: list[Hashable]) -> Hashable:
    # Removing a vertex of largest degree leaves the sparsest reduced Laplacian.
    inside = set(block)
    return max(block, key=lambda v: sum(1 for u in adjacency[v] if u in inside))


def _require_sink(G: nx.Graph, sink: Hashable | None) -> None:
    if sink is None:
        raise InvalidGraphError(
            "a directed graph needs an explicit sink (sink=...); its Laplacian has no "
            "canonical reduction"
        )
    if sink not in G:
        raise InvalidGraphError(f"the sink {sink!r} is not a vertex of the graph")


def _directed_rows(G: nx.Graph, sink: Hashable) -> tuple[list[dict[int, int]], int]:
    adjacency, total = _adjacency(G)
    return _reduced_rows_directed(adjacency, list(G), sink), total


def _reduced_rows_directed(
    adjacency: dict[Hashable, dict[Hashable, int]], vertices: list[Hashable], sink: Hashable
) -> list[dict[int, int]]:
    index = {v: i for i, v in enumerate(w for w in vertices if w != sink)}
    rows = []
    for v in vertices:
        if v == sink:
            continue
        row: dict[int, int] = {}
        degree = 0
        for u, m in adjacency[v].items():
            degree += m
            if u != sink:
                row[index[u]] = row.get(index[u], 0) - m
        if degree:
            row[index[v]] = row.get(index[v], 0) + degree
        rows.append({j: x for j, x in row.items() if x})
    return rows


def _diagonal_bound(rows: list[dict[int, int]]) -> int:
    """The product of the diagonal entries: a bound on the determinant of a symmetric positive
    semidefinite matrix such as a reduced Laplacian (Hadamard's inequality)."""
    bound = 1
    for i, row in enumerate(rows):
        bound *= row.get(i, 0)
    return bound


def _tree_count(rows: list[dict[int, int]]) -> int:
    """Determinant of a reduced Laplacian of an undirected graph."""
    return sparse_determinant(rows, bound=_diagonal_bound(rows))


def _certify(factors: list[int], count: int, what: str) -> None:
    product = reduce(mul, factors, 1)
    if product != count:
        raise CertificationError(
            f"{what}: the product of the invariant factors ({product}) differs from the "
            f"spanning-tree count computed independently ({count})"
        )


# --------------------------------------------------------------------------------------------
# Public functions


def critical_group(G: nx.Graph, *, sink: Hashable | None = None) -> CriticalGroup:
    """The critical group of a graph, certified against its spanning-tree count.

    Parameters
    ----------
    G : networkx Graph, MultiGraph, DiGraph or MultiDiGraph
        Edge attribute ``weight`` is a positive integer multiplicity (default 1); loops are
        skipped.
    sink : hashable, optional
        Required for a directed graph: the group is the cokernel of the out-degree Laplacian
        with the sink's row and column removed.  Ignored for undirected graphs (the group does
        not depend on it), except that it must be a vertex.

    Returns
    -------
    CriticalGroup

    Raises
    ------
    InvalidGraphError
        Empty graph, directed graph without a sink, or a sink that is not a vertex.
    InvalidWeightError
        A weight that is not a positive integer.

    Examples
    --------
    >>> import networkx as nx
    >>> K = critical_group(nx.petersen_graph())
    >>> print(K)
    Z/2 ⊕ Z/10 ⊕ Z/10 ⊕ Z/10
    >>> K.order, K.rank, K.free_rank, K.certificate.spanning_trees
    (2000, 4, 1, 2000)

    References
    ----------
    Biggs, J. Algebraic Combin. 9 (1999); Lorenzini, Discrete Math. 91 (1991).
    """
    require_nonempty(G)
    if G.is_directed():
        _require_sink(G, sink)
        rows, total = _directed_rows(G, sink)
        n = len(rows)
        group = sparse_cokernel([dict(r) for r in rows], n_columns=n)
        count = sparse_determinant(rows)
        if group.free_rank == 0:
            _certify(list(group.invariant_factors), abs(count), "directed graph")
        elif count != 0:
            raise CertificationError(
                "the reduced Laplacian is singular by elimination but has a nonzero determinant"
            )
        return CriticalGroup(
            group.invariant_factors,
            group.free_rank,
            group.torsion_order,
            TreeCountCertificate(abs(count), 1, group.free_rank == 0),
            G.number_of_nodes(),
            total,
            sink,
        )
    if sink is not None and sink not in G:
        raise InvalidGraphError(f"the sink {sink!r} is not a vertex of the graph")
    adjacency, total = _adjacency(G)
    blocks, components = _blocks(G, adjacency)
    factors: list[int] = []
    trees = 1
    for block in blocks:
        block_factors, block_trees = _block_group(adjacency, block)
        factors.extend(block_factors)
        trees *= block_trees
    invariants = tuple(d for d in chain_normalize(factors) if d > 1)
    order = reduce(mul, invariants, 1)
    _certify(list(invariants), trees, "graph")
    return CriticalGroup(
        invariants,
        components,
        order,
        TreeCountCertificate(trees, len(blocks)),
        G.number_of_nodes(),
        total,
        None,
    )


def _block_group(
    adjacency: dict[Hashable, dict[Hashable, int]], block: list[Hashable]
) -> tuple[list[int], int]:
    """Invariant factors (> 1) and the independently computed tree count of one block."""
    if len(block) == 2:
        u, v = block
        m = adjacency[u][v]
        return ([m] if m > 1 else []), m
    removed = _pick_removed(adjacency, block)
    rows = _reduced_rows(adjacency, block, removed)
    bound = _diagonal_bound(rows)
    group, witness = sparse_cokernel_certified(
        [dict(r) for r in rows], n_columns=len(rows), bound=bound
    )
    if group.free_rank:
        raise CertificationError("a block's reduced Laplacian came out singular")
    factors = list(group.invariant_factors)
    if witness is not None:
        # The short route: a proven divisor s of det L (the order of the subgroup spanned by
        # two exact rational solutions), then det L = order modulo primes whose product
        # exceeds (bound + order) / s.
        order = reduce(mul, factors, 1)
        try:
            divisor = subgroup_order(rows, witness.orders, witness.vectors, enough=order)
        except ArithmeticError as error:
            raise CertificationError(
                f"block: the solution behind the certificate fails: {error}"
            ) from error
        # The residues of det L: the elimination's pivot order replayed on L's own entries
        # (a separate computation; only the order is reused), else the level sweep.
        if confirm_determinant(rows, order, bound=bound, divisor=divisor, pivots=witness.pivots):
            return factors, order
    trees = _tree_count(rows)
    _certify(factors, trees, "block")
    return factors, trees


def spanning_tree_count(G: nx.Graph, *, sink: Hashable | None = None) -> int:
    """The exact number of spanning trees (0 for a disconnected graph).

    Computed as the product over blocks of the determinants of the blocks' reduced Laplacians
    (Kirchhoff's matrix-tree theorem), by multi-modular elimination: a route independent of the
    Smith form.  For a directed graph give ``sink``: the result is the number of spanning
    arborescences in which every vertex has a directed path to the sink (Tutte).

    Parameters
    ----------
    G : networkx graph
        Edge attribute ``weight`` is a positive integer multiplicity (default 1).
    sink : hashable, optional
        Required for a directed graph.

    Returns
    -------
    int

    Examples
    --------
    >>> import networkx as nx
    >>> spanning_tree_count(nx.complete_graph(5))  # Cayley: 5^3
    125
    >>> spanning_tree_count(nx.grid_2d_graph(3, 3))  # OEIS A007341
    192

    References
    ----------
    Kirchhoff (1847); Tutte, *Graph Theory* (1984), Theorem VI.28.
    """
    require_nonempty(G)
    if G.is_directed():
        _require_sink(G, sink)
        rows, _ = _directed_rows(G, sink)
        return abs(sparse_determinant(rows))
    if sink is not None and sink not in G:
        raise InvalidGraphError(f"the sink {sink!r} is not a vertex of the graph")
    adjacency, _ = _adjacency(G)
    blocks, components = _blocks(G, adjacency)
    if components > 1:
        return 0
    trees = 1
    for block in blocks:
        if len(block) == 2:
            u, v = block
            trees *= adjacency[u][v]
        else:
            rows = _reduced_rows(adjacency, block, _pick_removed(adjacency, block))
            trees *= _tree_count(rows)
    return trees


def log_spanning_tree_count(G: nx.Graph, *, sink: Hashable | None = None) -> LogTreeCount:
    """The natural logarithm of the spanning-tree count, approximately, for huge graphs.

    A sparse LU factorization of the reduced Laplacian (SciPy's SuperLU with a fill-reducing
    ordering) gives ``log tau = sum log |u_ii|``.  The result is a float: use
    :func:`spanning_tree_count` for the exact integer.

    Parameters
    ----------
    G : networkx graph
    sink : hashable, optional
        Required for a directed graph (arborescences into the sink).

    Returns
    -------
    LogTreeCount
        ``value`` (``-inf`` for a disconnected graph) and an error estimate.

    Examples
    --------
    >>> import networkx as nx
    >>> r = log_spanning_tree_count(nx.complete_graph(5))
    >>> round(r.value, 9) == round(3 * math.log(5), 9)
    True

    References
    ----------
    X. S. Li, "An overview of SuperLU", ACM Trans. Math. Software 31 (2005); Kirchhoff (1847).
    """
    import numpy as np
    import scipy.sparse
    import scipy.sparse.csgraph
    import scipy.sparse.linalg

    require_nonempty(G)
    n = G.number_of_nodes()
    directed = G.is_directed()
    if directed:
        _require_sink(G, sink)
        removed = sink
    elif sink is not None and sink not in G:
        raise InvalidGraphError(f"the sink {sink!r} is not a vertex of the graph")
    else:
        removed = sink if sink is not None else next(iter(G))
    index = {v: i for i, v in enumerate(G)}
    triples = np.array(
        [(index[u], index[v], m) for u, v, m in weighted_edges(G)], dtype=np.float64
    ).reshape(-1, 3)
    tails = triples[:, 0].astype(np.int64)
    heads = triples[:, 1].astype(np.int64)
    weights = triples[:, 2]
    if not directed:
        tails, heads = np.concatenate([tails, heads]), np.concatenate([heads, tails])
        weights = np.concatenate([weights, weights])
        components, _ = scipy.sparse.csgraph.connected_components(
            scipy.sparse.coo_array((weights, (tails, heads)), shape=(n, n)), directed=False
        )
        if components > 1:
            return LogTreeCount(float("-inf"), 0.0, n)
    A = scipy.sparse.coo_array((weights, (tails, heads)), shape=(n, n)).tocsr()
    degree = np.asarray(A.sum(axis=1)).ravel()
    keep = np.ones(n, dtype=bool)
    keep[index[removed]] = False
    L = (scipy.sparse.diags_array(degree) - A).tocsr()[keep][:, keep].tocsc()
    size = L.shape[0]
    if size == 0:
        return LogTreeCount(0.0, 0.0, n)
    symmetric = not G.is_directed()
    try:
        lu = scipy.sparse.linalg.splu(
            L,
            permc_spec="MMD_AT_PLUS_A" if symmetric else "COLAMD",
            diag_pivot_thresh=0.0 if symmetric else 1.0,
            options={"SymmetricMode": symmetric},
        )
    except RuntimeError:  # exactly singular: a directed graph whose sink is not reachable
        return LogTreeCount(float("-inf"), 0.0, n)
    diagonal = np.abs(lu.U.diagonal())
    if not np.all(diagonal > 0):
        return LogTreeCount(float("-inf"), 0.0, n)
    logs = np.log(diagonal)
    value = math.fsum(logs.tolist())
    # Each pivot carries a relative rounding error of a few units in the last place times the
    # element growth; summed over the pivots that is an absolute error in the logarithm.
    eps = float(np.finfo(np.float64).eps)
    growth = float(np.max(np.abs(lu.U.data))) / float(np.max(np.abs(L.data)))
    error = size * eps * 16.0 * max(1.0, growth) + eps * abs(value)
    return LogTreeCount(value, error, n)


MatrixKind = Literal["adjacency", "signless", "laplacian", "distance"]


def matrix_cokernel(G: nx.Graph, matrix: MatrixKind = "adjacency") -> Cokernel:
    """The cokernel (Smith invariants) of a graph matrix, through the same integer core.

    Parameters
    ----------
    G : networkx graph
    matrix : {"adjacency", "signless", "laplacian", "distance"}
        Which matrix: adjacency ``A``, signless Laplacian ``D + A``, Laplacian ``D - A``, or
        the distance matrix of a connected graph.

    Returns
    -------
    Cokernel

    Examples
    --------
    >>> import networkx as nx
    >>> matrix_cokernel(nx.cycle_graph(4), "adjacency")
    Cokernel(invariant_factors=(), free_rank=2)
    >>> matrix_cokernel(nx.path_graph(3), "distance")
    Cokernel(invariant_factors=(4,), free_rank=0)

    References
    ----------
    Graham, Pollak, Bell System Tech. J. 50 (1971) (distance matrix of a tree);
    Lorenzini (1991).
    """
    from graphinv import matrices

    builders = {
        "adjacency": matrices.adjacency_matrix,
        "signless": matrices.signless_laplacian_matrix,
        "laplacian": matrices.laplacian_matrix,
        "distance": matrices.distance_matrix,
    }
    if matrix not in builders:
        raise InvalidGraphError(
            f"Argument 'matrix' must be one of {', '.join(builders)}, not {matrix!r}."
        )
    M = builders[matrix](G)
    n_rows, n_columns = M.shape
    rows: list[dict[int, int]] = [{} for _ in range(n_rows)]
    for i, j, v in M.entries():
        rows[i][j] = v
    return sparse_cokernel(rows, n_columns=n_columns)

