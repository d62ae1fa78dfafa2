"""The critical group and spanning-tree counts: published values, reference libraries,
invariance properties and bad input."""

from __future__ import annotations

import json
import math
import random
from math import comb

import flint
import networkx as nx
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from strategies import multigraphs
from sympy import ZZ, Matrix, factorint
from sympy.matrices.normalforms import invariant_factors

from graphinv import (
    InvalidGraphError,
    InvalidWeightError,
    critical_group,
    laplacian_matrix,
    log_spanning_tree_count,
    matrix_cokernel,
    spanning_tree_count,
)


def factors(G, **kwargs):
    return critical_group(G, **kwargs).invariant_factors


def regroup(cyclic_orders):
    """Invariant factors of a direct sum of cyclic groups, via prime powers (sympy factorint)."""
    powers: dict[int, list[int]] = {}
    for d in cyclic_orders:
        for p, e in factorint(d).items():
            powers.setdefault(p, []).append(p**e)
    length = max((len(v) for v in powers.values()), default=0)
    result = [1] * length
    for values in powers.values():
        for k, q in enumerate(sorted(values, reverse=True)):
            result[length - 1 - k] *= q
    return tuple(result)


def lucas(n):
    a, b = 2, 1
    for _ in range(n):
        a, b = b, a + b
    return a


def fibonacci(n):
    a, b = 0, 1
    for _ in range(n):
        a, b = b, a + b
    return a


# ---------------------------------------------------------------------------------------------
# Published critical groups


@pytest.mark.parametrize("n", range(2, 12))
def test_complete_graph(n):
    # K(K_n) = (Z/n)^(n-2): Lorenzini, Discrete Math. 91 (1991); Biggs, J. Algebraic Combin. 9 (1999) (memory)
    assert factors(nx.complete_graph(n)) == (n,) * (n - 2)


@pytest.mark.parametrize(("m", "n"), [(2, 3), (3, 3), (3, 4), (4, 4), (2, 6), (3, 5)])
def test_complete_bipartite(m, n):
    # K(K_{m,n}) = Z_m^(n-2) + Z_n^(m-2) + Z_mn: Lorenzini, Discrete Math. 91 (1991) (memory)
    expected = regroup([m] * (n - 2) + [n] * (m - 2) + [m * n])
    assert factors(nx.complete_bipartite_graph(m, n)) == expected


def test_complete_bipartite_examples():
    # K_{3,3}: Z3 + Z3 + Z9; K_{4,4}: Z4^4 + Z16 (Lorenzini 1991, memory)
    assert factors(nx.complete_bipartite_graph(3, 3)) == (3, 3, 9)
    assert factors(nx.complete_bipartite_graph(4, 4)) == (4, 4, 4, 4, 16)


@pytest.mark.parametrize("n", range(3, 15))
def test_cycle(n):
    # K(C_n) = Z_n (common fact)
    assert factors(nx.cycle_graph(n)) == (n,)


@pytest.mark.parametrize("seed", range(8))
def test_trees_are_trivial(seed):
    # A tree has one spanning tree, so K(T) = 0 (common fact)
    T = nx.random_labeled_tree(3 + 4 * seed, seed=seed)
    K = critical_group(T)
    assert K.invariant_factors == () and K.order == 1 and str(K) == "0"


@pytest.mark.parametrize("n", range(3, 12))
def test_wheels(n):
    # W_n (n spokes): Z_{L_n}^2 for odd n, Z_{F_n} + Z_{5 F_n} for even n; Biggs 1999, §9 (memory)
    expected = (lucas(n), lucas(n)) if n % 2 else (fibonacci(n), 5 * fibonacci(n))
    assert factors(nx.wheel_graph(n + 1)) == expected


def test_wheel_examples():
    # W3 = K4: Z4^2; W4: Z3 + Z15; W5: Z11^2; W6: Z8 + Z40 (Biggs 1999, memory)
    assert [factors(nx.wheel_graph(n + 1)) for n in (3, 4, 5, 6)] == [
        (4, 4), (3, 15), (11, 11), (8, 40)
    ]


def test_petersen():
    # Z2 + Z10^3, order 2000: common fact (memory)
    K = critical_group(nx.petersen_graph())
    assert K.invariant_factors == (2, 10, 10, 10)
    assert str(K) == "Z/2 ⊕ Z/10 ⊕ Z/10 ⊕ Z/10"
    assert K.order == 2000 == K.certificate.spanning_trees
    assert K.primary_decomposition == {2: (2, 2, 2, 2), 5: (5, 5, 5)}
    assert (K.p_rank(2), K.p_rank(5), K.p_rank(3)) == (4, 3, 0)
    assert (K.rank, K.exponent, K.is_cyclic, K.free_rank) == (4, 10, False, 1)


def test_hypercubes_small():
    # Q2 = C4: Z4; Q3: Z2 + Z8 + Z24 (Bai, Linear Algebra Appl. 369 (2003); small cases common)
    assert factors(nx.hypercube_graph(2)) == (4,)
    assert factors(nx.hypercube_graph(3)) == (2, 8, 24)


@pytest.mark.parametrize("n", [3, 4, 5, 6])
def test_hypercube_structure(n):
    # Bai 2003 (memory): 2^(n-1) - 1 invariant factors; for odd p the Sylow p-part is
    # sum_{k=1..n} (Z/p^{v_p(k)})^{C(n,k)}; the order is OEIS A006237.
    K = critical_group(nx.hypercube_graph(n))
    assert K.rank == 2 ** (n - 1) - 1
    for p in (3, 5):
        expected = sorted(
            p ** _valuation(k, p) for k in range(1, n + 1) for _ in range(comb(n, k))
            if _valuation(k, p)
        )
        assert list(K.primary_decomposition.get(p, ())) == expected


def _valuation(k, p):
    v = 0
    while k % p == 0:
        k //= p
        v += 1
    return v


def test_paley_13():
    # P(13): (Z_3)^6 + (Z_13)^5 = Z3 + Z39^5; Chandler, Sin, Xiang, J. Algebraic Combin. 41 (2015) (memory)
    squares = {(x * x) % 13 for x in range(1, 13)}
    G = nx.Graph((a, b) for a in range(13) for b in range(13) if a < b and (b - a) % 13 in squares)
    assert factors(G) == (3, 39, 39, 39, 39, 39)


def test_octahedron():
    # K_{2,2,2}: Z2 + Z8 + Z24; Jacobson, Niedermaier, Reiner, J. Graph Theory 44 (2003) (memory)
    assert factors(nx.complete_multipartite_graph(2, 2, 2)) == (2, 8, 24)


# ---------------------------------------------------------------------------------------------
# Spanning-tree counts against OEIS


def test_grid_counts():
    # OEIS A007341: spanning trees of the n x n grid
    expected = [1, 4, 192, 100352, 557568000, 32565539635200, 19872369301840986112,
                126231322912498539682594816]
    assert [spanning_tree_count(nx.grid_2d_graph(n, n)) for n in range(1, 9)] == expected


def test_ladder_counts():
    # OEIS A001353: ladder P_2 x P_n, n = 1..9
    expected = [1, 4, 15, 56, 209, 780, 2911, 10864, 40545]
    assert [spanning_tree_count(nx.ladder_graph(n)) for n in range(1, 10)] == expected


def test_prism_counts():
    # OEIS A006235: prism C_n x K_2, n = 2 is the multigraph with doubled cycle edges
    prism2 = nx.MultiGraph([(0, 1), (0, 1), (2, 3), (2, 3), (0, 2), (1, 3)])
    assert spanning_tree_count(prism2) == 12
    expected = [75, 384, 1805, 8100, 35287, 150528, 632025]
    assert [spanning_tree_count(nx.circular_ladder_graph(n)) for n in range(3, 10)] == expected


def test_wheel_counts():
    # OEIS A004146: wheel with n spokes, n = 3..9 (= L_{2n} - 2)
    expected = [16, 45, 121, 320, 841, 2205, 5776]
    assert [spanning_tree_count(nx.wheel_graph(n + 1)) for n in range(3, 10)] == expected


def test_moebius_ladder_counts():
    # OEIS A020871: Möbius ladder with n rungs (circulant C_2n(1, n)), n = 2..8
    expected = [16, 81, 392, 1815, 8112, 35301, 150544]
    assert [spanning_tree_count(nx.circulant_graph(2 * n, [1, n])) for n in range(2, 9)] == expected


def test_hypercube_counts():
    # OEIS A006237: Q_0 .. Q_5
    expected = [1, 1, 4, 384, 42467328, 20776019874734407680]
    assert [spanning_tree_count(nx.hypercube_graph(n)) if n else 1 for n in range(6)] == expected
    assert spanning_tree_count(nx.empty_graph(1)) == 1


def test_torus_counts():
    # OEIS A212800: C_n x C_n, n = 3..5 (n = 2: the 4-cycle with doubled edges)
    C2C2 = nx.MultiGraph([(0, 1), (0, 1), (1, 2), (1, 2), (2, 3), (2, 3), (3, 0), (3, 0)])
    assert spanning_tree_count(C2C2) == 32
    expected = [11664, 42467328, 1562500000000]
    assert [spanning_tree_count(nx.grid_2d_graph(n, n, periodic=True)) for n in (3, 4, 5)] == expected


@pytest.mark.parametrize("n", range(1, 12))
def test_cayley(n):
    # OEIS A000272: n^(n-2) labelled trees (Cayley's formula)
    assert spanning_tree_count(nx.complete_graph(n)) == (n ** (n - 2) if n > 1 else 1)


def test_disconnected_count_is_zero():
    G = nx.disjoint_union(nx.cycle_graph(3), nx.cycle_graph(4))
    assert spanning_tree_count(G) == 0
    K = critical_group(G)
    # a disjoint union adds groups: Z3 + Z4 = Z12; the order is the product of component counts
    assert K.invariant_factors == (12,) and K.free_rank == 2 and K.order == 12


# ---------------------------------------------------------------------------------------------
# Agreement with reference libraries on seeded random graphs and multigraphs


def random_multigraph(seed: int) -> nx.MultiGraph:
    rng = random.Random(seed)
    n = rng.randrange(1, 10)
    G = nx.MultiGraph()
    G.add_nodes_from(range(n))
    for u in range(n):
        for v in range(u + 1, n):
            if rng.random() < 0.45:
                for _ in range(rng.choice([1, 1, 1, 2, 3])):
                    G.add_edge(u, v)
    if seed % 3 == 0 and n > 1:  # weights as multiplicities
        for _u, _v, data in G.edges(data=True):
            data["weight"] = rng.randrange(1, 4)
    return G


def reference_cokernel(G, library):
    L = laplacian_matrix(G).to_lists()
    if library == "flint":
        S = flint.fmpz_mat(L).snf()
        diagonal = [int(S[i, i]) for i in range(len(L))]
    else:
        diagonal = [int(d) for d in invariant_factors(Matrix(L), domain=ZZ)]
    return tuple(d for d in diagonal if d > 1), sum(1 for d in diagonal if d == 0)


@pytest.mark.parametrize("seed", range(220))
def test_agrees_with_flint(seed):
    # Reference: python-flint fmpz_mat.snf of the full Laplacian (torsion and free rank).
    G = random_multigraph(seed)
    K = critical_group(G)
    assert (K.invariant_factors, K.free_rank) == reference_cokernel(G, "flint")


@pytest.mark.parametrize("seed", range(500, 560))
def test_agrees_with_sympy(seed):
    # Reference: SymPy invariant_factors of the full Laplacian.
    G = random_multigraph(seed)
    K = critical_group(G)
    assert (K.invariant_factors, K.free_rank) == reference_cokernel(G, "sympy")


@pytest.mark.parametrize("seed", range(4))
def test_medium_graphs_agree_with_flint(seed):
    # Graphs whose cores go through the modular finish (core larger than the classical cut-off).
    G = nx.gnp_random_graph(60, 0.3, seed=seed)
    K = critical_group(G)
    assert (K.invariant_factors, K.free_rank) == reference_cokernel(G, "flint")
    assert K.order == spanning_tree_count(G) or K.free_rank > 1


# ---------------------------------------------------------------------------------------------
# Properties (hypothesis)




@settings(max_examples=40, deadline=None)
@given(multigraphs(max_vertices=7, max_multiplicity=3), st.randoms(use_true_random=False))
def test_relabelling_invariance(G, rng):
    labels = list(G)
    shuffled = labels[:]
    rng.shuffle(shuffled)
    H = nx.relabel_nodes(G, dict(zip(labels, [f"v{x}" for x in shuffled], strict=True)))
    assert critical_group(H).invariant_factors == critical_group(G).invariant_factors


@settings(max_examples=30, deadline=None)
@given(multigraphs(5, 3), multigraphs(5, 3))
def test_disjoint_union_adds_groups(G, H):
    union = nx.disjoint_union(G, H)
    K = critical_group(union)
    assert K.invariant_factors == regroup(factors(G) + factors(H))
    assert K.free_rank == critical_group(G).free_rank + critical_group(H).free_rank


@settings(max_examples=30, deadline=None)
@given(multigraphs(5, 3), multigraphs(5, 3))
def test_bridge_splits_the_group(G, H):
    # Joining two graphs by a bridge (multiplicity 1) gives the direct sum (Lorenzini 1991).
    union = nx.disjoint_union(G, H)
    union.add_edge(0, len(G))
    assert critical_group(union).invariant_factors == regroup(factors(G) + factors(H))


@settings(max_examples=40, deadline=None)
@given(multigraphs(max_vertices=7, max_multiplicity=3))
def test_order_is_tree_count(G):
    # Kirchhoff's matrix-tree theorem
    K = critical_group(G)
    if nx.is_connected(G):
        assert K.order == spanning_tree_count(G) == K.certificate.spanning_trees
    else:
        assert spanning_tree_count(G) == 0


@settings(max_examples=25, deadline=None)
@given(st.integers(2, 30), st.randoms(use_true_random=False))
def test_trees_give_trivial_group(n, rng):
    T = nx.random_labeled_tree(n, seed=rng.randrange(10**6))
    assert critical_group(T).invariant_factors == ()


# ---------------------------------------------------------------------------------------------
# Directed graphs, other matrices, the log count, output forms


def test_directed_cycle_with_sink():
    # Directed n-cycle: one arborescence into any vertex; sandpile group trivial (common fact)
    D = nx.cycle_graph(5, create_using=nx.DiGraph)
    assert spanning_tree_count(D, sink=0) == 1
    assert critical_group(D, sink=0).invariant_factors == ()


def test_bidirected_equals_undirected():
    # Each undirected edge as two arcs: the same group and count (Tutte's theorem specialises
    # to Kirchhoff's).
    G = nx.petersen_graph()
    D = G.to_directed()
    K = critical_group(D, sink=0)
    assert K.invariant_factors == (2, 10, 10, 10) and K.sink == 0
    assert spanning_tree_count(D, sink=0) == 2000


def test_directed_unreachable_sink_has_free_part():
    D = nx.DiGraph([(0, 1), (2, 1)])
    D.add_edge(1, 2)
    K = critical_group(D, sink=0)
    assert spanning_tree_count(D, sink=0) == 0
    assert K.free_rank == 1


def test_matrix_cokernel():
    # Signless Laplacian of an odd cycle is nonsingular, det Q(C_n) = 4 for odd n
    # (Cvetković, Rowlinson, Simić, Linear Algebra Appl. 423 (2007)).
    Q = matrix_cokernel(nx.cycle_graph(5), "signless")
    assert Q.free_rank == 0 and Q.torsion_order == 4
    # Distance matrix of a tree: det = (-1)^(n-1) (n-1) 2^(n-2) (Graham, Pollak 1971)
    D = matrix_cokernel(nx.path_graph(6), "distance")
    assert D.free_rank == 0 and D.torsion_order == 5 * 2**4
    assert matrix_cokernel(nx.cycle_graph(6), "laplacian").invariant_factors == (6,)
    with pytest.raises(InvalidGraphError, match="matrix"):
        matrix_cokernel(nx.cycle_graph(3), "incidence")  # type: ignore[arg-type]


def test_log_spanning_tree_count():
    # Grid growth: log tau(n x n grid) / n^2 -> 4G/pi (Temperley 1974; memory); and the exact
    # value for 20 x 20 from the exact count.
    G = nx.grid_2d_graph(20, 20)
    estimate = log_spanning_tree_count(G)
    exact = math.log(spanning_tree_count(G))
    assert abs(estimate.value - exact) <= max(estimate.error_estimate, 1e-9)
    assert estimate.approximate
    big = log_spanning_tree_count(nx.grid_2d_graph(150, 150))
    catalan = 0.915965594177219015
    assert abs(big.value / 150**2 - 4 * catalan / math.pi) < 0.02
    assert log_spanning_tree_count(nx.empty_graph(3)).value == float("-inf")
    json.dumps(log_spanning_tree_count(nx.empty_graph(3)).to_record(), allow_nan=False)


def test_record_and_reprs():
    K = critical_group(nx.complete_graph(20))
    record = json.loads(json.dumps(K.to_record()))
    assert record["invariant_factors"] == ["20"] * 18
    assert record["order"] == str(20**18) and record["certificate"]["checked"] is True
    assert K._repr_latex_() == r"$(\mathbb{Z}/20)^{18}$"
    assert "(ℤ/20)<sup>18</sup>" in K._repr_html_()
    assert critical_group(nx.path_graph(3))._repr_latex_() == "$0$"
    with pytest.raises(ValueError, match="prime"):
        K.p_rank(4)


# ---------------------------------------------------------------------------------------------
# Bad input


def test_bad_input():
    with pytest.raises(InvalidGraphError, match="no vertices"):
        critical_group(nx.Graph())
    with pytest.raises(InvalidGraphError, match="sink"):
        critical_group(nx.DiGraph([(0, 1)]))
    with pytest.raises(InvalidGraphError, match="sink"):
        spanning_tree_count(nx.DiGraph([(0, 1)]))
    with pytest.raises(InvalidGraphError, match="not a vertex"):
        critical_group(nx.DiGraph([(0, 1)]), sink=7)
    for weight in (-1, 0, 1.5, "2"):
        G = nx.Graph()
        G.add_edge(0, 1, weight=weight)
        with pytest.raises(InvalidWeightError, match="positive integer"):
            critical_group(G)
        with pytest.raises(InvalidWeightError):
            spanning_tree_count(G)
    with pytest.raises(InvalidGraphError):
        critical_group([(0, 1)])  # type: ignore[arg-type]


# ---------------------------------------------------------------------------------------------
# Command line


def test_cli_group_and_trees(cli_runner):
    from graphinv.cli import app

    result = cli_runner.invoke(app, ["group", "wheel:4"])
    assert result.exit_code == 0, result.output
    # W4: Z3 + Z15 (Biggs 1999, memory)
    assert "Z/3 ⊕ Z/15" in result.output and "45 spanning trees" in result.output
    result = cli_runner.invoke(app, ["group", "wheel:3..4", "--jsonl"])
    lines = [json.loads(line) for line in result.output.splitlines()]
    assert [r["invariant_factors"] for r in lines] == [["4", "4"], ["3", "15"]]
    result = cli_runner.invoke(app, ["trees", "wheel:5", "--approx"])
    assert result.exit_code == 0 and "121" in result.output and "approximate" in result.output


def test_cli_unknown_sink(cli_runner):
    from graphinv.cli import app

    result = cli_runner.invoke(app, ["group", "cycle:5", "--sink", "99"])
    assert result.exit_code == 2 and "not a vertex" in result.output
    result = cli_runner.invoke(app, ["trees", "cycle:5", "--sink", "3"])
    assert result.exit_code == 0 and result.output.strip().endswith(": 5")


def test_cli_normal_form(cli_runner, tmp_path):
    from graphinv.cli import app

    path = tmp_path / "m.txt"
    path.write_text("# a 3 x 3 example\n2 4 4\n-6 6 12\n10 -4 -16\n")
    result = cli_runner.invoke(app, ["normal-form", str(path), "--transforms", "--hermite"])
    assert result.exit_code == 0, result.output
    # diagonal (2, 6, 12): reference SymPy invariant_factors
    assert "Smith diagonal: 2 6 12" in result.output and "Hermite form" in result.output
    bad = tmp_path / "bad.txt"
    bad.write_text("1 2\n3 x\n")
    result = cli_runner.invoke(app, ["normal-form", str(bad)])
    assert result.exit_code == 2 and "line 2" in result.output and "'x'" in result.output
    ragged = tmp_path / "ragged.txt"
    ragged.write_text("1 2\n3\n")
    result = cli_runner.invoke(app, ["normal-form", str(ragged)])
    assert result.exit_code == 2 and "line 2" in result.output


@pytest.mark.slow
@pytest.mark.parametrize(
    "build",
    [
        lambda: nx.grid_2d_graph(14, 14),
        lambda: nx.hypercube_graph(7),
        lambda: nx.random_regular_graph(3, 200, seed=7),
        lambda: nx.complete_graph(60),
    ],
)
def test_larger_graphs_agree_with_flint(build):
    # Reference: python-flint fmpz_mat.snf on the full Laplacian (slow for the reference).
    G = build()
    K = critical_group(G)
    assert (K.invariant_factors, K.free_rank) == reference_cokernel(G, "flint")


DIRECTED_GRAPHML = """<?xml version="1.0" encoding="UTF-8"?>
<graphml xmlns="http://graphml.graphdrawing.org/xmlns">
  <graph edgedefault="directed">
    <node id="a"/><node id="b"/><node id="c"/>
    <edge source="a" target="b"/><edge source="b" target="a"/>
    <edge source="b" target="c"/><edge source="c" target="a"/><edge source="a" target="c"/>
  </graph>
</graphml>
"""


def test_directed_graphml_keeps_directions_with_a_sink(tmp_path, cli_runner):
    # Worked by hand from Tutte's matrix-tree theorem (Tutte, Graph Theory, 1984, VI.28): into
    # a, b goes to a or c and c must go to a: 2 arborescences, reduced Laplacian [[2,-1],[0,1]]
    # (group Z/2); into c, [[2,-1],[-1,2]]: 3.  Without --sink the file is read undirected and
    # antiparallel arcs are one edge: K_3, 3 spanning trees (Cayley 1889).
    from graphinv.cli import app
    from graphinv.io import read_graph

    path = tmp_path / "arcs.graphml"
    path.write_text(DIRECTED_GRAPHML)
    D = read_graph(path, directed=True)
    assert D.is_directed() and D.number_of_edges() == 5
    assert critical_group(D, sink="a").invariant_factors == (2,)
    assert spanning_tree_count(D, sink="c") == 3
    result = cli_runner.invoke(app, ["group", str(path), "--sink", "a"])
    assert result.exit_code == 0, result.output
    assert "Z/2" in result.output and "2 spanning arborescences" in result.output
    result = cli_runner.invoke(app, ["trees", str(path), "--sink", "c"])
    assert result.output.strip().endswith("3")
    with pytest.warns(UserWarning, match="read as undirected"):
        result = cli_runner.invoke(app, ["trees", str(path)])
    assert result.output.strip().endswith("3")
