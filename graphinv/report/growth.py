"""How fast the number of spanning trees grows across a family of graphs.

For a family of planar lattice pieces with ``N`` vertices, ``log τ`` is ``a N`` (bulk) plus a
boundary term proportional to the perimeter, ``b √N``, a corner term ``c log N`` and a constant
``d``.  :func:`fit_growth` fits that model by least squares; ``exp(a)`` is the per-vertex growth
constant, which for square grids tends to ``exp(4G/π) ≈ 3.20991`` (Temperley 1974).  For
one-dimensional families (ladders, prisms) the boundary does not grow and only ``a N + d`` is
fitted.

The counts themselves are exact (:func:`graphinv.spanning_tree_count`) while the graphs are
small, and ``log τ`` from the sparse factorization (:func:`graphinv.log_spanning_tree_count`)
beyond ``exact_up_to`` vertices; the fit is in floating point either way.

References
----------
H. N. V. Temperley, "Enumeration of graphs on a large periodic lattice", 1974;
B. Duplantier, F. David, "Exact partition functions and correlation functions of multiple
Hamiltonian walks on the Manhattan lattice", J. Stat. Phys. 51 (1988) (boundary and corner
terms of the spanning-tree free energy).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import Any

import networkx as nx

from graphinv.errors import InvalidGraphError

__all__ = ["GrowthFit", "family_growth", "fit_growth", "grid_growth"]

#: Terms of the fitted model, in the order of :attr:`GrowthFit.coefficients`.
MODEL_TERMS = ("N", "sqrt(N)", "log(N)", "1")


@dataclass(frozen=True)
class GrowthFit:
    """A least-squares fit ``log τ ≈ a N + b √N + c log N + d`` over a family (floats).

    Attributes
    ----------
    family : str
        What the graphs are (e.g. ``"square grid n x n"``).
    labels : tuple of str
        One name per graph.
    vertex_counts : tuple of int
    log_counts : tuple of float
        Natural logarithm of the number of spanning trees of each graph.
    exact : tuple of bool
        Whether each ``log_counts`` entry comes from an exact count.
    coefficients : tuple of float
        ``(a, b, c, d)`` (fewer terms when there are too few graphs; see :func:`fit_growth`).
    limit : float or None
        A known limit of the per-vertex growth constant, if one exists.
    limit_source : str or None
        Where that limit comes from.
    """

    family: str
    labels: tuple[str, ...]
    vertex_counts: tuple[int, ...]
    log_counts: tuple[float, ...]
    exact: tuple[bool, ...]
    coefficients: tuple[float, ...]
    limit: float | None = None
    limit_source: str | None = None

    @property
    def per_vertex(self) -> float:
        """The fitted per-vertex growth constant ``exp(a)``."""
        return math.exp(self.coefficients[0])

    @property
    def relative_error(self) -> float | None:
        """``per_vertex / limit - 1``, or None without a known limit."""
        return None if self.limit is None else self.per_vertex / self.limit - 1.0

    def predicted_log_count(self, vertices: float) -> float:
        """The fitted ``log τ`` at ``vertices`` vertices."""
        return sum(
            c * t for c, t in zip(self.coefficients, _terms(vertices, len(self.coefficients)), strict=True)
        )

    def _repr_html_(self) -> str:
        import html

        rows = "".join(
            f"<tr><td>{html.escape(name)}</td><td>{n}</td><td>{value:.6f}</td>"
            f"<td>{'exact' if exact else 'sparse log-determinant'}</td></tr>"
            for name, n, value, exact in zip(
                self.labels, self.vertex_counts, self.log_counts, self.exact, strict=True
            )
        )
        limit = (
            f"; limit {self.limit:.6f} ({html.escape(self.limit_source or '')})"
            if self.limit is not None
            else ""
        )
        return (
            f"<table><caption>{html.escape(self.family)}: fitted growth "
            f"{self.per_vertex:.6f} per vertex{limit}</caption>"
            "<tr><th>graph</th><th>N</th><th>log τ (float)</th><th>count</th></tr>"
            f"{rows}</table>"
        )

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict (all floats are labelled as fitted or approximate values)."""
        return {
            "family": self.family,
            "graphs": [
                {"name": name, "vertices": n, "log_spanning_trees": value, "exact": exact}
                for name, n, value, exact in zip(
                    self.labels, self.vertex_counts, self.log_counts, self.exact, strict=True
                )
            ],
            "model": "log τ ≈ "
            + " + ".join(f"c{i} * {t}" for i, t in enumerate(_term_names(len(self.coefficients)))),
            "coefficients": list(self.coefficients),
            "per_vertex_growth": self.per_vertex,
            "limit": self.limit,
            "limit_source": self.limit_source,
            "relative_error": self.relative_error,
            "numeric": "float64 least squares",
        }


def _terms(vertices: float, count: int) -> list[float]:
    full = [vertices, math.sqrt(vertices), math.log(vertices), 1.0]
    if count == 2:
        return [full[0], full[3]]
    if count == 3:
        return [full[0], full[1], full[3]]
    return full


def _term_names(count: int) -> tuple[str, ...]:
    if count == 2:
        return ("N", "1")
    if count == 3:
        return ("N", "sqrt(N)", "1")
    return MODEL_TERMS


def fit_growth(
    vertex_counts: Sequence[int],
    log_counts: Sequence[float],
    *,
    family: str = "family",
    labels: Sequence[str] | None = None,
    exact: Sequence[bool] | None = None,
    limit: float | None = None,
    limit_source: str | None = None,
    dimension: int = 2,
) -> GrowthFit:
    """Fit ``log τ ≈ a N + b √N + c log N + d`` and return the :class:`GrowthFit`.

    With five or more sizes all four terms are fitted; with three or four the corner term is
    dropped; with two, or for a one-dimensional family (``dimension=1``: ladders, prisms,
    cycles, whose boundary does not grow), only ``a N + d``.

    Raises
    ------
    InvalidGraphError
        With fewer than two graphs, or fewer distinct sizes than fitted terms.

    Examples
    --------
    The n x n grids, n = 2..8, from their exact counts (OEIS A007341):

    >>> counts = [4, 192, 100352, 557568000, 32565539635200, 19872369301840986112,
    ...           126231322912498539682594816]
    >>> fit = fit_growth([n * n for n in range(2, 9)], [math.log(c) for c in counts])
    >>> len(fit.coefficients), round(fit.per_vertex, 2)
    (4, 3.21)

    References
    ----------
    Temperley 1974; Duplantier & David, J. Stat. Phys. 51 (1988).
    """
    import numpy as np

    if len(vertex_counts) != len(log_counts):
        raise InvalidGraphError("vertex_counts and log_counts must have the same length")
    distinct = len(set(vertex_counts))
    if distinct < 2:
        raise InvalidGraphError(
            f"a growth fit needs graphs of at least two different sizes, not {distinct}"
        )
    if dimension not in (1, 2):
        raise InvalidGraphError(f"Argument 'dimension' must be 1 or 2, not {dimension!r}.")
    count = 2 if dimension == 1 else 4 if distinct >= 5 else 3 if distinct >= 3 else 2
    design = np.array([_terms(float(n), count) for n in vertex_counts])
    solution = np.linalg.lstsq(design, np.asarray(log_counts, dtype=float), rcond=None)[0]
    n_graphs = len(vertex_counts)
    return GrowthFit(
        family=family,
        labels=tuple(labels) if labels is not None else tuple(f"N={n}" for n in vertex_counts),
        vertex_counts=tuple(int(n) for n in vertex_counts),
        log_counts=tuple(float(v) for v in log_counts),
        exact=tuple(exact) if exact is not None else (True,) * n_graphs,
        coefficients=tuple(float(c) for c in solution),
        limit=limit,
        limit_source=limit_source,
    )


def _log_count(G: nx.Graph, exact_up_to: int) -> tuple[float, bool]:
    from graphinv import log_spanning_tree_count, spanning_tree_count

    if G.number_of_nodes() <= exact_up_to:
        count = spanning_tree_count(G)
        if count == 0:
            raise InvalidGraphError("a growth fit needs connected graphs (this one has no spanning tree)")
        return math.log(count), True
    approximate = log_spanning_tree_count(G)
    if not math.isfinite(approximate.value):
        raise InvalidGraphError("a growth fit needs connected graphs (this one has no spanning tree)")
    return approximate.value, False


def family_growth(
    graphs: Iterable[nx.Graph],
    *,
    family: str = "family",
    limit: float | None = None,
    limit_source: str | None = None,
    exact_up_to: int = 100,
    dimension: int = 2,
) -> GrowthFit:
    """Count spanning trees across ``graphs`` and fit their growth.

    Parameters
    ----------
    graphs : iterable of networkx graphs
        Connected, of at least two different sizes; ``G.graph["name"]`` labels each.
    family : str
        A description for plots and records.
    limit, limit_source : optional
        A known limit of the per-vertex growth constant and its source.
    exact_up_to : int
        Graphs with at most this many vertices are counted exactly; larger ones use the
        approximate ``log τ`` from a sparse factorization.
    dimension : {1, 2}
        2 for lattice pieces whose boundary grows like ``√N``; 1 for ladders and the like.

    Examples
    --------
    >>> fit = family_growth((nx.ladder_graph(k) for k in range(5, 20)), dimension=1)
    >>> round(fit.per_vertex ** 2, 6)   # ladders: τ grows like (2 + √3)^k on 2k vertices
    3.732051

    References
    ----------
    Temperley 1974.
    """
    labels: list[str] = []
    sizes: list[int] = []
    values: list[float] = []
    exact: list[bool] = []
    for G in graphs:
        value, is_exact = _log_count(G, exact_up_to)
        labels.append(str(G.graph.get("name") or f"N={G.number_of_nodes()}"))
        sizes.append(G.number_of_nodes())
        values.append(value)
        exact.append(is_exact)
    return fit_growth(
        sizes,
        values,
        family=family,
        labels=labels,
        exact=exact,
        limit=limit,
        limit_source=limit_source,
        dimension=dimension,
    )


def grid_growth(sizes: Iterable[int], *, exact_up_to: int = 100) -> GrowthFit:
    """Spanning-tree growth of the square grids ``n x n`` for ``n`` in ``sizes``.

    The fitted per-vertex constant is compared with ``exp(4G/π)`` (Temperley 1974).

    Examples
    --------
    >>> fit = grid_growth(range(2, 13))
    >>> abs(fit.relative_error) < 0.01
    True

    References
    ----------
    Temperley 1974; Kasteleyn, Physica 27 (1961).
    """
    from graphinv.report.limits import grid_growth_limit

    graphs = []
    for n in sizes:
        G = nx.convert_node_labels_to_integers(nx.grid_2d_graph(n, n))
        G.graph["name"] = f"grid {n}x{n}"
        graphs.append(G)
    return family_growth(
        graphs,
        family="square grid n × n",
        limit=grid_growth_limit(),
        limit_source="exp(4G/π), G Catalan's constant (Temperley 1974)",
        exact_up_to=exact_up_to,
    )
