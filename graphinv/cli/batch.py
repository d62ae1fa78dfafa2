"""``graphinv batch``, ``graphinv survey`` and ``graphinv export``: whole families of graphs."""

from __future__ import annotations

import sys
from typing import Annotated

import typer

from graphinv.cli._app import FormatOption, JsonLinesOption, command
from graphinv.notation import abelian_group_text

_ENGINE_HELP = "local (a process pool on this machine) or dask (a Dask cluster)."


@command("batch")
def batch(
    inputs: Annotated[
        list[str],
        typer.Argument(
            help="graph6/sparse6 files (.gz too), '-' for standard input, folders of graph "
            "files (one graph per file), or family specs such as gnp:30,0.5,seed=1..2000.",
            show_default=False,
        ),
    ],
    store: Annotated[
        str, typer.Option("--store", "-s", help="The SQLite store to fill (created if missing).")
    ],
    only: Annotated[
        str | None,
        typer.Option(
            "--only",
            help="Comma-separated invariants to compute (default all): critical-group, "
            "spanning-trees, laplacian-polynomial, signless-polynomial, adjacency-polynomial, "
            "adjacency-smith, signless-smith, degrees, canonical-key.",
        ),
    ] = None,
    workers: Annotated[
        int | None,
        typer.Option("--workers", "-w", help="Worker processes (default: all cores)."),
    ] = None,
    engine: Annotated[str, typer.Option("--engine", help=_ENGINE_HELP)] = "local",
    scheduler: Annotated[
        str | None,
        typer.Option(
            "--scheduler",
            help="Dask scheduler address (tcp://host:8786); implies --engine dask.",
        ),
    ] = None,
    local_cluster: Annotated[
        bool,
        typer.Option(
            "--local-cluster", help="Start a Dask LocalCluster for this run (--engine dask)."
        ),
    ] = False,
    chunk: Annotated[int, typer.Option("--chunk", help="Graphs per task sent to a worker.")] = 1000,
    max_vertices: Annotated[
        int | None,
        typer.Option("--max-vertices", help="Store an error for graphs with more vertices."),
    ] = None,
    input_format: FormatOption = None,
    label: Annotated[
        str | None,
        typer.Option(
            "--label", help="Name for standard input in the store (one per distinct stream)."
        ),
    ] = None,
    retry_errors: Annotated[
        bool, typer.Option("--retry-errors", help="Compute again graphs stored with an error.")
    ] = False,
    commit_every: Annotated[
        float,
        typer.Option(
            "--commit-every",
            help="Seconds between commits (an interruption loses at most this much work).",
        ),
    ] = 1.0,
    quiet: Annotated[bool, typer.Option("--quiet", "-q", help="No progress bar.")] = False,
    jsonl: JsonLinesOption = False,
) -> None:
    """Compute invariants for every graph of the inputs into a store; rerun to resume."""
    from graphinv.batch.engine import run_batch
    from graphinv.report.jsonl import to_json_line

    if scheduler is not None or local_cluster:
        engine = "dask"
    result = run_batch(
        inputs,
        store=store,
        invariants=only,
        workers=workers,
        engine=engine,
        scheduler=scheduler,
        chunk_size=chunk,
        max_vertices=max_vertices,
        format=input_format,
        label=label,
        retry_errors=retry_errors,
        progress=False if quiet else None,
        commit_seconds=commit_every,
        command=" ".join(["graphinv", *sys.argv[1:]]) if sys.argv[1:2] == ["batch"] else None,
    )
    if jsonl:
        typer.echo(to_json_line(result))
        return
    typer.echo(
        f"{result.store}: {result.computed} graphs computed ({result.failed} failed), "
        f"{result.skipped} already stored; {result.seconds:.1f} s, "
        f"{result.rate:,.0f} graphs/s"
    )


@command("survey")
def survey(
    store: Annotated[str, typer.Argument(help="A batch store.", show_default=False)],
    classes: Annotated[
        str | None,
        typer.Option(
            "--classes",
            help="List the cospectral classes for this matrix: laplacian, signless, adjacency.",
        ),
    ] = None,
    largest: Annotated[int, typer.Option("--largest", help="How many largest groups.")] = 5,
    jsonl: JsonLinesOption = False,
) -> None:
    """Summarise a batch store: counts, failures, critical-group ranks, shared spectra."""
    from graphinv.batch.queries import cospectral_classes, survey_store
    from graphinv.report.jsonl import to_json_line

    if classes is not None:
        for item in cospectral_classes(store, matrix=classes):
            if jsonl:
                typer.echo(to_json_line(item))
            else:
                names = " ".join(m["graph"] for m in item.members)
                typer.echo(f"{len(item.members)} graphs: {names}")
        return
    result = survey_store(store, largest=largest)
    if jsonl:
        typer.echo(to_json_line(result))
        return
    typer.echo(f"store     {result.store}  ({result.runs} runs)")
    for stream in result.inputs:
        total = "?" if stream["total"] is None else stream["total"]
        typer.echo(
            f"input     {stream['source']}  ({stream['kind']}): {stream['stored']} of {total} "
            f"stored, {stream['failed']} failed"
        )
    typer.echo(f"graphs    {result.graphs} stored, {result.failed} failed")
    for failure in result.failures:
        typer.echo(f"  failed  {failure['source']} #{failure['index']}: {failure['error']}")
    if result.by_vertices:
        sizes = ", ".join(f"{n}: {count}" for n, count in result.by_vertices.items())
        typer.echo(f"vertices  {sizes}")
    if result.connected:
        ranks = ", ".join(f"{rank}: {count}" for rank, count in result.rank_counts.items())
        assert result.cyclic is not None
        typer.echo(f"connected {result.connected} with a critical group")
        typer.echo(f"ranks     {ranks}  (number of invariant factors > 1)")
        cyclic_count = int(result.cyclic * result.connected)
        typer.echo(f"cyclic    {float(result.cyclic):.4f} ({cyclic_count} of {result.connected})")
        for top in result.largest:
            group = abelian_group_text(int(d) for d in top["critical_group"])
            typer.echo(f"largest   order {top['order']}: {group}  [{top['graph']}]")
    for count in result.cospectral:
        typer.echo(
            f"cospectral {count.matrix}: {count.graphs} graphs in {count.classes} shared spectra"
        )


@command("export")
def export(
    store: Annotated[str, typer.Argument(help="A batch store.", show_default=False)],
    output_format: Annotated[
        str, typer.Option("--format", "-f", help="jsonl, csv or parquet.")
    ] = "jsonl",
    output: Annotated[
        str | None, typer.Option("--output", "-o", help="Output file (default standard output).")
    ] = None,
) -> None:
    """Write one record per stored graph (index, critical_group, spanning_trees, error, ...)."""
    from graphinv.batch.export import export_store

    count = export_store(store, format=output_format, output=output)
    if output is not None:
        typer.echo(f"{output}: {count} records", err=True)
