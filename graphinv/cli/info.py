"""``graphinv version``: what is installed."""

from __future__ import annotations

import typer

from graphinv.cli._app import command


@command("version")
def version() -> None:
    """Print the graphinv version and the versions of the exact-arithmetic back ends."""
    from importlib.metadata import version as package_version

    for name in ("graphinv", "python-flint", "networkx", "sympy", "numpy", "scipy"):
        try:
            typer.echo(f"{name} {package_version(name)}")
        except Exception:  # pragma: no cover - a missing optional package
            typer.echo(f"{name} (not installed)")
