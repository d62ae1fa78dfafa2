"""The bundled demo: candidate fibre topologies of the invented Tarn Hollow campus.

The estates engineering team of a made-up campus compares candidate designs for its fibre
network (edge lists in ``graphs/demo/``) and a family of street-grid duct plans (a graph6 file).
:func:`run_demo` loads them, ranks the designs by their number of spanning trees, computes
their critical groups, finds the designs that share a spectrum and whether their critical
groups tell them apart, fits the growth of the duct plans against the square-grid limit, and
writes an HTML report, JSON Lines records and figures.  :func:`print_demo` shows the result.

The number of spanning trees counts the different ways to keep every building connected with
a minimal set of links: one indicator of redundancy, not an engineering sign-off.

References
----------
N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999);
H. N. V. Temperley, "Enumeration of graphs on a large periodic lattice", 1974;
W. H. Haemers, E. Spence, "Enumeration of cospectral graphs", European J. Combin. 25 (2004).
"""

from __future__ import annotations

import math
import os
import re
import time
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

import networkx as nx

from graphinv.errors import GraphInvError

if TYPE_CHECKING:
    from rich.console import Console

    from graphinv.report.growth import GrowthFit
    from graphinv.report.html import EmbeddedFigure, Section
    from graphinv.report.summary import GraphSummary

__all__ = [
    "DISCLAIMER",
    "CospectralFinding",
    "DemoResult",
    "DesignResult",
    "default_demo_data",
    "design_panels",
    "print_demo",
    "run_demo",
]

DISCLAIMER = (
    "The spanning-tree count is one indicator of a network's redundancy, not an engineering "
    "sign-off. Decisions about a real network belong to its own engineering standards and "
    "licensed practice."
)

CAMPUS = "Tarn Hollow campus (an invented scenario)"
_MATRIX_NAMES = {
    "laplacian": "Laplacian",
    "signless": "signless Laplacian",
    "adjacency": "adjacency",
}
MESH_FILE = "mesh-family.g6"


@dataclass(frozen=True)
class DesignResult:
    """One candidate design and its invariants.

    Attributes
    ----------
    name : str
        The design (file stem).
    description : str
        The design's comment from its file.
    source : str
        The edge-list file.
    summary : GraphSummary
    min_cut : int
        The fewest links (counted with multiplicity) whose loss splits the network
        (Stoer–Wagner minimum cut).
    """

    name: str
    description: str
    source: str
    summary: GraphSummary
    min_cut: int

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict (big integers as decimal strings)."""
        return {
            "design": self.name,
            "description": self.description,
            "source": self.source,
            "min_cut_links": self.min_cut,
            **self.summary.to_record(),
        }


@dataclass(frozen=True)
class CospectralFinding:
    """Designs sharing the spectrum of one matrix, and what tells them apart.

    Attributes
    ----------
    matrix : str
        ``laplacian``, ``signless`` or ``adjacency``.
    designs : tuple of str
    groups : tuple of str
        Each design's critical group.
    groups_differ : bool
        Whether the critical groups are pairwise different.
    separated_by : tuple of str
        The invariants that tell every member apart.
    """

    matrix: str
    designs: tuple[str, ...]
    groups: tuple[str, ...]
    groups_differ: bool
    separated_by: tuple[str, ...]

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict."""
        return {
            "record": "cospectral",
            "matrix": self.matrix,
            "designs": list(self.designs),
            "critical_groups": list(self.groups),
            "critical_groups_differ": self.groups_differ,
            "separated_by": list(self.separated_by),
        }

    def sentence(self) -> str:
        """The finding in one plain sentence."""
        names = " and ".join(self.designs)
        verdict = (
            "their critical groups differ"
            if self.groups_differ
            else "their critical groups are the same"
        )
        tellers = ", ".join(self.separated_by) if self.separated_by else "none of the invariants tried"
        return (
            f"{names} share their {_MATRIX_NAMES.get(self.matrix, self.matrix)} spectrum; {verdict} "
            f"({' vs '.join(self.groups)}); told apart by: {tellers}."
        )


@dataclass(frozen=True)
class DemoResult:
    """Everything the demo computed and wrote.

    Attributes
    ----------
    designs : tuple of DesignResult
        Ranked by spanning-tree count, most first.
    cospectral : tuple of CospectralFinding
    mesh : GrowthFit
        Growth of the street-grid duct plans.
    out : Path
        The output folder.
    report, records : Path
        The HTML report and the JSON Lines file.
    figures : tuple of Path
    seconds : float
        Wall-clock time of the run.
    """

    designs: tuple[DesignResult, ...]
    cospectral: tuple[CospectralFinding, ...]
    mesh: GrowthFit
    out: Path
    report: Path
    records: Path
    figures: tuple[Path, ...]
    seconds: float

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict of the whole run."""
        return {
            "designs": [d.to_record() for d in self.designs],
            "cospectral": [c.to_record() for c in self.cospectral],
            "mesh_growth": self.mesh.to_record(),
            "report": str(self.report),
            "records": str(self.records),
            "figures": [str(p) for p in self.figures],
        }


def default_demo_data() -> Path:
    """The bundled ``graphs/demo`` folder of the source tree.

    Raises
    ------
    GraphInvError
        If graphinv was installed without its source tree (give the folder explicitly).

    Examples
    --------
    >>> (default_demo_data() / "ring.txt").is_file()
    True
    """
    import graphinv

    folder = Path(graphinv.__file__).resolve().parent.parent / "graphs" / "demo"
    if not (folder / MESH_FILE).is_file():
        raise GraphInvError(
            f"the bundled demo data is not at {folder}; run from a source checkout or pass "
            "the folder holding the demo files"
        )
    return folder


def _description(path: Path) -> str:
    """The ``# Design "name": ...`` comment block of a design file, as one line (no prefix)."""
    lines: list[str] = []
    for raw in path.read_text(encoding="utf-8").splitlines():
        text = raw.strip()
        if lines:
            if not text.startswith("#") or not text.lstrip("#").strip():
                break
            lines.append(text.lstrip("#").strip())
        elif text.startswith("# Design"):
            lines.append(text.lstrip("#").strip())
    return re.sub(r'^Design "[^"]*":\s*', "", " ".join(lines))


def _min_cut(G: nx.Graph) -> int:
    if G.number_of_nodes() < 2 or not nx.is_connected(G):
        return 0
    simple = nx.Graph()
    simple.add_nodes_from(G)
    for u, v, data in G.edges(data=True):
        if u != v:
            weight = int(data.get("weight", 1))
            if simple.has_edge(u, v):
                simple[u][v]["weight"] += weight
            else:
                simple.add_edge(u, v, weight=weight)
    value, _ = nx.stoer_wagner(simple, weight="weight")
    return int(value)


def _load_designs(folder: Path) -> list[tuple[Path, nx.Graph]]:
    from graphinv.io import read_graph

    files = sorted(folder.glob("*.txt"))
    if not files:
        raise GraphInvError(f"{folder}: no design files (*.txt) found")
    return [(path, read_graph(path)) for path in files]


def _findings(
    designs: Sequence[DesignResult], graphs: Sequence[nx.Graph]
) -> tuple[CospectralFinding, ...]:
    from graphinv.cospectral import find_cospectral
    from graphinv.report.html import invariant_name
    from graphinv.report.summary import format_group

    report = find_cospectral(graphs)
    found = []
    for matrix, classes in report.classes.items():
        for item in classes:
            members = [designs[k] for k in item.members]
            groups = tuple(format_group(d.summary.critical_group) for d in members)
            found.append(
                CospectralFinding(
                    matrix=matrix,
                    designs=tuple(d.name for d in members),
                    groups=groups,
                    groups_differ=len(set(groups)) == len(groups),
                    separated_by=tuple(
                        invariant_name(k) for k, yes in item.separated_by.items() if yes
                    ),
                )
            )
    return tuple(found)


def _is_square_grid(G: nx.Graph) -> bool:
    k = math.isqrt(G.number_of_nodes())
    return (
        k >= 2
        and k * k == G.number_of_nodes()
        and nx.is_isomorphic(G, nx.grid_2d_graph(k, k))
    )


def _mesh_growth(folder: Path) -> GrowthFit:
    from graphinv.io import read_graphs
    from graphinv.report.growth import family_growth
    from graphinv.report.limits import grid_growth_limit

    plans = list(read_graphs(folder / MESH_FILE))
    for G in plans:
        k = math.isqrt(G.number_of_nodes())
        G.graph["name"] = f"{k}x{k} plan"
    squares = all(_is_square_grid(G) for G in plans)
    return family_growth(
        plans,
        family="street-grid duct plans" + (" (square grids)" if squares else ""),
        limit=grid_growth_limit() if squares else None,
        limit_source="square-grid limit exp(4G/π) (Temperley 1974)" if squares else None,
    )


def _figures(
    designs: Sequence[DesignResult],
    graphs: dict[str, nx.Graph],
    findings: Sequence[CospectralFinding],
    mesh: GrowthFit,
) -> list[tuple[str, str, str, Any]]:
    """``(file stem, title, caption, matplotlib figure)`` for every demo figure."""
    from graphinv.report.plots import (
        graphs_figure,
        growth_figure,
        ranking_figure,
    )

    figures: list[tuple[str, str, str, Any]] = [
        (
            "ranking",
            "Designs ranked by spanning trees",
            "Bar length is log10 of the exact count; labels give the count.",
            ranking_figure(
                {d.name: d.summary.spanning_trees for d in designs},
                title=f"Spanning trees of each candidate design, {CAMPUS}",
            ),
        )
    ]
    panels, positions = design_panels([(d.name, graphs[d.name]) for d in designs])
    figures.append(
        (
            "designs",
            "The candidate designs",
            "Every design on the same map of the campus; vertices coloured by their number of "
            "links (with multiplicity), thicker lines for doubled fibre.",
            graphs_figure(panels, positions=positions, value_label="links at the vertex", columns=5),
        )
    )
    seen: set[tuple[str, ...]] = set()
    for finding in findings:  # one drawing per set of designs, whichever spectrum they share
        if finding.designs not in seen:
            seen.add(finding.designs)
            figures.append(_pair_figure(finding, graphs, positions))
    figures.append(
        (
            "mesh-growth",
            "Street-grid duct plans: spanning-tree growth",
            f"Fitted per-vertex growth {mesh.per_vertex:.5f}"
            + (f" against the square-grid limit {mesh.limit:.5f} (Temperley 1974)." if mesh.limit else "."),
            growth_figure(mesh),
        )
    )
    return figures


def design_panels(
    designs: Sequence[tuple[str, nx.Graph]],
) -> tuple[list[tuple[str, nx.Graph, dict[Any, float]]], dict[Any, tuple[float, float]]]:
    """Drawing panels ``(title, graph, links per vertex)`` and one shared campus layout.

    The partial mesh follows the ducts between neighbouring buildings, so its layout is the
    closest thing to a map of the campus; every design is drawn on it (on the layout of the
    last design when there is no partial mesh).

    Examples
    --------
    >>> panels, positions = design_panels([("ring", nx.cycle_graph(4))])
    >>> panels[0][0], sorted(positions)
    ('ring: τ = 4', [0, 1, 2, 3])
    """
    from graphinv import spanning_tree_count

    graphs = dict(designs)
    layout_source = graphs.get("partial-mesh", designs[-1][1])
    positions = _campus_layout(layout_source)
    panels = [
        (
            f"{name}: τ = {spanning_tree_count(G)}",
            G,
            {v: float(deg) for v, deg in G.degree(weight="weight")},
        )
        for name, G in designs
    ]
    return panels, positions


def _pair_figure(
    finding: CospectralFinding,
    graphs: dict[str, nx.Graph],
    positions: dict[Any, tuple[float, float]],
) -> tuple[str, str, str, Any]:
    """Cospectral designs side by side, coloured by their identity configurations.

    Vertex names must be shared by the designs (they are drawn on one map of the campus).
    """
    from graphinv.chipfiring import recurrent_identity
    from graphinv.report.plots import graphs_figure

    members = [graphs[name] for name in finding.designs]
    sink = "core-a" if all("core-a" in G for G in members) else next(iter(members[0]))
    edge_sets = [{frozenset((u, v)) for u, v in G.edges() if u != v} for G in members]
    common = set.intersection(*edge_sets)
    panels = [
        (f"{name}\n{group}", G, dict(recurrent_identity(G, sink)))
        for name, group, G in zip(finding.designs, finding.groups, members, strict=True)
    ]
    highlights = [[tuple(e) for e in edges - common] for edges in edge_sets]
    caption = (
        f"{finding.sentence()} Red: links the designs do not share. Colours: the identity of "
        f"each design's group of recurrent chip configurations (sink {sink}, hollow; Dhar 1990)."
    )
    return (
        "cospectral-" + "-".join(finding.designs),
        f"{_MATRIX_NAMES.get(finding.matrix, finding.matrix)}-cospectral designs: "
        f"{' and '.join(finding.designs)}",
        caption,
        graphs_figure(
            panels,
            positions=positions,
            columns=len(panels),
            value_label="chips in the identity",
            highlights=highlights,
        ),
    )


def _campus_layout(G: nx.Graph) -> dict[Any, tuple[float, float]]:
    positions = nx.kamada_kawai_layout(nx.Graph(G))
    return {v: (float(p[0]), float(p[1])) for v, p in positions.items()}


def _report_sections(
    designs: Sequence[DesignResult],
    findings: Sequence[CospectralFinding],
    mesh: GrowthFit,
    embedded: dict[str, EmbeddedFigure],
) -> list[Section]:
    from graphinv.report.html import Section, Table
    from graphinv.report.summary import format_group, format_primary_decomposition

    ranking = Table(
        (
            "rank",
            "design",
            "links",
            "spanning trees",
            "min cut (links)",
            "algebraic connectivity (float)",
            "critical group",
        ),
        tuple(
            (
                str(k),
                d.name,
                str(d.summary.edges),
                str(d.summary.spanning_trees),
                str(d.min_cut),
                f"{d.summary.algebraic_connectivity:.4f}"
                if d.summary.algebraic_connectivity is not None
                else "",
                format_group(d.summary.critical_group),
            )
            for k, d in enumerate(designs, start=1)
        ),
        numeric=frozenset({0, 2, 3, 4, 5}),
    )
    descriptions = Table(
        ("design", "description", "file"),
        tuple((d.name, d.description, Path(d.source).name) for d in designs),
    )
    groups = Table(
        ("design", "critical group", "primary decomposition", "rank", "cyclic"),
        tuple(
            (
                d.name,
                format_group(d.summary.critical_group),
                format_primary_decomposition(d.summary.critical_group),
                str(len(d.summary.critical_group.invariant_factors)),
                "yes" if len(d.summary.critical_group.invariant_factors) <= 1 else "no",
            )
            for d in designs
        ),
        numeric=frozenset({3}),
    )
    cospectral_figures = tuple(v for k, v in embedded.items() if k.startswith("cospectral-"))
    mesh_rows = Table(
        ("plan", "vertices", "log τ", "τ^(1/N)", "exact"),
        tuple(
            (
                name,
                str(n),
                f"{value:.6f}",
                f"{math.exp(value / n):.5f}",
                "yes" if exact else "sparse log-determinant",
            )
            for name, n, value, exact in zip(
                mesh.labels, mesh.vertex_counts, mesh.log_counts, mesh.exact, strict=True
            )
        ),
        numeric=frozenset({1, 2, 3}),
    )
    limit_text = (
        f" The square-grid limit is exp(4G/π) = {mesh.limit:.6f} (Temperley 1974), so the fit is "
        f"{abs(mesh.relative_error or 0):.3%} away from it."
        if mesh.limit is not None
        else ""
    )
    return [
        Section(
            "The question",
            paragraphs=(
                f"The estates engineering team of the {CAMPUS} is choosing a topology for the "
                "campus fibre network joining two core equipment rooms and twelve buildings. "
                "Each candidate design is a multigraph (a doubled duct counts twice). For each "
                "design graphinv counts the spanning trees exactly — the number of different "
                "minimal sets of links that keep every building connected — and computes the "
                "critical group, whose order is that count.",
            ),
            notes=(DISCLAIMER,),
        ),
        Section(
            "Designs ranked by spanning trees",
            tables=(ranking, descriptions),
            figures=tuple(embedded[k] for k in ("ranking", "designs") if k in embedded),
        ),
        Section(
            "Critical groups",
            paragraphs=(
                "Each critical group is certified: the product of its invariant factors equals "
                "the spanning-tree count computed by an independent determinant.",
            ),
            tables=(groups,),
        ),
        Section(
            "Designs that share a spectrum",
            paragraphs=tuple(f.sentence() for f in findings)
            or ("No two designs share a spectrum.",),
            figures=cospectral_figures,
        ),
        Section(
            "Street-grid duct plans",
            paragraphs=(
                f"The per-vertex growth constant of the spanning-tree count fitted over the "
                f"{len(mesh.vertex_counts)} plans is {mesh.per_vertex:.6f}.{limit_text}",
            ),
            tables=(mesh_rows,),
            figures=tuple(embedded[k] for k in ("mesh-growth",) if k in embedded),
        ),
    ]


def run_demo(*, out: str | os.PathLike[str], data: str | os.PathLike[str] | None = None) -> DemoResult:
    """Run the Tarn Hollow campus demo and write its report, records and figures to ``out``.

    Parameters
    ----------
    out : path
        Output folder (created): ``report.html``, ``designs.jsonl`` and ``figures/*.png|svg``.
    data : path, optional
        The folder of demo files; default the bundled ``graphs/demo``.

    Returns
    -------
    DemoResult

    Examples
    --------
    Two of the bundled designs and the first four duct plans:

    >>> import shutil, tempfile
    >>> data = Path(tempfile.mkdtemp())
    >>> for name in ("ring.txt", "ladder.txt"):
    ...     _ = shutil.copy(default_demo_data() / name, data / name)
    >>> plans = (default_demo_data() / MESH_FILE).read_text().splitlines()[:4]
    >>> _ = (data / MESH_FILE).write_text("\\n".join(plans) + "\\n")
    >>> result = run_demo(out=tempfile.mkdtemp(), data=data)
    >>> [(d.name, d.summary.spanning_trees) for d in result.designs], result.report.name
    ([('ladder', 2911), ('ring', 14)], 'report.html')

    References
    ----------
    Biggs, J. Algebraic Combin. 9 (1999); Temperley 1974; Haemers & Spence 2004.
    """
    from graphinv.report.html import EmbeddedFigure, render_html
    from graphinv.report.jsonl import write_json_lines
    from graphinv.report.plots import save_figure
    from graphinv.report.summary import summarize

    started = time.perf_counter()
    folder = Path(data) if data is not None else default_demo_data()
    target = Path(out)
    target.mkdir(parents=True, exist_ok=True)
    loaded = _load_designs(folder)
    unranked = [
        DesignResult(
            name=path.stem,
            description=_description(path),
            source=str(path),
            summary=summarize(G, name=path.stem),
            min_cut=_min_cut(G),
        )
        for path, G in loaded
    ]
    graphs = {path.stem: G for path, G in loaded}
    designs = tuple(
        sorted(unranked, key=lambda d: (-d.summary.spanning_trees, -d.min_cut, d.name))
    )
    findings = _findings(unranked, [G for _, G in loaded])
    mesh = _mesh_growth(folder)
    written: list[Path] = []
    embedded = {}
    for stem, title, caption, figure in _figures(designs, graphs, findings, mesh):
        files = save_figure(figure, target / "figures" / stem)
        written.extend(files)
        # Embed the PNG just written rather than drawing the figure a third time.
        embedded[stem] = EmbeddedFigure(title=title, caption=caption, png=files[0].read_bytes())
    records = target / "designs.jsonl"
    with records.open("w", encoding="utf-8") as stream:
        write_json_lines([*designs, *findings, {"record": "mesh_growth", **mesh.to_record()}], stream)
    report = target / "report.html"
    report.write_text(
        render_html(
            f"Fibre topologies for the {CAMPUS}",
            _report_sections(designs, findings, mesh, embedded),
            subtitle="graphinv demo",
        ),
        encoding="utf-8",
    )
    return DemoResult(
        designs=designs,
        cospectral=findings,
        mesh=mesh,
        out=target,
        report=report,
        records=records,
        figures=tuple(written),
        seconds=time.perf_counter() - started,
    )


def print_demo(result: DemoResult, console: Console) -> None:
    """Print the ranked table, the cospectral findings, the duct-plan fit and the files."""
    from rich import box
    from rich.table import Table

    from graphinv.report.summary import format_group

    table = Table(
        title="Tarn Hollow campus (invented): designs ranked by spanning trees",
        caption="trees: spanning trees (exact); cut: fewest links whose loss splits the "
        "network; λ₂: algebraic connectivity (float)",
        box=box.SIMPLE_HEAD,
        pad_edge=False,
    )
    for name, justify in (
        ("#", "right"),
        ("design", "left"),
        ("links", "right"),
        ("trees", "right"),
        ("cut", "right"),
        ("λ₂", "right"),
    ):
        table.add_column(name, justify=justify, no_wrap=True)  # type: ignore[arg-type]
    table.add_column("critical group", overflow="fold")
    for k, d in enumerate(result.designs, start=1):
        table.add_row(
            str(k),
            d.name,
            str(d.summary.edges),
            str(d.summary.spanning_trees),
            str(d.min_cut),
            f"{d.summary.algebraic_connectivity:.3f}" if d.summary.algebraic_connectivity is not None else "",
            format_group(d.summary.critical_group),
        )
    console.print(table)
    console.print()
    if result.cospectral:
        console.print("[bold]Designs that share a spectrum[/bold]")
        for finding in result.cospectral:
            _say(console, finding.sentence(), first="  • ", rest="    ")
    else:
        console.print("No two designs share a spectrum.")
    console.print()
    mesh = result.mesh
    line = f"Street-grid duct plans: fitted growth {mesh.per_vertex:.5f} spanning trees per vertex"
    if mesh.limit is not None:
        line += f" (square-grid limit exp(4G/π) = {mesh.limit:.5f}, Temperley 1974)"
    _say(console, line)
    console.print()
    console.print(f"Report:  {result.report}", highlight=False)
    console.print(f"Records: {result.records}", highlight=False)
    console.print(
        f"Figures: {result.out / 'figures'} ({len(result.figures)} files)", highlight=False
    )
    console.print(f"Done in {result.seconds:.1f} s.", highlight=False)
    console.print()
    _say(console, DISCLAIMER, style="italic")


def _say(console: Console, text: str, *, first: str = "", rest: str = "", style: str = "") -> None:
    """Print a paragraph wrapped at the console width with a hanging indent."""
    import textwrap

    width = max(40, min(console.width, 100))
    # Keep each group such as "Z/10 ⊕ Z/60" on one line: protect its spaces while wrapping.
    protected = text.replace(" ⊕ ", "\u00a0⊕\u00a0")
    wrapped = textwrap.fill(
        protected, width=width, initial_indent=first, subsequent_indent=rest
    ).replace("\u00a0", " ")
    console.print(wrapped, style=style or None, highlight=False, markup=False, soft_wrap=True)
