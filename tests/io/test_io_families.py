"""Graph families: sizes from closed formulas, known isomorphisms, spanning-tree counts (OEIS)."""

from __future__ import annotations

import math

import networkx as nx
import pytest

from graphinv.errors import GraphFormatError
from graphinv.io import count_family_graphs, family_graph, family_graphs, family_table
from graphinv.matrices import reduced_laplacian_matrix


def size(spec: str) -> tuple[int, int]:
    G = family_graph(spec)
    return G.number_of_nodes(), G.number_of_edges()


def degrees(spec: str) -> set[int]:
    return {d for _, d in family_graph(spec).degree()}


def spanning_trees(spec: str) -> int:
    # Kirchhoff's matrix-tree theorem: det of the reduced Laplacian (exact, python-flint).
    return int(reduced_laplacian_matrix(family_graph(spec)).to_flint().det())


# --- vertex and edge counts from closed formulas ----------------------------------------------


@pytest.mark.parametrize("n", [1, 2, 5, 9])
def test_complete(n):
    assert size(f"complete:{n}") == (n, n * (n - 1) // 2)  # common fact


@pytest.mark.parametrize(("m", "n"), [(1, 1), (2, 3), (4, 4)])
def test_bipartite(m, n):
    assert size(f"bipartite:{m},{n}") == (m + n, m * n)  # common fact


def test_multipartite():
    parts = [2, 3, 4]
    total = sum(parts)
    # common fact: edges of K_{a,b,c} = (total^2 - sum of squares) / 2
    assert size("multipartite:2,3,4") == (total, (total**2 - sum(p * p for p in parts)) // 2)
    assert nx.is_isomorphic(
        family_graph("multipartite:2,3,4"), nx.complete_multipartite_graph(2, 3, 4)
    )


@pytest.mark.parametrize("n", [3, 4, 10])
def test_cycle_path_star_wheel(n):
    assert size(f"cycle:{n}") == (n, n)  # common fact
    assert size(f"path:{n}") == (n, n - 1)  # common fact
    assert size(f"star:{n}") == (n + 1, n)  # common fact (n leaves)
    assert size(f"wheel:{n}") == (n + 1, 2 * n)  # common fact: W_n has n+1 vertices, 2n edges
    assert family_graph(f"wheel:{n}").degree(0) == n  # the hub is vertex 0
    assert family_graph(f"star:{n}").degree(0) == n  # the centre is vertex 0


@pytest.mark.parametrize(("a", "b"), [(1, 1), (1, 5), (3, 4), (7, 7)])
def test_grid(a, b):
    # common fact: the a x b grid has ab vertices and a(b-1) + b(a-1) edges
    assert size(f"grid:{a}x{b}") == (a * b, a * (b - 1) + b * (a - 1))


def test_grid_three_dimensions_and_row_major_numbering():
    a, b, c = 2, 3, 4
    # common fact: edges of a product of paths = sum over axes of (size - 1) * (other sizes)
    assert size("grid:2x3x4") == (a * b * c, (a - 1) * b * c + a * (b - 1) * c + a * b * (c - 1))
    G = family_graph("grid:2x3")
    assert sorted(G[0]) == [1, 3] and sorted(G[4]) == [1, 3, 5]  # row-major: 0 1 2 / 3 4 5
    assert nx.is_isomorphic(family_graph("grid:2x3x4"), nx.grid_graph([2, 3, 4]))


@pytest.mark.parametrize("spec", ["torus:3x3", "torus:3x5", "torus:4x5x6"])
def test_torus_is_2d_regular(spec):
    sizes = [int(s) for s in spec.split(":")[1].split("x")]
    n = math.prod(sizes)
    # common fact: a product of d cycles is 2d-regular, so it has d * n edges
    assert size(spec) == (n, len(sizes) * n)
    assert degrees(spec) == {2 * len(sizes)}
    assert nx.is_isomorphic(family_graph(spec), nx.grid_graph(sizes, periodic=True))


@pytest.mark.parametrize("d", [0, 1, 2, 3, 6])
def test_hypercube(d):
    # common fact: Q_d has 2^d vertices and d * 2^(d-1) edges
    assert size(f"hypercube:{d}") == (2**d, d * 2 ** (d - 1) if d else 0)
    if d:  # networkx's hypercube_graph(0) has no vertex; Q_0 is one vertex (2^0)
        assert nx.is_isomorphic(family_graph(f"hypercube:{d}"), nx.hypercube_graph(d))


@pytest.mark.parametrize("n", [3, 4, 7])
def test_prism_and_moebius_are_cubic(n):
    # common fact: both ladders are 3-regular on 2n vertices (3n edges)
    assert size(f"prism:{n}") == (2 * n, 3 * n)
    assert size(f"moebius:{n}") == (2 * n, 3 * n)
    assert degrees(f"prism:{n}") == degrees(f"moebius:{n}") == {3}
    assert nx.is_isomorphic(family_graph(f"prism:{n}"), nx.circular_ladder_graph(n))
    # common fact: the Möbius ladder M_n is the circulant C_{2n}(1, n)
    assert nx.is_isomorphic(family_graph(f"moebius:{n}"), nx.circulant_graph(2 * n, [1, n]))


def test_moebius_2_is_k4():
    assert nx.is_isomorphic(family_graph("moebius:2"), nx.complete_graph(4))  # common fact


def test_circulant():
    assert size("circulant:10:1,3") == (10, 20)  # each jump J < N/2 adds N edges
    assert size("circulant:10:1,5") == (10, 15)  # J = N/2 adds N/2 edges
    assert nx.is_isomorphic(family_graph("circulant:11:1,2,4"), nx.circulant_graph(11, [1, 2, 4]))


def test_petersen_graph():
    G = family_graph("petersen:5,2")
    # common fact: the Petersen graph is 3-regular on 10 vertices
    assert (G.number_of_nodes(), degrees("petersen:5,2")) == (10, {3})
    assert nx.is_isomorphic(G, nx.petersen_graph())


@pytest.mark.parametrize(
    ("spec", "reference"),
    [
        # Named generalized Petersen graphs (common facts; Watkins 1969 for the notation).
        ("petersen:4,1", nx.hypercube_graph(3)),
        ("petersen:8,3", nx.moebius_kantor_graph()),
        ("petersen:10,2", nx.dodecahedral_graph()),
        ("petersen:10,3", nx.desargues_graph()),
    ],
)
def test_named_generalized_petersen_graphs(spec, reference):
    assert nx.is_isomorphic(family_graph(spec), reference)


@pytest.mark.parametrize("q", [5, 9, 13, 17, 25, 29, 49, 81])
def test_paley_is_strongly_regular(q):
    G = family_graph(f"paley:{q}")
    # Paley 1933 / common fact: P(q) is (q-1)/2-regular; it is strongly regular with
    # lambda = (q-5)/4 and mu = (q-1)/4 (Brouwer & Haemers, Spectra of Graphs, 2012, §9.1.2).
    assert G.number_of_nodes() == q
    assert degrees(f"paley:{q}") == {(q - 1) // 2}
    assert nx.intersection_array(G) == ([(q - 1) // 2, (q - 1) // 4], [1, (q - 1) // 4])
    triangles_per_edge = {len(set(G[u]) & set(G[v])) for u, v in G.edges()}
    assert triangles_per_edge == {(q - 5) // 4}


def test_paley_9_is_the_3x3_rook_graph():
    # common fact: P(9) is K_3 x K_3 (the 3 x 3 rook's graph); needs GF(9) arithmetic
    rook = nx.cartesian_product(nx.complete_graph(3), nx.complete_graph(3))
    assert nx.is_isomorphic(family_graph("paley:9"), rook)


def test_paley_is_self_complementary():
    # common fact: Paley graphs are self-complementary
    for q in (13, 25, 29):
        G = family_graph(f"paley:{q}")
        assert nx.is_isomorphic(G, nx.complement(G))


def test_gnp_reproducible_and_plausible():
    first = family_graph("gnp:300,0.1,seed=4")
    again = family_graph("gnp:300,0.1,seed=4")
    other = family_graph("gnp:300,0.1,seed=5")
    assert sorted(first.edges()) == sorted(again.edges())
    assert sorted(first.edges()) != sorted(other.edges())
    pairs = 300 * 299 // 2
    mean, sd = 0.1 * pairs, math.sqrt(pairs * 0.1 * 0.9)
    # binomial edge count (common fact): within 5 standard deviations of p * C(n, 2)
    assert abs(first.number_of_edges() - mean) < 5 * sd
    assert family_graph("gnp:6,1").number_of_edges() == 15
    assert family_graph("gnp:6,0").number_of_edges() == 0
    assert family_graph("gnp:6,1/3,seed=2").graph["name"] == "gnp:6,1/3,seed=2"


def test_random_regular():
    for seed in range(3):
        assert degrees(f"regular:20,3,seed={seed}") == {3}
    assert size("regular:10,0") == (10, 0)


# --- spanning-tree counts against OEIS (checks that the structure is right, not just sizes) ---


@pytest.mark.parametrize(
    ("template", "values", "start"),
    [
        ("grid:{n}x{n}", [1, 4, 192, 100352, 557568000], 1),  # OEIS A007341
        ("prism:{n}", [75, 384, 1805, 8100, 35287], 3),  # OEIS A006235
        ("moebius:{n}", [16, 81, 392, 1815, 8112], 2),  # OEIS A020871
        ("wheel:{n}", [16, 45, 121, 320, 841], 3),  # OEIS A004146
        ("hypercube:{n}", [1, 1, 4, 384, 42467328], 0),  # OEIS A006237
        ("torus:{n}x{n}", [11664, 42467328, 1562500000000], 3),  # OEIS A212800
    ],
)
def test_spanning_tree_counts_match_oeis(template, values, start):
    counted = [spanning_trees(template.format(n=n)) for n in range(start, start + len(values))]
    assert counted == values


def test_complete_bipartite_spanning_trees():
    # Scoins 1962 (common fact): K_{m,n} has m^(n-1) n^(m-1) spanning trees
    assert spanning_trees("bipartite:3,5") == 3**4 * 5**2


# --- ranges -----------------------------------------------------------------------------------


def test_ranges_expand_in_order():
    assert [G.graph["name"] for G in family_graphs("petersen:5..7,1..2")] == [
        "petersen:5,1",
        "petersen:5,2",
        "petersen:6,1",
        "petersen:6,2",
        "petersen:7,1",
        "petersen:7,2",
    ]
    assert [G.graph["name"] for G in family_graphs("grid:2..3x4")] == ["grid:2x4", "grid:3x4"]
    assert [G.graph["name"] for G in family_graphs("grid:2..4")] == [
        "grid:2x2",
        "grid:3x3",
        "grid:4x4",
    ]
    assert count_family_graphs("regular:10,3,seed=1..2000") == 2000
    seeds = family_graphs("gnp:8,0.5,seed=1..3")
    assert [G.graph["name"] for G in seeds] == [f"gnp:8,0.5,seed={s}" for s in (1, 2, 3)]
    G = next(family_graphs("cycle:3..5"))
    assert (G.graph["source"], G.graph["family"]) == ("cycle:3..5", "cycle")


def test_family_graphs_is_lazy():
    graphs = family_graphs("complete:1..100000")
    assert next(graphs).number_of_nodes() == 1


def test_table_lists_every_family_with_a_working_example():
    for grammar, _, example in family_table():
        assert example.split(":")[0] == grammar.split(":")[0]
        assert family_graph(example).number_of_nodes() > 0


# --- bad specs --------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("spec", "message"),
    [
        ("wheel:2", "family 'wheel' expects 1 parameter N >= 3, got 'wheel:2'"),
        ("cycle:2", "family 'cycle' expects 1 parameter N >= 3, got 'cycle:2'"),
        ("cycle:4,5", "family 'cycle' expects 1 parameter N >= 3 (cycle:N), got 'cycle:4,5'"),
        ("cycle", "family 'cycle' expects 1 parameter N >= 3 (cycle:N), got 'cycle'"),
        ("bipartite:3", "family 'bipartite' expects 2 parameters"),
        ("grid:3,4", "sizes must be joined with 'x'"),
        ("grid:0x4", "family 'grid' expects sizes"),
        ("torus:2x5", "family 'torus' expects sizes AxB[xC...] >= 3"),
        ("petersen:6,3", "1 <= K < N/2"),
        ("paley:7", "Q ≡ 1 (mod 4)"),
        ("paley:21", "a prime power"),
        ("circulant:10:1,6", "1 <= J <= N/2"),
        ("circulant:10:1,1", "distinct jumps"),
        ("circulant:10", "missing ':J1,J2,...'"),
        ("gnp:10,1.5", "0 <= P <= 1"),
        ("gnp:10,half", "'half' is not a probability"),
        ("gnp:10,0.5,sed=3", "is not seed=S"),
        ("regular:5,3", "N·D even"),
        ("cycle:5..3", "empty range '5..3'"),
        ("cycle:x", "'x' is not an integer or a range A..B"),
        ("wheel:1..5", "got 'wheel:1..5' (at 'wheel:1')"),
        ("dodecahedron:1", "unknown graph family in 'dodecahedron:1'; expected name:params"),
    ],
)
def test_bad_specs_say_what_is_expected(spec, message):
    with pytest.raises(GraphFormatError) as caught:
        list(family_graphs(spec))
    assert message in str(caught.value)


def test_family_graph_refuses_ranges():
    with pytest.raises(GraphFormatError, match=r"holds a range \(4 graphs\)"):
        family_graph("cycle:3..6")
