"""Cospectral graphs: which graphs share a characteristic polynomial, and what tells them apart.

Two graphs are *cospectral* for a matrix (Laplacian ``L``, signless Laplacian ``Q`` or adjacency
``A``) when that matrix has the same characteristic polynomial for both.  graphinv groups graphs
by the **exact** integer polynomial (never by floating-point eigenvalues), removes isomorphic
duplicates first (an isomorphic copy is not a "mate"), and then asks which finer invariants
separate the members of each class: the critical group (torsion of the cokernel of ``L``), the
Smith normal forms of ``A`` and ``Q``, and the degree sequence.

Isomorphism is decided by a canonical certificate from nauty (through the ``pynauty`` package)
for simple graphs; for multigraphs, or when pynauty is not installed, graphs inside one
polynomial class are compared with :func:`networkx.is_isomorphic` instead.

References
----------
W. H. Haemers, E. Spence, "Enumeration of cospectral graphs", European J. Combin. 25 (2004);
A. E. Brouwer, W. H. Haemers, *Spectra of Graphs*, Springer, 2012, ch. 14;
B. D. McKay, A. Piperno, "Practical graph isomorphism, II", J. Symbolic Comput. 60 (2014).
"""

from __future__ import annotations

import html
from collections.abc import Callable, Hashable, Iterable, Sequence
from dataclasses import dataclass, field
from typing import Any

import networkx as nx
import numpy as np

from graphinv._graphs import as_multiplicity, weighted_edges
from graphinv.errors import InvalidGraphError
from graphinv.spectrum import (
    MATRIX_KINDS,
    characteristic_polynomials,
    check_matrix_kind,
    format_polynomial,
)

__all__ = [
    "SEPARATING_INVARIANTS",
    "Comparison",
    "ComparisonRow",
    "CospectralClass",
    "CospectralReport",
    "CospectralSummary",
    "PolynomialClasses",
    "canonical_key",
    "canonical_key_of_edges",
    "classes_from_keys",
    "compare_graphs",
    "cospectral_classes",
    "find_cospectral",
    "format_group",
    "is_isomorphic",
    "polynomial_keys",
]

#: The invariants checked on every cospectral class, in this order.
SEPARATING_INVARIANTS: tuple[str, ...] = (
    "critical_group",
    "adjacency_smith",
    "signless_smith",
    "degree_sequence",
)

_MATRIX_LETTER = {"laplacian": "L", "signless": "Q", "adjacency": "A"}


# --------------------------------------------------------------------------------------------
# graphs as small integer structures
# --------------------------------------------------------------------------------------------


def _check_graph(G: Any, position: int | None = None) -> nx.Graph:
    where = f"graph {position}: " if position is not None else ""
    if not isinstance(G, nx.Graph):
        raise InvalidGraphError(f"{where}expected a networkx graph, not {type(G).__name__}")
    if G.is_directed():
        raise InvalidGraphError(f"{where}cospectral analysis needs undirected graphs")
    if G.number_of_nodes() == 0:
        raise InvalidGraphError(f"{where}the graph has no vertices; expected at least one")
    return G


def _integer_edges(G: nx.Graph) -> tuple[int, list[tuple[int, int, int]]]:
    index = {v: i for i, v in enumerate(G)}
    if G.is_multigraph():
        return len(index), [(index[u], index[v], m) for u, v, m in weighted_edges(G)]
    # Fast path for simple graphs (collections of many small graphs): plain positive int
    # weights are taken as they are, anything else goes through the full check.
    edges = []
    for u, v, weight in G.edges(data="weight", default=1):
        if u == v:
            continue
        m = weight if type(weight) is int and weight > 0 else as_multiplicity(weight, edge=(u, v))
        edges.append((index[u], index[v], m))
    return len(index), edges


def _adjacency_array(n: int, edges: Sequence[tuple[int, int, int]]) -> np.ndarray:
    A = np.zeros((n, n), dtype=np.int64)
    for i, j, m in edges:
        A[i, j] += m
        A[j, i] += m
    return A


def _matrix_stack(adjacency: np.ndarray, matrix: str) -> np.ndarray:
    if matrix == "adjacency":
        return adjacency
    degree = adjacency.sum(axis=-1)
    diagonal = np.zeros_like(adjacency)
    index = np.arange(adjacency.shape[-1])
    diagonal[..., index, index] = degree
    return diagonal - adjacency if matrix == "laplacian" else diagonal + adjacency


def polynomial_keys(graphs: Iterable[nx.Graph], matrix: str = "laplacian") -> list[tuple[int, ...]]:
    """Exact characteristic polynomials of many graphs (highest degree first).

    Graphs of equal order are stacked and run through the certified batch routine
    :func:`graphinv.spectrum.characteristic_polynomials`.

    Examples
    --------
    >>> polynomial_keys([nx.star_graph(3), nx.path_graph(2)], "signless")
    [(1, -6, 9, -4, 0), (1, -2, 0)]
    """
    check_matrix_kind(matrix)
    structures = [_integer_edges(_check_graph(G, k)) for k, G in enumerate(graphs)]
    return _polynomials(structures, matrix)


def _polynomials(
    structures: Sequence[tuple[int, list[tuple[int, int, int]]]], matrix: str
) -> list[tuple[int, ...]]:
    by_order: dict[int, list[int]] = {}
    for k, (n, _) in enumerate(structures):
        by_order.setdefault(n, []).append(k)
    result: list[tuple[int, ...]] = [()] * len(structures)
    for n, positions in by_order.items():
        stack = np.zeros((len(positions), n, n), dtype=np.int64)
        entries = [
            (slot, i, j, m) for slot, k in enumerate(positions) for i, j, m in structures[k][1]
        ]
        if entries:
            slots, rows, columns, values = np.array(entries, dtype=np.int64).T
            np.add.at(stack, (slots, rows, columns), values)
            np.add.at(stack, (slots, columns, rows), values)
        for k, polynomial in zip(
            positions, characteristic_polynomials(_matrix_stack(stack, matrix)), strict=True
        ):
            result[k] = polynomial
    return result


def canonical_key(G: nx.Graph) -> Hashable | None:
    """A key equal for two simple graphs exactly when they are isomorphic, or ``None``.

    The key is ``(n, certificate)`` with nauty's canonical-labelling certificate (through
    pynauty).  ``None`` means no certificate is available here (a multigraph, or pynauty not
    installed); use :func:`is_isomorphic` for such graphs.

    Examples
    --------
    >>> canonical_key(nx.path_graph(4)) == canonical_key(nx.Graph([(3, 1), (1, 0), (0, 2)]))
    True
    >>> canonical_key(nx.path_graph(4)) == canonical_key(nx.star_graph(3))
    False

    References
    ----------
    McKay & Piperno, "Practical graph isomorphism, II", J. Symbolic Comput. 60 (2014).
    """
    _check_graph(G)
    n, edges = _integer_edges(G)
    return _certificate(n, edges)


def canonical_key_of_edges(n: int, edges: Iterable[Sequence[int]]) -> Hashable | None:
    """:func:`canonical_key` for a graph given as ``n`` and 0-based edges, without networkx.

    Edges are ``(i, j)`` pairs or ``(i, j, multiplicity)`` triples, each unordered pair once
    (as :func:`graphinv.io.parse_graph6` returns them).  ``None`` for a multiplicity above 1.

    Examples
    --------
    >>> canonical_key_of_edges(3, [(0, 1), (1, 2)]) == canonical_key_of_edges(3, [(2, 0), (0, 1)])
    True

    References
    ----------
    McKay & Piperno, "Practical graph isomorphism, II", J. Symbolic Comput. 60 (2014).
    """
    triples = [(int(e[0]), int(e[1]), int(e[2]) if len(e) > 2 else 1) for e in edges]
    if any(not (0 <= i < n and 0 <= j < n) for i, j, _ in triples):
        raise InvalidGraphError(f"edges must join vertices 0 to {n - 1}")
    return _certificate(n, [t for t in triples if t[0] != t[1]])


def _certificate(n: int, edges: Sequence[tuple[int, int, int]]) -> Hashable | None:
    try:
        import pynauty
    except ImportError:  # pragma: no cover - pynauty is a declared dependency
        return None
    neighbours: dict[int, list[int]] = {v: [] for v in range(n)}
    for i, j, m in edges:
        if m != 1:
            return None
        neighbours[i].append(j)
    return (n, pynauty.certificate(pynauty.Graph(n, adjacency_dict=neighbours)))


def _weighted_simple(G: nx.Graph) -> nx.Graph:
    H = nx.Graph()
    H.add_nodes_from(G)
    H.add_weighted_edges_from(weighted_edges(G), weight="multiplicity")
    return H


def is_isomorphic(G: nx.Graph, H: nx.Graph) -> bool:
    """Whether two undirected graphs are isomorphic (edge multiplicities respected).

    Uses nauty certificates when both are simple graphs, else networkx's VF2 matcher.

    Examples
    --------
    >>> is_isomorphic(nx.cycle_graph(4), nx.Graph([(0, 2), (2, 1), (1, 3), (3, 0)]))
    True
    >>> is_isomorphic(nx.star_graph(4), nx.disjoint_union(nx.cycle_graph(4), nx.empty_graph(1)))
    False

    References
    ----------
    L. P. Cordella et al., "A (sub)graph isomorphism algorithm for matching large graphs",
    IEEE Trans. PAMI 26 (2004); McKay & Piperno 2014.
    """
    first, second = canonical_key(G), canonical_key(H)
    if first is not None and second is not None:
        return first == second
    return bool(
        nx.is_isomorphic(
            _weighted_simple(G),
            _weighted_simple(H),
            edge_match=lambda a, b: a["multiplicity"] == b["multiplicity"],
        )
    )


# --------------------------------------------------------------------------------------------
# classes from keys (usable without graphs, e.g. from stored batch results)
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class PolynomialClasses:
    """Graphs grouped by polynomial, with isomorphic duplicates set aside.

    Attributes
    ----------
    classes : tuple of tuple of int
        Each class: two or more positions of pairwise non-isomorphic graphs with one
        polynomial, increasing; classes ordered by their first position.
    duplicates : tuple of tuple of int
        Each entry: the position of the first graph of an isomorphism class (its
        representative) followed by the later positions of graphs isomorphic to it.
    polynomials : tuple
        The polynomial key of each class, in the order of ``classes``.
    """

    classes: tuple[tuple[int, ...], ...]
    duplicates: tuple[tuple[int, ...], ...]
    polynomials: tuple[Hashable, ...]

    def _repr_html_(self) -> str:
        rows = "".join(f"<tr><td>{', '.join(map(str, c))}</td></tr>" for c in self.classes)
        return (
            f"<table><caption>{len(self.classes)} classes, {len(self.duplicates)} isomorphism "
            f"classes with duplicates</caption><tr><th>positions</th></tr>{rows}</table>"
        )

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict."""
        return {
            "classes": [list(c) for c in self.classes],
            "duplicates": [list(d) for d in self.duplicates],
            "polynomials": [list(p) if isinstance(p, tuple) else p for p in self.polynomials],
        }


def classes_from_keys(
    entries: Iterable[tuple[int, Hashable, Hashable | None]],
    *,
    same_graph: Callable[[int, int], bool] | None = None,
) -> PolynomialClasses:
    """Form cospectral classes from stored keys, without the graphs themselves.

    Parameters
    ----------
    entries : iterable of (position, polynomial_key, canonical_key)
        ``polynomial_key`` is any hashable that is equal exactly for equal polynomials (the
        coefficient tuple, or its text); ``canonical_key`` is equal exactly for isomorphic
        graphs (e.g. from :func:`canonical_key`), or ``None`` when unknown.
    same_graph : callable, optional
        ``same_graph(i, j)`` decides isomorphism of the graphs at positions ``i`` and ``j``
        when a canonical key is ``None``.  Required if any key is ``None``.

    Returns
    -------
    PolynomialClasses

    Raises
    ------
    InvalidGraphError
        If a canonical key is missing and no ``same_graph`` is given, or a position repeats.

    Examples
    --------
    >>> found = classes_from_keys([(0, "p", "a"), (1, "q", "b"), (2, "p", "c"), (3, "p", "a")])
    >>> found.classes, found.duplicates
    (((0, 2),), ((0, 3),))
    """
    groups: dict[Hashable, list[tuple[int, Hashable | None]]] = {}
    seen: set[int] = set()
    for position, polynomial, canonical in entries:
        if position in seen:
            raise InvalidGraphError(f"position {position} appears twice among the keys")
        seen.add(position)
        if canonical is None and same_graph is None:
            raise InvalidGraphError(
                f"position {position} has no canonical key; pass same_graph=... to decide "
                "isomorphism"
            )
        groups.setdefault(polynomial, []).append((position, canonical))
    classes: list[tuple[tuple[int, ...], Hashable]] = []
    duplicates: list[tuple[int, ...]] = []
    for polynomial, members in groups.items():
        members.sort(key=lambda item: item[0])
        representatives: list[list[int]] = []
        by_certificate: dict[Hashable, list[int]] = {}
        unkeyed: list[list[int]] = []
        for position, canonical in members:
            if canonical is not None:
                bucket = by_certificate.get(canonical)
                if bucket is None:
                    by_certificate[canonical] = bucket = [position]
                    representatives.append(bucket)
                else:
                    bucket.append(position)
                continue
            assert same_graph is not None
            for bucket in unkeyed:
                if same_graph(bucket[0], position):
                    bucket.append(position)
                    break
            else:
                unkeyed.append([position])
                representatives.append(unkeyed[-1])
        duplicates.extend(tuple(b) for b in representatives if len(b) > 1)
        if len(representatives) > 1:
            classes.append((tuple(sorted(b[0] for b in representatives)), polynomial))
    classes.sort(key=lambda item: item[0])
    duplicates.sort()
    return PolynomialClasses(
        classes=tuple(c for c, _ in classes),
        duplicates=tuple(duplicates),
        polynomials=tuple(p for _, p in classes),
    )


# --------------------------------------------------------------------------------------------
# the public contract: classes of a collection of graphs
# --------------------------------------------------------------------------------------------


class _Collection:
    """Graphs with their integer structure, polynomials and certificates, computed once."""

    def __init__(self, graphs: Iterable[nx.Graph]) -> None:
        self.graphs = [_check_graph(G, k) for k, G in enumerate(graphs)]
        self.structures = [_integer_edges(G) for G in self.graphs]
        self._polynomials: dict[str, list[tuple[int, ...]]] = {}
        self._certificates: list[Hashable | None] | None = None
        self._invariants: dict[tuple[str, int], Hashable] = {}

    def polynomials(self, matrix: str) -> list[tuple[int, ...]]:
        if matrix not in self._polynomials:
            self._polynomials[matrix] = _polynomials(self.structures, matrix)
        return self._polynomials[matrix]

    def certificates(self) -> list[Hashable | None]:
        if self._certificates is None:
            self._certificates = [_certificate(n, edges) for n, edges in self.structures]
        return self._certificates

    def same_graph(self, i: int, j: int) -> bool:
        return is_isomorphic(self.graphs[i], self.graphs[j])

    def classes(self, matrix: str) -> PolynomialClasses:
        certificates = self.certificates()
        return classes_from_keys(
            zip(range(len(self.graphs)), self.polynomials(matrix), certificates, strict=True),
            same_graph=self.same_graph,
        )

    def invariant(self, name: str, position: int) -> Hashable:
        key = (name, position)
        if key not in self._invariants:
            n, edges = self.structures[position]
            self._invariants[key] = _invariant(name, n, edges)
        return self._invariants[key]


def _cokernel(rows: list[list[int]]) -> tuple[tuple[int, ...], int]:
    """Invariant factors (> 1) and free rank of the cokernel of a square integer matrix."""
    from graphinv.normalform import smith_diagonal

    diagonal = smith_diagonal(rows)
    factors = tuple(sorted(int(abs(d)) for d in diagonal if d not in (0, 1, -1)))
    return factors, sum(1 for d in diagonal if d == 0)


def _invariant(name: str, n: int, edges: Sequence[tuple[int, int, int]]) -> Hashable:
    adjacency = _adjacency_array(n, edges)
    if name == "degree_sequence":
        return tuple(sorted(adjacency.sum(axis=1).tolist(), reverse=True))
    kind = {
        "critical_group": "laplacian",
        "adjacency_smith": "adjacency",
        "signless_smith": "signless",
    }[name]
    factors, free_rank = _cokernel(_matrix_stack(adjacency, kind).tolist())
    # The critical group is the torsion part of coker L; its free rank only counts components.
    return (factors, 0) if name == "critical_group" else (factors, free_rank)


def cospectral_classes(graphs: Iterable[nx.Graph], matrix: str = "laplacian") -> list[list[int]]:
    """Classes of pairwise non-isomorphic graphs sharing one characteristic polynomial.

    Parameters
    ----------
    graphs : iterable of networkx graphs
        Undirected; edge weights are integer multiplicities.
    matrix : {"laplacian", "adjacency", "signless"}

    Returns
    -------
    list of list of int
        Each class lists the input positions (0-based, increasing) of two or more pairwise
        non-isomorphic graphs with the same exact characteristic polynomial; classes are
        ordered by their first position.  Of several isomorphic inputs only the first
        position appears; :func:`find_cospectral` reports the duplicates.

    Raises
    ------
    InvalidGraphError
        For a directed or empty graph, or a bad ``matrix``.

    Examples
    --------
    The smallest adjacency-cospectral pair, the star K_{1,4} and C_4 plus an isolated vertex:

    >>> star = nx.star_graph(4)
    >>> square = nx.disjoint_union(nx.cycle_graph(4), nx.empty_graph(1))
    >>> cospectral_classes([nx.path_graph(5), star, star, square], "adjacency")
    [[1, 3]]

    References
    ----------
    Brouwer & Haemers, *Spectra of Graphs*, 2012, §1.3.1 (the pair K_{1,4}, C_4 + K_1);
    Haemers & Spence, European J. Combin. 25 (2004).
    """
    check_matrix_kind(matrix)
    found = _Collection(graphs).classes(matrix)
    return [list(c) for c in found.classes]


# --------------------------------------------------------------------------------------------
# the full report
# --------------------------------------------------------------------------------------------


def format_group(factors: Sequence[int], free_rank: int = 0) -> str:
    """Write a finitely generated abelian group from its invariant factors.

    Examples
    --------
    >>> format_group((2, 10), 1)
    'Z/2 ⊕ Z/10 ⊕ Z'
    >>> format_group((), 0)
    '0'
    """
    from graphinv.notation import abelian_group_text

    return abelian_group_text(factors, free_rank)


def _invariant_text(name: str, value: Any) -> str:
    if name == "degree_sequence":
        return " ".join(str(d) for d in value)
    factors, free_rank = value
    return format_group(factors, free_rank)


@dataclass(frozen=True)
class CospectralClass:
    """One class of pairwise non-isomorphic cospectral graphs and what separates them.

    Attributes
    ----------
    matrix : str
        The matrix whose polynomial the members share.
    polynomial : tuple of int
        The shared characteristic polynomial, highest degree first.
    members : tuple of int
        Input positions, increasing.
    values : dict
        For each invariant in :data:`SEPARATING_INVARIANTS`, its value on each member (in
        member order).  Groups are ``(invariant factors, free rank)`` of the cokernel; the
        critical group is the torsion part of the Laplacian's cokernel.
    separated_by : dict
        For each invariant, whether it takes pairwise different values on all members.
    """

    matrix: str
    polynomial: tuple[int, ...]
    members: tuple[int, ...]
    values: dict[str, tuple[Any, ...]] = field(hash=False)
    separated_by: dict[str, bool] = field(hash=False)

    def _repr_html_(self) -> str:
        head = "".join(f"<th>{html.escape(name.replace('_', ' '))}</th>" for name in self.values)
        body = "".join(
            f"<tr><td>#{k}</td>"
            + "".join(
                f"<td>{html.escape(_invariant_text(name, column[slot]))}</td>"
                for name, column in self.values.items()
            )
            + "</tr>"
            for slot, k in enumerate(self.members)
        )
        verdict = "".join(
            f"<td>{'separates' if self.separated_by[name] else 'does not separate'}</td>"
            for name in self.values
        )
        return (
            f"<table><caption>{html.escape(self.matrix)}-cospectral, "
            f"det(xI - M) = {html.escape(format_polynomial(self.polynomial))}</caption>"
            f"<tr><th>graph</th>{head}</tr>{body}<tr><td></td>{verdict}</tr></table>"
        )

    def distinct(self, invariant: str) -> int:
        """How many different values ``invariant`` takes on the members."""
        return len(set(self.values[invariant]))

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict (groups written like ``Z2 ⊕ Z10``)."""
        return {
            "matrix": self.matrix,
            "polynomial": format_polynomial(self.polynomial),
            "members": list(self.members),
            "separated_by": dict(self.separated_by),
            "values": {
                name: [_invariant_text(name, v) for v in values]
                for name, values in self.values.items()
            },
        }


@dataclass(frozen=True)
class CospectralSummary:
    """Counts for one matrix over the whole collection.

    Attributes
    ----------
    matrix : str
    graphs : int
        Non-isomorphic graphs considered (duplicates removed).
    with_mate : int
        Graphs having at least one non-isomorphic cospectral mate (the sum of class sizes).
    classes : int
        Number of cospectral classes.
    largest_class : int
    separated : dict
        For each invariant, how many graphs with a mate it tells apart from *every* mate.
    """

    matrix: str
    graphs: int
    with_mate: int
    classes: int
    largest_class: int
    separated: dict[str, int] = field(hash=False)

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict."""
        return {
            "matrix": self.matrix,
            "graphs": self.graphs,
            "with_mate": self.with_mate,
            "classes": self.classes,
            "largest_class": self.largest_class,
            "separated": dict(self.separated),
        }


@dataclass(frozen=True)
class CospectralReport:
    """Cospectral classes of a collection for several matrices.

    Attributes
    ----------
    count : int
        Number of input graphs.
    names : tuple of str
        A display name per input graph (its ``name`` attribute, else ``#position``).
    classes : dict
        ``matrix -> tuple of CospectralClass``.
    duplicates : tuple of tuple of int
        Isomorphic inputs: each entry is a representative position followed by later
        positions isomorphic to it.  Only representatives take part in classes.
    summary : tuple of CospectralSummary
        One row per matrix, in the order asked for.
    """

    count: int
    names: tuple[str, ...]
    classes: dict[str, tuple[CospectralClass, ...]] = field(hash=False)
    duplicates: tuple[tuple[int, ...], ...]
    summary: tuple[CospectralSummary, ...]

    def records(self) -> list[dict[str, Any]]:
        """One JSON-ready record per duplicate group, class and summary row."""
        out: list[dict[str, Any]] = []
        for group in self.duplicates:
            out.append(
                {
                    "record": "duplicate",
                    "representative": group[0],
                    "copies": list(group[1:]),
                    "names": [self.names[k] for k in group],
                }
            )
        for classes in self.classes.values():
            for found in classes:
                record = {"record": "class", **found.to_record()}
                record["names"] = [self.names[k] for k in found.members]
                out.append(record)
        for row in self.summary:
            out.append({"record": "summary", **row.to_record()})
        return out

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict of the whole report."""
        return {
            "graphs": self.count,
            "duplicates": [list(d) for d in self.duplicates],
            "classes": {m: [c.to_record() for c in cs] for m, cs in self.classes.items()},
            "summary": [row.to_record() for row in self.summary],
        }

    def _repr_html_(self) -> str:
        head = "".join(
            f"<th>separated by {html.escape(name.replace('_', ' '))}</th>"
            for name in SEPARATING_INVARIANTS
        )
        body = "".join(
            f"<tr><td>{html.escape(row.matrix)}</td><td>{row.graphs}</td>"
            f"<td>{row.with_mate}</td><td>{row.classes}</td>"
            + "".join(f"<td>{row.separated[name]}</td>" for name in SEPARATING_INVARIANTS)
            + "</tr>"
            for row in self.summary
        )
        return (
            f"<table><caption>cospectral graphs among {self.count} inputs "
            f"({len(self.duplicates)} isomorphism classes with duplicates)</caption>"
            f"<tr><th>matrix</th><th>graphs</th><th>with a mate</th><th>classes</th>{head}</tr>"
            f"{body}</table>"
        )


def find_cospectral(
    graphs: Iterable[nx.Graph],
    *,
    matrices: Sequence[str] = MATRIX_KINDS,
    invariants: Sequence[str] = SEPARATING_INVARIANTS,
) -> CospectralReport:
    """Cospectral classes for each matrix, duplicates, and which invariants separate mates.

    Parameters
    ----------
    graphs : iterable of networkx graphs
        Undirected; edge weights are integer multiplicities.
    matrices : sequence of {"laplacian", "signless", "adjacency"}
        The matrices to group by (default all three).
    invariants : sequence of str
        Which of :data:`SEPARATING_INVARIANTS` to evaluate on class members (default all).

    Returns
    -------
    CospectralReport

    Examples
    --------
    >>> graphs = [nx.star_graph(3), nx.disjoint_union(nx.complete_graph(3), nx.empty_graph(1))]
    >>> report = find_cospectral(graphs, matrices=["signless", "laplacian"])
    >>> [(row.matrix, row.with_mate, row.separated["critical_group"]) for row in report.summary]
    [('signless', 2, 2), ('laplacian', 0, 0)]

    References
    ----------
    Haemers & Spence, "Enumeration of cospectral graphs", European J. Combin. 25 (2004);
    Lorenzini, "A finite group attached to the Laplacian of a graph", Discrete Math. 91 (1991).
    """
    for matrix in matrices:
        check_matrix_kind(matrix)
    for name in invariants:
        if name not in SEPARATING_INVARIANTS:
            choices = ", ".join(repr(k) for k in SEPARATING_INVARIANTS)
            raise InvalidGraphError(
                f"Argument 'invariants' must hold names from {choices}, not {name!r}."
            )
    collection = _Collection(graphs)
    names = tuple(str(G.graph.get("name") or f"#{k}") for k, G in enumerate(collection.graphs))
    duplicates: tuple[tuple[int, ...], ...] = ()
    duplicate_positions: set[int] = set()
    all_classes: dict[str, tuple[CospectralClass, ...]] = {}
    summary: list[CospectralSummary] = []
    for matrix in dict.fromkeys(matrices):
        found = collection.classes(matrix)
        duplicates = found.duplicates
        duplicate_positions = {k for group in duplicates for k in group[1:]}
        classes = []
        separated = dict.fromkeys(invariants, 0)
        for members, polynomial in zip(found.classes, found.polynomials, strict=True):
            values = {
                name: tuple(collection.invariant(name, k) for k in members) for name in invariants
            }
            for name, column in values.items():
                for value in column:
                    if column.count(value) == 1:
                        separated[name] += 1
            classes.append(
                CospectralClass(
                    matrix=matrix,
                    polynomial=tuple(polynomial),  # type: ignore[arg-type]
                    members=members,
                    values=values,
                    separated_by={
                        name: len(set(column)) == len(column) for name, column in values.items()
                    },
                )
            )
        all_classes[matrix] = tuple(classes)
        summary.append(
            CospectralSummary(
                matrix=matrix,
                graphs=len(collection.graphs) - len(duplicate_positions),
                with_mate=sum(len(c.members) for c in classes),
                classes=len(classes),
                largest_class=max((len(c.members) for c in classes), default=0),
                separated=separated,
            )
        )
    if not matrices:
        duplicates = collection.classes("laplacian").duplicates
    return CospectralReport(
        count=len(collection.graphs),
        names=names,
        classes=all_classes,
        duplicates=duplicates,
        summary=tuple(summary),
    )


# --------------------------------------------------------------------------------------------
# comparing two graphs
# --------------------------------------------------------------------------------------------

#: The invariants :func:`compare_graphs` lists, in order; the first that differs is reported.
COMPARISON_ORDER: tuple[str, ...] = (
    "vertices",
    "edges",
    "degree_sequence",
    "laplacian_polynomial",
    "signless_polynomial",
    "adjacency_polynomial",
    "spanning_trees",
    "critical_group",
    "adjacency_smith",
    "signless_smith",
)


@dataclass(frozen=True)
class ComparisonRow:
    """One invariant of two graphs side by side.

    Attributes
    ----------
    invariant : str
        A name from :data:`COMPARISON_ORDER`.
    first, second : str
        The values, written out (polynomials highest degree first, groups as ``Z2 ⊕ Z10``).
    same : bool
    """

    invariant: str
    first: str
    second: str
    same: bool

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict."""
        return {
            "invariant": self.invariant,
            "first": self.first,
            "second": self.second,
            "same": self.same,
        }


@dataclass(frozen=True)
class Comparison:
    """Two graphs compared invariant by invariant.

    Attributes
    ----------
    rows : tuple of ComparisonRow
        In the order of :data:`COMPARISON_ORDER`.
    isomorphic : bool
    first_difference : str or None
        The first invariant (in that order) that differs; ``"isomorphism"`` when every
        listed invariant agrees yet the graphs are not isomorphic; ``None`` when they are
        isomorphic.
    """

    rows: tuple[ComparisonRow, ...]
    isomorphic: bool
    first_difference: str | None

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict."""
        return {
            "isomorphic": self.isomorphic,
            "first_difference": self.first_difference,
            "invariants": [row.to_record() for row in self.rows],
        }

    def _repr_html_(self) -> str:
        body = "".join(
            f"<tr><td>{html.escape(r.invariant.replace('_', ' '))}</td>"
            f"<td>{html.escape(r.first)}</td><td>{html.escape(r.second)}</td>"
            f"<td>{'same' if r.same else 'differs'}</td></tr>"
            for r in self.rows
        )
        verdict = (
            "isomorphic"
            if self.isomorphic
            else f"not isomorphic; first separated by {self.first_difference}"
        )
        return (
            f"<table><caption>{html.escape(verdict)}</caption>"
            "<tr><th>invariant</th><th>first graph</th><th>second graph</th><th></th></tr>"
            f"{body}</table>"
        )


def compare_graphs(G: nx.Graph, H: nx.Graph) -> Comparison:
    """Compare two graphs by their invariants and name the first one that separates them.

    The invariants, in order (cheap and coarse first): vertex count, edge count (with
    multiplicity), degree sequence, characteristic polynomials of L, Q and A, number of
    spanning trees, critical group, Smith normal forms of A and Q (as cokernels), then
    isomorphism.  Polynomials and Smith forms are exact and dense, so this is meant for graphs
    of up to a few hundred vertices.

    Parameters
    ----------
    G, H : networkx graphs
        Undirected; edge weights are integer multiplicities.

    Returns
    -------
    Comparison

    Examples
    --------
    >>> star = nx.star_graph(4)
    >>> square = nx.disjoint_union(nx.cycle_graph(4), nx.empty_graph(1))
    >>> comparison = compare_graphs(star, square)
    >>> comparison.isomorphic, comparison.first_difference
    (False, 'degree_sequence')
    >>> [row.invariant for row in comparison.rows if row.same]
    ['vertices', 'edges', 'adjacency_polynomial', 'adjacency_smith']

    References
    ----------
    Kirchhoff 1847 (spanning trees from the Laplacian polynomial); Lorenzini, Discrete Math. 91
    (1991) (critical group); Brouwer & Haemers, *Spectra of Graphs*, 2012, ch. 14.
    """
    collection = _Collection([G, H])
    rows: list[ComparisonRow] = []
    polynomials = {m: collection.polynomials(m) for m in MATRIX_KINDS}
    for name in COMPARISON_ORDER:
        pair = [_comparison_value(collection, name, k, polynomials) for k in (0, 1)]
        rows.append(ComparisonRow(name, pair[0][1], pair[1][1], pair[0][0] == pair[1][0]))
    certificates = collection.certificates()
    if certificates[0] is not None and certificates[1] is not None:
        isomorphic = certificates[0] == certificates[1]
    else:
        isomorphic = collection.same_graph(0, 1)
    first = next((r.invariant for r in rows if not r.same), None)
    if first is None and not isomorphic:
        first = "isomorphism"
    return Comparison(rows=tuple(rows), isomorphic=isomorphic, first_difference=first)


def _comparison_value(
    collection: _Collection,
    name: str,
    position: int,
    polynomials: dict[str, list[tuple[int, ...]]],
) -> tuple[Hashable, str]:
    n, edges = collection.structures[position]
    if name == "vertices":
        return n, str(n)
    if name == "edges":
        total = sum(m for _, _, m in edges)
        return total, str(total)
    if name.endswith("_polynomial"):
        polynomial = polynomials[name.removesuffix("_polynomial")][position]
        return polynomial, format_polynomial(polynomial)
    if name == "spanning_trees":
        # Kirchhoff: the coefficient of x in det(xI - L) is (-1)^(n-1) n tau(G).
        polynomial = polynomials["laplacian"][position]
        trees = abs(polynomial[-2]) // n if n > 1 else 1
        return trees, str(trees)
    value = collection.invariant(name, position)
    return value, _invariant_text(name, value)
