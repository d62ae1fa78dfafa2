"""Write, read back, compare: edge lists, graph6, sparse6 and adjacency-matrix text."""

from __future__ import annotations

import io
import random

import networkx as nx
import pytest

from graphinv.errors import GraphFormatError, InvalidGraphError
from graphinv.io import (
    convert_graphs,
    family_graphs,
    read_graph,
    read_graphs,
    write_adjacency_matrix,
    write_edgelist,
    write_graph6,
    write_sparse6,
)


def _random_multigraph(seed: int, n: int = 12) -> nx.Graph:
    rng = random.Random(seed)
    G = nx.Graph()
    G.add_nodes_from(range(n))
    for _ in range(2 * n):
        u, v = rng.sample(range(n), 2)
        G.add_edge(u, v, weight=G[u][v]["weight"] + 1 if G.has_edge(u, v) else 1)
    return G


def _same_multigraph(G: nx.Graph, H: nx.Graph) -> bool:
    """Isomorphic with equal multiplicities (networkx isomorphism with an edge matcher)."""
    return nx.is_isomorphic(G, H, edge_match=lambda a, b: a.get("weight", 1) == b.get("weight", 1))


@pytest.mark.parametrize("seed", range(5))
def test_edge_list_round_trip_keeps_labels_and_multiplicities(tmp_path, seed):
    G = _random_multigraph(seed)
    G = nx.relabel_nodes(G, {v: f"site-{v}" if v % 2 else v for v in G})
    G.add_node("spare")
    path = tmp_path / "g.edges"
    write_edgelist(G, path)
    H = read_graph(path)
    assert set(H) == set(G)
    assert {frozenset((u, v)): m for u, v, m in H.edges(data="weight")} == {
        frozenset((u, v)): m for u, v, m in G.edges(data="weight")
    }


def test_edge_list_writer_refuses_unsafe_labels():
    with pytest.raises(InvalidGraphError, match="cannot be written"):
        write_edgelist(nx.Graph([("a b", "c")]), io.StringIO())


@pytest.mark.parametrize("seed", range(5))
def test_sparse6_round_trip_keeps_multiplicities(tmp_path, seed):
    graphs = [_random_multigraph(seed * 10 + i, n=5 + 3 * i) for i in range(4)]
    path = tmp_path / "m.s6"
    assert write_sparse6(graphs, path) == 4
    back = list(read_graphs(path))
    assert all(_same_multigraph(G, H) for G, H in zip(graphs, back, strict=True))


def test_graph6_round_trip_of_families(tmp_path):
    graphs = [*family_graphs("petersen:5..9,1..2"), nx.empty_graph(0)]
    path = tmp_path / "f.g6"
    write_graph6(graphs, path)
    back = list(read_graphs(path))
    assert len(back) == len(graphs)
    assert all(nx.is_isomorphic(G, H) for G, H in zip(graphs, back, strict=True))


def test_adjacency_matrix_round_trip():
    G = _random_multigraph(3)
    out = io.StringIO()
    order = write_adjacency_matrix(G, out)
    out.seek(0)
    H = read_graph(out, format="matrix")
    assert order == list(G)
    assert _same_multigraph(G, H)


def test_convert_family_to_graph6_file_and_back(tmp_path):
    target = tmp_path / "grids.g6"
    assert convert_graphs("grid:2..5", to="graph6", target=target) == 4
    sizes = [G.number_of_nodes() for G in read_graphs(target)]
    assert sizes == [4, 9, 16, 25]


def test_convert_to_edges_needs_one_graph(tmp_path):
    out = io.StringIO()
    assert convert_graphs("wheel:4", to="edges", target=out) == 1
    assert out.getvalue().startswith("# wheel:4: 5 vertices, 8 edges")
    with pytest.raises(GraphFormatError, match="holds several"):
        convert_graphs("wheel:4..5", to="edges", target=io.StringIO())
    with pytest.raises(GraphFormatError, match="unknown output format"):
        convert_graphs("wheel:4", to="dot", target=io.StringIO())


def test_convert_multigraph_to_graph6_is_refused():
    with pytest.raises(InvalidGraphError, match="use sparse6"):
        convert_graphs(io.StringIO("a b 2\n"), to="graph6", target=io.StringIO(), format="edges")
