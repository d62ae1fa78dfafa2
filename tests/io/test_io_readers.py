"""Reading graphs: formats, names, standard input, streaming and every bad-input error."""

from __future__ import annotations

import gzip
import io
import sys
import tracemalloc
from pathlib import Path

import networkx as nx
import pytest

from graphinv.errors import GraphFormatError
from graphinv.io import (
    GraphRecord,
    iter_records,
    read_graph,
    read_graphs,
    to_graph6,
    to_sparse6,
)

SAMPLES = Path(__file__).resolve().parents[2] / "graphs" / "samples"


def write(tmp_path: Path, name: str, text: str) -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


# --- edge lists -------------------------------------------------------------------------------


def test_edge_list_separators_comments_labels_and_multiplicities(tmp_path):
    path = write(
        tmp_path,
        "net.txt",
        "# header comment\n\n"
        "a b\n"
        "b,c,2\n"
        "c\td  # trailing comment\n"
        "a b 3\n"  # repeated edge adds up: 1 + 3
        "7 8\n"
        "lonely\n",
    )
    G = read_graph(path)
    assert G.graph == {"name": "net", "source": str(path)}
    assert list(G) == ["a", "b", "c", "d", 7, 8, "lonely"]
    assert G["a"]["b"]["weight"] == 4
    assert G["b"]["c"]["weight"] == 2
    assert G["c"]["d"]["weight"] == 1
    assert G.degree("lonely") == 0
    assert isinstance(next(iter(G[7])), int)


def test_edge_list_loop_is_dropped_with_a_warning_naming_file_and_line(tmp_path):
    path = write(tmp_path, "loops.edges", "0 1\n1 1\n")
    with pytest.warns(UserWarning, match=r"loops\.edges, line 2"):
        G = read_graph(path)
    assert sorted(G.edges()) == [(0, 1)]
    assert 1 in G


@pytest.mark.parametrize(
    ("text", "line", "fragment"),
    [
        ("0 1\n1 2 x\n", 2, "'x'"),
        ("0 1 2.5\n", 1, "'2.5'"),
        ("0 1\n\n0 2 0\n", 3, "'0'"),
        ("0 1 -2\n", 1, "'-2'"),
        ("0 1 2 3\n", 1, "4 fields"),
    ],
)
def test_edge_list_bad_lines_name_file_and_line(tmp_path, text, line, fragment):
    path = write(tmp_path, "bad.txt", text)
    with pytest.raises(GraphFormatError) as caught:
        read_graph(path)
    message = str(caught.value)
    assert f"bad.txt, line {line}:" in message
    assert fragment in message
    assert "expected" in message
    assert caught.value.line == line and caught.value.source == str(path)


@pytest.mark.parametrize("name", ["empty.txt", "empty.g6", "empty.adj", "empty.graphml"])
def test_empty_file_says_no_graph_found(tmp_path, name):
    path = write(tmp_path, name, "# only a comment\n\n" if not name.endswith("graphml") else "")
    with pytest.raises(GraphFormatError, match=r"empty\.\w+: no graph found"):
        read_graph(path)


# --- adjacency matrices -----------------------------------------------------------------------


def test_adjacency_matrix_multiplicities(tmp_path):
    path = write(tmp_path, "m.adj", "# a multigraph\n0, 2, 1\n2, 0, 0\n1, 0, 0\n")
    G = read_graph(path)
    assert sorted(G.edges(data="weight")) == [(0, 1, 2), (0, 2, 1)]


@pytest.mark.parametrize(
    ("text", "line", "fragment"),
    [
        ("0 1 0\n1 0\n0 0 0\n", 2, "ragged"),
        ("0 1\n0 0\n", 2, "not symmetric"),
        ("0 -1\n-1 0\n", 1, "'-1'"),
        ("0 a\na 0\n", 1, "'a'"),
        ("0 1 1\n1 0 1\n", 2, "not square"),
    ],
)
def test_adjacency_matrix_errors_name_the_line(tmp_path, text, line, fragment):
    path = write(tmp_path, "bad.mat", text)
    with pytest.raises(GraphFormatError) as caught:
        read_graph(path)
    assert f"bad.mat, line {line}:" in str(caught.value)
    assert fragment in str(caught.value)


def test_adjacency_matrix_diagonal_dropped_with_warning(tmp_path):
    path = write(tmp_path, "loop.adj", "0 1\n1 2\n")
    with pytest.warns(UserWarning, match=r"loop\.adj, line 2"):
        G = read_graph(path)
    assert G.number_of_edges() == 1


def test_sample_files_load():
    G = read_graph(SAMPLES / "campus-fibre.edges")
    assert G["workshop"]["science-hall"]["weight"] == 3
    assert G.degree("boathouse") == 0
    assert nx.is_isomorphic(read_graph(SAMPLES / "k4.adj"), nx.complete_graph(4))
    names = [G.graph["name"] for G in read_graphs(SAMPLES / "small.g6")]
    assert names == [f"small#{i}" for i in range(5)]


# --- graph6 / sparse6 files -------------------------------------------------------------------


def test_graph6_file_names_lines_and_header(tmp_path):
    path = write(tmp_path, "two.g6", ">>graph6<<" + to_graph6(nx.petersen_graph()) + "\n\nBw\n")
    graphs = list(read_graphs(path))
    assert [G.graph["name"] for G in graphs] == ["two#0", "two#1"]
    assert [G.graph["line"] for G in graphs] == [1, 3]
    assert nx.is_isomorphic(graphs[0], nx.petersen_graph())


def test_incremental_sparse6_lines_build_on_the_line_before(tmp_path):
    # formats.txt's worked example ":Fa@x^" (edges 0-1 0-2 1-2 5-6 on 7 vertices); each ';'
    # line toggles those edges in the graph before it, a graph6 line included.
    text = ":Fa@x^\n;a@x^\n;a@x^\nF????\n;a@x^\n"
    graphs = list(read_graphs(write(tmp_path, "steps.s6", text)))
    sizes = [G.number_of_edges() for G in graphs]
    assert sizes == [4, 0, 4, 0, 4]
    assert sorted(graphs[2].edges) == [(0, 1), (0, 2), (1, 2), (5, 6)]
    assert [G.graph["line"] for G in graphs] == [1, 2, 3, 4, 5]


def test_incremental_sparse6_without_a_graph_before_is_an_error(tmp_path):
    path = write(tmp_path, "lonely.s6", ";a@x^\n:Fa@x^\n")
    graphs = read_graphs(path)
    with pytest.raises(GraphFormatError) as caught:
        next(graphs)
    assert "line 1" in str(caught.value) and "needs the graph of the line" in str(caught.value)


def test_single_graph6_is_named_by_stem(tmp_path):
    path = write(tmp_path, "pete.g6", to_graph6(nx.petersen_graph()) + "\n")
    assert read_graph(path).graph["name"] == "pete"


def test_malformed_graph6_line_raises_with_line_and_index(tmp_path):
    path = write(tmp_path, "mixed.g6", "Bw\nBw\nD!!\nBw\n")
    graphs = read_graphs(path)
    assert next(graphs).number_of_nodes() == 3
    assert next(graphs).number_of_nodes() == 3
    with pytest.raises(GraphFormatError) as caught:
        next(graphs)
    assert f"{path}, line 3, graph 2: malformed graph6" in str(caught.value)
    assert (caught.value.line, caught.value.graph_index) == (3, 2)


def test_graph6_wrong_length_is_reported(tmp_path):
    path = write(tmp_path, "short.g6", "Dhc\nDh\n")
    with pytest.raises(GraphFormatError, match=r"short\.g6, line 2, graph 1: .*expected 3"):
        list(read_graphs(path))


def test_iter_records_keeps_going_past_bad_lines(tmp_path):
    path = write(tmp_path, "mixed.g6", "Bw\nD!!\n:Bd\nDhc\n")
    records = list(iter_records(path))
    assert [r.index for r in records] == [0, 1, 2, 3]
    assert [r.line for r in records] == [1, 2, 3, 4]
    assert [r.error is None for r in records] == [True, False, True, True]
    bad = records[1]
    assert isinstance(bad, GraphRecord) and bad.graph is None
    assert "mixed.g6, line 2, graph 1" in bad.error
    assert records[2].graph is not None and records[2].graph.number_of_edges() == 2


def test_iter_records_raises_for_file_level_problems(tmp_path):
    with pytest.raises(GraphFormatError, match="no such file"):
        list(iter_records(tmp_path / "absent.g6"))
    with pytest.raises(GraphFormatError, match="unknown format 'pajek'"):
        list(iter_records(write(tmp_path, "x.txt", "0 1\n"), format="pajek"))


def test_iter_records_single_graph_error_becomes_a_record(tmp_path):
    path = write(tmp_path, "w.txt", "0 1\n0 2 nine\n")
    (record,) = list(iter_records(path))
    assert record.graph is None and record.line == 2
    assert "w.txt, line 2" in record.error


def test_sparse6_multiplicities_and_loops(tmp_path):
    G = nx.Graph()
    G.add_edge(0, 1, weight=3)
    G.add_edge(1, 2, weight=1)
    G.add_node(3)
    path = write(tmp_path, "m.s6", to_sparse6(G) + "\n")
    H = read_graph(path)
    assert sorted(H.edges(data="weight")) == [(0, 1, 3), (1, 2, 1)]
    assert H.number_of_nodes() == 4
    # networkx writes the loop; graphinv drops it and says where.
    loop = nx.MultiGraph([(0, 1), (2, 2)])
    path = tmp_path / "loop.s6"
    path.write_bytes(nx.to_sparse6_bytes(loop, header=False))
    with pytest.warns(UserWarning, match=r"loop\.s6, line 1: 1 loop"):
        H = read_graph(path)
    assert sorted(H.edges()) == [(0, 1)]


def test_gzip_file(tmp_path):
    path = tmp_path / "many.g6.gz"
    with gzip.open(path, "wt", encoding="ascii") as stream:
        stream.write("Bw\nCl\n")
    assert [G.number_of_nodes() for G in read_graphs(path)] == [3, 4]
    assert next(read_graphs(path)).graph["name"] == "many#0"


# --- standard input and sniffing ------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "sizes"),
    [
        (">>graph6<<Bw\nCl\n", [3, 4]),
        (":Bd\n", [3]),
        ("Bw\nCl\n", [3, 4]),
        ("# edges\na b\nb c 2\n", [3]),
    ],
)
def test_stdin_is_sniffed(monkeypatch, text, sizes):
    monkeypatch.setattr(sys, "stdin", io.StringIO(text))
    graphs = list(read_graphs("-"))
    assert [G.number_of_nodes() for G in graphs] == sizes
    assert all(G.graph["source"] == "<stdin>" for G in graphs)


def test_stdin_with_explicit_format_and_errors_name_stdin(monkeypatch):
    monkeypatch.setattr(sys, "stdin", io.StringIO("0 1\n1 0\n"))
    assert read_graph("-", format="matrix").number_of_edges() == 1
    monkeypatch.setattr(sys, "stdin", io.StringIO("a b c d\n"))
    with pytest.raises(GraphFormatError, match=r"^<stdin>, line 1: 4 fields"):
        read_graph("-")


def test_unknown_suffix_is_sniffed(tmp_path):
    path = write(tmp_path, "graphs.dat", "Bw\nCl\n")
    assert len(list(read_graphs(path))) == 2


# --- GraphML and GML --------------------------------------------------------------------------


def test_graphml_and_gml_round_trip_through_networkx(tmp_path):
    G = nx.MultiGraph([("x", "y"), ("x", "y"), ("y", "z")])
    G.add_node("w")
    nx.write_graphml(G, tmp_path / "g.graphml")
    H = read_graph(tmp_path / "g.graphml")
    assert H["x"]["y"]["weight"] == 2 and H.degree("w") == 0
    K = nx.Graph()
    K.add_edge(1, 2, weight=3)
    K.add_edge(2, 3)
    nx.write_gml(K, tmp_path / "k.gml")
    H = read_graph(tmp_path / "k.gml")
    assert sorted(H.edges(data="weight")) == [(1, 2, 3), (2, 3, 1)]


def test_graphml_fractional_weight_is_an_error(tmp_path):
    G = nx.Graph()
    G.add_edge("p", "q", weight=0.5)
    nx.write_graphml(G, tmp_path / "f.graphml")
    with pytest.raises(GraphFormatError, match=r"f\.graphml: edge .*positive integer"):
        read_graph(tmp_path / "f.graphml")


def test_broken_graphml_names_file_and_line(tmp_path):
    path = write(tmp_path, "broken.graphml", '<?xml version="1.0"?>\n<graphml>\n<graph>\n')
    with pytest.raises(GraphFormatError, match=r"broken\.graphml, line \d+: cannot read GraphML"):
        read_graph(path)


# --- read_graph counts, families as sources ---------------------------------------------------


def test_read_graph_names_the_count(tmp_path):
    path = write(tmp_path, "three.g6", "Bw\nBw\nBw\n")
    with pytest.raises(GraphFormatError, match="expected exactly one graph, found 3"):
        read_graph(path)
    with pytest.raises(GraphFormatError, match="found 2000"):
        read_graph("gnp:6,0.5,seed=1..2000")


def test_family_spec_as_source_and_missing_file():
    assert read_graph("hypercube:3").graph["name"] == "hypercube:3"
    with pytest.raises(GraphFormatError, match="no such file"):
        read_graph("graphs/not-there.txt")
    with pytest.raises(GraphFormatError, match="unknown graph family in 'blob:3'"):
        read_graph("blob:3")
    with pytest.raises(GraphFormatError, match=r"^runs:2024\.g6: no such file"):
        read_graph("runs:2024.g6")


# --- streaming --------------------------------------------------------------------------------


class _CountingLines(io.TextIOBase):
    """A text stream producing ``total`` graph6 lines on demand and counting what was read."""

    def __init__(self, total: int) -> None:
        self.total = total
        self.served = 0
        self.name = "<generated>"

    def readable(self) -> bool:
        return True

    def __iter__(self):
        return self

    def __next__(self) -> str:
        if self.served >= self.total:
            raise StopIteration
        self.served += 1
        return "IheA@GUAo\n"


def test_reading_the_first_graph_does_not_read_the_whole_stream():
    stream = _CountingLines(10**7)
    graphs = read_graphs(stream, format="graph6")
    first = next(graphs)
    assert nx.is_isomorphic(first, nx.petersen_graph())
    # one line for the graph, one looked ahead to decide between 'stem' and 'stem#0'
    assert stream.served == 2


def test_large_graph6_file_streams_in_small_memory(tmp_path):
    path = tmp_path / "big.g6"
    with open(path, "w", encoding="ascii") as out:
        out.writelines("IheA@GUAo\n" for _ in range(200_000))
    tracemalloc.start()
    try:
        graphs = read_graphs(path)
        for _ in range(1000):
            next(graphs)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    # The file is 2 MB; decoding 1000 of its lines must not have pulled it all in.
    assert peak < 1_000_000


def test_byte_order_mark_and_windows_line_ends(tmp_path):
    path = tmp_path / "excel.csv"
    path.write_bytes("\ufeffnorth,south\r\nsouth,east,2\r\n".encode())
    G = read_graph(path)
    assert list(G) == ["north", "south", "east"]
    assert G["south"]["east"]["weight"] == 2


def test_undecodable_bytes_name_the_line(tmp_path):
    path = tmp_path / "latin.txt"
    path.write_bytes(b"a b\n" * 5000 + b"\xe9t\xe9 c\n")
    with pytest.raises(
        GraphFormatError, match=r"latin\.txt, line 5001: the bytes b'\\xe9' are not UTF-8"
    ):
        read_graph(path)


def test_directed_graphml_is_read_undirected_with_a_warning(tmp_path):
    D = nx.DiGraph([("a", "b"), ("b", "a"), ("b", "c")])
    nx.write_graphml(D, tmp_path / "d.graphml")
    with pytest.warns(UserWarning, match=r"d\.graphml: directed graph read as undirected"):
        G = read_graph(tmp_path / "d.graphml")
    # the antiparallel pair a->b, b->a is one undirected edge, not a double edge
    assert sorted(G.edges(data="weight")) == [("a", "b", 1), ("b", "c", 1)]


def test_integer_labels_in_graphml_become_ints(tmp_path):
    nx.write_graphml(nx.path_graph(3), tmp_path / "p.graphml")
    assert sorted(read_graph(tmp_path / "p.graphml")) == [0, 1, 2]


def test_source_problems_are_reported_before_iteration(tmp_path):
    with pytest.raises(GraphFormatError, match="no such file"):
        read_graphs(tmp_path / "absent.txt")
    with pytest.raises(GraphFormatError, match="is a directory"):
        iter_records(tmp_path)
    with pytest.raises(GraphFormatError, match="unknown graph family"):
        read_graphs("blob:4")
    with pytest.raises(GraphFormatError, match="unknown format"):
        read_graphs("cycle:4", format="dot")


@pytest.mark.parametrize(
    "header", ["source,target", "Source,Target,Weight", "from to", "node1\tnode2\tcount"]
)
def test_edge_list_header_row_is_skipped(tmp_path, header):
    # Column-name rows of CSV exports (common practice); a later row of the same words, or a
    # first row with a real label, stays an edge.
    path = tmp_path / "links.csv"
    path.write_text(f"{header}\nhall,lab\nlab,gym\n")
    G = read_graph(path)
    assert sorted(G, key=str) == ["gym", "hall", "lab"]
    path.write_text("source,hall\nhall,lab\n")
    assert "source" in read_graph(path)
