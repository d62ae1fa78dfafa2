"""Spectra of a graph: exact characteristic polynomials and numeric eigenvalues.

Three symmetric matrices are supported, named by the ``matrix`` argument everywhere in graphinv's
spectral layer:

``"laplacian"``
    ``L = D - A`` (degree matrix minus adjacency matrix);
``"signless"``
    the signless Laplacian ``Q = D + A``;
``"adjacency"``
    the adjacency matrix ``A``.

Characteristic polynomials are exact: ``det(x I - M)`` as a tuple of Python ints, **highest
degree first** (so the tuple starts with the leading coefficient 1 and has ``n + 1`` entries for
an ``n``-vertex graph).  They come from python-flint's ``fmpz_mat.charpoly``; a batched route
(:func:`characteristic_polynomials`) runs the Faddeev–LeVerrier recurrence on a whole stack of
small matrices in floating point and *certifies* every step stays below ``2**53``, where floats
hold integers exactly, falling back to python-flint for any matrix where it might not.

Eigenvalues are floating-point numbers (NumPy ``float64``) and are always labelled as such:
:class:`Spectrum` records the method and the tolerance used to group equal eigenvalues.

References
----------
A. E. Brouwer, W. H. Haemers, *Spectra of Graphs*, Springer, 2012 (chapters 1 and 14);
D. K. Faddeev, V. N. Faddeeva, *Computational Methods of Linear Algebra*, 1963
(the Faddeev–LeVerrier recurrence).
"""

from __future__ import annotations

import html
import math
from collections.abc import Hashable, Iterable, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Literal

import networkx as nx
import numpy as np

from graphinv._graphs import require_nonempty
from graphinv.errors import InvalidGraphError
from graphinv.matrices import (
    LabelledMatrix,
    adjacency_matrix,
    laplacian_matrix,
    signless_laplacian_matrix,
)

if TYPE_CHECKING:
    import scipy.sparse

__all__ = [
    "MATRIX_KINDS",
    "MatrixKind",
    "SpanningTreeCheck",
    "SpectralProfile",
    "Spectrum",
    "algebraic_connectivity",
    "characteristic_polynomial",
    "characteristic_polynomials",
    "charpoly_of_rows",
    "check_matrix_kind",
    "eigenvalues",
    "format_polynomial",
    "graph_matrix",
    "group_eigenvalues",
    "spanning_trees_from_spectrum",
    "spectral_profile",
]

MatrixKind = Literal["laplacian", "signless", "adjacency"]
MATRIX_KINDS: tuple[str, ...] = ("laplacian", "signless", "adjacency")

#: Largest graph whose full spectrum is computed with a dense ``n x n`` eigensolver.
DENSE_LIMIT = 6000
#: Floats hold every integer of absolute value below this exactly.
_EXACT_FLOAT = 2.0**53
#: Above this order the recurrence (n^4 operations, coefficients soon past 2**53) loses to
#: python-flint, which :func:`characteristic_polynomials` then uses directly.
_STACK_LIMIT = 20


def check_matrix_kind(matrix: str) -> str:
    """Return ``matrix`` if it names a supported matrix, else raise :class:`InvalidGraphError`.

    Examples
    --------
    >>> check_matrix_kind("signless")
    'signless'
    >>> check_matrix_kind("normal")
    Traceback (most recent call last):
    ...
    graphinv.errors.InvalidGraphError: Argument 'matrix' must be one of 'laplacian', 'signless', 'adjacency', not 'normal'.
    """
    if matrix not in MATRIX_KINDS:
        choices = ", ".join(repr(k) for k in MATRIX_KINDS)
        raise InvalidGraphError(f"Argument 'matrix' must be one of {choices}, not {matrix!r}.")
    return matrix


def graph_matrix(
    G: nx.Graph, matrix: str = "laplacian", vertices: Iterable[Hashable] | None = None
) -> LabelledMatrix:
    """The Laplacian, signless Laplacian or adjacency matrix of an undirected graph.

    Parameters
    ----------
    G : networkx graph
        Undirected; edge attribute ``weight`` is a positive integer multiplicity.
    matrix : {"laplacian", "signless", "adjacency"}
    vertices : iterable, optional
        Row and column order; default ``list(G)``.

    Returns
    -------
    LabelledMatrix

    Raises
    ------
    InvalidGraphError
        If the graph is empty or directed, or ``matrix`` is not one of the three names.

    Examples
    --------
    >>> graph_matrix(nx.path_graph(3), "signless").to_lists()
    [[1, 1, 0], [1, 2, 1], [0, 1, 1]]

    References
    ----------
    Brouwer & Haemers, *Spectra of Graphs*, 2012, §1.3 (L) and §1.4 (Q).
    """
    check_matrix_kind(matrix)
    require_nonempty(G)
    if G.is_directed():
        raise InvalidGraphError(
            "spectra are computed here for undirected graphs only; "
            "convert with G.to_undirected() first"
        )
    if matrix == "laplacian":
        return laplacian_matrix(G, vertices)
    if matrix == "signless":
        return signless_laplacian_matrix(G, vertices)
    return adjacency_matrix(G, vertices)


# --------------------------------------------------------------------------------------------
# exact characteristic polynomials
# --------------------------------------------------------------------------------------------


def charpoly_of_rows(rows: Sequence[Sequence[int]]) -> tuple[int, ...]:
    """Exact characteristic polynomial ``det(x I - M)`` of a square integer matrix.

    The lean entry point for batch work: plain nested lists of ints in, a tuple of ints out
    (highest degree first, leading coefficient 1), through python-flint's ``fmpz_mat.charpoly``.

    Parameters
    ----------
    rows : sequence of sequences of int
        A square matrix, row by row.

    Returns
    -------
    tuple of int
        ``n + 1`` coefficients, highest degree first.

    Raises
    ------
    InvalidGraphError
        If the rows do not form a square matrix.

    Examples
    --------
    >>> charpoly_of_rows([[1, -1], [-1, 1]])   # x^2 - 2x
    (1, -2, 0)
    >>> charpoly_of_rows([])
    (1,)

    References
    ----------
    W. Hart et al., FLINT: Fast Library for Number Theory (``fmpz_mat_charpoly``).
    """
    import flint

    n = len(rows)
    if n == 0:
        return (1,)
    flat = [int(x) for row in rows for x in row]
    if len(flat) != n * n or any(len(row) != n for row in rows):
        raise InvalidGraphError(f"the matrix must be square; got {n} rows of unequal lengths")
    coefficients = flint.fmpz_mat(n, n, flat).charpoly().coeffs()
    return tuple(int(c) for c in reversed(coefficients))


def characteristic_polynomials(stack: np.ndarray | Sequence[Any]) -> list[tuple[int, ...]]:
    """Exact characteristic polynomials of many square integer matrices of one size at once.

    Runs the Faddeev–LeVerrier recurrence ``M_k = M M_{k-1} + c_{k-1} I``,
    ``c_k = -tr(M M_k) / k`` on the whole stack with NumPy ``float64`` arithmetic.  After each
    step it checks, matrix by matrix, that ``n**2 * max|M| * max|M_k| < 2**53``: that bounds
    every partial sum of the trace and of the next product, so below it every product, sum and
    (exact) division is computed without rounding and the result is the exact integer
    polynomial.  Matrices that fail the bound are redone with python-flint, and stacks of
    matrices larger than 20 x 20 go to python-flint directly.

    Parameters
    ----------
    stack : array_like of int, shape (count, n, n)

    Returns
    -------
    list of tuple of int
        One polynomial per matrix, highest degree first.

    Examples
    --------
    >>> import numpy as np
    >>> stack = np.array([[[0, 1], [1, 0]], [[2, -1], [-1, 2]]])
    >>> characteristic_polynomials(stack)
    [(1, 0, -1), (1, -4, 3)]

    References
    ----------
    Faddeev & Faddeeva, *Computational Methods of Linear Algebra*, 1963, §24 (the recurrence);
    IEEE 754-2008 (integers below 2**53 are exact in binary64).
    """
    array = np.asarray(stack)
    if array.ndim != 3 or array.shape[1] != array.shape[2]:
        raise InvalidGraphError(
            f"expected a stack of square matrices of shape (count, n, n), not {array.shape}"
        )
    count, n, _ = array.shape
    if count == 0:
        return []
    if n == 0:
        return [(1,)] * count
    if n > _STACK_LIMIT or array.dtype == object or not np.issubdtype(array.dtype, np.integer):
        return [charpoly_of_rows(m.tolist()) for m in array]
    M = array.astype(np.float64)
    row_max = np.abs(M).max(axis=(1, 2))
    exact = row_max * n < _EXACT_FLOAT
    coefficients = np.zeros((count, n + 1), dtype=np.float64)
    coefficients[:, 0] = 1.0
    diagonal = np.arange(n)
    power = np.zeros_like(M)
    for k in range(1, n + 1):
        # M_k = M @ M_{k-1} + c_{k-1} I, then c_k = -tr(M @ M_k) / k
        power = M @ power
        power[:, diagonal, diagonal] += coefficients[:, k - 1, None]
        # The trace sums n^2 products and the next step's product sums n; with every partial
        # sum below 2**53 in absolute value nothing is rounded (a rounded P_k would show a
        # maximum of at least 2**53 here, since rounding is monotone).
        power_max = np.abs(power).max(axis=(1, 2))
        exact &= row_max * power_max * (n * n) < _EXACT_FLOAT
        trace = np.einsum("kij,kji->k", M, power)
        coefficients[:, k] = -trace / k
    coefficients[~exact] = 0.0  # redone exactly below; keeps the cast free of overflow
    result: list[tuple[int, ...]] = [tuple(row) for row in coefficients.astype(np.int64).tolist()]
    for index in np.flatnonzero(~exact).tolist():
        result[index] = charpoly_of_rows(array[index].tolist())
    return result


def characteristic_polynomial(G: nx.Graph, matrix: str = "laplacian") -> tuple[int, ...]:
    """Exact characteristic polynomial ``det(x I - M)`` of the chosen graph matrix.

    Parameters
    ----------
    G : networkx graph
        Undirected; edge weights are integer multiplicities.
    matrix : {"laplacian", "signless", "adjacency"}

    Returns
    -------
    tuple of int
        The ``n + 1`` integer coefficients, **highest degree first** (leading coefficient 1).
        Use :func:`format_polynomial` to print it.

    Notes
    -----
    For the Laplacian the coefficient of ``x`` is ``(-1)^(n-1) n`` times the number of
    spanning trees (Kirchhoff's matrix-tree theorem).

    Examples
    --------
    >>> characteristic_polynomial(nx.complete_graph(3))   # eigenvalues 0, 3, 3
    (1, -6, 9, 0)
    >>> characteristic_polynomial(nx.star_graph(4), "adjacency")   # x^5 - 4x^3
    (1, 0, -4, 0, 0, 0)

    References
    ----------
    Brouwer & Haemers, *Spectra of Graphs*, 2012, §1.3.5 (matrix-tree theorem).
    """
    return charpoly_of_rows(graph_matrix(G, matrix).to_lists())


def format_polynomial(coefficients: Sequence[int], variable: str = "x") -> str:
    """Write a polynomial given highest degree first, e.g. ``x^3 - 6x^2 + 9x``.

    Examples
    --------
    >>> format_polynomial((1, -6, 9, 0))
    'x^3 - 6x^2 + 9x'
    >>> format_polynomial((1,))
    '1'
    """
    degree = len(coefficients) - 1
    terms: list[str] = []
    for position, c in enumerate(coefficients):
        if c == 0:
            continue
        power = degree - position
        size = abs(c)
        body = "" if size == 1 and power > 0 else str(size)
        if power >= 1:
            body += variable + (f"^{power}" if power > 1 else "")
        if not terms:
            terms.append(("-" if c < 0 else "") + body)
        else:
            terms.append(("- " if c < 0 else "+ ") + body)
    return " ".join(terms) if terms else "0"


# --------------------------------------------------------------------------------------------
# numeric spectra
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Spectrum:
    """Eigenvalues of a graph matrix, as floating-point numbers (not exact).

    Attributes
    ----------
    matrix : str
        ``"laplacian"``, ``"signless"`` or ``"adjacency"``.
    vertices : int
        Number of vertices (the full spectrum has this many eigenvalues).
    values : tuple of float
        The eigenvalues computed, in increasing order, with multiplicity.
    groups : tuple of (float, int)
        Distinct eigenvalues (mean of each group) with their multiplicities.  Two consecutive
        eigenvalues belong to one group when they differ from the group's smallest member by at
        most ``tolerance * max(1, max |eigenvalue|)``.
    tolerance : float
        The relative tolerance used for grouping.
    method : str
        The numerical routine (``numpy.linalg.eigvalsh`` or ``scipy.sparse.linalg.eigsh``).
    complete : bool
        True when ``values`` is the whole spectrum, False for a few extreme eigenvalues.
    """

    matrix: str
    vertices: int
    values: tuple[float, ...]
    groups: tuple[tuple[float, int], ...]
    tolerance: float
    method: str
    complete: bool

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict; eigenvalues are labelled as float64 numbers."""
        return {
            "matrix": self.matrix,
            "vertices": self.vertices,
            "numeric": "float64",
            "method": self.method,
            "complete": self.complete,
            "tolerance": self.tolerance,
            "eigenvalues": list(self.values),
            "distinct": [{"value": v, "multiplicity": m} for v, m in self.groups],
        }

    def _repr_html_(self) -> str:
        rows = "".join(f"<tr><td>{v:.10g}</td><td>{m}</td></tr>" for v, m in self.groups)
        scope = "all eigenvalues" if self.complete else "extreme eigenvalues only"
        return (
            f"<table><caption>{html.escape(self.matrix)} spectrum, {self.vertices} vertices "
            f"({scope}; float64 via {html.escape(self.method)}, grouped to relative "
            f"tolerance {self.tolerance:g})</caption>"
            "<tr><th>eigenvalue</th><th>multiplicity</th></tr>"
            f"{rows}</table>"
        )


def group_eigenvalues(
    values: Sequence[float], tolerance: float = 1e-8
) -> tuple[tuple[float, int], ...]:
    """Group sorted eigenvalues that agree to ``tolerance * max(1, max |value|)``.

    Examples
    --------
    >>> group_eigenvalues([0.0, 3.0 - 1e-13, 3.0 + 1e-13])
    ((0.0, 1), (3.0, 2))
    """
    ordered = sorted(float(v) for v in values)
    if not ordered:
        return ()
    scale = tolerance * max(1.0, max(abs(ordered[0]), abs(ordered[-1])))
    groups: list[list[float]] = [[ordered[0]]]
    for value in ordered[1:]:
        if value - groups[-1][0] <= scale:
            groups[-1].append(value)
        else:
            groups.append([value])
    result = []
    for group in groups:
        mean = math.fsum(group) / len(group)
        if abs(mean) <= scale:
            mean = 0.0
        result.append((mean, len(group)))
    return tuple(result)


def _dense_spectrum(M: LabelledMatrix) -> np.ndarray:
    dense = np.zeros(M.shape, dtype=np.float64)
    dense[M.rows, M.columns] = M.values.astype(np.float64)
    return np.linalg.eigvalsh(dense)


def _sparse(M: LabelledMatrix) -> scipy.sparse.csr_array:
    return M.to_scipy().astype(np.float64)


def eigenvalues(
    G: nx.Graph,
    matrix: str = "laplacian",
    *,
    count: int | None = None,
    which: Literal["smallest", "largest"] = "largest",
    tolerance: float = 1e-8,
) -> Spectrum:
    """Eigenvalues of the Laplacian, signless Laplacian or adjacency matrix (floats).

    Parameters
    ----------
    G : networkx graph
        Undirected; edge weights are integer multiplicities.
    matrix : {"laplacian", "signless", "adjacency"}
    count : int, optional
        Compute only this many extreme eigenvalues (``which`` end of the spectrum).  On graphs
        with more than 500 vertices this uses the sparse Lanczos solver
        ``scipy.sparse.linalg.eigsh`` (shift-invert for the smallest eigenvalues of the positive
        semidefinite L and Q); otherwise a dense solve is sliced.  Default: all eigenvalues,
        by the dense symmetric solver ``numpy.linalg.eigvalsh`` (up to 6000 vertices).
    which : {"largest", "smallest"}
        Which end of the spectrum ``count`` refers to.
    tolerance : float
        Relative tolerance for grouping equal eigenvalues (see :class:`Spectrum`).

    Returns
    -------
    Spectrum

    Raises
    ------
    InvalidGraphError
        For an empty or directed graph, a bad ``count``/``which``, or a full spectrum
        requested for more than 6000 vertices.

    Examples
    --------
    >>> [(round(value, 9), multiplicity)
    ...  for value, multiplicity in eigenvalues(nx.complete_graph(4)).groups]
    [(0.0, 1), (4.0, 3)]
    >>> [round(v, 6) for v in eigenvalues(nx.cycle_graph(5), "adjacency", count=1).values]
    [2.0]

    References
    ----------
    Brouwer & Haemers, *Spectra of Graphs*, 2012, §1.4; E. Anderson et al., *LAPACK Users'
    Guide*, 1999 (``dsyevd``); R. B. Lehoucq, D. C. Sorensen, C. Yang, *ARPACK Users' Guide*, 1998.
    """
    M = graph_matrix(G, matrix)
    n = M.shape[0]
    if which not in ("smallest", "largest"):
        raise InvalidGraphError(f"Argument 'which' must be 'smallest' or 'largest', not {which!r}.")
    if not tolerance > 0:
        raise InvalidGraphError(f"Argument 'tolerance' must be positive, not {tolerance!r}.")
    if count is None:
        if n > DENSE_LIMIT:
            raise InvalidGraphError(
                f"the full spectrum of a {n}-vertex graph needs a dense {n} x {n} solve; "
                f"ask for a few extreme eigenvalues with count=... (at most {DENSE_LIMIT} "
                "vertices for the full spectrum)"
            )
        values = _dense_spectrum(M)
        method, complete = "numpy.linalg.eigvalsh", True
    else:
        if isinstance(count, bool) or not isinstance(count, int) or not 1 <= count <= n:
            raise InvalidGraphError(
                f"Argument 'count' must be an integer from 1 to {n}, not {count!r}."
            )
        if n <= 500 or count >= n - 1:
            full = _dense_spectrum(M)
            values = full[:count] if which == "smallest" else full[n - count :]
            method, complete = "numpy.linalg.eigvalsh", count == n
        else:
            values = _extreme_sparse(M, count, which, positive=matrix != "adjacency")
            method, complete = "scipy.sparse.linalg.eigsh", False
    ordered = tuple(float(v) for v in np.sort(values))
    return Spectrum(
        matrix=matrix,
        vertices=n,
        values=ordered,
        groups=group_eigenvalues(ordered, tolerance),
        tolerance=tolerance,
        method=method,
        complete=complete,
    )


def _extreme_sparse(M: LabelledMatrix, count: int, which: str, *, positive: bool) -> np.ndarray:
    from scipy.sparse.linalg import eigsh

    sparse = _sparse(M)
    if which == "largest":
        values = eigsh(sparse, k=count, which="LA", return_eigenvectors=False)
    elif positive:
        # L and Q are positive semidefinite: shift-invert around -1 finds the eigenvalues
        # nearest 0 quickly and keeps the shifted matrix nonsingular.
        values = eigsh(sparse, k=count, sigma=-1.0, which="LM", return_eigenvectors=False)
    else:
        values = eigsh(sparse, k=count, which="SA", return_eigenvectors=False)
    return np.asarray(values, dtype=np.float64)


def algebraic_connectivity(G: nx.Graph) -> float:
    """The second-smallest Laplacian eigenvalue (a float, computed numerically).

    It is positive exactly when the graph is connected (Fiedler 1973).  Graphs with more than
    500 vertices use the sparse shift-invert Lanczos solver.

    Examples
    --------
    >>> round(algebraic_connectivity(nx.path_graph(4)), 6)   # 2 - 2 cos(pi/4)
    0.585786
    >>> algebraic_connectivity(nx.empty_graph(1))
    0.0

    References
    ----------
    M. Fiedler, "Algebraic connectivity of graphs", Czechoslovak Math. J. 23 (1973).
    """
    require_nonempty(G)
    n = G.number_of_nodes()
    if n == 1:
        return 0.0
    spectrum = eigenvalues(G, "laplacian", count=2, which="smallest")
    value = spectrum.values[1]
    scale = 1e-9 * max(1.0, abs(value))
    return 0.0 if abs(value) <= scale else value


@dataclass(frozen=True)
class SpanningTreeCheck:
    """Spanning trees counted two ways: exactly, and from Laplacian eigenvalues (float).

    Attributes
    ----------
    vertices : int
    exact : int
        The exact count (python int, from the integer normal-form core).
    estimate : float
        ``(1/n) * product of the n - 1 largest Laplacian eigenvalues`` (matrix-tree theorem),
        a float64 number; ``inf`` when it exceeds the float range (see ``log10_estimate``).
    log10_estimate : float
        ``log10`` of the estimate (``-inf`` for a disconnected graph).
    relative_error : float
        ``|estimate / exact - 1|``, computed from logarithms (0 when both are 0).
    agrees : bool
        Whether ``relative_error <= tolerance``.
    tolerance : float
    """

    vertices: int
    exact: int
    estimate: float
    log10_estimate: float
    relative_error: float
    agrees: bool
    tolerance: float

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict; ``exact`` as a decimal string, the float fields labelled."""
        return {
            "vertices": self.vertices,
            "spanning_trees": str(self.exact),
            "spectral_estimate_float64": None if math.isinf(self.estimate) else self.estimate,
            "spectral_log10_estimate": None
            if math.isinf(self.log10_estimate)
            else self.log10_estimate,
            "relative_error": self.relative_error,
            "agrees": self.agrees,
            "tolerance": self.tolerance,
        }

    def _repr_html_(self) -> str:
        verdict = "agree" if self.agrees else "DISAGREE"
        return (
            "<table><tr><th>spanning trees (exact)</th><th>from eigenvalues (float64)</th>"
            "<th>relative error</th></tr>"
            f"<tr><td>{self.exact}</td><td>{self.estimate:.12g}</td>"
            f"<td>{self.relative_error:.2e} ({verdict})</td></tr></table>"
        )


def spanning_trees_from_spectrum(
    G: nx.Graph, *, exact: int | None = None, tolerance: float = 1e-6
) -> SpanningTreeCheck:
    """The spanning-tree count from Laplacian eigenvalues, beside the exact count.

    Kirchhoff's theorem in spectral form: ``tau(G) = (1/n) * mu_2 * ... * mu_n`` for the
    Laplacian eigenvalues ``0 = mu_1 <= mu_2 <= ... <= mu_n``.  The product is formed from
    logarithms so that it does not overflow before the final result.

    Parameters
    ----------
    G : networkx graph
        Undirected, at most 6000 vertices (needs the full spectrum).
    exact : int, optional
        The exact count if already known; default the exact determinant of the reduced
        Laplacian from :func:`graphinv.normalform.determinant` (0 for a disconnected graph).
    tolerance : float
        Relative difference accepted as agreement.

    Returns
    -------
    SpanningTreeCheck

    Examples
    --------
    >>> check = spanning_trees_from_spectrum(nx.complete_graph(5))   # Cayley: 5^3
    >>> check.exact, round(check.estimate, 6), check.agrees
    (125, 125.0, True)

    References
    ----------
    G. Kirchhoff, Ann. Phys. Chem. 72 (1847); Brouwer & Haemers, *Spectra of Graphs*, 2012,
    Prop. 1.3.4.
    """
    spectrum = eigenvalues(G, "laplacian")
    if exact is None:
        exact = _exact_spanning_trees(G)
    return _tree_check(spectrum, exact, tolerance)


def _tree_check(spectrum: Spectrum, exact: int, tolerance: float) -> SpanningTreeCheck:
    n = spectrum.vertices
    values = np.asarray(spectrum.values[1:], dtype=np.float64)
    scale = 1e-9 * max(1.0, spectrum.values[-1])
    if n == 1:
        log_estimate = 0.0
    elif values.size == 0 or values[0] <= scale:
        log_estimate = -math.inf
    else:
        log_estimate = math.fsum(np.log(values).tolist()) - math.log(n)
    estimate = math.exp(log_estimate) if log_estimate < 709.0 else math.inf
    if exact == 0 or log_estimate == -math.inf:
        relative_error = 0.0 if exact == 0 and log_estimate == -math.inf else math.inf
    else:
        relative_error = abs(math.expm1(log_estimate - math.log(exact)))
    return SpanningTreeCheck(
        vertices=n,
        exact=exact,
        estimate=estimate,
        log10_estimate=log_estimate / math.log(10) if log_estimate != -math.inf else -math.inf,
        relative_error=relative_error,
        agrees=relative_error <= tolerance,
        tolerance=tolerance,
    )


def _exact_spanning_trees(G: nx.Graph) -> int:
    from graphinv.matrices import reduced_laplacian_matrix
    from graphinv.normalform import determinant

    if not nx.is_connected(G):
        return 0
    if G.number_of_nodes() == 1:
        return 1
    return int(determinant(reduced_laplacian_matrix(G).to_lists()))


@dataclass(frozen=True)
class SpectralProfile:
    """What the spectral layer says about one graph: exact polynomial and float eigenvalues.

    Attributes
    ----------
    name : str
    matrix : str
    vertices : int
    polynomial : tuple of int or None
        Exact, highest degree first; ``None`` above ``polynomial_limit`` vertices.
    spectrum : Spectrum
        Complete when the graph is small enough for a dense solve, else the extreme
        eigenvalues at both ends.
    algebraic_connectivity : float or None
        Laplacian only (float).
    trees : SpanningTreeCheck or None
        Laplacian only, when the full spectrum was computed: the exact count beside the
        eigenvalue product.
    """

    name: str
    matrix: str
    vertices: int
    polynomial: tuple[int, ...] | None
    spectrum: Spectrum
    algebraic_connectivity: float | None
    trees: SpanningTreeCheck | None

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict; the polynomial's coefficients beyond 2**53 become strings."""
        return {
            "name": self.name,
            "matrix": self.matrix,
            "vertices": self.vertices,
            "polynomial": None if self.polynomial is None else list(self.polynomial),
            "polynomial_text": None
            if self.polynomial is None
            else format_polynomial(self.polynomial),
            "spectrum": self.spectrum.to_record(),
            "algebraic_connectivity_float64": self.algebraic_connectivity,
            "spanning_trees": None if self.trees is None else self.trees.to_record(),
        }

    def _repr_html_(self) -> str:
        polynomial = (
            "not computed (graph too large)"
            if self.polynomial is None
            else format_polynomial(self.polynomial)
        )
        parts = [
            f"<p><b>{html.escape(self.name)}</b>: det(xI - {html.escape(self.matrix)}) = "
            f"{html.escape(polynomial)}</p>",
            self.spectrum._repr_html_(),
        ]
        if self.trees is not None:
            parts.append(self.trees._repr_html_())
        return "".join(parts)


def spectral_profile(
    G: nx.Graph,
    *,
    matrix: str = "laplacian",
    polynomial_limit: int = 400,
    dense_limit: int = 2000,
    extremes: int = 6,
    tolerance: float = 1e-8,
) -> SpectralProfile:
    """Exact polynomial, eigenvalues and (for L) connectivity and tree-count check of a graph.

    Parameters
    ----------
    G : networkx graph
        Undirected; edge weights are integer multiplicities.
    matrix : {"laplacian", "signless", "adjacency"}
    polynomial_limit : int
        Largest graph whose exact characteristic polynomial is computed.
    dense_limit : int
        Largest graph whose full spectrum is computed; bigger graphs get the ``extremes``
        smallest and largest eigenvalues from the sparse solver.
    extremes : int
        How many eigenvalues at each end for graphs above ``dense_limit``.
    tolerance : float
        Relative tolerance for grouping eigenvalues.

    Returns
    -------
    SpectralProfile

    Examples
    --------
    >>> profile = spectral_profile(nx.complete_graph(4))
    >>> format_polynomial(profile.polynomial), profile.trees.exact, profile.trees.agrees
    ('x^4 - 12x^3 + 48x^2 - 64x', 16, True)

    References
    ----------
    Brouwer & Haemers, *Spectra of Graphs*, 2012; Fiedler 1973; Kirchhoff 1847.
    """
    check_matrix_kind(matrix)
    M = graph_matrix(G, matrix)
    n = M.shape[0]
    polynomial = charpoly_of_rows(M.to_lists()) if n <= polynomial_limit else None
    if n <= dense_limit:
        spectrum = eigenvalues(G, matrix, tolerance=tolerance)
    else:
        count = min(extremes, n)
        low = eigenvalues(G, matrix, count=count, which="smallest", tolerance=tolerance)
        high = eigenvalues(G, matrix, count=count, which="largest", tolerance=tolerance)
        values = tuple(sorted(low.values + high.values))
        spectrum = Spectrum(
            matrix=matrix,
            vertices=n,
            values=values,
            groups=group_eigenvalues(values, tolerance),
            tolerance=tolerance,
            method=high.method,
            complete=False,
        )
    connectivity = trees = None
    if matrix == "laplacian":
        if spectrum.complete:
            connectivity = 0.0 if n == 1 else spectrum.values[1]
            if abs(connectivity) <= 1e-9 * max(1.0, spectrum.values[-1]):
                connectivity = 0.0
            if polynomial is not None:
                # Kirchhoff: the coefficient of x in det(xI - L) is (-1)^(n-1) n tau(G).
                exact = abs(polynomial[-2]) // n if n > 1 else 1
            else:
                exact = _exact_spanning_trees(G)
            trees = _tree_check(spectrum, exact, 1e-6)
        else:
            connectivity = algebraic_connectivity(G)
    name = str(G.graph.get("name") or "graph")
    return SpectralProfile(
        name=name,
        matrix=matrix,
        vertices=n,
        polynomial=polynomial,
        spectrum=spectrum,
        algebraic_connectivity=connectivity,
        trees=trees,
    )
