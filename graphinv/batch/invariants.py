"""The per-graph kernel of a batch: one small graph in, one row of exact invariants out.

A batch handles millions of graphs of a few vertices each, so this path avoids networkx: a
worker receives raw graph6/sparse6 lines, parses them with the lean parsers of
:mod:`graphinv.io.graph6`, builds the integer rows of the adjacency, Laplacian and signless
Laplacian matrices directly, and hands them to the pure normal-form core
(:func:`graphinv.normalform.cokernel`, :func:`graphinv.normalform.smith_diagonal`,
:func:`graphinv.normalform.determinant`) and to the exact characteristic polynomial of
:mod:`graphinv.spectrum`.

Every stored value is text, so that integers of any size stay exact in SQLite:

``critical_group``
    the invariant factors greater than 1 of the torsion of ``coker L``, comma-separated
    (empty text for the trivial group);
``components``
    the free rank of ``coker L``, which is the number of connected components;
``group_rank``
    the number of invariant factors greater than 1 (0 means trivial, 1 cyclic);
``spanning_trees``
    the number of spanning trees, found independently of the Smith form from the coefficient of
    ``x`` in ``det(xI - L)``, which is ``(-1)^(n-1) n τ(G)`` (Kelmans and Chelnokov 1974), or
    from the determinant of the reduced Laplacian when that polynomial is not wanted;
``laplacian_polynomial``, ``signless_polynomial``, ``adjacency_polynomial``
    the coefficients of ``det(xI - M)``, leading coefficient first;
``adjacency_smith``, ``signless_smith``
    the full Smith diagonal (``n`` entries, zeros last);
``degrees``
    the degree sequence, largest first;
``canonical_key``
    the graph6 text of the canonical relabelling by nauty (through pynauty), so that two rows
    have the same key exactly when the graphs are isomorphic.

Where both the critical group and the spanning-tree count are computed, the kernel checks that
the product of the invariant factors equals the spanning-tree count (Kirchhoff's matrix-tree
theorem with the Smith form, Biggs 1999) and records an error for the graph if it does not.

References
----------
N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999).
A. K. Kelmans and V. M. Chelnokov, "A certain polynomial of a graph and graphs with an extremal
number of trees", J. Combin. Theory Ser. B 16 (1974).
B. D. McKay and A. Piperno, "Practical graph isomorphism, II", J. Symbolic Comput. 60 (2014).
B. D. McKay, "Description of graph6, sparse6 and digraph6 encodings" (nauty documentation).
"""

from __future__ import annotations

import io
import math
import sys
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass
from typing import Any

__all__ = [
    "DEFAULT_INVARIANTS",
    "INVARIANTS",
    "InvariantRow",
    "KernelSettings",
    "adjacency_rows",
    "canonical_graph6",
    "compute_invariants",
    "encode_graph6",
    "graph_edges",
    "parse_invariants",
    "process_chunk",
]

#: Every invariant the batch engine can compute, in storage order.
INVARIANTS: tuple[str, ...] = (
    "critical_group",
    "spanning_trees",
    "laplacian_polynomial",
    "signless_polynomial",
    "adjacency_polynomial",
    "adjacency_smith",
    "signless_smith",
    "degrees",
    "canonical_key",
)

#: What ``graphinv batch`` computes when no selection is given: everything.
DEFAULT_INVARIANTS: tuple[str, ...] = INVARIANTS


def parse_invariants(text: str | Iterable[str] | None) -> tuple[str, ...]:
    """Turn a user's selection into a tuple of invariant names in storage order.

    Parameters
    ----------
    text : str or iterable of str or None
        Names separated by commas (hyphens or underscores), ``"all"``, or None for the default.

    Returns
    -------
    tuple of str
        The selected names, in the order of :data:`INVARIANTS`.

    Raises
    ------
    graphinv.errors.InvalidGraphError
        If a name is unknown.

    Examples
    --------
    >>> parse_invariants("spanning-trees, critical-group")
    ('critical_group', 'spanning_trees')
    >>> parse_invariants(None) == INVARIANTS
    True

    References
    ----------
    N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999).
    """
    from graphinv.errors import GraphInvError

    if text is None:
        return DEFAULT_INVARIANTS
    names = text.split(",") if isinstance(text, str) else list(text)
    chosen: set[str] = set()
    for raw in names:
        name = raw.strip().lower().replace("-", "_")
        if not name:
            continue
        if name == "all":
            chosen.update(INVARIANTS)
        elif name in INVARIANTS:
            chosen.add(name)
        else:
            raise GraphInvError(
                f"unknown invariant {raw.strip()!r}; expected some of: "
                + ", ".join(n.replace("_", "-") for n in INVARIANTS)
            )
    if not chosen:
        raise GraphInvError("the invariant selection is empty; expected at least one name")
    return tuple(name for name in INVARIANTS if name in chosen)


@dataclass(frozen=True)
class KernelSettings:
    """What a worker computes for each graph of a chunk.

    Attributes
    ----------
    invariants : tuple of str
        Names from :data:`INVARIANTS`.
    max_vertices : int or None
        Graphs with more vertices get an error row instead of results.
    input_format : str or None
        ``"graph6"``, ``"sparse6"`` or None (decide per line by the first character) for line
        streams; the format handed to :func:`graphinv.io.read_graphs` for whole files.
    """

    invariants: tuple[str, ...] = DEFAULT_INVARIANTS
    max_vertices: int | None = None
    input_format: str | None = None


@dataclass(frozen=True)
class InvariantRow:
    """The stored invariants of one graph (text values; None where not computed).

    Examples
    --------
    >>> row = compute_invariants([[0, 1, 1], [1, 0, 1], [1, 1, 0]],
    ...                          invariants=("critical_group", "spanning_trees"))
    >>> row.critical_group, row.spanning_trees, row.components
    ('3', '3', 1)
    >>> row.to_record()["critical_group"]
    ['3']
    """

    vertices: int
    edges: int | str
    components: int | None = None
    critical_group: str | None = None
    group_rank: int | None = None
    spanning_trees: str | None = None
    laplacian_polynomial: str | None = None
    signless_polynomial: str | None = None
    adjacency_polynomial: str | None = None
    adjacency_smith: str | None = None
    signless_smith: str | None = None
    degrees: str | None = None
    canonical_key: str | None = None

    def values(self) -> tuple[Any, ...]:
        """The values in the order of the store's result columns."""
        return (
            self.vertices,
            self.edges,
            self.components,
            self.critical_group,
            self.group_rank,
            self.spanning_trees,
            self.laplacian_polynomial,
            self.signless_polynomial,
            self.adjacency_polynomial,
            self.adjacency_smith,
            self.signless_smith,
            self.degrees,
            self.canonical_key,
        )

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict: integer lists as lists of decimal strings."""
        from graphinv.batch.store import decode_value

        return {
            name: decode_value(name, value)
            for name, value in zip(RESULT_COLUMNS, self.values(), strict=True)
        }


#: The stored result columns, in the order of :meth:`InvariantRow.values`.
RESULT_COLUMNS: tuple[str, ...] = (
    "vertices",
    "edges",
    "components",
    "critical_group",
    "group_rank",
    *INVARIANTS[1:],
)


def adjacency_rows(n: int, edges: Iterable[Sequence[int]]) -> list[list[int]]:
    """The adjacency rows of a graph on vertices ``0..n-1``; repeated edges add up, loops skip.

    Parameters
    ----------
    n : int
        The number of vertices.
    edges : iterable of (u, v) or (u, v, multiplicity)
        Vertex pairs; a pair listed twice (as sparse6 may) is a double edge.

    Examples
    --------
    >>> adjacency_rows(3, [(0, 1), (1, 2), (1, 2), (2, 2)])
    [[0, 1, 0], [1, 0, 2], [0, 2, 0]]

    References
    ----------
    N. Biggs, *Algebraic Graph Theory*, 2nd ed., Cambridge University Press, 1993 (multigraph
    adjacency matrices).
    """
    rows = [[0] * n for _ in range(n)]
    for edge in edges:
        u, v = edge[0], edge[1]
        if u == v:
            continue
        m = edge[2] if len(edge) > 2 else 1
        rows[u][v] += m
        rows[v][u] += m
    return rows


def _join(values: Iterable[Any]) -> str:
    return ",".join(map(str, values))


def _reverse_join(values: Sequence[Any]) -> str:
    return ",".join(map(str, reversed(values)))


def _graph6_size(n: int) -> str:
    if n < 63:
        return chr(63 + n)
    if n < 258048:
        return "~" + "".join(chr(63 + ((n >> s) & 63)) for s in (12, 6, 0))
    return "~~" + "".join(chr(63 + ((n >> s) & 63)) for s in (30, 24, 18, 12, 6, 0))


def encode_graph6(n: int, rows: Sequence[Sequence[int]]) -> str:
    """The graph6 text of a simple graph given by its adjacency rows (nonzero means adjacent).

    Examples
    --------
    >>> encode_graph6(3, [[0, 1, 1], [1, 0, 1], [1, 1, 0]])
    'Bw'
    >>> encode_graph6(0, [])
    '?'

    References
    ----------
    B. D. McKay, "Description of graph6, sparse6 and digraph6 encodings" (nauty documentation).
    """
    head = _graph6_size(n)
    out = []
    value = 0
    count = 0
    for v in range(1, n):
        row = rows[v]
        for u in range(v):
            value = (value << 1) | (1 if row[u] else 0)
            count += 1
            if count == 6:
                out.append(chr(63 + value))
                value = 0
                count = 0
    if count:
        out.append(chr(63 + (value << (6 - count))))
    return head + "".join(out)


def canonical_graph6(rows: Sequence[Sequence[int]]) -> str:
    """A canonical key: equal for two graphs exactly when they are isomorphic.

    For a simple graph it is the graph6 text of nauty's canonical relabelling.  For a
    multigraph each edge of multiplicity ``m > 1`` becomes a new vertex joined to both ends and
    coloured by ``m``; the key is ``"multi:"`` followed by the colour classes and nauty's
    certificate of that coloured graph.

    Raises
    ------
    ImportError
        If pynauty is not installed.

    Examples
    --------
    >>> path_a = [[0, 1, 0], [1, 0, 1], [0, 1, 0]]  # 0-1-2
    >>> path_b = [[0, 1, 1], [1, 0, 0], [1, 0, 0]]  # 1-0-2
    >>> canonical_graph6(path_a) == canonical_graph6(path_b)
    True

    References
    ----------
    B. D. McKay and A. Piperno, "Practical graph isomorphism, II", J. Symbolic Comput. 60 (2014).
    """
    import pynauty

    n = len(rows)
    if n == 0:
        return "?"
    adjacency: dict[int, list[int]] = {}
    multiple: dict[int, list[tuple[int, int]]] = {}
    for v in range(n):
        row = rows[v]
        neighbours = [u for u in range(v + 1, n) if row[u]]
        if neighbours:
            simple = []
            for u in neighbours:
                if row[u] == 1:
                    simple.append(u)
                else:
                    multiple.setdefault(row[u], []).append((v, u))
            if simple:
                adjacency[v] = simple
    if not multiple:
        # The certificate is the canonical graph's adjacency matrix, row by row, as bit sets
        # (64-bit set words in machine byte order, most significant bit first); repack it as
        # graph6.
        certificate = pynauty.certificate(pynauty.Graph(n, adjacency_dict=adjacency))
        width = len(certificate) // n
        shift = 8 * width
        packed = 0
        for v in range(1, n):
            start = v * width
            if width == 8:
                bits = int.from_bytes(certificate[start : start + 8], sys.byteorder)
            else:  # several 64-bit set words per row, each in machine byte order
                bits = 0
                for offset in range(start, start + width, 8):
                    word = int.from_bytes(certificate[offset : offset + 8], sys.byteorder)
                    bits = (bits << 64) | word
            packed = (packed << v) | (bits >> (shift - v))
        pairs = n * (n - 1) // 2
        padding = -pairs % 6
        packed <<= padding
        count = (pairs + padding) // 6
        body = bytes(63 + ((packed >> (6 * (count - 1 - i))) & 63) for i in range(count))
        return _graph6_size(n) + body.decode("ascii")
    total = n
    colouring = [set(range(n))]
    classes = []
    for m in sorted(multiple):
        members = set()
        for v, u in multiple[m]:
            adjacency.setdefault(v, []).append(total)
            adjacency.setdefault(u, []).append(total)
            members.add(total)
            total += 1
        colouring.append(members)
        classes.append(f"{m}x{len(members)}")
    graph = pynauty.Graph(total, adjacency_dict=adjacency, vertex_coloring=colouring)
    return f"multi:{n}:{'.'.join(classes)}:{pynauty.certificate(graph).hex()}"


def _smith_of_rows(rows: Sequence[Sequence[int]]) -> tuple[int, ...]:
    """The Smith diagonal of a square matrix whose rows this module built (plain ints)."""
    from graphinv.normalform.cokernel import diagonal_of_rows

    # The core's public entry points check every entry's type; rows built here from parsed
    # graphs are known to be rectangular lists of ints, so the batch goes straight to the
    # core's function for checked rows (half the cost on 9 x 9 matrices).
    size = len(rows)
    return tuple(diagonal_of_rows(rows, size, size))  # type: ignore[arg-type]


def _core() -> tuple[Callable[..., Any], Callable[..., Any], Callable[..., Any]]:
    """The pure core functions the kernel uses: Smith diagonal, determinant, polynomial."""
    from graphinv.normalform import determinant
    from graphinv.spectrum import charpoly_of_rows

    return _smith_of_rows, determinant, charpoly_of_rows


#: Up to this many vertices the polynomials of a chunk are computed together, as a NumPy stack
#: (:func:`graphinv.spectrum.characteristic_polynomials`); larger graphs go one by one.
_STACK_LIMIT = 16
#: Multiplicities above this stay out of the stack (its int64 matrices must not overflow).
_STACK_WEIGHT = 1 << 20


def _laplacians(
    rows: Sequence[Sequence[int]], degrees: Sequence[int]
) -> tuple[list[list[int]], list[list[int]]]:
    n = len(rows)
    laplacian = [[-x for x in row] for row in rows]
    signless = [list(row) for row in rows]
    for i in range(n):
        laplacian[i][i] = degrees[i]
        signless[i][i] = degrees[i]
    return laplacian, signless


def compute_invariants(
    rows: Sequence[Sequence[int]], *, invariants: Sequence[str] = DEFAULT_INVARIANTS
) -> InvariantRow:
    """Compute the selected invariants of the graph with adjacency rows ``rows``.

    Parameters
    ----------
    rows : sequence of sequences of int
        The symmetric adjacency rows (non-negative multiplicities, zero diagonal).
    invariants : sequence of str
        Names from :data:`INVARIANTS`.

    Returns
    -------
    InvariantRow
        The stored text values.

    Raises
    ------
    graphinv.errors.GraphInvError
        If the critical group and the spanning-tree count disagree (which would mean a defect in
        the core, never bad input).

    Examples
    --------
    >>> k4 = [[0 if i == j else 1 for j in range(4)] for i in range(4)]
    >>> row = compute_invariants(k4)
    >>> row.critical_group, row.spanning_trees, row.laplacian_polynomial
    ('4,4', '16', '1,-12,48,-64,0')
    >>> row.adjacency_smith, row.degrees, row.canonical_key
    ('1,1,1,3', '3,3,3,3', 'C~')

    References
    ----------
    N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999);
    D. Lorenzini, "A finite group attached to the Laplacian of a graph", Discrete Math. 91 (1991).
    """
    charpoly = _core()[2]
    wanted = set(invariants)
    degrees = [sum(row) for row in rows]
    laplacian, signless = _laplacians(rows, degrees)
    polynomials = {
        name: charpoly(matrix)
        for name, matrix in (
            ("laplacian_polynomial", laplacian),
            ("signless_polynomial", signless),
            ("adjacency_polynomial", rows),
        )
        if name in wanted
    }
    return _finish(rows, laplacian, signless, degrees, polynomials, wanted)


def _finish(
    rows: Sequence[Sequence[int]],
    laplacian: list[list[int]],
    signless: list[list[int]],
    degrees: Sequence[int],
    polynomials: dict[str, Sequence[int]],
    wanted: set[str],
) -> InvariantRow:
    """Everything after the polynomials: Smith forms, the tree count and its check, the key."""
    from graphinv.errors import GraphInvError

    smith_diagonal, determinant, _ = _core()
    n = len(rows)
    edges = sum(degrees) // 2
    # SQLite integers have 64 bits; a larger edge count (huge multiplicities) is stored as text.
    values: dict[str, Any] = {"vertices": n, "edges": edges if edges < 2**63 else str(edges)}
    order: int | None = None
    if "critical_group" in wanted:
        # Rows and columns of L sum to zero, so coker L = coker(reduced L) + Z (Biggs 1999):
        # the smaller reduced Laplacian gives the same invariant factors.
        diagonal = smith_diagonal([row[1:] for row in laplacian[1:]])
        factors = [d for d in diagonal if d > 1]
        values["critical_group"] = _join(factors)
        values["group_rank"] = len(factors)
        values["components"] = 1 + sum(1 for d in diagonal if d == 0)
        order = math.prod(factors)
    for name, coefficients in polynomials.items():
        values[name] = _join(coefficients)
    if "spanning_trees" in wanted:
        if "laplacian_polynomial" in polynomials and n > 0:
            # The coefficient of x in det(xI - L) is (-1)^(n-1) n τ(G) (Kelmans-Chelnokov 1974).
            trees = abs(int(polynomials["laplacian_polynomial"][n - 1])) // n
        elif n <= 1:
            trees = n
        else:
            trees = abs(determinant([row[1:] for row in laplacian[1:]]))
        values["spanning_trees"] = str(trees)
        if order is not None and values["components"] == 1 and order != trees:
            raise GraphInvError(
                f"internal check failed: the invariant factors multiply to {order} but the "
                f"graph has {trees} spanning trees"
            )
    if "adjacency_smith" in wanted:
        values["adjacency_smith"] = _join(smith_diagonal(rows))
    if "signless_smith" in wanted:
        values["signless_smith"] = _join(smith_diagonal(signless))
    if "degrees" in wanted:
        values["degrees"] = _join(sorted(degrees, reverse=True))
    if "canonical_key" in wanted:
        values["canonical_key"] = canonical_graph6(rows)
    return InvariantRow(**values)


_POLYNOMIAL_NAMES = ("laplacian_polynomial", "signless_polynomial", "adjacency_polynomial")


def _stacked_matrices(
    graphs: Sequence[tuple[int, Sequence[Sequence[int]]]], n: int, wanted: set[str]
) -> tuple[list[Any], list[Any], list[Any], list[Any], dict[str, list[tuple[int, ...]]]]:
    """Adjacency, Laplacian and signless rows plus polynomials of many ``n``-vertex graphs."""
    import numpy as np

    from graphinv.spectrum import characteristic_polynomials

    count = len(graphs)
    graph_ids: list[int] = []
    tails: list[int] = []
    heads: list[int] = []
    weights: list[int] = []
    for k, (_, edges) in enumerate(graphs):
        for edge in edges:
            u, v = edge[0], edge[1]
            if u != v:
                graph_ids.append(k)
                tails.append(u)
                heads.append(v)
                weights.append(edge[2] if len(edge) > 2 else 1)
    A = np.zeros((count, n, n), dtype=np.int64)
    np.add.at(A, (graph_ids, tails, heads), weights)
    np.add.at(A, (graph_ids, heads, tails), weights)
    degree = A.sum(axis=2)
    diagonal = np.arange(n)
    L = -A
    L[:, diagonal, diagonal] = degree
    Q = A.copy()
    Q[:, diagonal, diagonal] = degree
    polynomials = {}
    for name, stack in zip(_POLYNOMIAL_NAMES, (L, Q, A), strict=True):
        if name in wanted:
            polynomials[name] = characteristic_polynomials(stack)
    return A.tolist(), L.tolist(), Q.tolist(), degree.tolist(), polynomials


#: A task item: (position, 1-based line or None, content key, payload).  The payload is None
#: for a graph6/sparse6 line (the content is the text); ``(suffix format, file name, text)``
#: for ``kind="files"`` (the text travels, so remote workers need no shared file system); and
#: ``(n, [(u, v, multiplicity), ...])`` for ``kind="edges"``.  A payload that is a string is
#: the message of a graph that could not even be read.
TaskItem = tuple[int, "int | None", str, Any]
#: A result row: (position, line, content, *RESULT_COLUMNS values, error).
ResultItem = tuple[Any, ...]

_EMPTY_RESULTS = (None,) * len(RESULT_COLUMNS)


def _error_row(position: int, line: int | None, content: str, message: str) -> ResultItem:
    return (position, line, content, *_EMPTY_RESULTS, message)


def _parse_line(text: str, input_format: str | None) -> tuple[int, list[tuple[int, int]]]:
    from graphinv.io.graph6 import parse_graph6, parse_sparse6

    if input_format == "sparse6" or (input_format is None and text[:1] in (":", ";")):
        return parse_sparse6(text)
    return parse_graph6(text)


class _NamedText(io.StringIO):
    """File text shipped to a worker, keeping the file's name for error messages."""

    def __init__(self, text: str, name: str) -> None:
        super().__init__(text)
        self.name = name


def _graph_from_file(payload: Any, input_format: str | None) -> tuple[int, list[Any]]:
    """``(n, [(u, v, multiplicity), ...])`` of the one graph in a file's shipped text.

    ``payload`` is ``(format from the suffix, file name, text)``, or the message of a file that
    could not be read.
    """
    from graphinv.errors import GraphFormatError, GraphInvError
    from graphinv.io import read_graphs

    if isinstance(payload, str):
        raise GraphInvError(payload)
    suffix_format, name, text = payload
    graphs = list(read_graphs(_NamedText(text, name), format=input_format or suffix_format))
    if len(graphs) != 1:
        raise GraphFormatError(
            f"expected one graph per file in a folder, found {len(graphs)}", source=name
        )
    return graph_edges(graphs[0])


def graph_edges(G: Any) -> tuple[int, list[tuple[int, int, int]]]:
    """``(n, [(u, v, multiplicity), ...])`` of a networkx graph, vertices numbered in order.

    Examples
    --------
    >>> import networkx as nx
    >>> graph_edges(nx.MultiGraph([("a", "b"), ("a", "b"), ("b", "c")]))
    (3, [(0, 1, 2), (1, 2, 1)])

    References
    ----------
    N. Biggs, *Algebraic Graph Theory*, 2nd ed., 1993 (multiplicities as integer weights).
    """
    from graphinv._graphs import weighted_edges

    index = {v: i for i, v in enumerate(G)}
    return len(index), [(index[u], index[v], m) for u, v, m in weighted_edges(G)]


def process_chunk(
    items: Sequence[TaskItem], settings: KernelSettings, *, kind: str = "lines"
) -> list[ResultItem]:
    """Compute one chunk of a batch; never raises for a bad graph.

    Small graphs of equal size are handled together: their polynomials come from one NumPy
    stack, so the per-graph cost is dominated by the Smith forms.

    Parameters
    ----------
    items : sequence of (position, line, content, payload)
        See :data:`TaskItem`.
    settings : KernelSettings
        What to compute.
    kind : {"lines", "files", "edges"}
        What the items hold: graph6/sparse6 lines, the text of files holding one graph each,
        or graphs already given as ``(n, edges)``.

    Returns
    -------
    list of tuple
        One row per item, in the order of ``items``: position, line, content key, the values
        of the result columns, and the error message (None on success).

    Examples
    --------
    >>> rows = process_chunk([(0, 1, "Bw", None), (1, 2, "B!", None)],
    ...                      KernelSettings(("spanning_trees",)))
    >>> rows[0][0], rows[0][8], rows[0][-1]
    (0, '3', None)
    >>> rows[1][0], rows[1][-1]
    (1, "line 2: malformed graph6: character '!' ...")

    References
    ----------
    B. D. McKay, formats.txt (graph6, sparse6); Biggs 1999 (critical group); Kelmans and
    Chelnokov 1974 (tree count from the Laplacian polynomial).
    """
    from graphinv.errors import GraphInvError

    wanted = set(settings.invariants)
    limit = settings.max_vertices
    input_format = settings.input_format
    out: list[ResultItem | None] = [None] * len(items)
    by_size: dict[int, list[tuple[int, int, Any]]] = {}
    for slot, (position, line, content, payload) in enumerate(items):
        n: int
        graph: Any
        try:
            if kind == "lines":
                if isinstance(payload, str):  # a line the reader could not expand
                    raise GraphInvError(payload)
                n, graph = _parse_line(content, input_format)
            elif kind == "files":
                n, graph = _graph_from_file(payload, input_format)
            elif isinstance(payload, str):
                raise GraphInvError(payload)
            else:
                n, graph = payload
            if limit is not None and n > limit:
                raise GraphInvError(
                    f"the graph has {n} vertices, over the limit of {limit} (--max-vertices)"
                )
            if n == 0:
                raise GraphInvError("the graph has no vertices; expected at least one")
        except (GraphInvError, ValueError, ArithmeticError, OSError) as exc:
            out[slot] = _error_row(position, line, content, _message(exc, line))
            continue
        stacked = n <= _STACK_LIMIT and (
            kind == "lines" or all(len(e) < 3 or e[2] <= _STACK_WEIGHT for e in graph)
        )
        by_size.setdefault(n if stacked else -slot - 1, []).append((slot, n, graph))
    for key, members in by_size.items():
        try:
            if key >= 0:
                A, L, Q, D, polynomials = _stacked_matrices(
                    [(n, graph) for _, n, graph in members], key, wanted
                )
            else:
                A, L, Q, D, polynomials = _single_matrices(members[0][1], members[0][2], wanted)
        except (GraphInvError, ValueError, ArithmeticError) as exc:
            for slot, _, _ in members:
                position, line, content, _ = items[slot]
                out[slot] = _error_row(position, line, content, _message(exc, line))
            continue
        for k, (slot, _, _) in enumerate(members):
            position, line, content, _ = items[slot]
            try:
                result = _finish(
                    A[k],
                    L[k],
                    Q[k],
                    D[k],
                    {name: values[k] for name, values in polynomials.items()},
                    wanted,
                )
            except (GraphInvError, ValueError, ArithmeticError) as exc:
                out[slot] = _error_row(position, line, content, _message(exc, line))
                continue
            out[slot] = (position, line, content, *result.values(), None)
    return [row for row in out if row is not None]


def _single_matrices(
    n: int, edges: Iterable[Sequence[int]], wanted: set[str]
) -> tuple[list[Any], list[Any], list[Any], list[Any], dict[str, list[tuple[int, ...]]]]:
    """The same as :func:`_stacked_matrices` for one larger graph, through python-flint."""
    charpoly = _core()[2]
    rows = adjacency_rows(n, edges)
    degrees = [sum(row) for row in rows]
    laplacian, signless = _laplacians(rows, degrees)
    polynomials = {
        name: [charpoly(matrix)]
        for name, matrix in zip(_POLYNOMIAL_NAMES, (laplacian, signless, rows), strict=True)
        if name in wanted
    }
    return [rows], [laplacian], [signless], [degrees], polynomials


def _message(exc: BaseException, line: int | None) -> str:
    from graphinv.errors import GraphFormatError

    if isinstance(exc, GraphFormatError):
        # The line number of the stream is known here; the parser saw only one line of text.
        message = exc.message
        if exc.source is not None and exc.source not in ("<string>",):
            message = f"{exc.source}: {message}"
        return f"line {line}: {message}" if line is not None else message
    text = str(exc) or type(exc).__name__
    return f"line {line}: {text}" if line is not None else text
