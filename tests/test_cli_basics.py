"""The command-line shell itself."""

from __future__ import annotations

import subprocess
import sys

from graphinv.cli import app


def test_version_lists_back_ends(cli_runner):
    result = cli_runner.invoke(app, ["version"])
    assert result.exit_code == 0
    assert "python-flint" in result.output


def test_python_dash_m_works():
    done = subprocess.run(
        [sys.executable, "-m", "graphinv", "--help"], capture_output=True, text=True, check=False
    )
    assert done.returncode == 0
    assert "Usage" in done.stdout
