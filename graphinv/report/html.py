"""Self-contained HTML reports: one file, figures embedded, readable offline in any browser.

A report is built from :class:`Section` objects (a heading, paragraphs, tables, embedded
figures and preformatted text) and rendered by :func:`render_html` with inline CSS, PNG figures
as ``data:`` URIs, no scripts and no links outside the file.  Three reports come ready-made:

- :func:`graph_report` for one graph (summary, group, spectrum, drawing);
- :func:`collection_report` for many graphs (table, rank distribution, cospectral classes and
  what separates them, spanning-tree growth when sizes vary);
- :func:`store_report` for a batch store (counts, failures, rank distribution, cyclic fraction,
  cospectral counts, largest groups).

:func:`write_report` picks the right one for a graph file, family spec or store.

References
----------
N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999);
W. H. Haemers, E. Spence, "Enumeration of cospectral graphs", European J. Combin. 25 (2004).
"""

from __future__ import annotations

import base64
import datetime as _dt
import html
import itertools
import os
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

import networkx as nx

from graphinv.errors import InvalidGraphError
from graphinv.report.jsonl import decimal_string, to_json_line

if TYPE_CHECKING:
    from matplotlib.figure import Figure

    from graphinv.report.summary import GraphSummary

__all__ = [
    "COLLECTION_LIMIT",
    "EmbeddedFigure",
    "ReportFile",
    "Section",
    "Table",
    "collection_report",
    "cospectral_tallies",
    "embed_figure",
    "graph_report",
    "invariant_name",
    "is_sqlite_file",
    "render_html",
    "store_report",
    "write_report",
]

#: A collection report reads at most this many graphs by default (use a batch store beyond).
COLLECTION_LIMIT = 2000
#: A collection report looks for cospectral classes when no graph has more vertices than this.
COSPECTRAL_LIMIT = 400
#: Graphs up to this size get their full Laplacian spectrum and polynomial in a graph report.
FULL_SPECTRUM_LIMIT = 400

_CSS = """
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; margin: 0;
       color: #1d1d1f; background: #fafafa; line-height: 1.45; }
main { max-width: 1040px; margin: 0 auto; padding: 24px 28px 60px; background: #fff; }
h1 { font-size: 1.7em; margin: 0.2em 0 0.1em; }
h2 { font-size: 1.25em; margin-top: 1.8em; border-bottom: 1px solid #ddd; padding-bottom: 4px; }
p.meta { color: #666; font-size: 0.9em; margin-top: 0; }
table { border-collapse: collapse; margin: 0.8em 0; font-size: 0.92em; }
th, td { border: 1px solid #d5d5d5; padding: 4px 9px; text-align: left; vertical-align: top; }
th { background: #f0f3f7; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
caption { caption-side: bottom; text-align: left; color: #666; font-size: 0.85em; padding-top: 3px; }
td.wrap { overflow-wrap: break-word; }
pre { word-break: break-all; white-space: pre-wrap; }
pre { background: #f6f6f6; padding: 8px 10px; font-size: 0.85em; border-radius: 4px; }
figure { margin: 1em 0; }
figure img { max-width: 100%; height: auto; border: 1px solid #eee; }
figcaption { color: #555; font-size: 0.9em; margin-top: 4px; }
.note { background: #fff8e5; border-left: 4px solid #e0a800; padding: 8px 12px; }
"""


@dataclass(frozen=True)
class EmbeddedFigure:
    """A figure ready to embed: PNG bytes (shown as a ``data:`` URI) and a caption."""

    title: str
    caption: str
    png: bytes

    def to_html(self) -> str:
        """The ``<figure>`` element with the PNG inlined as base64."""
        data = base64.b64encode(self.png).decode("ascii")
        return (
            f"<figure><img alt=\"{html.escape(self.title)}\" "
            f"src=\"data:image/png;base64,{data}\">"
            f"<figcaption><b>{html.escape(self.title)}.</b> {html.escape(self.caption)}"
            "</figcaption></figure>"
        )


def embed_figure(figure: Figure, *, title: str, caption: str = "") -> EmbeddedFigure:
    """Render a matplotlib figure to PNG for embedding.

    Examples
    --------
    >>> from graphinv.report.plots import graph_figure
    >>> embedded = embed_figure(graph_figure(nx.path_graph(3)), title="P3")
    >>> embedded.to_html().startswith('<figure><img alt="P3" src="data:image/png;base64,')
    True
    """
    from graphinv.report.plots import figure_png

    return EmbeddedFigure(title=title, caption=caption, png=figure_png(figure))


@dataclass(frozen=True)
class Table:
    """A table: header cells and rows of text; ``numeric`` columns are right-aligned."""

    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    numeric: frozenset[int] = frozenset()
    caption: str | None = None

    def to_html(self) -> str:
        """The ``<table>`` element, every cell escaped."""
        head = "".join(f"<th>{html.escape(h)}</th>" for h in self.header)
        body = []
        for row in self.rows:
            cells = "".join(
                f"<td class=\"{'num' if k in self.numeric else 'wrap'}\">{html.escape(cell)}</td>"
                for k, cell in enumerate(row)
            )
            body.append(f"<tr>{cells}</tr>")
        caption = f"<caption>{html.escape(self.caption)}</caption>" if self.caption else ""
        return f"<table>{caption}<thead><tr>{head}</tr></thead><tbody>{''.join(body)}</tbody></table>"


@dataclass(frozen=True)
class Section:
    """One titled part of a report: paragraphs, notes, preformatted blocks, tables, figures."""

    heading: str
    paragraphs: tuple[str, ...] = ()
    tables: tuple[Table, ...] = ()
    figures: tuple[EmbeddedFigure, ...] = ()
    preformatted: tuple[str, ...] = ()
    notes: tuple[str, ...] = field(default=())

    def to_html(self) -> str:
        """The section's HTML, every text escaped."""
        parts = [f"<section><h2>{html.escape(self.heading)}</h2>"]
        parts.extend(f"<p>{html.escape(p)}</p>" for p in self.paragraphs)
        parts.extend(f"<p class=\"note\">{html.escape(n)}</p>" for n in self.notes)
        parts.extend(f"<pre>{html.escape(text)}</pre>" for text in self.preformatted)
        parts.extend(t.to_html() for t in self.tables)
        parts.extend(f.to_html() for f in self.figures)
        parts.append("</section>")
        return "".join(parts)


def render_html(title: str, sections: Sequence[Section], *, subtitle: str = "") -> str:
    """A complete, self-contained HTML document.

    Examples
    --------
    >>> page = render_html("Report", [Section("One", paragraphs=("a < b",))])
    >>> "a &lt; b" in page and page.startswith("<!DOCTYPE html>")
    True
    """
    from graphinv import __version__

    stamp = _dt.datetime.now(_dt.UTC).strftime("%Y-%m-%d %H:%M UTC")
    meta = f"graphinv {__version__} · {stamp}" + (f" · {subtitle}" if subtitle else "")
    body = "".join(section.to_html() for section in sections)
    return (
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
        f"<title>{html.escape(title)}</title><style>{_CSS}</style></head>"
        f"<body><main><h1>{html.escape(title)}</h1><p class=\"meta\">{html.escape(meta)}</p>"
        f"{body}</main></body></html>\n"
    )


# --------------------------------------------------------------------------------------------
# Ready-made reports


def _summary_table(summary: GraphSummary) -> Table:
    return Table(("quantity", "value"), tuple((label.strip(), value) for label, value in summary.rows()))


def _summaries_table(summaries: Sequence[GraphSummary], caption: str | None = None) -> Table:
    from graphinv.report.summary import format_group, scientific

    rows = []
    for s in summaries:
        count = decimal_string(s.spanning_trees)
        rows.append(
            (
                s.name,
                str(s.vertices),
                str(s.edges),
                count if len(count) <= 30 else scientific(s.spanning_trees),
                format_group(s.critical_group),
                str(len(s.critical_group.invariant_factors)),
                "yes" if len(s.critical_group.invariant_factors) <= 1 else "no",
                "" if s.algebraic_connectivity is None else f"{s.algebraic_connectivity:.4g}",
            )
        )
    return Table(
        (
            "graph",
            "vertices",
            "edges",
            "spanning trees",
            "critical group",
            "rank",
            "cyclic",
            "algebraic connectivity (float)",
        ),
        tuple(rows),
        numeric=frozenset({1, 2, 3, 5, 7}),
        caption=caption,
    )


def _spectrum_section(G: nx.Graph) -> Section:
    from graphinv.spectrum import characteristic_polynomial, eigenvalues, format_polynomial

    n = G.number_of_nodes()
    if n > FULL_SPECTRUM_LIMIT:
        return Section(
            "Laplacian spectrum",
            paragraphs=(
                f"The full spectrum is listed for graphs of at most {FULL_SPECTRUM_LIMIT} "
                f"vertices; this one has {n}. The summary gives the extreme eigenvalues.",
            ),
        )
    spectrum = eigenvalues(G, "laplacian")
    table = Table(
        ("eigenvalue (float64)", "multiplicity"),
        tuple((f"{value:.10g}", str(mult)) for value, mult in spectrum.groups),
        numeric=frozenset({0, 1}),
        caption=f"grouped to relative tolerance {spectrum.tolerance:g}, {spectrum.method}",
    )
    polynomial = format_polynomial(characteristic_polynomial(G, "laplacian"))
    return Section(
        "Laplacian spectrum",
        paragraphs=("Exact characteristic polynomial det(xI − L):",),
        preformatted=(polynomial,),
        tables=(table,),
    )


def _drawing(G: nx.Graph, name: str) -> EmbeddedFigure | None:
    from graphinv.report.plots import graph_figure

    if G.number_of_nodes() > 2500:
        return None
    degrees = {v: d for v, d in G.degree(weight="weight")}
    regular = len(set(degrees.values())) == 1
    return embed_figure(
        graph_figure(
            G,
            values=None if regular else degrees,
            value_label="degree (with multiplicity)",
            title=name,
        ),
        title=f"Drawing of {name}",
        caption=("A regular graph of degree " + str(next(iter(degrees.values()))) + "."
                 if regular else "Vertices coloured by degree.")
        + " Thicker edges carry several parallel links.",
    )


#: Graphs up to this size get drawings of their identity and group generators as chip
#: configurations in a graph report.
CHIP_DRAWING_LIMIT = 200


def _chip_section(G: nx.Graph, group: Any) -> Section | None:
    """The identity and the generators of the group of recurrent configurations, drawn."""
    from graphinv.chipfiring import group_generators, recurrent_identity
    from graphinv.report.plots import graphs_figure

    if G.number_of_nodes() > CHIP_DRAWING_LIMIT or not nx.is_connected(G):
        return None
    sink = next(iter(G))
    panels: list[tuple[str, nx.Graph, Any]] = [
        ("identity", G, dict(recurrent_identity(G, sink)))
    ]
    generators = group_generators(G, sink=sink)
    shown = list(zip(generators, group.invariant_factors, strict=False))[:5]
    for k, (generator, order) in enumerate(shown, start=1):
        panels.append((f"generator {k}, order {order}", G, generator.to_dict()))
    more = len(generators) - len(shown)
    caption = (
        f"Sink {sink!s} (hollow). The recurrent configurations form a group isomorphic to the "
        "critical group (Biggs 1999); the identity comes first, then recurrent configurations "
        "generating its cyclic factors Z/d1, Z/d2 and so on"
        + (f" ({more} more generators not drawn)." if more > 0 else ".")
    )
    figure = graphs_figure(panels, value_label="chips", columns=3)
    return Section(
        "Chip configurations",
        figures=(embed_figure(figure, title="Identity and group generators", caption=caption),),
    )


def graph_report(G: nx.Graph, *, name: str | None = None) -> str:
    """An HTML report on one graph.

    Examples
    --------
    >>> page = graph_report(nx.petersen_graph(), name="Petersen")
    >>> "Z/2 ⊕ (Z/10)^3" in page and "data:image/png;base64," in page
    True

    References
    ----------
    Biggs, J. Algebraic Combin. 9 (1999).
    """
    from graphinv.report.summary import summarize

    summary = summarize(G, name=name)
    sections = [
        Section("Summary", tables=(_summary_table(summary),), notes=_trust_notes(summary)),
        _spectrum_section(G),
    ]
    drawing = _drawing(G, summary.name)
    if drawing is not None:
        sections.append(Section("Drawing", figures=(drawing,)))
    chips = _chip_section(G, summary.critical_group)
    if chips is not None:
        sections.append(chips)
    sections.append(Section("Record (JSON)", preformatted=(to_json_line(summary),)))
    return render_html(f"graphinv report: {summary.name}", sections)


def _trust_notes(summary: GraphSummary) -> tuple[str, ...]:
    certificate = getattr(summary.critical_group, "certificate", None)
    if certificate is None:
        return ()
    return (
        "Check: the product of the invariant factors equals the number of spanning trees "
        "computed independently "
        f"({getattr(certificate, 'method', 'by a determinant')}).",
    )


def _rank_counts(summaries: Sequence[GraphSummary]) -> dict[int, int]:
    counts: dict[int, int] = {}
    for s in summaries:
        rank = len(s.critical_group.invariant_factors)
        counts[rank] = counts.get(rank, 0) + 1
    return dict(sorted(counts.items()))


_INVARIANT_NAMES = {
    "critical_group": "critical group",
    "adjacency_smith": "Smith form of A",
    "signless_smith": "Smith form of Q",
    "degree_sequence": "degree sequence",
}


def invariant_name(key: str) -> str:
    """A reader's name for a separating invariant's key.

    Examples
    --------
    >>> invariant_name("signless_smith"), invariant_name("critical_group")
    ('Smith form of Q', 'critical group')
    """
    return _INVARIANT_NAMES.get(key, key.replace("_", " "))


def cospectral_tallies(report: Any) -> dict[str, dict[str, int]]:
    """Turn a :class:`graphinv.cospectral.CospectralReport` into counts for a figure.

    Returns ``{matrix: {"with a mate": k, "<invariant>": separated, ...}}``.

    Examples
    --------
    >>> from graphinv.cospectral import find_cospectral
    >>> graphs = [nx.star_graph(4), nx.disjoint_union(nx.cycle_graph(4), nx.empty_graph(1))]
    >>> cospectral_tallies(find_cospectral(graphs, matrices=["adjacency"]))["adjacency"]["with a mate"]
    2
    """
    return {
        row.matrix: {
            "with a mate": row.with_mate,
            **{invariant_name(name): count for name, count in row.separated.items()},
        }
        for row in report.summary
    }


def _cospectral_sections(graphs: Sequence[nx.Graph], names: Sequence[str]) -> list[Section]:
    from graphinv.cospectral import find_cospectral
    from graphinv.report.plots import separation_figure

    report = find_cospectral(graphs)
    summary_rows = tuple(
        (
            row.matrix,
            str(row.graphs),
            str(row.with_mate),
            str(row.classes),
            *(str(row.separated[k]) for k in row.separated),
        )
        for row in report.summary
    )
    invariants = list(report.summary[0].separated) if report.summary else []
    table = Table(
        (
            "matrix",
            "graphs",
            "with a cospectral mate",
            "classes",
            *(f"separated by {invariant_name(k)}" for k in invariants),
        ),
        summary_rows,
        numeric=frozenset(range(1, 4 + len(invariants))),
    )
    class_rows = []
    for matrix, classes in report.classes.items():
        for found in classes:
            separated = [invariant_name(k) for k, yes in found.separated_by.items() if yes]
            record = found.to_record()
            groups = record["values"].get("critical_group")
            class_rows.append(
                (
                    matrix,
                    ", ".join(names[k] for k in found.members),
                    " | ".join(groups) if groups else "",
                    ", ".join(separated) if separated else "none of these invariants",
                )
            )
    paragraphs = [
        "Graphs are grouped by their exact characteristic polynomials (never by "
        "floating-point eigenvalues); isomorphic duplicates are not counted as mates. "
        "For each class we ask which invariants tell its members apart."
    ]
    figures: tuple[EmbeddedFigure, ...] = ()
    if any(row.with_mate for row in report.summary):
        figures = (
            embed_figure(
                separation_figure(cospectral_tallies(report)),
                title="Cospectral graphs and what separates them",
                caption="Grey: graphs with a non-isomorphic cospectral mate; coloured bars: "
                "how many of them each invariant tells apart from every mate.",
            ),
        )
    else:
        paragraphs.append("No two non-isomorphic graphs here share a spectrum.")
    sections = [
        Section("Cospectral graphs", paragraphs=tuple(paragraphs), tables=(table,), figures=figures)
    ]
    if class_rows:
        sections.append(
            Section(
                "Cospectral classes",
                tables=(
                    Table(
                        ("matrix", "members", "critical groups", "separated by"),
                        tuple(class_rows[:200]),
                        caption=None
                        if len(class_rows) <= 200
                        else f"first 200 of {len(class_rows)} classes",
                    ),
                ),
            )
        )
    if report.duplicates:
        sections.append(
            Section(
                "Isomorphic duplicates",
                paragraphs=(
                    "These inputs are isomorphic to an earlier one and take no part in the "
                    "classes: "
                    + "; ".join(", ".join(names[k] for k in group) for group in report.duplicates),
                ),
            )
        )
    return sections


def collection_report(
    graphs: Iterable[nx.Graph], *, title: str = "graph collection", limit: int = COLLECTION_LIMIT
) -> str:
    """An HTML report on a collection of graphs.

    Parameters
    ----------
    graphs : iterable of networkx graphs
    title : str
    limit : int
        Read at most this many graphs (the report says when it stopped early); analyse larger
        collections with ``graphinv batch`` and report on the store.

    Examples
    --------
    >>> page = collection_report([nx.cycle_graph(n) for n in range(3, 9)], title="cycles")
    >>> page.count("data:image/png;base64,") >= 2
    True

    References
    ----------
    Haemers & Spence, European J. Combin. 25 (2004); Temperley 1974 (growth).
    """
    from graphinv.report.growth import family_growth
    from graphinv.report.limits import grid_growth_limit
    from graphinv.report.plots import growth_figure, rank_distribution_figure
    from graphinv.report.summary import summarize

    chosen = list(itertools.islice(graphs, limit + 1))
    truncated = len(chosen) > limit
    chosen = chosen[:limit]
    if not chosen:
        raise InvalidGraphError("the collection holds no graphs")
    summaries = [summarize(G, spectra=G.number_of_nodes() <= 2000) for G in chosen]
    names = [s.name for s in summaries]
    notes = (f"Only the first {limit} graphs were read.",) if truncated else ()
    ranks = _rank_counts(summaries)
    cyclic = sum(c for r, c in ranks.items() if r <= 1)
    sections = [
        Section(
            "Graphs",
            paragraphs=(
                f"{len(summaries)} graphs; {cyclic} of them ({cyclic / len(summaries):.1%}) have "
                "a cyclic critical group.",
            ),
            notes=notes,
            tables=(_summaries_table(summaries),),
        ),
        Section(
            "Critical-group ranks",
            figures=(
                embed_figure(
                    rank_distribution_figure(ranks, title=f"Ranks of the critical groups ({title})"),
                    title="Distribution of critical-group rank",
                    caption="Rank = number of invariant factors (minimum number of generators).",
                ),
            ),
        ),
    ]
    sizes = {s.vertices for s in summaries}
    if len(sizes) >= 3 and all(s.spanning_trees > 0 for s in summaries):
        # Square grids from the family spec (names "grid:KxK") have a known limit.
        squares = all(re.fullmatch(r"grid:(\d+)x\1", name) for name in names)
        fit = family_growth(
            chosen,
            family=title,
            limit=grid_growth_limit() if squares else None,
            limit_source="exp(4G/π), G Catalan's constant (Temperley 1974)" if squares else None,
        )
        limit_text = (
            f" The square-grid limit is exp(4G/π) = {fit.limit:.6f} (Temperley 1974)."
            if fit.limit is not None
            else ""
        )
        sections.append(
            Section(
                "Spanning-tree growth",
                paragraphs=(
                    f"Fitted per-vertex growth constant exp(a) = {fit.per_vertex:.6f} from "
                    f"log τ ≈ a N + b √N + c log N + d (least squares, floats).{limit_text}",
                ),
                figures=(
                    embed_figure(
                        growth_figure(fit),
                        title="Spanning-tree growth",
                        caption="Measured counts and the fitted model.",
                    ),
                ),
            )
        )
    largest = max(s.vertices for s in summaries)
    if len(chosen) >= 2 and largest <= COSPECTRAL_LIMIT:
        sections.extend(_cospectral_sections(chosen, names))
    elif len(chosen) >= 2:
        sections.append(
            Section(
                "Cospectral graphs",
                paragraphs=(
                    f"Not computed: cospectral classes are reported for collections of graphs "
                    f"with at most {COSPECTRAL_LIMIT} vertices (the largest here has {largest}); "
                    "use 'graphinv mates' for larger graphs.",
                ),
            )
        )
    return render_html(f"graphinv report: {title}", sections)


def store_report(store: str | os.PathLike[str]) -> str:
    """An HTML report on a batch store (read only).

    Examples
    --------
    >>> import tempfile
    >>> from graphinv.batch.engine import run_batch
    >>> path = os.path.join(tempfile.mkdtemp(), "wheels.db")
    >>> _ = run_batch(["wheel:3..6"], store=path, workers=1)
    >>> "Distribution of critical-group rank" in store_report(path)
    True

    References
    ----------
    Wood, J. Amer. Math. Soc. 30 (2017); Haemers & Spence, European J. Combin. 25 (2004).
    """
    from graphinv.batch.queries import survey_store
    from graphinv.report.plots import rank_distribution_figure

    survey = survey_store(store, largest=10, failures=20)
    inputs = Table(
        ("input", "kind", "graphs", "stored", "failed"),
        tuple(
            (
                str(item.get("source", "")),
                str(item.get("kind", "")),
                "?" if item.get("total") is None else str(item.get("total")),
                str(item.get("stored", "")),
                str(item.get("failed", "")),
            )
            for item in survey.inputs
        ),
        numeric=frozenset({2, 3, 4}),
    )
    cyclic_text = (
        "no connected graphs with a critical group"
        if survey.cyclic is None
        else f"{float(survey.cyclic):.4f} ({survey.cyclic.numerator}/{survey.cyclic.denominator})"
    )
    sections = [
        Section(
            "Store",
            paragraphs=(
                f"{survey.graphs} graphs stored in {survey.runs} run(s); {survey.failed} failed; "
                f"{survey.connected} connected graphs with a critical group; fraction cyclic "
                f"{cyclic_text}.",
            ),
            tables=(inputs,),
        ),
        Section(
            "Graphs by number of vertices",
            tables=(
                Table(
                    ("vertices", "graphs"),
                    tuple((str(k), str(v)) for k, v in survey.by_vertices.items()),
                    numeric=frozenset({0, 1}),
                ),
            ),
        ),
    ]
    if survey.rank_counts:
        # Random graphs G(n, q) only: there the limiting law of Wood (2017) is the yardstick.
        random_inputs = bool(survey.inputs) and all(
            str(item.get("source", "")).startswith("gnp:") for item in survey.inputs
        )
        limit = None
        paragraphs: tuple[str, ...] = ()
        if random_inputs:
            from graphinv.report.limits import cyclic_probability_limit, rank_distribution_limit

            limit = rank_distribution_limit(max(max(survey.rank_counts), 1))
            paragraphs = (
                "Every input is a family of random graphs G(n, q): red marks give the limiting "
                "law of the rank as n grows (Wood 2017), under which a fraction "
                f"∏ζ(2k+1)⁻¹ = {cyclic_probability_limit():.5f} of the groups is cyclic.",
            )
        sections.append(
            Section(
                "Critical-group ranks",
                paragraphs=paragraphs,
                figures=(
                    embed_figure(
                        rank_distribution_figure(
                            survey.rank_counts,
                            title="Ranks of the critical groups (connected graphs)",
                            limit=limit,
                        ),
                        title="Distribution of critical-group rank",
                        caption="Connected graphs only; rank = number of invariant factors.",
                    ),
                ),
            )
        )
    if survey.largest:
        sections.append(
            Section(
                "Largest critical groups",
                tables=(
                    Table(
                        ("input", "index", "vertices", "order = spanning trees", "invariant factors"),
                        tuple(
                            (
                                str(row["source"]),
                                str(row["index"]),
                                str(row["vertices"]),
                                str(row["order"]),
                                " ⊕ ".join(f"Z/{d}" for d in row["critical_group"]) or "0",
                            )
                            for row in survey.largest
                        ),
                        numeric=frozenset({1, 2, 3}),
                    ),
                ),
            )
        )
    if survey.cospectral:
        sections.append(
            Section(
                "Cospectral graphs",
                tables=(
                    Table(
                        ("matrix", "shared spectra", "graphs with a cospectral mate"),
                        tuple((c.matrix, str(c.classes), str(c.graphs)) for c in survey.cospectral),
                        numeric=frozenset({1, 2}),
                    ),
                ),
            )
        )
    if survey.failures:
        sections.append(
            Section(
                "Failures",
                tables=(
                    Table(
                        ("input", "index", "line", "error"),
                        tuple(
                            (
                                str(f["source"]),
                                str(f["index"]),
                                "" if f["line"] is None else str(f["line"]),
                                str(f["error"]),
                            )
                            for f in survey.failures
                        ),
                    ),
                ),
            )
        )
    sections.append(Section("Survey (JSON)", preformatted=(to_json_line(survey),)))
    return render_html(f"graphinv report: {Path(os.fspath(store)).name}", sections)


# --------------------------------------------------------------------------------------------
# Files


@dataclass(frozen=True)
class ReportFile:
    """What :func:`write_report` wrote."""

    path: Path
    kind: str
    graphs: int | None
    size: int

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict."""
        return {"report": str(self.path), "kind": self.kind, "graphs": self.graphs, "bytes": self.size}


def is_sqlite_file(path: str | os.PathLike[str]) -> bool:
    """True when ``path`` is a file starting with the SQLite header.

    Examples
    --------
    >>> is_sqlite_file("no-such-file.db")
    False
    """
    try:
        with open(path, "rb") as stream:
            return stream.read(16) == b"SQLite format 3\x00"
    except OSError:
        return False


def write_report(
    source: str, *, output: str | os.PathLike[str], format: str | None = None, title: str | None = None
) -> ReportFile:
    """Write the HTML report of a graph file, family spec or batch store to ``output``.

    One graph gives a graph report, several a collection report, a SQLite batch store a store
    report.

    Examples
    --------
    >>> import tempfile
    >>> target = os.path.join(tempfile.mkdtemp(), "wheel.html")
    >>> written = write_report("wheel:5", output=target)
    >>> written.kind, written.graphs, written.size > 1000
    ('graph', 1, True)
    """
    from graphinv.io import read_graphs

    target = Path(output)
    if is_sqlite_file(source):
        page = store_report(source)
        kind, count = "store", None
    else:
        graphs = list(itertools.islice(read_graphs(source, format=format), COLLECTION_LIMIT + 1))
        if len(graphs) == 1:
            page = graph_report(graphs[0], name=title)
            kind, count = "graph", 1
        else:
            default = "standard input" if source == "-" else Path(source).name or source
            page = collection_report(graphs, title=title or default)
            kind, count = "collection", min(len(graphs), COLLECTION_LIMIT)
    if target.parent != Path(""):
        target.parent.mkdir(parents=True, exist_ok=True)
    target.write_text(page, encoding="utf-8")
    return ReportFile(path=target, kind=kind, graphs=count, size=target.stat().st_size)
