"""The typer application and the pieces every command module shares.

Each command is a thin wrapper over one keyword-only function of the library.  Library errors
(:class:`graphinv.errors.GraphInvError`) and unreadable files become one line on standard error
and exit status 2, never a traceback.
"""

from __future__ import annotations

import functools
import sys
from collections.abc import Callable
from typing import Annotated, Any, TypeVar

import typer

from graphinv.errors import GraphInvError

__all__ = ["FormatOption", "GraphSource", "JsonLinesOption", "app", "command", "fail"]

app = typer.Typer(
    name="graphinv",
    help="Exact graph invariants from Laplacian normal forms: critical groups, spanning trees, "
    "spectra, cospectral classes and chip-firing.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
)

F = TypeVar("F", bound=Callable[..., Any])

GraphSource = Annotated[
    str,
    typer.Argument(
        help="A graph file (edge list, graph6, sparse6, GraphML, GML, adjacency matrix), "
        "'-' for standard input, or a family spec such as grid:30x30.",
        show_default=False,
    ),
]
FormatOption = Annotated[
    str | None,
    typer.Option(
        "--format",
        "-f",
        help="Input format when the file suffix does not tell: edges, graph6, sparse6, "
        "graphml, gml, matrix.",
    ),
]
JsonLinesOption = Annotated[
    bool,
    typer.Option(
        "--jsonl", help="Write JSON Lines (big integers as decimal strings) instead of a table."
    ),
]


def fail(message: str) -> typer.Exit:
    """Print ``error: message`` on standard error and return the exit to raise."""
    typer.echo(f"error: {message}", err=True)
    return typer.Exit(code=2)


def command(name: str, *, on: typer.Typer | None = None, **kwargs: Any) -> Callable[[F], F]:
    """Register a command that turns library errors into one clean line.

    Parameters
    ----------
    name : str
        The command name.
    on : typer.Typer, optional
        A command group made with ``typer.Typer()`` and added with ``app.add_typer``;
        default the top-level :data:`app`.
    """

    def decorate(function: F) -> F:
        @functools.wraps(function)
        def wrapper(*args: Any, **inner: Any) -> Any:
            try:
                return function(*args, **inner)
            except GraphInvError as exc:
                raise fail(str(exc)) from None
            except FileNotFoundError as exc:
                raise fail(f"{exc.filename}: no such file") from None
            except (IsADirectoryError, PermissionError) as exc:
                raise fail(f"{exc.filename}: {exc.strerror}") from None
            except KeyboardInterrupt:
                typer.echo("interrupted", err=True)
                sys.exit(130)

        (on if on is not None else app).command(name, **kwargs)(wrapper)
        return function

    return decorate


@app.callback()
def _root() -> None:
    """Exact graph invariants from Laplacian normal forms."""
