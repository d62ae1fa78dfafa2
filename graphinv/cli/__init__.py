"""The ``graphinv`` command line: a thin layer over the Python API.

Each topic module registers its commands on the one typer app; run ``graphinv --help``.
"""

from __future__ import annotations

from graphinv.cli import batch as _batch  # noqa: F401  (registers commands)
from graphinv.cli import chips as _chips  # noqa: F401  (registers commands)
from graphinv.cli import groups as _groups  # noqa: F401  (registers commands)
from graphinv.cli import info as _info  # noqa: F401  (registers commands)
from graphinv.cli import load as _load  # noqa: F401  (registers commands)
from graphinv.cli import report as _report  # noqa: F401  (registers commands)
from graphinv.cli import spectra as _spectra  # noqa: F401  (registers commands)
from graphinv.cli._app import app

__all__ = ["app", "main"]


def main() -> None:
    """Entry point of the ``graphinv`` console script and ``python -m graphinv``."""
    app()
