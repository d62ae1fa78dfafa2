"""``graphinv chips ...`` commands."""

from __future__ import annotations

import json

from graphinv.cli import app


def test_help_lists_the_commands(cli_runner):
    result = cli_runner.invoke(app, ["chips", "--help"])
    assert result.exit_code == 0
    for name in ("stabilize", "identity", "is-recurrent", "order", "coords", "grid-identity"):
        assert name in result.output


def test_grid_identity_text_matches_published(cli_runner):
    # reference README (OEIS A007341 comments): the 3 x 3 identity
    result = cli_runner.invoke(app, ["chips", "grid-identity", "3"])
    assert result.exit_code == 0
    assert result.output.split() == ["212", "101", "212"]


def test_grid_identity_png(cli_runner, tmp_path):
    target = tmp_path / "identity_grid_6.png"
    result = cli_runner.invoke(app, ["chips", "grid-identity", "6", "--png", str(target)])
    assert result.exit_code == 0
    assert target.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_stabilize_with_drop_and_file(cli_runner, tmp_path):
    chips = tmp_path / "chips.txt"
    chips.write_text("# two chips on vertex 1\n1 2\n", encoding="utf-8")
    result = cli_runner.invoke(
        app, ["chips", "stabilize", "path:4", "--chips", str(chips), "--drop", "3=5", "--jsonl"]
    )
    assert result.exit_code == 0, result.output
    record = json.loads(result.output)
    # path 0-1-2-3 with sink 0: stabilizing is exact; the result is stable and has fewer chips
    assert all(record["chips"][v] < d for v, d in (("1", 2), ("2", 2), ("3", 1)))
    assert record["topplings"] == sum(record["firings"].values())


def test_identity_coords_order_and_recurrence(cli_runner):
    result = cli_runner.invoke(app, ["chips", "identity", "complete:4", "--jsonl"])
    assert result.exit_code == 0
    # K4: L~ (1,1,1) = (1,1,1), so c_max = (2,2,2) is equivalent to 0 and is the identity
    assert json.loads(result.output)["chips"] == {"1": 2, "2": 2, "3": 2}
    result = cli_runner.invoke(app, ["chips", "coords", "complete:4", "--drop", "1=1"])
    assert result.exit_code == 0 and "Z/4 ⊕ Z/4" in result.output
    result = cli_runner.invoke(app, ["chips", "order", "cycle:6", "--drop", "3=1"])
    assert result.output.strip() == "2"
    result = cli_runner.invoke(app, ["chips", "is-recurrent", "cycle:4", "--drop", "1=1"])
    assert result.exit_code == 1 and "recurrent: no" in result.output
    result = cli_runner.invoke(
        app, ["chips", "is-recurrent", "cycle:4", "--drop", "1=1", "--drop", "2=1", "--drop", "3=1"]
    )
    assert result.exit_code == 0 and "recurrent: yes" in result.output


def test_bad_input_is_one_line(cli_runner, tmp_path):
    cases = [
        (["chips", "stabilize", "cycle:4", "--drop", "9=1"], "unknown vertex '9'"),
        (["chips", "stabilize", "cycle:4"], "give a configuration"),
        (["chips", "stabilize", "cycle:4", "--drop", "1=-2"], "must not be negative"),
        (["chips", "stabilize", "cycle:4", "--drop", "0=1"], "is the sink"),
        (["chips", "identity", "cycle:4", "--sink", "7"], "unknown vertex '7'"),
    ]
    for arguments, message in cases:
        result = cli_runner.invoke(app, arguments)
        assert result.exit_code == 2, arguments
        assert message in result.output
        assert "Traceback" not in result.output
    bad = tmp_path / "bad.txt"
    bad.write_text("1 2\n2 x\n", encoding="utf-8")
    result = cli_runner.invoke(app, ["chips", "stabilize", "cycle:4", "--chips", str(bad)])
    assert result.exit_code == 2
    assert f"{bad}, line 2: chip count must be an integer" in result.output


def test_generators_and_recurrents(cli_runner):
    result = cli_runner.invoke(app, ["chips", "generators", "wheel:4"])
    # Biggs 1999 (memory): W4 has critical group Z/3 + Z/15
    assert result.exit_code == 0 and "Z/3 ⊕ Z/15; order 45" in result.output
    result = cli_runner.invoke(app, ["chips", "recurrents", "wheel:4"])
    # OEIS A004146: the wheel with 4 spokes has 45 spanning trees
    assert result.exit_code == 0 and len(result.output.splitlines()) == 45
    result = cli_runner.invoke(app, ["chips", "recurrents", "wheel:4", "--limit", "10"])
    assert result.exit_code == 2 and "more than 10 recurrent configurations" in result.output


def test_divisor_command(cli_runner):
    # Baker-Norine 2007: on K4 (genus 3) the canonical divisor (1,1,1,1) has rank g - 1 = 2
    arguments = ["chips", "divisor", "complete:4", "--jsonl"]
    for v in range(4):
        arguments += ["--put", f"{v}=1"]
    result = cli_runner.invoke(app, arguments)
    assert result.exit_code == 0, result.output
    record = json.loads(result.output)
    assert (record["degree"], record["genus"], record["rank"]) == (4, 3, 2)
    assert record["rank_of_K_minus_D"] == 0  # Riemann-Roch: 2 - r(0) = 4 + 1 - 3
    result = cli_runner.invoke(
        app, ["chips", "divisor", "cycle:5", "--put", "0=1", "--put", "2=-1"]
    )
    assert result.exit_code == 0 and "rank: -1" in result.output
    result = cli_runner.invoke(app, ["chips", "divisor", "cycle:5", "--put", "0=x"])
    assert result.exit_code == 2 and "must be an integer" in result.output
