"""``graphinv spectrum``, ``compare``, ``mates`` and ``switch``: spectra and cospectral graphs."""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from graphinv.cli._app import FormatOption, GraphSource, JsonLinesOption, command
from graphinv.errors import GraphFormatError

if TYPE_CHECKING:
    import networkx as nx
    from rich.console import Console
    from rich.table import Table

MatrixOption = Annotated[
    str,
    typer.Option(
        "--matrix",
        "-m",
        help="laplacian (L = D - A), signless (Q = D + A) or adjacency (A).",
    ),
]


def _console() -> Console:
    from rich.console import Console

    return Console(highlight=False, soft_wrap=False, markup=False)


def _table(title: str, *columns: str) -> Table:
    from rich import box
    from rich.table import Table

    table = Table(title=title, box=box.SIMPLE_HEAD, title_justify="left")
    for column in columns:
        table.add_column(column)
    return table


def _graphs_of(source: str, input_format: str | None) -> Iterator[nx.Graph]:
    """The graphs of a file, standard input, family spec, or every file of a folder (sorted)."""
    from graphinv.io import read_graphs

    folder = Path(source)
    if source != "-" and folder.is_dir():
        files = sorted(p for p in folder.iterdir() if p.is_file() and not p.name.startswith("."))
        if not files:
            raise GraphFormatError("the folder holds no graph files", source=source)
        for path in files:
            yield from read_graphs(str(path), format=input_format)
    else:
        yield from read_graphs(source, format=input_format)


@command("spectrum")
def spectrum(
    source: GraphSource,
    matrix: MatrixOption = "laplacian",
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Exact characteristic polynomial and (float) eigenvalues of each graph of SOURCE."""
    from graphinv.report.jsonl import to_json_line
    from graphinv.spectrum import check_matrix_kind, format_polynomial, spectral_profile

    check_matrix_kind(matrix)
    console = _console()
    for G in _graphs_of(source, input_format):
        profile = spectral_profile(G, matrix=matrix)
        if jsonl:
            typer.echo(to_json_line(profile))
            continue
        letter = {"laplacian": "L", "signless": "Q", "adjacency": "A"}[matrix]
        console.print(f"{profile.name}: {profile.vertices} vertices")
        if profile.polynomial is None:
            console.print(f"  det(xI - {letter}) not computed (more than 400 vertices)")
        else:
            console.print(f"  det(xI - {letter}) = {format_polynomial(profile.polynomial)}")
        scope = "all" if profile.spectrum.complete else "extremes only"
        console.print(
            f"  eigenvalues of {letter} (float64, {scope}, grouped to relative tolerance "
            f"{profile.spectrum.tolerance:g}):"
        )
        table = _table("", "eigenvalue", "multiplicity")
        for value, multiplicity in profile.spectrum.groups:
            table.add_row(f"{value:.10g}", str(multiplicity))
        console.print(table)
        if profile.algebraic_connectivity is not None:
            console.print(
                f"  algebraic connectivity (float64): {profile.algebraic_connectivity:.10g}"
            )
        if profile.trees is not None:
            check = profile.trees
            verdict = "agree" if check.agrees else "DISAGREE"
            console.print(f"  spanning trees (exact): {check.exact}")
            console.print(
                f"  from eigenvalues (float64): {check.estimate:.12g}  "
                f"(relative difference {check.relative_error:.1e}, {verdict})"
            )


@command("compare")
def compare(
    first: Annotated[
        str, typer.Argument(help="The first graph (file or family spec).", show_default=False)
    ],
    second: Annotated[
        str, typer.Argument(help="The second graph (file or family spec).", show_default=False)
    ],
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Compare two graphs invariant by invariant and name the first that tells them apart."""
    from graphinv.cospectral import compare_graphs
    from graphinv.io import read_graph
    from graphinv.report.jsonl import to_json_line

    comparison = compare_graphs(
        read_graph(first, format=input_format), read_graph(second, format=input_format)
    )
    if jsonl:
        typer.echo(to_json_line(comparison))
        return
    table = _table("", "invariant", first, second, "")
    for row in comparison.rows:
        table.add_row(
            row.invariant.replace("_", " "), row.first, row.second, "" if row.same else "differs"
        )
    console = _console()
    console.print(table)
    if comparison.isomorphic:
        console.print("isomorphic")
    else:
        separator = (comparison.first_difference or "").replace("_", " ")
        console.print(f"not isomorphic; first separated by: {separator}")


@command("mates")
def mates(
    sources: Annotated[
        list[str],
        typer.Argument(
            help="Graph files (multi-graph graph6/sparse6 too), folders of graph files, or "
            "family specs; all graphs are pooled.",
            show_default=False,
        ),
    ],
    matrix: Annotated[
        list[str] | None,
        typer.Option(
            "--matrix",
            "-m",
            help="laplacian, signless or adjacency; repeat for several (default all three).",
        ),
    ] = None,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Cospectral classes across graphs: shared exact polynomials, duplicates, separators."""
    from graphinv.cospectral import SEPARATING_INVARIANTS, find_cospectral, format_group
    from graphinv.report.jsonl import to_json_line
    from graphinv.spectrum import MATRIX_KINDS

    graphs = [G for source in sources for G in _graphs_of(source, input_format)]
    report = find_cospectral(graphs, matrices=matrix or MATRIX_KINDS)
    if jsonl:
        for record in report.records():
            typer.echo(to_json_line(record))
        return
    console = _console()
    short = {
        "critical_group": "K(G)",
        "adjacency_smith": "SNF(A)",
        "signless_smith": "SNF(Q)",
        "degree_sequence": "degrees",
    }
    for group in report.duplicates:
        names = ", ".join(report.names[k] for k in group[1:])
        console.print(f"duplicate: {names} isomorphic to {report.names[group[0]]} (skipped)")
    for kind, classes in report.classes.items():
        for found in classes:
            table = _table(
                f"{kind}-cospectral: {len(found.members)} graphs",
                "graph",
                *(short[name] for name in SEPARATING_INVARIANTS),
            )
            for slot, k in enumerate(found.members):
                cells = []
                for name in SEPARATING_INVARIANTS:
                    value = found.values[name][slot]
                    cells.append(
                        " ".join(str(d) for d in value)
                        if name == "degree_sequence"
                        else format_group(*value)
                    )
                table.add_row(report.names[k], *cells)
            table.add_row(
                "separated?",
                *("yes" if found.separated_by[name] else "no" for name in SEPARATING_INVARIANTS),
            )
            console.print(table)
    console.print(
        f"summary over {report.count} graphs ({len(report.duplicates)} with isomorphic "
        "copies); the last columns count graphs with a mate that the invariant tells apart "
        "from every mate:"
    )
    summary = _table(
        "",
        "matrix",
        "graphs",
        "with mate",
        "classes",
        *(short[name] for name in SEPARATING_INVARIANTS),
    )
    for row in report.summary:
        summary.add_row(
            row.matrix,
            str(row.graphs),
            str(row.with_mate),
            str(row.classes),
            *(str(row.separated[name]) for name in SEPARATING_INVARIANTS),
        )
    console.print(summary)


@command("switch")
def switch(
    source: GraphSource,
    output: Annotated[
        str | None,
        typer.Option("--output", "-o", help="Write the mates as graph6 to this file."),
    ] = None,
    matrix: MatrixOption = "adjacency",
    max_size: Annotated[
        int, typer.Option("--max-size", help="Largest switching set tried (even, >= 4).")
    ] = 4,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Cospectral mates by Godsil-McKay switching, written as graph6 lines."""
    import sys

    from graphinv.io import to_graph6
    from graphinv.report.jsonl import to_json_line
    from graphinv.switching import cospectral_mates

    stream = open(output, "w", encoding="utf-8") if output else None  # noqa: SIM115
    try:
        total = 0
        for G in _graphs_of(source, input_format):
            name = str(G.graph.get("name") or "graph")
            found = cospectral_mates(G, matrix=matrix, max_size=max_size)
            total += len(found)
            for H in found:
                code = to_graph6(H)
                if stream is not None:
                    stream.write(code + "\n")
                if jsonl:
                    record = {
                        "graph": name,
                        "matrix": matrix,
                        "switching_set": [str(v) for v in H.graph["switching_set"]],
                        "mate_graph6": code,
                    }
                    typer.echo(to_json_line(record))
                elif stream is None:
                    typer.echo(code)
            if not jsonl:
                typer.echo(f"{name}: {len(found)} {matrix} mate(s)", err=True)
    finally:
        if stream is not None:
            stream.close()
    if output and not jsonl:
        typer.echo(f"{output}: {total} graphs written", err=True)
    sys.stdout.flush()
