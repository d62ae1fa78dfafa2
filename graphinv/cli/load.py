"""``graphinv convert``, ``matrix`` and ``families``: loading, converting and looking at graphs."""

from __future__ import annotations

from collections.abc import Callable, Hashable
from enum import StrEnum
from typing import TYPE_CHECKING, Annotated

import typer

from graphinv.cli._app import FormatOption, GraphSource, JsonLinesOption, command

if TYPE_CHECKING:
    import networkx as nx

    from graphinv.matrices import LabelledMatrix

DENSE_LIMIT = 40  # widest matrix printed as a table; wider ones are listed entry by entry


class OutputFormat(StrEnum):
    """Formats ``convert`` writes."""

    graph6 = "graph6"
    sparse6 = "sparse6"
    edges = "edges"


class MatrixKind(StrEnum):
    """The exact matrices ``matrix`` prints."""

    laplacian = "laplacian"
    reduced = "reduced"
    signless = "signless"
    adjacency = "adjacency"
    incidence = "incidence"
    distance = "distance"


def _matrix_function(kind: MatrixKind) -> Callable[[nx.Graph], LabelledMatrix]:
    from graphinv import matrices

    functions: dict[MatrixKind, Callable[[nx.Graph], LabelledMatrix]] = {
        MatrixKind.laplacian: matrices.laplacian_matrix,
        MatrixKind.reduced: matrices.reduced_laplacian_matrix,
        MatrixKind.signless: matrices.signless_laplacian_matrix,
        MatrixKind.adjacency: matrices.adjacency_matrix,
        MatrixKind.incidence: matrices.incidence_matrix,
        MatrixKind.distance: matrices.distance_matrix,
    }
    return functions[kind]


@command("convert")
def convert(
    source: GraphSource,
    to: Annotated[
        OutputFormat,
        typer.Option(
            "--to",
            "-t",
            help="Output format: graph6, sparse6 (keeps multiplicities) "
            "or edges (one graph, keeps labels).",
        ),
    ],
    output: Annotated[
        str,
        typer.Option("--output", "-o", help="File to write; '-' (the default) is standard output."),
    ] = "-",
    input_format: FormatOption = None,
) -> None:
    """Convert the graphs of SOURCE (files, standard input or a family spec with ranges).

    Example: graphinv convert "petersen:5..12,1..3" --to graph6 -o gp.g6
    """
    from graphinv.io import convert_graphs

    count = convert_graphs(source, to=to.value, target=output, format=input_format)
    if output != "-":
        typer.echo(f"wrote {count} graph{'s' if count != 1 else ''} to {output}", err=True)


def _label_text(label: Hashable) -> str:
    if isinstance(label, tuple) and len(label) == 3:
        u, v, k = label  # an incidence-matrix column: edge u-v, parallel copy k
        return f"{u}-{v}" + (f"#{k}" if k else "")
    return str(label)


def _matrix_lines(M: LabelledMatrix, *, sparse: bool) -> list[str]:
    rows = [_label_text(v) for v in M.row_labels]
    columns = [_label_text(v) for v in M.column_labels]
    if sparse or len(columns) > DENSE_LIMIT:
        entries = M.entries()
        row_width = max([len("row")] + [len(r) for r in rows])
        column_width = max([len("column")] + [len(c) for c in columns])
        value_width = max([len("value")] + [len(str(v)) for _, _, v in entries])
        lines = [f"  {'row':>{row_width}}  {'column':>{column_width}}  {'value':>{value_width}}"]
        lines += [
            f"  {rows[i]:>{row_width}}  {columns[j]:>{column_width}}  {value:>{value_width}}"
            for i, j, value in entries
        ]
        return lines
    dense = M.to_lists()
    cells = [[str(x) for x in row] for row in dense]
    widths = [
        max([len(columns[j])] + [len(cells[i][j]) for i in range(len(rows))])
        for j in range(len(columns))
    ]
    first = max((len(r) for r in rows), default=0)
    lines = [
        "  "
        + " " * first
        + "  "
        + "  ".join(c.rjust(w) for c, w in zip(columns, widths, strict=True))
    ]
    for label, row in zip(rows, cells, strict=True):
        lines.append(
            "  "
            + label.rjust(first)
            + "  "
            + "  ".join(c.rjust(w) for c, w in zip(row, widths, strict=True))
        )
    return lines


@command("matrix")
def matrix(
    source: GraphSource,
    kind: Annotated[
        MatrixKind,
        typer.Option(
            "--kind",
            "-k",
            help="laplacian, reduced (one vertex per component removed), "
            "signless, adjacency, incidence (oriented) or distance.",
        ),
    ] = MatrixKind.laplacian,
    sparse: Annotated[
        bool, typer.Option("--sparse", help="List the nonzero entries instead of a table.")
    ] = False,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Print an exact integer matrix of each graph of SOURCE, with its vertex order.

    Matrices wider than 40 columns are listed as 'row column value' lines of nonzero entries.
    """
    from graphinv.io import read_graphs
    from graphinv.report.jsonl import to_json_line

    function = _matrix_function(kind)
    for G in read_graphs(source, format=input_format):
        M = function(G)
        name = G.graph.get("name", "graph")
        removed = [v for v in G if v not in set(M.row_labels)] if kind is MatrixKind.reduced else []
        if jsonl:
            record = {
                "name": name,
                "kind": kind.value,
                "shape": list(M.shape),
                "row_labels": list(M.row_labels),
                "column_labels": list(M.column_labels),
                "entries": M.entries(),
            }
            if kind is MatrixKind.reduced:
                record["removed"] = removed
            typer.echo(to_json_line(record))
            continue
        rows, columns = M.shape
        typer.echo(f"{name}: {kind.value} matrix, {rows} x {columns}")
        order = "row order" if kind is MatrixKind.incidence else "vertex order"
        typer.echo(f"  {order}: " + ", ".join(_label_text(v) for v in M.row_labels))
        if kind is MatrixKind.incidence:
            typer.echo(
                "  columns (edges u-v, oriented u -> v): "
                + ", ".join(_label_text(v) for v in M.column_labels)
            )
        if removed:
            typer.echo("  removed (one per component): " + ", ".join(map(str, removed)))
        for line in _matrix_lines(M, sparse=sparse):
            typer.echo(line)


@command("families")
def families() -> None:
    """List the graph family specs, with one example each (use them wherever a file goes)."""
    from graphinv.io import family_table

    table = family_table()
    widths = [max(len(row[k]) for row in table) for k in range(3)]
    header = ("spec", "graph", "example")
    typer.echo("  ".join(h.ljust(w) for h, w in zip(header, widths, strict=True)).rstrip())
    for row in table:
        typer.echo("  ".join(c.ljust(w) for c, w in zip(row, widths, strict=True)).rstrip())
    typer.echo("")
    typer.echo("Any integer parameter may be a range A..B: cycle:3..20, petersen:5..12,1..3,")
    typer.echo("grid:2..10 (square grids), gnp:30,0.2,seed=1..2000 (2000 samples).")
    typer.echo("Vertices are 0..n-1; grids and tori are numbered row-major.")
