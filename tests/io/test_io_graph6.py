"""The graph6/sparse6 codec against networkx (a reference implementation of the open format)."""

from __future__ import annotations

import random

import networkx as nx
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from graphinv.errors import GraphFormatError, InvalidGraphError
from graphinv.io.graph6 import (
    encode_graph6,
    encode_sparse6,
    from_graph6,
    from_sparse6,
    parse_graph6,
    parse_sparse6,
    to_graph6,
    to_sparse6,
)

# Sizes around the boundaries of the size field (62/63 vertices) and of the sparse6 padding
# rule (n = 2, 4, 8, 16), as described in McKay's formats.txt.
SIZES = [0, 1, 2, 3, 4, 5, 7, 8, 9, 15, 16, 17, 31, 32, 62, 63, 64, 100]


def _random_graph(rng: random.Random, n: int) -> nx.Graph:
    G = nx.gnp_random_graph(n, rng.choice([0.05, 0.2, 0.5, 0.9]), seed=rng.randrange(10**9))
    return G


@pytest.mark.parametrize("n", SIZES)
def test_graph6_agrees_with_networkx(n):
    rng = random.Random(1000 + n)
    for _ in range(5):
        G = _random_graph(rng, n)
        reference = nx.to_graph6_bytes(G, header=False).decode().strip()
        assert to_graph6(G) == reference  # networkx as reference implementation
        size, edges = parse_graph6(reference)
        assert size == n
        assert sorted(edges) == sorted(tuple(sorted(e)) for e in G.edges())


@pytest.mark.parametrize("n", SIZES[1:])
def test_sparse6_agrees_with_networkx(n):
    rng = random.Random(2000 + n)
    for _ in range(5):
        G = _random_graph(rng, n)
        reference = nx.to_sparse6_bytes(G, header=False).decode().strip()
        if n not in (2, 4, 8, 16):
            assert to_sparse6(G) == reference  # networkx as reference implementation
        # For n = 2**k <= 16 networkx inserts formats.txt's extra 0 padding bit whenever the
        # last vertex has no edge; formats.txt (and graphinv) only when the last edge ends at
        # n - 2.  Both decode to the same graph, which is what matters:
        assert parse_sparse6(to_sparse6(G)) == parse_sparse6(reference)
        assert sorted(parse_sparse6(reference)[1]) == sorted(tuple(sorted(e)) for e in G.edges())
        back = nx.from_sparse6_bytes(to_sparse6(G).encode())
        assert set(map(frozenset, back.edges())) == set(map(frozenset, G.edges()))
        assert back.number_of_nodes() == n


def test_sparse6_multigraph_agrees_with_networkx_decoder():
    rng = random.Random(7)
    for n in (2, 4, 8, 16, 30):
        edges = [tuple(sorted(rng.sample(range(n), 2))) for _ in range(3 * n)]
        text = encode_sparse6(n, edges)
        reference = nx.from_sparse6_bytes(text.encode())  # a MultiGraph in networkx
        assert sorted(tuple(sorted(e)) for e in reference.edges()) == sorted(edges)
        assert sorted(parse_sparse6(text)[1]) == sorted(edges)


def test_formats_txt_worked_example():
    # formats.txt works through the sparse6 encoding of a 7-vertex graph with edges
    # 0-1 0-2 1-2 5-6, giving ":Fa@x^" (B. D. McKay, formats.txt).
    assert encode_sparse6(7, [(0, 1), (0, 2), (1, 2), (5, 6)]) == ":Fa@x^"
    assert parse_sparse6(":Fa@x^") == (7, [(0, 1), (0, 2), (1, 2), (5, 6)])


def test_large_vertex_counts_use_long_size_fields():
    # n = 63 and above use '~' plus three characters; above 258047 '~~' plus six.
    assert encode_graph6(63, [])[:4] == "~??~"
    assert parse_graph6(encode_graph6(300, [(0, 299)])) == (300, [(0, 299)])
    text = encode_sparse6(300000, [(0, 299999), (5, 6)])
    assert text.startswith(":~~")
    assert parse_sparse6(text) == (300000, [(5, 6), (0, 299999)])


@pytest.mark.slow
def test_long_size_field_agrees_with_networkx():
    text = encode_sparse6(300000, [(0, 299999), (5, 6)])
    assert nx.from_sparse6_bytes(text.encode()).number_of_edges() == 2  # networkx as reference


@settings(max_examples=60, deadline=None)
@given(
    st.integers(min_value=1, max_value=40).flatmap(
        lambda n: st.tuples(
            st.just(n),
            st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)), max_size=60),
        )
    )
)
def test_sparse6_round_trip_keeps_multiedges_and_loops(case):
    n, edges = case
    normal = sorted(tuple(sorted(e)) for e in edges)
    assert sorted(parse_sparse6(encode_sparse6(n, edges))[1]) == normal


@settings(max_examples=60, deadline=None)
@given(st.integers(min_value=0, max_value=70), st.randoms(use_true_random=False))
def test_graph6_round_trip(n, rng):
    G = _random_graph(rng, n)
    H = from_graph6(to_graph6(G))
    assert list(H) == list(range(n))
    assert set(map(frozenset, H.edges())) == set(map(frozenset, G.edges()))


def test_from_functions_set_weights():
    G = from_sparse6(encode_sparse6(3, [(0, 1), (0, 1), (1, 2), (2, 2)]))
    assert sorted(G.edges(data="weight")) == [(0, 1, 2), (1, 2, 1)]
    assert all(w == 1 for _, _, w in from_graph6("Bw").edges(data="weight"))


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ("", "empty"),
        ("C!", "character '!'"),
        ("Cl?", "3 characters for 4 vertices; expected 2"),
        ("~?", "cut short"),
        (":Bd", "sparse6"),
    ],
)
def test_malformed_graph6(text, fragment):
    with pytest.raises(GraphFormatError, match=fragment):
        parse_graph6(text)


def test_malformed_sparse6():
    with pytest.raises(GraphFormatError, match="start with ':'"):
        parse_sparse6("Bw")
    with pytest.raises(GraphFormatError, match=r"incremental.*needs the graph of the line"):
        parse_sparse6(";Bd")


def test_incremental_sparse6_toggles_the_edges_of_the_previous_graph():
    # formats.txt (B. D. McKay): a ';' line holds the sparse6 bit stream, without a vertex
    # count, of the symmetric difference with the previous graph.  Its worked example ":Fa@x^"
    # is the graph on 7 vertices with edges 0-1 0-2 1-2 5-6; ":F" is the empty graph on 7.
    edges = [(0, 1), (0, 2), (1, 2), (5, 6)]
    assert parse_sparse6(";a@x^", previous=parse_sparse6(":F")) == (7, edges)
    assert parse_sparse6(";a@x^", previous=(7, edges)) == (7, [])
    assert parse_sparse6(";a@x^", previous=(7, [(2, 1), (3, 4)])) == (
        7,
        [(0, 1), (0, 2), (3, 4), (5, 6)],
    )
    # A symmetric difference with a multigraph is undefined.
    with pytest.raises(GraphFormatError, match="parallel edges"):
        parse_sparse6(";a@x^", previous=(7, [(3, 4), (4, 3)]))


def test_graph6_refuses_what_it_cannot_store():
    with pytest.raises(InvalidGraphError, match="multiplicity 2"):
        to_graph6(nx.Graph([(0, 1, {"weight": 2})]))
    with pytest.raises(InvalidGraphError, match="loop"):
        encode_graph6(2, [(1, 1)])
    with pytest.raises(InvalidGraphError, match="repeated"):
        encode_graph6(2, [(0, 1), (1, 0)])
    with pytest.raises(InvalidGraphError, match="outside"):
        encode_graph6(2, [(0, 2)])
    with pytest.raises(InvalidGraphError, match="undirected"):
        to_graph6(nx.DiGraph([(0, 1)]))
