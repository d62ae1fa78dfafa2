"""The show, report, demo and figures commands."""

from __future__ import annotations

import json
import shutil

from graphinv.cli import app
from graphinv.report.demo import default_demo_data


def test_show_one_graph(cli_runner):
    result = cli_runner.invoke(app, ["show", "wheel:5"])
    assert result.exit_code == 0, result.output
    # W5: Z11 ⊕ Z11 (Biggs 1999, memory); 121 spanning trees (OEIS A004146).
    assert "Z/11 ⊕ Z/11" in result.output and "121" in result.output
    assert "algebraic connectivity" in result.output


def test_show_many_graphs_as_a_table_and_as_json_lines(cli_runner):
    table = cli_runner.invoke(app, ["show", "grid:2..4", "--no-spectra"])
    assert table.exit_code == 0, table.output
    assert "100352" in table.output  # OEIS A007341, 4 x 4 grid
    lines = cli_runner.invoke(app, ["show", "grid:2..4", "--jsonl", "--no-spectra"])
    records = [json.loads(line) for line in lines.output.splitlines()]
    assert [r["spanning_trees"] for r in records] == ["4", "192", "100352"]  # OEIS A007341


def test_show_bad_source_is_one_line(cli_runner, tmp_path):
    bad = tmp_path / "bad.txt"
    bad.write_text("a b\nb c -2\n", encoding="utf-8")
    result = cli_runner.invoke(app, ["show", str(bad)])
    assert result.exit_code == 2
    assert result.output.count("\n") == 1 and "line 2" in result.output
    assert "Traceback" not in result.output


def test_report_command(cli_runner, tmp_path):
    target = tmp_path / "petersen.html"
    result = cli_runner.invoke(app, ["report", "petersen:5,2", "-o", str(target)])
    assert result.exit_code == 0, result.output
    assert "graph report" in result.output
    assert "Z/2 ⊕ (Z/10)^3" in target.read_text(encoding="utf-8")  # Petersen (common fact)


def test_demo_command(cli_runner, tmp_path):
    # The full demo runs in test_report_demo.py; here a few of its files exercise the command.
    data = tmp_path / "data"
    data.mkdir()
    bundled = default_demo_data()
    for name in ("ring.txt", "hub-a.txt", "hub-b.txt"):
        shutil.copy(bundled / name, data / name)
    plans = (bundled / "mesh-family.g6").read_text(encoding="utf-8").splitlines()[:5]
    (data / "mesh-family.g6").write_text("\n".join(plans) + "\n", encoding="utf-8")
    out = tmp_path / "demo"
    result = cli_runner.invoke(app, ["demo", "--out", str(out), "--data", str(data)])
    assert result.exit_code == 0, result.output
    text = " ".join(result.output.split())
    assert "hub-a and hub-b share their Laplacian spectrum" in text
    assert "their critical groups are the same" in text
    assert "not an engineering sign-off" in text
    assert "report.html" in text
    assert (out / "report.html").exists() and (out / "designs.jsonl").exists()


def test_demo_without_data_is_one_line(cli_runner, tmp_path):
    result = cli_runner.invoke(app, ["demo", "--out", str(tmp_path / "o"), "--data", str(tmp_path)])
    assert result.exit_code == 2
    assert "no design files" in result.output


def test_figures_command(cli_runner, tmp_path):
    result = cli_runner.invoke(app, ["figures", "--out", str(tmp_path), "--only", "demo-designs"])
    assert result.exit_code == 0, result.output
    assert (tmp_path / "demo-designs.png").stat().st_size < 200_000
    unknown = cli_runner.invoke(app, ["figures", "--out", str(tmp_path), "--only", "nothing"])
    assert unknown.exit_code == 2 and "unknown figure" in unknown.output


def test_draw_command(cli_runner, tmp_path):
    target = tmp_path / "hub.svg"
    star = str(default_demo_data() / "star-of-rings.txt")
    result = cli_runner.invoke(
        app,
        ["draw", star, "-o", str(target), "-c", "generator",
         "-s", "core-a", "-g", "4"],
    )
    assert result.exit_code == 0, result.output
    assert "<svg" in target.read_text(encoding="utf-8")
    # (Z/4)^4 has four generators (sum over the four 4-cycle blocks; common fact), not five.
    too_far = cli_runner.invoke(
        app, ["draw", star, "-o", str(target), "-c", "generator", "-g", "5"]
    )
    assert too_far.exit_code == 2 and "4 generator(s)" in too_far.output
    bad = cli_runner.invoke(app, ["draw", "wheel:5", "-o", str(tmp_path / "w.pdf")])
    assert bad.exit_code == 2 and ".png or .svg" in bad.output
    no_sink = cli_runner.invoke(app, ["draw", "wheel:5", "-o", str(target), "-c", "identity", "-s", "x"])
    assert no_sink.exit_code == 2 and "not a vertex" in no_sink.output
