"""Malformed input lines become error rows with their line numbers; the batch goes on."""

from __future__ import annotations

import io
import sys

import pytest

from graphinv.batch.engine import run_batch
from graphinv.batch.export import export_records

# Lines of a graph6 stream (1-based line numbers in comments), encoded by the graph6 rules of
# B. D. McKay's formats.txt.
STREAM = (
    "\n".join(
        [
            ">>graph6<<Bw",  # 1: triangle, after the header
            "B!",  # 2: '!' is outside '?'..'~'
            "",  # 3: blank, not a graph
            "# a comment",  # 4: not a graph
            "Bg",  # 5: the path 0-1-2
            "C~~",  # 6: one character too many for 4 vertices
            "C~",  # 7: K_4
            "Cr",  # 8: 4-cycle
            "\x7f\x7f",  # 9: not printable graph6
            "Ch",  # 10: the path 0-1-2-3
        ]
    )
    + "\n"
)


@pytest.fixture
def stdin_stream(monkeypatch):
    monkeypatch.setattr(sys, "stdin", io.StringIO(STREAM))


def test_bad_lines_get_error_rows_and_good_lines_are_stored(tmp_path, stdin_stream, stored_rows):
    store = tmp_path / "bad.db"
    result = run_batch(["-"], store=store, workers=1, progress=False)
    assert (result.computed, result.failed) == (8, 3)
    rows = stored_rows(store)
    assert [(row["position"], row["line"]) for row in rows] == [
        (0, 1),
        (1, 2),
        (2, 5),
        (3, 6),
        (4, 7),
        (5, 8),
        (6, 9),
        (7, 10),
    ]
    by_line = {row["line"]: row for row in rows}
    assert sorted(by_line) == [1, 2, 5, 6, 7, 8, 9, 10]
    for line in (2, 6, 9):
        assert by_line[line]["error"].startswith(f"line {line}: malformed graph6")
        assert by_line[line]["critical_group"] is None
    # K(K_3) = Z3, K(K_4) = Z4^2 (Lorenzini 1991, memory), K(C_4) = Z4 (common fact),
    # paths are trees: trivial group, one spanning tree (common fact)
    assert (by_line[1]["critical_group"], by_line[1]["spanning_trees"]) == ("3", "3")
    assert (by_line[5]["critical_group"], by_line[5]["spanning_trees"]) == ("", "1")
    assert (by_line[7]["critical_group"], by_line[7]["spanning_trees"]) == ("4,4", "16")
    assert (by_line[8]["critical_group"], by_line[8]["spanning_trees"]) == ("4", "4")
    assert (by_line[10]["critical_group"], by_line[10]["spanning_trees"]) == ("", "1")


def test_positions_match_the_loader(tmp_path):
    from graphinv.io import iter_records

    path = tmp_path / "stream.g6"
    path.write_text(STREAM)
    run_batch([str(path)], store=tmp_path / "s.db", workers=1)
    expected = [(r.index, r.line) for r in iter_records(str(path))]
    assert [(r["index"], r["line"]) for r in export_records(tmp_path / "s.db")] == expected


def test_vertex_limit_gives_error_rows_and_retry_recomputes(tmp_path, stored_rows):
    store = tmp_path / "limit.db"
    run_batch(["complete:3..7"], store=store, workers=1, max_vertices=5)
    rows = stored_rows(store)
    assert [row["error"] for row in rows[3:]] == [
        "the graph has 6 vertices, over the limit of 5 (--max-vertices)",
        "the graph has 7 vertices, over the limit of 5 (--max-vertices)",
    ]
    assert run_batch(["complete:3..7"], store=store, workers=1).computed == 0
    retried = run_batch(["complete:3..7"], store=store, workers=1, retry_errors=True)
    assert (retried.computed, retried.skipped, retried.failed) == (2, 3, 0)
    # K(K_7) = Z7^5 (Lorenzini 1991, memory)
    assert stored_rows(store)[4]["critical_group"] == "7,7,7,7,7"
    assert stored_rows(store)[4]["error"] is None


def test_distinct_standard_input_streams_need_labels(tmp_path, monkeypatch, stored_rows):
    from graphinv.errors import StoreError

    store = tmp_path / "stdin.db"
    monkeypatch.setattr(sys, "stdin", io.StringIO("Bw\n"))
    run_batch(["-"], store=store, workers=1)
    monkeypatch.setattr(sys, "stdin", io.StringIO("C~\n"))
    with pytest.raises(StoreError, match="or --label"):
        run_batch(["-"], store=store, workers=1)
    monkeypatch.setattr(sys, "stdin", io.StringIO("C~\n"))
    run_batch(["-"], store=store, workers=1, label="k4")
    assert [row["source"] for row in stored_rows(store)] == ["stdin:default", "stdin:k4"]


def test_incremental_sparse6_lines_are_expanded_in_order(tmp_path, monkeypatch, stored_rows):
    # formats.txt (B. D. McKay): a ';' line lists the edges toggled from the graph of the line
    # before.  K_4 ("C~" in graph6), then toggling edge 2-3 gives the diamond K_4 - e, and
    # toggling it again K_4 back.  K(K_4) = Z4^2 with 16 spanning trees (Lorenzini 1991,
    # memory); the diamond's group is checked against python-flint's Smith form of its
    # Laplacian.  A ';' line with no graph before it is an error row; the batch goes on.
    import flint
    import networkx as nx

    from graphinv.io.graph6 import encode_sparse6, parse_sparse6

    toggle = ";" + encode_sparse6(4, [(2, 3)])[2:]  # the bit stream without ':' and N(4)
    stream = "\n".join([toggle, "C~", toggle, toggle]) + "\n"
    monkeypatch.setattr(sys, "stdin", io.StringIO(stream))
    store = tmp_path / "steps.db"
    result = run_batch(["-"], store=store, workers=1, progress=False)
    assert (result.computed, result.failed) == (4, 1)
    by_line = {row["line"]: row for row in stored_rows(store)}
    assert "needs the graph of the line before it" in by_line[1]["error"]
    diamond = nx.complete_graph(4)
    diamond.remove_edge(2, 3)
    L = nx.laplacian_matrix(diamond, nodelist=range(4)).toarray().tolist()
    S = flint.fmpz_mat(L).snf()
    expected = ",".join(str(int(S[i, i])) for i in range(4) if int(S[i, i]) > 1)
    assert (by_line[2]["critical_group"], by_line[2]["spanning_trees"]) == ("4,4", "16")
    assert (by_line[3]["critical_group"], by_line[3]["spanning_trees"]) == (expected, "8")
    assert (by_line[4]["critical_group"], by_line[4]["spanning_trees"]) == ("4,4", "16")
    # The stored key of an incremental line is the full sparse6 line of its graph.
    n, edges = parse_sparse6(by_line[3]["content"])
    assert (n, sorted(edges)) == (4, sorted(diamond.edges))
