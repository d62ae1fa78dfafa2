"""The convert, matrix and families commands."""

from __future__ import annotations

import io
import json
from pathlib import Path

import networkx as nx

from graphinv.cli import app
from graphinv.io import read_graphs

SAMPLES = Path(__file__).resolve().parents[2] / "graphs" / "samples"


def test_convert_family_to_graph6_on_stdout(cli_runner):
    result = cli_runner.invoke(app, ["convert", "cycle:3..5", "--to", "graph6"])
    assert result.exit_code == 0
    # networkx as reference encoder for the same graphs
    expected = [
        nx.to_graph6_bytes(nx.cycle_graph(n), header=False).decode().strip() for n in (3, 4, 5)
    ]
    assert result.stdout.split() == expected


def test_convert_to_file_reports_count(cli_runner, tmp_path):
    target = tmp_path / "gp.s6"
    result = cli_runner.invoke(
        app, ["convert", "petersen:5..6,1..2", "-t", "sparse6", "-o", str(target)]
    )
    assert result.exit_code == 0
    assert "wrote 4 graphs" in result.stderr
    graphs = list(read_graphs(target))
    assert nx.is_isomorphic(graphs[1], nx.petersen_graph())


def test_convert_stdin_edges_to_sparse6_keeps_multiplicity(cli_runner):
    result = cli_runner.invoke(app, ["convert", "-", "--to", "sparse6"], input="a b 2\nb c\n")
    assert result.exit_code == 0
    (G,) = read_graphs(io.StringIO(result.stdout), format="sparse6")
    assert sorted(w for _, _, w in G.edges(data="weight")) == [1, 2]


def test_convert_errors_are_one_line(cli_runner, tmp_path):
    bad = tmp_path / "bad.txt"
    bad.write_text("0 1\n1 2 -3\n", encoding="utf-8")
    result = cli_runner.invoke(app, ["convert", str(bad), "--to", "graph6"])
    assert result.exit_code == 2
    assert result.stderr.strip() == (
        f"error: {bad}, line 2: bad multiplicity '-3' in the third column; "
        "expected a positive integer (the number of parallel edges)"
    )
    assert "Traceback" not in result.output
    result = cli_runner.invoke(app, ["convert", "a b 2", "--to", "graph6"])
    assert result.exit_code == 2 and "no such file" in result.stderr
    result = cli_runner.invoke(app, ["convert", "wheel:1", "--to", "graph6"])
    assert result.exit_code == 2
    assert "family 'wheel' expects 1 parameter N >= 3, got 'wheel:1'" in result.stderr


def test_convert_multigraph_to_graph6_suggests_sparse6(cli_runner):
    result = cli_runner.invoke(
        app, ["convert", str(SAMPLES / "campus-fibre.edges"), "--to", "graph6"]
    )
    assert result.exit_code == 2
    assert "use sparse6" in result.stderr and "Traceback" not in result.output


def test_matrix_table_shows_vertex_order(cli_runner):
    result = cli_runner.invoke(app, ["matrix", "path:3"])
    assert result.exit_code == 0
    lines = result.stdout.splitlines()
    assert lines[0] == "path:3: laplacian matrix, 3 x 3"
    assert lines[1] == "  vertex order: 0, 1, 2"
    # L(P_3) = D - A (common fact)
    assert [line.split()[1:] for line in lines[3:]] == [
        ["1", "-1", "0"],
        ["-1", "2", "-1"],
        ["0", "-1", "1"],
    ]


def test_matrix_jsonl_reduced_laplacian(cli_runner):
    result = cli_runner.invoke(app, ["matrix", "cycle:4", "--kind", "reduced", "--jsonl"])
    assert result.exit_code == 0
    record = json.loads(result.stdout)
    assert record["removed"] == [0] and record["row_labels"] == [1, 2, 3]
    dense = [[0] * 3 for _ in range(3)]
    for i, j, value in record["entries"]:
        dense[i][j] = value
    assert dense == [[2, -1, 0], [-1, 2, -1], [0, -1, 2]]


def test_matrix_incidence_and_sparse_listing(cli_runner):
    result = cli_runner.invoke(app, ["matrix", "path:3", "-k", "incidence"])
    assert "columns (edges u-v, oriented u -> v): 0-1, 1-2" in result.stdout
    result = cli_runner.invoke(app, ["matrix", "complete:3", "-k", "adjacency", "--sparse"])
    assert result.exit_code == 0
    assert result.stdout.splitlines()[2].split() == ["row", "column", "value"]
    assert len(result.stdout.splitlines()) == 3 + 6


def test_matrix_of_a_disconnected_graph_distance_fails_cleanly(cli_runner):
    result = cli_runner.invoke(
        app, ["matrix", str(SAMPLES / "campus-fibre.edges"), "-k", "distance"]
    )
    assert result.exit_code == 2
    assert result.stderr.startswith("error: the distance matrix needs a connected graph")


def test_matrix_unknown_kind_is_a_usage_error(cli_runner):
    result = cli_runner.invoke(app, ["matrix", "cycle:3", "--kind", "weird"])
    assert result.exit_code == 2


def test_families_lists_every_family(cli_runner):
    from graphinv.io import family_names

    result = cli_runner.invoke(app, ["families"])
    assert result.exit_code == 0
    assert "petersen:N,K" in result.stdout and "petersen:5,2" in result.stdout
    listed = {
        line.split(":")[0] for line in result.stdout.splitlines()[1:] if ":" in line.split(" ")[0]
    }
    assert listed == set(family_names())
