"""Godsil–McKay switching: building cospectral mates of a graph.

A *switching set* of a simple graph ``G`` is a vertex set ``C`` of even size ``k`` such that

1. ``C`` induces a regular graph, and
2. every vertex outside ``C`` is adjacent to none, exactly half, or all of ``C``.

Switching ``G`` on ``C`` keeps every edge except those between ``C`` and the outside vertices
with exactly ``k/2`` neighbours in ``C``: each such vertex trades its ``k/2`` neighbours in ``C``
for the other ``k/2``.  With ``R = (2/k) J - I`` on ``C`` and the identity elsewhere, ``R`` is
orthogonal and ``R A R`` is the adjacency matrix of the switched graph, so the two graphs have
the same adjacency spectrum (Godsil & McKay 1982).  For ``k = 2`` the switched graph is always
isomorphic to ``G`` (it swaps the two vertices), so sets have at least 4 vertices.

**Laplacian and signless Laplacian.**  ``R L R = R D R - R A R``.  If in addition every vertex
of ``C`` has the *same degree* in ``G``, then ``D`` is a scalar on ``C`` so ``R D R = D``, and the
switch preserves every degree (each vertex of ``C`` has as many switched neighbours before as
after, by counting edges between ``C`` and the switched vertices), so ``R L R`` and ``R Q R``
are the Laplacian and signless Laplacian of the switched graph: the mates are also L- and
Q-cospectral.  With this ``R`` the condition is also necessary: the off-diagonal entries of
``R D R`` on ``C`` vanish only when all degrees in ``C`` are equal.  This is the condition
graphinv uses for ``matrix="laplacian"`` and ``"signless"`` (GM switching for L and Q is
discussed by van Dam & Haemers 2003 and Haemers & Spence 2004 — memory); every mate is checked
against the exact characteristic polynomial regardless.  Such sets are rare in small graphs:
with sets of 4 vertices no graph on at most 8 vertices gets a non-isomorphic L-mate this way
(exhaustive run over nauty-geng output), the first examples need about 10 vertices.

The search tries every vertex set of each even size from 4 up to ``max_size``: about
``C(n, k) * n`` word operations for size ``k``, i.e. ``O(n^(max_size + 1))``.  The default
``max_size = 4`` covers the switchings behind most small cospectral pairs and stays fast up to a
few dozen vertices.

References
----------
C. D. Godsil, B. D. McKay, "Constructing cospectral graphs", Aequationes Math. 25 (1982);
E. R. van Dam, W. H. Haemers, "Which graphs are determined by their spectrum?", Linear Algebra
Appl. 373 (2003);
W. H. Haemers, E. Spence, "Enumeration of cospectral graphs", European J. Combin. 25 (2004);
A. E. Brouwer, W. H. Haemers, *Spectra of Graphs*, Springer, 2012, §14.2.3.
"""

from __future__ import annotations

import html
from collections.abc import Hashable, Iterable
from dataclasses import dataclass
from itertools import combinations
from typing import Any

import networkx as nx

from graphinv._graphs import weighted_edges
from graphinv.cospectral import canonical_key, is_isomorphic
from graphinv.errors import GraphInvError, InvalidGraphError
from graphinv.spectrum import characteristic_polynomial, check_matrix_kind

__all__ = [
    "SwitchingSet",
    "cospectral_mates",
    "godsil_mckay_sets",
    "godsil_mckay_switch",
]


@dataclass(frozen=True)
class SwitchingSet:
    """A Godsil–McKay switching set of a graph.

    Attributes
    ----------
    vertices : tuple
        The set ``C`` (in the graph's vertex order).
    switched : tuple
        The outside vertices adjacent to exactly half of ``C``; their edges to ``C`` flip.
    matrices : tuple of str
        The matrices for which switching on ``C`` preserves the spectrum: always
        ``"adjacency"``, plus ``"laplacian"`` and ``"signless"`` when every vertex of ``C``
        has the same degree.
    """

    vertices: tuple[Hashable, ...]
    switched: tuple[Hashable, ...]
    matrices: tuple[str, ...]

    def _repr_html_(self) -> str:
        return (
            "<table><tr><th>switching set</th><th>switched vertices</th><th>matrices</th></tr>"
            f"<tr><td>{html.escape(', '.join(map(str, self.vertices)))}</td>"
            f"<td>{html.escape(', '.join(map(str, self.switched)))}</td>"
            f"<td>{html.escape(', '.join(self.matrices))}</td></tr></table>"
        )

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict (vertex labels as text)."""
        return {
            "set": [str(v) for v in self.vertices],
            "switched": [str(v) for v in self.switched],
            "matrices": list(self.matrices),
        }


def _simple_graph(G: Any) -> tuple[list[Hashable], list[int]]:
    if not isinstance(G, nx.Graph):
        raise InvalidGraphError(f"expected a networkx graph, not {type(G).__name__}")
    if G.is_directed():
        raise InvalidGraphError("Godsil-McKay switching needs an undirected graph")
    if G.number_of_nodes() == 0:
        raise InvalidGraphError("the graph has no vertices; expected at least one")
    order = list(G)
    index = {v: i for i, v in enumerate(order)}
    masks = [0] * len(order)
    for u, v, m in weighted_edges(G):
        if m != 1:
            raise InvalidGraphError(
                f"Godsil-McKay switching needs a simple graph; edge {(u, v)!r} has multiplicity {m}"
            )
        i, j = index[u], index[v]
        masks[i] |= 1 << j
        masks[j] |= 1 << i
    return order, masks


def _examine(
    masks: list[int], members: tuple[int, ...], labels: list[Hashable]
) -> tuple[str, list[int], bool]:
    """Check the switching conditions; return (problem, switched, equal degrees)."""
    size = len(members)
    c_mask = 0
    for i in members:
        c_mask |= 1 << i
    inner = {(masks[i] & c_mask).bit_count() for i in members}
    if len(inner) != 1:
        return ("the set does not induce a regular graph", [], False)
    half = size // 2
    switched = []
    for v, mask in enumerate(masks):
        if c_mask >> v & 1:
            continue
        count = (mask & c_mask).bit_count()
        if count == half:
            switched.append(v)
        elif count not in (0, size):
            return (
                f"vertex {labels[v]!r} outside the set has {count} of its {size} vertices as "
                "neighbours; expected none, half or all",
                [],
                False,
            )
    equal_degrees = len({masks[i].bit_count() for i in members}) == 1
    return ("", switched, equal_degrees)


def _check_size(max_size: int) -> None:
    if isinstance(max_size, bool) or not isinstance(max_size, int) or max_size < 4:
        raise InvalidGraphError(
            f"Argument 'max_size' must be an integer of at least 4, not {max_size!r}."
        )


def godsil_mckay_sets(
    G: nx.Graph, *, matrix: str = "adjacency", max_size: int = 4
) -> list[SwitchingSet]:
    """All Godsil–McKay switching sets of ``G`` with 4 to ``max_size`` vertices.

    Only sets whose switch changes the graph (at least one outside vertex adjacent to exactly
    half of the set) are listed.

    Parameters
    ----------
    G : networkx graph
        Simple and undirected.
    matrix : {"adjacency", "laplacian", "signless"}
        For ``"laplacian"`` and ``"signless"`` only sets whose vertices all have the same
        degree are returned (see the module notes).
    max_size : int
        The largest set size tried (even sizes 4, 6, ... up to it); the search costs about
        ``C(n, k) * n`` word operations for each size ``k``.

    Returns
    -------
    list of SwitchingSet
        In order of size, then of the vertex order.

    Raises
    ------
    InvalidGraphError
        For a directed, empty or multigraph input, a bad ``matrix`` or ``max_size``.

    Examples
    --------
    Vertex 4 sees half of the independent set ``{0, 1, 2, 3}``:

    >>> G = nx.Graph([(4, 0), (4, 1), (5, 0), (5, 1), (5, 2), (5, 3)])
    >>> [(s.vertices, s.switched) for s in godsil_mckay_sets(G)]
    [((0, 1, 2, 3), (4,))]

    References
    ----------
    Godsil & McKay, "Constructing cospectral graphs", Aequationes Math. 25 (1982).
    """
    check_matrix_kind(matrix)
    _check_size(max_size)
    order, masks = _simple_graph(G)
    n = len(order)
    found: list[SwitchingSet] = []
    for size in range(4, min(max_size, n - 1) + 1, 2):
        for members in combinations(range(n), size):
            problem, switched, equal_degrees = _examine(masks, members, order)
            if problem or not switched:
                continue
            if matrix != "adjacency" and not equal_degrees:
                continue
            kinds = ("adjacency", "laplacian", "signless") if equal_degrees else ("adjacency",)
            found.append(
                SwitchingSet(
                    vertices=tuple(order[i] for i in members),
                    switched=tuple(order[v] for v in switched),
                    matrices=kinds,
                )
            )
    return found


def godsil_mckay_switch(
    G: nx.Graph, vertices: Iterable[Hashable], *, matrix: str = "adjacency"
) -> nx.Graph:
    """Switch ``G`` on the vertex set ``vertices`` (Godsil–McKay).

    Parameters
    ----------
    G : networkx graph
        Simple and undirected.
    vertices : iterable
        The switching set ``C``: even size at least 4, inducing a regular graph, every outside
        vertex adjacent to none, half or all of it.
    matrix : {"adjacency", "laplacian", "signless"}
        For ``"laplacian"`` and ``"signless"`` the vertices of ``C`` must also have equal
        degrees.

    Returns
    -------
    networkx.Graph
        A new graph on the same vertices; the graph attributes are copied, with ``name``
        extended to say which set was switched and ``switching_set`` holding the set.

    Raises
    ------
    InvalidGraphError
        Naming the condition that ``vertices`` fails.

    Examples
    --------
    >>> G = nx.Graph([(4, 0), (4, 1), (5, 0), (5, 1), (5, 2), (5, 3)])
    >>> sorted(tuple(sorted(e)) for e in godsil_mckay_switch(G, [0, 1, 2, 3]).edges())
    [(0, 5), (1, 5), (2, 4), (2, 5), (3, 4), (3, 5)]

    References
    ----------
    Godsil & McKay, Aequationes Math. 25 (1982); Brouwer & Haemers, *Spectra of Graphs*, 2012,
    §14.2.3.
    """
    check_matrix_kind(matrix)
    order, masks = _simple_graph(G)
    index = {v: i for i, v in enumerate(order)}
    chosen = list(vertices)
    missing = [v for v in chosen if v not in index]
    if missing:
        raise InvalidGraphError(f"{missing[0]!r} is not a vertex of the graph")
    members = tuple(sorted({index[v] for v in chosen}))
    if len(members) != len(chosen):
        raise InvalidGraphError("the switching set lists a vertex twice")
    if len(members) < 4 or len(members) % 2:
        raise InvalidGraphError(
            f"a switching set needs an even number of vertices, at least 4; got {len(members)}"
        )
    problem, switched, equal_degrees = _examine(masks, members, order)
    if problem:
        raise InvalidGraphError(f"not a Godsil-McKay switching set: {problem}")
    if matrix != "adjacency" and not equal_degrees:
        raise InvalidGraphError(
            f"not a {matrix} switching set: the vertices of the set have different degrees"
        )
    H = nx.Graph()
    H.graph.update(G.graph)
    H.add_nodes_from(G.nodes(data=True))
    H.add_edges_from(G.edges())
    c_vertices = [order[i] for i in members]
    for v in switched:
        outside = order[v]
        for c in c_vertices:
            if H.has_edge(outside, c):
                H.remove_edge(outside, c)
            else:
                H.add_edge(outside, c)
    base = G.graph.get("name") or "graph"
    H.graph["name"] = f"{base} switched on {{{', '.join(str(c) for c in c_vertices)}}}"
    H.graph["switching_set"] = tuple(c_vertices)
    return H


def cospectral_mates(
    G: nx.Graph, *, matrix: str = "adjacency", max_size: int = 4
) -> list[nx.Graph]:
    """Cospectral mates of ``G`` made by Godsil–McKay switching, up to isomorphism.

    Every switching set from :func:`godsil_mckay_sets` is applied; results isomorphic to ``G``
    or to an earlier mate are dropped.  Each mate's exact characteristic polynomial is checked
    against ``G``'s.

    Parameters
    ----------
    G : networkx graph
        Simple and undirected.
    matrix : {"adjacency", "laplacian", "signless"}
        The spectrum to preserve.
    max_size : int
        Largest switching set tried (see :func:`godsil_mckay_sets`).

    Returns
    -------
    list of networkx.Graph
        Pairwise non-isomorphic, none isomorphic to ``G``, all with ``G``'s polynomial.

    Examples
    --------
    The hexagon plus an isolated vertex has an adjacency mate (switching on ``{0, 2, 4, 6}``):

    >>> G = nx.disjoint_union(nx.cycle_graph(6), nx.empty_graph(1))
    >>> [sorted(H.edges()) for H in cospectral_mates(G)]
    [[(0, 3), (1, 4), (1, 6), (2, 5), (3, 6), (5, 6)]]

    References
    ----------
    Godsil & McKay, Aequationes Math. 25 (1982); Haemers & Spence, European J. Combin. 25
    (2004).
    """
    sets = godsil_mckay_sets(G, matrix=matrix, max_size=max_size)
    target = characteristic_polynomial(G, matrix) if sets else ()
    seen_keys = {canonical_key(G)}
    mates: list[nx.Graph] = []
    for found in sets:
        H = godsil_mckay_switch(G, found.vertices, matrix=matrix)
        key = canonical_key(H)
        if key is not None:
            if key in seen_keys:
                continue
            seen_keys.add(key)
        elif is_isomorphic(G, H) or any(is_isomorphic(M, H) for M in mates):
            continue
        if characteristic_polynomial(H, matrix) != target:
            raise GraphInvError(
                f"internal error: switching on {found.vertices!r} changed the {matrix} "
                "polynomial; please report this graph"
            )
        mates.append(H)
    return mates
