"""``graphinv group``, ``trees`` and ``normal-form``: critical groups, spanning-tree counts and
normal forms of integer matrices."""

from __future__ import annotations

import sys
from collections.abc import Hashable
from pathlib import Path
from typing import TYPE_CHECKING, Annotated, Any

import typer

from graphinv.cli._app import FormatOption, GraphSource, JsonLinesOption, command
from graphinv.errors import GraphFormatError

if TYPE_CHECKING:
    import networkx as nx

SinkOption = Annotated[
    str | None,
    typer.Option(
        "--sink",
        "-s",
        help="Sink vertex: a GraphML/GML file that declares directed edges keeps its "
        "directions (out-degree Laplacian, sandpile group); ignored for undirected graphs.",
    ),
]


def _resolve_sink(G: nx.Graph, sink: str | None) -> Hashable | None:
    """The vertex the user meant: the label as written, or as an integer."""
    if sink is None:
        return None
    if sink in G:
        return sink
    try:
        number = int(sink)
    except ValueError:
        return sink
    return number if number in G else sink


def _name(G: nx.Graph, index: int) -> str:
    return str(G.graph.get("name", f"graph {index}"))


def _write_records(records: list[dict[str, Any]]) -> None:
    from graphinv.report.jsonl import write_json_lines

    write_json_lines(records, sys.stdout)


@command("group")
def group(
    source: GraphSource,
    format: FormatOption = None,
    sink: SinkOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Critical group of each graph: invariant factors, order, rank, checked tree count."""
    from graphinv.group import critical_group
    from graphinv.io import read_graphs

    records = []
    for index, G in enumerate(read_graphs(source, format=format, directed=sink is not None)):
        K = critical_group(G, sink=_resolve_sink(G, sink))
        if jsonl:
            records.append({"name": _name(G, index), **K.to_record()})
            continue
        typer.echo(f"{_name(G, index)}: {K}")
        typer.echo(
            f"  order {K.order}, rank {K.rank}, free rank {K.free_rank}, "
            f"{'cyclic' if K.is_cyclic else 'not cyclic'}; "
            f"checked against {K.certificate.spanning_trees} spanning "
            f"{'arborescences' if G.is_directed() else 'trees'}"
        )
    if jsonl:
        _write_records(records)


@command("trees")
def trees(
    source: GraphSource,
    format: FormatOption = None,
    sink: SinkOption = None,
    approx: Annotated[
        bool,
        typer.Option("--approx", help="Also print the natural log of the count (float)."),
    ] = False,
    jsonl: JsonLinesOption = False,
) -> None:
    """Exact number of spanning trees of each graph (arborescences into --sink if directed)."""
    from graphinv.group import log_spanning_tree_count, spanning_tree_count
    from graphinv.io import read_graphs

    records = []
    for index, G in enumerate(read_graphs(source, format=format, directed=sink is not None)):
        root = _resolve_sink(G, sink)
        count = spanning_tree_count(G, sink=root)
        record: dict[str, Any] = {"name": _name(G, index), "spanning_trees": str(count)}
        line = f"{_name(G, index)}: {count}"
        if approx:
            estimate = log_spanning_tree_count(G, sink=root)
            record.update(estimate.to_record())
            line += f"  ({estimate})"
        if jsonl:
            records.append(record)
        else:
            typer.echo(line)
    if jsonl:
        _write_records(records)


def read_integer_matrix(path: str) -> list[list[int]]:
    """Read whitespace-separated integer rows (``#`` starts a comment; ``-`` is stdin).

    Raises
    ------
    GraphFormatError
        Naming the file and line of a token that is not an integer or a row of the wrong length.
    """
    if path == "-":
        text, name = sys.stdin.read(), "<stdin>"
    else:
        text, name = Path(path).read_text(encoding="utf-8"), path
    rows: list[list[int]] = []
    width = None
    for number, raw in enumerate(text.splitlines(), start=1):
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        try:
            row = [int(token) for token in line.replace(",", " ").split()]
        except ValueError:
            bad = next(t for t in line.replace(",", " ").split() if not _is_int(t))
            raise GraphFormatError(
                f"matrix entry {bad!r} is not an integer", source=name, line=number
            ) from None
        if width is None:
            width = len(row)
        elif len(row) != width:
            raise GraphFormatError(
                f"row has {len(row)} entries; the first row has {width}", source=name, line=number
            )
        rows.append(row)
    if not rows:
        raise GraphFormatError("no matrix rows found", source=name)
    return rows


def _is_int(token: str) -> bool:
    try:
        int(token)
    except ValueError:
        return False
    return True


def _print_matrix(title: str, M: tuple[tuple[int, ...], ...]) -> None:
    typer.echo(f"{title}:")
    width = max((len(str(x)) for row in M for x in row), default=1)
    for row in M:
        typer.echo("  " + " ".join(str(x).rjust(width) for x in row))


@command("normal-form")
def normal_form(
    matrix_file: Annotated[
        str,
        typer.Argument(help="Integer matrix: whitespace-separated rows, '-' for stdin.",
                       show_default=False),
    ],
    transforms: Annotated[
        bool, typer.Option("--transforms", help="Also print unimodular U, V with U A V = S.")
    ] = False,
    hermite: Annotated[
        bool, typer.Option("--hermite", help="Also print the row Hermite form H = U A.")
    ] = False,
    jsonl: JsonLinesOption = False,
) -> None:
    """Smith normal form (and optionally the Hermite form) of an integer matrix."""
    from graphinv.normalform import cokernel, hermite_form, smith_form

    A = read_integer_matrix(matrix_file)
    S = smith_form(A, transforms=transforms)
    group = cokernel(A)
    record: dict[str, Any] = {
        "shape": list(S.shape),
        "smith_diagonal": [str(d) for d in S.diagonal],
        "rank": S.rank,
        **group.to_record(),
    }
    H = hermite_form(A) if hermite else None
    if transforms:
        record["U"], record["V"] = S.U, S.V
    if H is not None:
        record["hermite"] = {"H": H.H, "U": H.U}
    if jsonl:
        _write_records([record])
        return
    typer.echo(f"shape {S.shape[0]} x {S.shape[1]}, rank {S.rank}")
    typer.echo("Smith diagonal: " + " ".join(str(d) for d in S.diagonal))
    torsion = " ⊕ ".join(f"Z/{d}" for d in group.invariant_factors) or "0"
    free = f" ⊕ Z^{group.free_rank}" if group.free_rank else ""
    typer.echo(f"cokernel (Z^n / rows): {torsion}{free}")
    if transforms and S.U is not None and S.V is not None:
        _print_matrix("U", S.U)
        _print_matrix("V", S.V)
    if H is not None:
        _print_matrix("Hermite form H = U A", H.H)
        _print_matrix("U", H.U)
