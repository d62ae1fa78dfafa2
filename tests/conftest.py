"""Shared test fixtures: a fixed terminal width and a CLI runner."""

from __future__ import annotations

import os

import pytest

os.environ.setdefault("COLUMNS", "100")
os.environ.setdefault("TERM", "dumb")


@pytest.fixture
def cli_runner():
    """A typer CliRunner with a fixed terminal width."""
    from typer.testing import CliRunner

    return CliRunner(env={"COLUMNS": "100", "NO_COLOR": "1", "TERM": "dumb"})
