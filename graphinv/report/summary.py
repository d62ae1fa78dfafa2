"""A one-graph summary: sizes, spanning trees, the critical group and spectral highlights.

:func:`summarize` computes a :class:`GraphSummary`; :func:`summary_table` and
:func:`summaries_table` turn one or many summaries into rich tables for the terminal, and the
summary renders itself in Jupyter (``_repr_html_``, ``_repr_latex_``).  Counts and group orders
are exact Python ints; the two spectral numbers are floats and are labelled as such.

References
----------
N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999)
(the critical group and its order, the number of spanning trees);
M. Fiedler, "Algebraic connectivity of graphs", Czechoslovak Math. J. 23 (1973).
"""

from __future__ import annotations

import html
import math
from collections.abc import Iterable, Iterator, Sequence
from dataclasses import dataclass
from decimal import Decimal
from typing import TYPE_CHECKING, Any

import networkx as nx

from graphinv._graphs import require_nonempty, weighted_edges
from graphinv.errors import InvalidGraphError
from graphinv.notation import abelian_group_text
from graphinv.report.jsonl import decimal_string

if TYPE_CHECKING:
    from rich.table import Table

    from graphinv.group import CriticalGroup

__all__ = [
    "GraphSummary",
    "format_group",
    "format_primary_decomposition",
    "primary_parts",
    "scientific",
    "summaries",
    "summaries_table",
    "summarize",
    "summary_table",
]

#: Counts with more digits than this are shown with their middle elided in tables.
FULL_DIGITS_LIMIT = 120


def scientific(value: int, digits: int = 4) -> str:
    """An exact integer in scientific notation with ``digits`` significant digits.

    The rounding is exact (decimal arithmetic), so the result is right however large ``value``
    is.

    Examples
    --------
    >>> scientific(126231322912498539682594816)
    '1.262e+26'
    >>> scientific(7), scientific(0)
    ('7.000e+0', '0')
    """
    if value == 0:
        return "0"
    return f"{Decimal(value):.{digits - 1}e}"


def _digits(value: int, limit: int = FULL_DIGITS_LIMIT) -> str:
    text = decimal_string(value)
    if len(text) <= limit:
        return text
    keep = limit // 2 - 2
    return f"{text[:keep]}…{text[-keep:]} ({len(text)} digits)"


def format_group(group: CriticalGroup) -> str:
    """The group as ``Z/d1 ⊕ … ⊕ Z/dr``, a factor repeated k ≥ 3 times as ``(Z/d)^k``.

    ``0`` is the trivial group.  Factors of more than 60 digits are shown in scientific form.

    Examples
    --------
    >>> from graphinv import critical_group
    >>> format_group(critical_group(nx.petersen_graph()))
    'Z/2 ⊕ (Z/10)^3'
    >>> format_group(critical_group(nx.complete_graph(4)))
    'Z/4 ⊕ Z/4'
    """
    return abelian_group_text(
        group.invariant_factors,
        compact=True,
        factor_text=lambda d: str(d) if d.bit_length() < 200 else scientific(d),
    )


def format_primary_decomposition(group: CriticalGroup) -> str:
    """The group as a sum of cyclic groups of prime-power order, primes in increasing order.

    Invariant factors above 10^40 are only split off their primes below 10,000 (full
    factoring could take very long); what is left is named by its number of digits.

    Examples
    --------
    >>> from graphinv import critical_group
    >>> format_primary_decomposition(critical_group(nx.petersen_graph()))
    '(Z/2)^4 ⊕ (Z/5)^3'
    """
    parts, rest = primary_parts(group)
    text = abelian_group_text([q for p in sorted(parts) for q in parts[p]], compact=True)
    if rest:
        digits = ", ".join(str(len(decimal_string(r))) for r in rest)
        note = f"(part of order prime to all p < {_SMALL_PRIME_BOUND}: cyclic factors of {digits} digits)"
        text = note if text == "0" else f"{text} ⊕ {note}"
    return text


_SMALL_PRIME_BOUND = 10_000
_FACTOR_LIMIT = 10**40


def primary_parts(group: CriticalGroup) -> tuple[dict[int, tuple[int, ...]], tuple[int, ...]]:
    """Elementary divisors by prime, and the unfactored cofactors of very large factors.

    Returns ``(parts, rest)``: ``parts`` maps each prime ``p`` to its prime powers; ``rest`` is
    empty unless an invariant factor exceeds 10^40, in which case only primes below 10,000 are
    split off and the cofactors above 1 are listed.

    Examples
    --------
    >>> from graphinv import critical_group
    >>> primary_parts(critical_group(nx.complete_graph(4)))
    ({2: (4, 4)}, ())
    """
    if not group.invariant_factors or group.exponent < _FACTOR_LIMIT:
        return dict(group.primary_decomposition), ()
    import sympy

    small = [int(p) for p in sympy.primerange(2, _SMALL_PRIME_BOUND)]
    parts: dict[int, list[int]] = {}
    rest: list[int] = []
    for d in group.invariant_factors:
        for p in small:
            if d % p == 0:
                power = 1
                while d % p == 0:
                    d //= p
                    power *= p
                parts.setdefault(p, []).append(power)
        if d > 1:
            rest.append(d)
    return {p: tuple(sorted(parts[p])) for p in sorted(parts)}, tuple(rest)


@dataclass(frozen=True)
class GraphSummary:
    """What a reader wants to know first about one graph.

    Attributes
    ----------
    name : str
        The graph's name (file name, family spec or ``G.graph["name"]``).
    vertices : int
    edges : int
        Edges counted with multiplicity (loops skipped).
    components : int
        Connected components (the free rank of the cokernel of the Laplacian).
    min_degree, max_degree : int
        Degrees counted with multiplicity.
    spanning_trees : int
        The exact number of spanning trees (0 for a disconnected graph).
    critical_group : CriticalGroup
        The torsion part of the cokernel of the Laplacian.
    algebraic_connectivity : float or None
        Second-smallest Laplacian eigenvalue (float64; None when spectra were skipped).
    largest_laplacian_eigenvalue : float or None
        Largest Laplacian eigenvalue (float64; None when spectra were skipped).
    """

    name: str
    vertices: int
    edges: int
    components: int
    min_degree: int
    max_degree: int
    spanning_trees: int
    critical_group: CriticalGroup
    algebraic_connectivity: float | None
    largest_laplacian_eigenvalue: float | None

    @property
    def log10_spanning_trees(self) -> float | None:
        """``log10`` of the spanning-tree count (float), None for a disconnected graph."""
        return math.log10(self.spanning_trees) if self.spanning_trees else None

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict; the count and the group's factors are decimal strings.

        Examples
        --------
        >>> record = summarize(nx.cycle_graph(5), name="C5").to_record()
        >>> record["spanning_trees"], record["invariant_factors"], record["cyclic"]
        ('5', ['5'], True)
        """
        group = self.critical_group
        parts, rest = primary_parts(group)
        return {
            "name": self.name,
            "vertices": self.vertices,
            "edges": self.edges,
            "components": self.components,
            "min_degree": self.min_degree,
            "max_degree": self.max_degree,
            "spanning_trees": decimal_string(self.spanning_trees),
            "critical_group": format_group(group),
            "invariant_factors": [decimal_string(d) for d in group.invariant_factors],
            "free_rank": group.free_rank,
            "group_order": decimal_string(group.order),
            "rank": len(group.invariant_factors),
            "cyclic": len(group.invariant_factors) <= 1,
            "primary_decomposition": {
                str(p): [decimal_string(q) for q in powers] for p, powers in parts.items()
            },
            "unfactored_parts": [decimal_string(r) for r in rest],
            "algebraic_connectivity": self.algebraic_connectivity,
            "largest_laplacian_eigenvalue": self.largest_laplacian_eigenvalue,
            "eigenvalues_numeric": "float64",
        }

    def rows(self) -> list[tuple[str, str]]:
        """The summary as ``(label, value)`` text rows, the order every renderer uses."""
        group = self.critical_group
        rank = len(group.invariant_factors)
        rows = [
            ("vertices", str(self.vertices)),
            ("edges", str(self.edges)),
            ("components", str(self.components)),
            ("degree", f"{self.min_degree}..{self.max_degree}"),
            ("spanning trees", _digits(self.spanning_trees)),
            ("  ≈", scientific(self.spanning_trees)),
            ("critical group", format_group(group)),
            ("  primary parts", format_primary_decomposition(group)),
            ("  order", _digits(group.order)),
            ("  rank", str(rank)),
            ("  cyclic", "yes" if rank <= 1 else "no"),
        ]
        if group.free_rank > 1:
            rows.append(("  free rank of coker L", str(group.free_rank)))
        if self.algebraic_connectivity is not None:
            rows.append(("algebraic connectivity", f"{self.algebraic_connectivity:.6g} (float)"))
        if self.largest_laplacian_eigenvalue is not None:
            rows.append(
                ("largest Laplacian eigenvalue", f"{self.largest_laplacian_eigenvalue:.6g} (float)")
            )
        return rows

    def _repr_html_(self) -> str:
        body = "".join(
            f"<tr><th style='text-align:left'>{html.escape(label.strip())}</th>"
            f"<td style='text-align:left'>{html.escape(value)}</td></tr>"
            for label, value in self.rows()
        )
        return f"<table><caption>{html.escape(self.name)}</caption>{body}</table>"

    def _repr_latex_(self) -> str:
        group = self.critical_group
        factors = group.invariant_factors
        group_tex = (
            " \\oplus ".join(f"\\mathbb{{Z}}/{d}" for d in factors) if factors else "0"
        )
        lines = [
            f"\\text{{vertices}} & {self.vertices}",
            f"\\text{{edges}} & {self.edges}",
            f"\\text{{components}} & {self.components}",
            f"\\text{{spanning trees}} & {_latex_number(self.spanning_trees)}",
            f"\\text{{critical group}} & {group_tex}",
            f"\\text{{rank}} & {len(factors)}",
        ]
        if self.algebraic_connectivity is not None:
            lines.append(
                f"\\text{{algebraic connectivity}} & {self.algebraic_connectivity:.6g}"
            )
        return "$$\\begin{array}{ll}" + " \\\\ ".join(lines) + "\\end{array}$$"


def _latex_number(value: int) -> str:
    text = decimal_string(value)
    if len(text) <= 30:
        return text
    mantissa, exponent = scientific(value).split("e")
    return f"{mantissa} \\times 10^{{{int(exponent)}}}"


def summarize(G: nx.Graph, *, name: str | None = None, spectra: bool = True) -> GraphSummary:
    """Compute the :class:`GraphSummary` of an undirected graph or multigraph.

    Parameters
    ----------
    G : networkx Graph or MultiGraph
        Edge attribute ``weight`` is a positive integer multiplicity (default 1).
    name : str, optional
        Default ``G.graph["name"]``, else ``"graph"``.
    spectra : bool
        Compute the algebraic connectivity and the largest Laplacian eigenvalue (floats).

    Returns
    -------
    GraphSummary

    Raises
    ------
    InvalidGraphError
        For an empty or directed graph, or a weight that is not a positive integer.

    Examples
    --------
    >>> s = summarize(nx.grid_2d_graph(3, 3), name="grid 3x3")
    >>> s.spanning_trees, format_group(s.critical_group), round(s.algebraic_connectivity, 6)
    (192, 'Z/8 ⊕ Z/24', 1.0)

    References
    ----------
    Biggs, J. Algebraic Combin. 9 (1999); Fiedler, Czechoslovak Math. J. 23 (1973).
    """
    from graphinv import critical_group, spanning_tree_count
    from graphinv.spectrum import algebraic_connectivity, eigenvalues

    require_nonempty(G)
    if G.is_directed():
        raise InvalidGraphError(
            "a summary is defined here for undirected graphs; a directed graph's critical "
            "group depends on the chosen sink"
        )
    degree = dict.fromkeys(G, 0)
    edges = 0
    for u, v, m in weighted_edges(G):
        edges += m
        degree[u] += m
        degree[v] += m
    group = critical_group(G)
    connectivity: float | None = None
    largest: float | None = None
    if spectra:
        connectivity = algebraic_connectivity(G)
        largest = eigenvalues(G, "laplacian", count=1, which="largest").values[-1]
    return GraphSummary(
        name=name if name is not None else str(G.graph.get("name") or "graph"),
        vertices=G.number_of_nodes(),
        edges=edges,
        components=nx.number_connected_components(G),
        min_degree=min(degree.values()),
        max_degree=max(degree.values()),
        spanning_trees=spanning_tree_count(G),
        critical_group=group,
        algebraic_connectivity=connectivity,
        largest_laplacian_eigenvalue=largest,
    )


def summaries(
    source: str, *, format: str | None = None, spectra: bool = True
) -> Iterator[GraphSummary]:
    """Summaries of every graph of a file, standard input (``"-"``) or family spec, lazily.

    Examples
    --------
    >>> [(s.name, s.spanning_trees) for s in summaries("wheel:3..5", spectra=False)]
    [('wheel:3', 16), ('wheel:4', 45), ('wheel:5', 121)]
    """
    from graphinv.io import read_graphs

    for G in read_graphs(source, format=format):
        yield summarize(G, spectra=spectra)


def summary_table(summary: GraphSummary) -> Table:
    """A two-column rich table for one graph.

    Examples
    --------
    >>> from rich.console import Console
    >>> console = Console(width=80, color_system=None)
    >>> console.print(summary_table(summarize(nx.cycle_graph(4), name="C4", spectra=False)))
                  C4
    ┌─────────────────┬──────────┐
    │ vertices        │ 4        │
    │ edges           │ 4        │
    │ components      │ 1        │
    │ degree          │ 2..2     │
    │ spanning trees  │ 4        │
    │   ≈             │ 4.000e+0 │
    │ critical group  │ Z/4      │
    │   primary parts │ Z/4      │
    │   order         │ 4        │
    │   rank          │ 1        │
    │   cyclic        │ yes      │
    └─────────────────┴──────────┘
    """
    from rich import box
    from rich.table import Table

    table = Table(title=summary.name, show_header=False, box=box.SQUARE)
    table.add_column("quantity", style="bold", no_wrap=True)
    table.add_column("value", overflow="fold")
    for label, value in summary.rows():
        table.add_row(label, value)
    return table


def summaries_table(summaries: Iterable[GraphSummary], *, title: str | None = None) -> Table:
    """One row per graph: sizes, spanning trees, critical group, rank, cyclic, spectra.

    Examples
    --------
    >>> from rich.console import Console
    >>> rows = [summarize(nx.cycle_graph(n), name=f"C{n}", spectra=False) for n in (3, 4)]
    >>> Console(width=100, color_system=None).print(summaries_table(rows))
    ┏━━━━━━┳━━━┳━━━┳━━━━━━━━━━━━━━━━┳━━━━━━━━━━━━━━━━┳━━━━━━┳━━━━━━━━┳━━━━━━━━━━━━━━━━━━━━━━━━┓
    ┃ name ┃ n ┃ m ┃ spanning trees ┃ critical group ┃ rank ┃ cyclic ┃ algebraic connectivity ┃
    ┡━━━━━━╇━━━╇━━━╇━━━━━━━━━━━━━━━━╇━━━━━━━━━━━━━━━━╇━━━━━━╇━━━━━━━━╇━━━━━━━━━━━━━━━━━━━━━━━━┩
    │ C3   │ 3 │ 3 │              3 │ Z/3            │    1 │ yes    │                        │
    │ C4   │ 4 │ 4 │              4 │ Z/4            │    1 │ yes    │                        │
    └──────┴───┴───┴────────────────┴────────────────┴──────┴────────┴────────────────────────┘
    """
    from rich.table import Table

    table = Table(title=title)
    table.add_column("name", overflow="fold")
    table.add_column("n", justify="right")
    table.add_column("m", justify="right")
    table.add_column("spanning trees", justify="right", overflow="fold")
    table.add_column("critical group", overflow="fold")
    table.add_column("rank", justify="right")
    table.add_column("cyclic")
    table.add_column("algebraic connectivity", justify="right")
    for s in summaries:
        table.add_row(*_table_row(s))
    return table


def _table_row(s: GraphSummary) -> Sequence[str]:
    count = decimal_string(s.spanning_trees)
    rank = len(s.critical_group.invariant_factors)
    return (
        s.name,
        str(s.vertices),
        str(s.edges),
        count if len(count) <= 24 else scientific(s.spanning_trees),
        format_group(s.critical_group),
        str(rank),
        "yes" if rank <= 1 else "no",
        "" if s.algebraic_connectivity is None else f"{s.algebraic_connectivity:.4g}",
    )
