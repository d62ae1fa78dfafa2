"""``graphinv chips ...``: chip-firing on a graph with a sink.

Commands: ``stabilize``, ``identity``, ``is-recurrent``, ``order``, ``coords``, ``generators``,
``recurrents``, ``divisor`` (Baker-Norine rank and reduced form) and ``grid-identity`` (the
picture of the identity on the wired grid).  A configuration comes from
``--chips FILE`` (lines ``VERTEX COUNT`` or a JSON object) and/or repeated ``--drop VERTEX=COUNT``;
vertices are typed as they print (``3``, ``(0, 1)``, ``sink``).
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Annotated, Any

import typer

from graphinv.cli._app import FormatOption, GraphSource, JsonLinesOption, app, command
from graphinv.notation import abelian_group_text

if TYPE_CHECKING:
    from graphinv.chipfiring import ChipGraph, Configuration

chips = typer.Typer(
    help="Chip-firing with a sink: stabilize, recurrent configurations, the identity and "
    "coordinates in the critical group.",
    no_args_is_help=True,
)
app.add_typer(chips, name="chips")

SinkOption = Annotated[
    str | None,
    typer.Option(
        "--sink",
        "-s",
        help="The sink vertex, typed as it prints; default the first vertex (undirected) or "
        "the only vertex without outgoing edges (directed).",
    ),
]
ChipsFileOption = Annotated[
    Path | None,
    typer.Option(
        "--chips",
        "-c",
        help="A configuration file: 'VERTEX COUNT' per line (# comments) or a JSON object.",
        show_default=False,
    ),
]
DropOption = Annotated[
    list[str] | None,
    typer.Option(
        "--drop",
        "-d",
        help="Add COUNT chips on VERTEX (repeatable), e.g. --drop 5=1000.",
        show_default=False,
    ),
]


def _graph(source: str, input_format: str | None, sink: str | None) -> ChipGraph:
    from graphinv.chipfiring import chip_graph
    from graphinv.chipfiring.configurations import vertex_by_name
    from graphinv.io import read_graph

    G = read_graph(source, format=input_format)
    return chip_graph(G, sink=vertex_by_name(G, sink) if sink is not None else None)


def _configuration(
    graph: ChipGraph, chips_file: Path | None, drops: list[str] | None
) -> Configuration:
    from graphinv.chipfiring import ConfigurationError
    from graphinv.chipfiring.configurations import parse_configuration, vertex_by_name

    if chips_file is None and not drops:
        raise ConfigurationError("give a configuration: --chips FILE and/or --drop VERTEX=COUNT")
    configuration = graph.zero()
    if chips_file is not None:
        text = chips_file.read_text(encoding="utf-8")
        configuration = parse_configuration(text, graph, source=str(chips_file))
    added: dict[Any, int] = {}
    for drop in drops or []:
        name, equals, count = drop.rpartition("=")
        if not equals or not name:
            raise ConfigurationError(f"--drop expects VERTEX=COUNT, not {drop!r}")
        try:
            number = int(count)
        except ValueError:
            raise ConfigurationError(
                f"--drop {drop!r}: the count must be an integer, not {count!r}"
            ) from None
        if number < 0:
            raise ConfigurationError(f"--drop {drop!r}: the count must not be negative")
        vertex = vertex_by_name(graph.graph, name)
        added[vertex] = added.get(vertex, 0) + number
    return configuration + graph.configuration(added) if added else configuration


def _print_configuration(configuration: Configuration, heading: str) -> None:
    typer.echo(heading)
    for vertex, count in configuration.to_dict().items():
        typer.echo(f"  {vertex}\t{count}")


def _emit(record: dict[str, Any]) -> None:
    from graphinv.report.jsonl import to_json_line

    typer.echo(to_json_line(record))


@command("stabilize", on=chips)
def stabilize_command(
    source: GraphSource,
    chips_file: ChipsFileOption = None,
    drop: DropOption = None,
    sink: SinkOption = None,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Fire unstable vertices until none can fire; print the result and the firing counts."""
    from graphinv.chipfiring import stabilize

    graph = _graph(source, input_format, sink)
    result = stabilize(_configuration(graph, chips_file, drop))
    if jsonl:
        _emit(result.to_record())
        return
    firings = result.firing_dict()
    typer.echo(f"sink {graph.sink}; {result.topplings} firings in all")
    typer.echo("vertex\tchips\tfirings")
    for vertex, count in result.stable.to_dict().items():
        typer.echo(f"{vertex}\t{count}\t{firings[vertex]}")


@command("identity", on=chips)
def identity_command(
    source: GraphSource,
    sink: SinkOption = None,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """The identity of the group of recurrent configurations."""
    from graphinv.chipfiring import identity_configuration

    identity = identity_configuration(_graph(source, input_format, sink))
    if jsonl:
        _emit(identity.to_record())
        return
    _print_configuration(
        identity, f"identity recurrent configuration (sink {identity.graph.sink}):"
    )


@command("is-recurrent", on=chips)
def is_recurrent_command(
    source: GraphSource,
    chips_file: ChipsFileOption = None,
    drop: DropOption = None,
    sink: SinkOption = None,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Whether a configuration is recurrent (burning test); exit status 1 if it is not."""
    from graphinv.chipfiring import is_recurrent, is_superstable

    configuration = _configuration(_graph(source, input_format, sink), chips_file, drop)
    recurrent = is_recurrent(configuration)
    record = {
        "recurrent": recurrent,
        "superstable": is_superstable(configuration),
        "stable": configuration.is_stable(),
    }
    if jsonl:
        _emit(record)
    else:
        typer.echo(f"recurrent: {'yes' if recurrent else 'no'}")
        typer.echo(f"superstable: {'yes' if record['superstable'] else 'no'}")
    if not recurrent:
        raise typer.Exit(code=1)


@command("order", on=chips)
def order_command(
    source: GraphSource,
    chips_file: ChipsFileOption = None,
    drop: DropOption = None,
    sink: SinkOption = None,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """The order of a configuration's class in the critical group."""
    from graphinv.chipfiring import configuration_order

    order = configuration_order(
        _configuration(_graph(source, input_format, sink), chips_file, drop)
    )
    if jsonl:
        _emit({"order": order})
    else:
        typer.echo(str(order))


@command("coords", on=chips)
def coords_command(
    source: GraphSource,
    chips_file: ChipsFileOption = None,
    drop: DropOption = None,
    sink: SinkOption = None,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Coordinates of a configuration in Z/d1 + ... + Z/dr (from the Smith form transforms)."""
    from graphinv.chipfiring import recurrent_group

    graph = _graph(source, input_format, sink)
    configuration = _configuration(graph, chips_file, drop)
    group = recurrent_group(graph)
    values = group.coordinates(configuration)
    if jsonl:
        _emit({"invariant_factors": list(group.invariant_factors), "coordinates": list(values)})
        return
    factors = abelian_group_text(group.invariant_factors)
    typer.echo(f"group: {factors}")
    typer.echo(f"coordinates: ({', '.join(str(v) for v in values)})")


@command("grid-identity", on=chips)
def grid_identity_command(
    n: Annotated[int, typer.Argument(help="Side of the square grid.", min=1, show_default=False)],
    png: Annotated[
        Path | None, typer.Option("--png", help="Write the picture to this PNG file.")
    ] = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """The identity of the n x n grid with its boundary wired to the sink, as text or PNG."""
    from graphinv.report.chipfiring_figures import identity_grid, save_identity_grid

    if png is not None:
        written = save_identity_grid(n, png)
        typer.echo(f"wrote {written}")
        return
    values = identity_grid(n)
    if jsonl:
        _emit({"rows": n, "columns": n, "identity": values})
        return
    for row in values:
        typer.echo("".join(str(v) for v in row))


@command("generators", on=chips)
def generators_command(
    source: GraphSource,
    sink: SinkOption = None,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Invariant factors d1 | ... | dr and one recurrent generator of order d_i for each."""
    from graphinv.chipfiring import recurrent_group

    group = recurrent_group(_graph(source, input_format, sink))
    if jsonl:
        _emit(group.to_record())
        return
    factors = abelian_group_text(group.invariant_factors)
    typer.echo(f"group: {factors}; order {group.order}")
    for d, generator in zip(group.invariant_factors, group.generators, strict=True):
        _print_configuration(generator, f"generator of order {d}:")


@command("recurrents", on=chips)
def recurrents_command(
    source: GraphSource,
    sink: SinkOption = None,
    limit: Annotated[
        int, typer.Option("--limit", help="Refuse groups with more recurrents than this.")
    ] = 100_000,
    superstable: Annotated[
        bool, typer.Option("--superstable", help="List the superstables (c_max - r) instead.")
    ] = False,
    input_format: FormatOption = None,
) -> None:
    """List every recurrent (or superstable) configuration, one JSON line each."""
    from graphinv.chipfiring import recurrent_configurations, superstable_configurations

    graph = _graph(source, input_format, sink)
    listing = superstable_configurations if superstable else recurrent_configurations
    for configuration in listing(graph, limit=limit):
        _emit(configuration.to_record())


@command("divisor", on=chips)
def divisor_command(
    source: GraphSource,
    put: Annotated[
        list[str] | None,
        typer.Option(
            "--put",
            "-p",
            help="VERTEX=VALUE (repeatable; values may be negative), e.g. --put 0=3 --put 2=-1.",
            show_default=False,
        ),
    ] = None,
    q: Annotated[
        str | None, typer.Option("--q", help="The vertex q of the q-reduced divisor.")
    ] = None,
    input_format: FormatOption = None,
    jsonl: JsonLinesOption = False,
) -> None:
    """Degree, genus, Baker-Norine rank, r(K - D) and the q-reduced form of a divisor."""
    from graphinv.chipfiring import ConfigurationError
    from graphinv.chipfiring.configurations import vertex_by_name
    from graphinv.divisors import (
        canonical_divisor,
        divisor_degree,
        divisor_rank,
        genus,
        reduced_divisor,
    )
    from graphinv.io import read_graph

    G = read_graph(source, format=input_format)
    D: dict[Any, int] = {}
    for item in put or []:
        name, equals, value = item.rpartition("=")
        if not equals or not name:
            raise ConfigurationError(f"--put expects VERTEX=VALUE, not {item!r}")
        try:
            number = int(value)
        except ValueError:
            raise ConfigurationError(
                f"--put {item!r}: the value must be an integer, not {value!r}"
            ) from None
        vertex = vertex_by_name(G, name)
        D[vertex] = D.get(vertex, 0) + number
    base = vertex_by_name(G, q) if q is not None else None
    K = canonical_divisor(G)
    complement = {v: K[v] - D.get(v, 0) for v in G}
    reduced = reduced_divisor(G, D, q=base)
    record = {
        "degree": divisor_degree(D),
        "genus": genus(G),
        "rank": divisor_rank(G, D),
        "rank_of_K_minus_D": divisor_rank(G, complement),
        "reduced": {str(v): n for v, n in reduced.items()},
    }
    if jsonl:
        _emit(record)
        return
    for key in ("degree", "genus", "rank", "rank_of_K_minus_D"):
        typer.echo(f"{key.replace('_', ' ')}: {record[key]}")
    where = base if base is not None else next(iter(G))
    typer.echo(f"{where}-reduced divisor: " + ", ".join(f"{v}:{n}" for v, n in reduced.items()))
