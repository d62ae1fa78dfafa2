"""``graphinv show``, ``report``, ``demo`` and ``figures``: results people read."""

from __future__ import annotations

import sys
from typing import Annotated

import typer

from graphinv.cli._app import FormatOption, GraphSource, JsonLinesOption, command
from graphinv.errors import GraphInvError

#: Rows per printed table page when showing many graphs (each page is printed as it fills).
_PAGE = 200


@command("show")
def show(
    source: GraphSource,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
    no_spectra: Annotated[
        bool,
        typer.Option("--no-spectra", help="Skip the algebraic connectivity and largest eigenvalue."),
    ] = False,
) -> None:
    """Summarise graphs: size, spanning trees, critical group, spectral highlights.

    One graph prints a summary; several print a table (one row per graph, printed as they
    are computed).
    """
    from rich.console import Console

    from graphinv.report.jsonl import to_json_line
    from graphinv.report.summary import summaries, summaries_table, summary_table

    stream = summaries(source, format=input_format, spectra=not no_spectra)
    if jsonl:
        for summary in stream:
            typer.echo(to_json_line(summary))
        return
    console = Console(highlight=False)
    first = next(stream, None)
    if first is None:
        raise GraphInvError(f"{source}: no graphs to show")
    second = next(stream, None)
    if second is None:
        console.print(summary_table(first))
        return
    page = [first, second]
    for summary in stream:
        page.append(summary)
        if len(page) == _PAGE:
            console.print(summaries_table(page))
            page = []
    if page:
        console.print(summaries_table(page))


@command("report")
def report(
    source: Annotated[
        str,
        typer.Argument(
            help="A graph file, '-' for standard input, a family spec such as grid:2..12, or a "
            "batch store (.db) made by 'graphinv batch'.",
            show_default=False,
        ),
    ],
    output: Annotated[
        str, typer.Option("--output", "-o", help="The HTML file to write.")
    ] = "report.html",
    input_format: FormatOption = None,
    title: Annotated[str | None, typer.Option("--title", help="Title of the report.")] = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Write a self-contained HTML report (figures embedded, no external links)."""
    from graphinv.report.html import write_report
    from graphinv.report.jsonl import to_json_line

    written = write_report(source, output=output, format=input_format, title=title)
    if jsonl:
        typer.echo(to_json_line(written))
    else:
        what = f"{written.graphs} graph(s)" if written.graphs is not None else "batch store"
        typer.echo(f"wrote {written.path} ({written.kind} report, {what}, {written.size} bytes)")


@command("draw")
def draw(
    source: GraphSource,
    output: Annotated[
        str, typer.Option("--output", "-o", help="The image to write: a .png or .svg file.")
    ] = "graph.png",
    colour: Annotated[
        str,
        typer.Option(
            "--colour",
            "-c",
            help="Colour vertices by: degree, identity (the identity recurrent configuration), "
            "generator (a recurrent generator of the critical group), none.",
        ),
    ] = "degree",
    sink: Annotated[
        str | None,
        typer.Option("--sink", "-s", help="Sink for identity and generator (default: first vertex)."),
    ] = None,
    generator: Annotated[
        int, typer.Option("--generator", "-g", help="Which generator, 1 = the first invariant factor.")
    ] = 1,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Draw one graph, coloured by degree or by a chip configuration."""
    from graphinv.report.jsonl import to_json_line
    from graphinv.report.plots import write_drawing

    written = write_drawing(
        source,
        output=output,
        colour=colour,
        sink=sink,
        generator=generator,
        format=input_format,
    )
    if jsonl:
        typer.echo(to_json_line({"drawing": str(written), "colour": colour}))
    else:
        typer.echo(f"wrote {written}")


@command("demo")
def demo(
    out: Annotated[str, typer.Option("--out", help="Folder for the report and figures.")] = "out/demo",
    data: Annotated[
        str | None,
        typer.Option("--data", help="Folder of demo files (default: the bundled graphs/demo)."),
    ] = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Run the campus fibre-network demo: rank designs, compare groups, write the report."""
    from rich.console import Console

    from graphinv.report.demo import print_demo, run_demo
    from graphinv.report.jsonl import to_json_line

    result = run_demo(out=out, data=data)
    if jsonl:
        typer.echo(to_json_line(result))
        return
    print_demo(result, Console(highlight=False))


@command("figures")
def figures(
    out: Annotated[str, typer.Option("--out", help="Folder to write the figures into.")] = "figures",
    only: Annotated[
        list[str] | None,
        typer.Option(
            "--only",
            help="Draw only this figure (repeatable): grid-growth, random-groups, cospectral-7, "
            "grid-identity, demo-designs.",
        ),
    ] = None,
    svg: Annotated[bool, typer.Option("--svg", help="Write SVG beside each PNG.")] = False,
    samples: Annotated[
        int, typer.Option("--samples", help="Samples of G(30, 1/2) for random-groups.")
    ] = 2000,
    jsonl: JsonLinesOption = False,
) -> None:
    """Regenerate the README figures (each checked against its published limit)."""
    from graphinv.report.gallery import make_figures
    from graphinv.report.jsonl import to_json_line

    made = make_figures(
        out=out, only=only, formats=("png", "svg") if svg else ("png",), samples=samples
    )
    for figure in made:
        if jsonl:
            typer.echo(to_json_line(figure))
        else:
            names = ", ".join(str(p) for p in figure.files)
            typer.echo(f"{names}: {figure.finding}")
    sys.stdout.flush()
