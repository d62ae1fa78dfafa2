"""Godsil–McKay switching (graphinv.switching)."""

from __future__ import annotations

import random

import networkx as nx
import pytest
import sympy

from graphinv.cospectral import cospectral_classes
from graphinv.errors import InvalidGraphError
from graphinv.spectrum import graph_matrix
from graphinv.switching import cospectral_mates, godsil_mckay_sets, godsil_mckay_switch

# Ten vertices: an independent set C = {0, 1, 2, 3} whose vertices all have degree 3, six
# outside vertices each adjacent to a different pair of C, and two edges among them that break
# the symmetry.  Satisfies the Laplacian switching condition (C regular, outside vertices see
# none/half/all of C, equal degrees on C).
LAPLACIAN_EXAMPLE = [
    (4, 0), (4, 1), (5, 2), (5, 3), (6, 0), (6, 2),
    (7, 1), (7, 3), (8, 0), (8, 3), (9, 1), (9, 2),
    (4, 6), (6, 8),
]  # fmt: skip


def _sympy_polynomial(G: nx.Graph, matrix: str) -> list[int]:
    # Reference library: sympy's characteristic polynomial (Berkowitz), det(xI - M).
    rows = graph_matrix(G, matrix, sorted(G)).to_lists()
    return [int(c) for c in sympy.Matrix(rows).charpoly(sympy.Symbol("x")).all_coeffs()]


def _atlas(n: int) -> list[nx.Graph]:
    return [G for G in nx.graph_atlas_g() if G.number_of_nodes() == n]


# --- bad input -------------------------------------------------------------------------------


def test_switch_names_the_failed_condition():
    G = nx.Graph([(4, 0), (4, 1), (4, 2), (5, 0)])
    G.add_node(3)
    with pytest.raises(InvalidGraphError, match="vertex 4 outside the set has 3 of its 4"):
        godsil_mckay_switch(G, [0, 1, 2, 3])
    with pytest.raises(InvalidGraphError, match="regular"):
        godsil_mckay_switch(nx.path_graph(6), [0, 1, 2, 3])
    with pytest.raises(InvalidGraphError, match="even number of vertices, at least 4"):
        godsil_mckay_switch(nx.path_graph(6), [0, 1, 2])
    with pytest.raises(InvalidGraphError, match="not a vertex"):
        godsil_mckay_switch(nx.path_graph(6), [0, 1, 2, 99])


def test_laplacian_switch_needs_equal_degrees():
    G = nx.Graph([(4, 0), (4, 1), (5, 0), (5, 1), (5, 2), (5, 3)])
    godsil_mckay_switch(G, [0, 1, 2, 3])  # fine for the adjacency matrix
    with pytest.raises(InvalidGraphError, match="different degrees"):
        godsil_mckay_switch(G, [0, 1, 2, 3], matrix="laplacian")


def test_multigraph_and_bad_size_are_refused():
    with pytest.raises(InvalidGraphError, match="simple graph"):
        godsil_mckay_sets(nx.MultiGraph([(0, 1), (0, 1)]))
    with pytest.raises(InvalidGraphError, match="'max_size'"):
        godsil_mckay_sets(nx.path_graph(5), max_size=2)
    with pytest.raises(InvalidGraphError, match="undirected"):
        cospectral_mates(nx.DiGraph([(0, 1)]))


# --- published behaviour ---------------------------------------------------------------------


def test_hexagon_plus_vertex_has_a_switched_mate():
    # Godsil & McKay, Aequationes Math. 25 (1982): switching preserves the adjacency spectrum.
    # C_6 + K_1 with C = {0, 2, 4, 6}: outside vertices 1, 3, 5 each see half of C.
    G = nx.disjoint_union(nx.cycle_graph(6), nx.empty_graph(1))
    sets = {s.vertices: s for s in godsil_mckay_sets(G)}
    assert sets[(0, 2, 4, 6)].switched == (1, 3, 5)
    (mate,) = cospectral_mates(G)
    assert _sympy_polynomial(mate, "adjacency") == _sympy_polynomial(G, "adjacency")
    assert not nx.is_isomorphic(mate, G)


def test_two_vertex_sets_are_never_used():
    # Switching on 2 vertices only swaps them (Godsil & McKay 1982), so sizes start at 4.
    assert all(len(s.vertices) >= 4 for s in godsil_mckay_sets(nx.petersen_graph(), max_size=6))


def test_adjacency_mates_on_seven_vertices_are_cospectral_and_new():
    # Every mate must share the exact polynomial (sympy reference) and be non-isomorphic to
    # the graph and to the other mates (networkx reference); each lies in an A-class counted
    # by Haemers & Spence 2004 (110 graphs with an A-mate on 7 vertices).
    graphs = _atlas(7)
    members = {k for c in cospectral_classes(graphs, "adjacency") for k in c}
    with_mates = 0
    for k, G in enumerate(graphs):
        mates = cospectral_mates(G)
        if not mates:
            continue
        with_mates += 1
        assert k in members
        for i, H in enumerate(mates):
            assert not nx.is_isomorphic(G, H)
            assert all(not nx.is_isomorphic(H, other) for other in mates[:i])
        if with_mates <= 12:  # the sympy reference is slow; check a dozen graphs with it
            target = _sympy_polynomial(G, "adjacency")
            assert all(_sympy_polynomial(H, "adjacency") == target for H in mates)
    assert 0 < with_mates <= 110


def test_laplacian_switching_gives_laplacian_and_signless_mates():
    # The equal-degree condition makes R L R and R Q R the matrices of the switched graph
    # (derivation in graphinv.switching after Godsil & McKay 1982); checked against sympy.
    G = nx.Graph(LAPLACIAN_EXAMPLE)
    (found,) = godsil_mckay_sets(G, matrix="laplacian")
    assert found.vertices == (0, 1, 2, 3)
    assert set(found.matrices) == {"adjacency", "laplacian", "signless"}
    mates = cospectral_mates(G, matrix="laplacian")
    assert len(mates) == 1 and not nx.is_isomorphic(mates[0], G)
    for matrix in ("laplacian", "signless", "adjacency"):
        assert _sympy_polynomial(mates[0], matrix) == _sympy_polynomial(G, matrix)
    assert cospectral_mates(G, matrix="signless")[0].edges() == mates[0].edges()


def test_adjacency_sets_without_equal_degrees_break_laplacian_cospectrality():
    # Without equal degrees on C the Laplacian spectrum generally changes: the hexagon example
    # has vertex 6 of degree 0 in C = {0, 2, 4, 6} (sympy reference).
    G = nx.disjoint_union(nx.cycle_graph(6), nx.empty_graph(1))
    (mate,) = cospectral_mates(G)
    assert _sympy_polynomial(mate, "laplacian") != _sympy_polynomial(G, "laplacian")
    assert cospectral_mates(G, matrix="laplacian") == []


def test_switching_twice_returns_the_graph():
    # The switching matrix R is an involution, so switching twice on C gives G back
    # (Godsil & McKay 1982).
    rng = random.Random(41)
    checked = 0
    for _ in range(200):
        G = nx.gnp_random_graph(9, 0.5, seed=rng.randrange(10**6))
        for found in godsil_mckay_sets(G)[:2]:
            H = godsil_mckay_switch(G, found.vertices)
            back = godsil_mckay_switch(H, found.vertices)
            assert {frozenset(e) for e in back.edges()} == {frozenset(e) for e in G.edges()}
            checked += 1
    assert checked > 0


@pytest.mark.parametrize("seed", [3, 4])
def test_random_graph_mates_agree_with_sympy(seed):
    rng = random.Random(seed)
    for _ in range(40):
        G = nx.gnp_random_graph(rng.randint(7, 10), 0.5, seed=rng.randrange(10**6))
        mates = cospectral_mates(G)
        if not mates:
            continue
        target = _sympy_polynomial(G, "adjacency")
        assert _sympy_polynomial(mates[0], "adjacency") == target
        assert not nx.is_isomorphic(mates[0], G)
        return
    pytest.fail("no random graph with a Godsil-McKay mate was found")


# --- command line ----------------------------------------------------------------------------


def test_cli_switch_writes_verified_mates(cli_runner, tmp_path):
    from graphinv.cli import app
    from graphinv.io import from_graph6, to_graph6

    G = nx.disjoint_union(nx.cycle_graph(6), nx.empty_graph(1))
    source = tmp_path / "hexagon.g6"
    source.write_text(to_graph6(G) + "\n")
    target = tmp_path / "mates.g6"
    result = cli_runner.invoke(app, ["switch", str(source), "-o", str(target)])
    assert result.exit_code == 0, result.output
    (line,) = target.read_text().split()
    mate = from_graph6(line)
    assert _sympy_polynomial(mate, "adjacency") == _sympy_polynomial(G, "adjacency")
    assert not nx.is_isomorphic(mate, G)
    result = cli_runner.invoke(app, ["switch", str(source), "--max-size", "3"])
    assert result.exit_code == 2 and "'max_size'" in result.output
