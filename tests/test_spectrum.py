"""Exact characteristic polynomials and numeric spectra (graphinv.spectrum)."""

from __future__ import annotations

import math
import random

import networkx as nx
import numpy as np
import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st

from graphinv.errors import InvalidGraphError
from graphinv.spectrum import (
    algebraic_connectivity,
    characteristic_polynomial,
    characteristic_polynomials,
    charpoly_of_rows,
    eigenvalues,
    format_polynomial,
    graph_matrix,
    group_eigenvalues,
    spanning_trees_from_spectrum,
)

KINDS = ("laplacian", "signless", "adjacency")


def _sympy_charpoly(rows: list[list[int]]) -> tuple[int, ...]:
    # Reference library: sympy's Berkowitz characteristic polynomial, det(xI - M).
    x = sympy.Symbol("x")
    return tuple(int(c) for c in sympy.Matrix(rows).charpoly(x).all_coeffs())


def _random_graphs(seed: int, count: int) -> list[nx.Graph]:
    rng = random.Random(seed)
    graphs = []
    for _ in range(count):
        n = rng.randint(1, 11)
        graphs.append(nx.gnp_random_graph(n, rng.random(), seed=rng.randrange(10**6)))
    return graphs


# --- bad input -------------------------------------------------------------------------------


def test_unknown_matrix_name_is_refused():
    with pytest.raises(InvalidGraphError, match="Argument 'matrix' must be one of"):
        characteristic_polynomial(nx.path_graph(3), "normalized")


def test_directed_graph_is_refused():
    with pytest.raises(InvalidGraphError, match="undirected"):
        eigenvalues(nx.DiGraph([(0, 1)]))


def test_empty_graph_is_refused():
    with pytest.raises(InvalidGraphError, match="no vertices"):
        characteristic_polynomial(nx.Graph())


def test_non_square_rows_are_refused():
    with pytest.raises(InvalidGraphError, match="square"):
        charpoly_of_rows([[1, 2], [3]])


def test_bad_count_is_refused():
    with pytest.raises(InvalidGraphError, match="'count'"):
        eigenvalues(nx.path_graph(3), count=4)


# --- published values ------------------------------------------------------------------------


def test_complete_graph_laplacian_polynomial():
    # L(K_n) has eigenvalues 0 and n (multiplicity n - 1): Brouwer & Haemers,
    # Spectra of Graphs (2012), §1.4.1.  So det(xI - L) = x (x - 5)^4 for K_5.
    x = sympy.Symbol("x")
    expected = tuple(int(c) for c in sympy.Poly(x * (x - 5) ** 4, x).all_coeffs())
    assert characteristic_polynomial(nx.complete_graph(5)) == expected


def test_star_and_square_share_the_adjacency_polynomial():
    # K_{1,4} and C_4 + K_1 both have adjacency spectrum {2, 0^3, -2}: Brouwer & Haemers,
    # Spectra of Graphs (2012), §1.3.1 (x^5 - 4x^3).
    square = nx.disjoint_union(nx.cycle_graph(4), nx.empty_graph(1))
    assert characteristic_polynomial(nx.star_graph(4), "adjacency") == (1, 0, -4, 0, 0, 0)
    assert characteristic_polynomial(square, "adjacency") == (1, 0, -4, 0, 0, 0)


def test_petersen_adjacency_polynomial():
    # Petersen graph spectrum 3, 1^5, (-2)^4: Brouwer & Haemers (2012), §1.4.4 (memory).
    x = sympy.Symbol("x")
    expected = tuple(
        int(c) for c in sympy.Poly((x - 3) * (x - 1) ** 5 * (x + 2) ** 4, x).all_coeffs()
    )
    assert characteristic_polynomial(nx.petersen_graph(), "adjacency") == expected


def test_cycle_eigenvalues_are_cosines():
    # Adjacency eigenvalues of C_n are 2 cos(2 pi j / n): Brouwer & Haemers (2012), §1.4.3.
    n = 9
    spectrum = eigenvalues(nx.cycle_graph(n), "adjacency")
    expected = sorted(2 * math.cos(2 * math.pi * j / n) for j in range(n))
    assert np.allclose(spectrum.values, expected, atol=1e-12)
    assert [m for _, m in spectrum.groups] == [2, 2, 2, 2, 1]


def test_path_algebraic_connectivity():
    # a(P_n) = 2 - 2 cos(pi / n): Fiedler, Czechoslovak Math. J. 23 (1973).
    for n in (2, 5, 12):
        assert algebraic_connectivity(nx.path_graph(n)) == pytest.approx(
            2 - 2 * math.cos(math.pi / n), abs=1e-12
        )
    assert algebraic_connectivity(nx.empty_graph(3)) == 0.0


def test_large_graph_extreme_eigenvalues_by_lanczos():
    # L of the cycle C_n has eigenvalues 2 - 2 cos(2 pi j / n) (Brouwer & Haemers, §1.4.3);
    # n = 800 is above the dense threshold, so the sparse solver is used.
    n = 800
    smallest = eigenvalues(nx.cycle_graph(n), count=3, which="smallest")
    largest = eigenvalues(nx.cycle_graph(n), count=1, which="largest")
    assert smallest.method == "scipy.sparse.linalg.eigsh" and not smallest.complete
    expected = [0.0, 2 - 2 * math.cos(2 * math.pi / n), 2 - 2 * math.cos(2 * math.pi / n)]
    assert np.allclose(smallest.values, expected, atol=1e-9)
    assert largest.values[0] == pytest.approx(4.0, abs=1e-9)
    assert algebraic_connectivity(nx.cycle_graph(n)) == pytest.approx(expected[1], rel=1e-6)


def test_spanning_trees_of_wheels_from_eigenvalues():
    # Wheel with n spokes: 1, 5, 16, 45, 121, 320, 841 spanning trees for n = 1..7
    # (OEIS A004146, L_{2n} - 2); W_1 would be a multigraph, so start at n = 3.
    published = {3: 16, 4: 45, 5: 121, 6: 320, 7: 841}
    for n, count in published.items():
        check = spanning_trees_from_spectrum(nx.wheel_graph(n + 1))
        assert check.exact == count
        assert check.estimate == pytest.approx(count, rel=1e-10)
        assert check.agrees


def test_spanning_trees_of_disconnected_graph_is_zero():
    # common fact: a disconnected graph has no spanning tree, and mu_2 = 0.
    check = spanning_trees_from_spectrum(nx.disjoint_union(nx.path_graph(3), nx.path_graph(2)))
    assert check.exact == 0 and check.estimate == 0.0 and check.agrees


def test_spectral_count_of_a_huge_count_stays_finite_in_logs():
    # Hypercube Q_9 has an enormous tree count; the log route must still agree.
    # Tree count of Q_n: OEIS A006237 (checked here through the exact determinant).
    check = spanning_trees_from_spectrum(nx.hypercube_graph(9))
    assert check.agrees
    assert check.log10_estimate == pytest.approx(math.log10(check.exact), rel=1e-9)


# --- agreement with reference libraries ------------------------------------------------------


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_polynomials_agree_with_sympy_on_random_graphs(seed):
    for G in _random_graphs(seed, 12):
        for kind in KINDS:
            rows = graph_matrix(G, kind).to_lists()
            assert characteristic_polynomial(G, kind) == _sympy_charpoly(rows)


def test_multigraph_polynomial_agrees_with_sympy():
    G = nx.MultiGraph([(0, 1), (0, 1), (1, 2), (2, 3), (3, 0), (3, 0), (3, 0)])
    for kind in KINDS:
        rows = graph_matrix(G, kind).to_lists()
        assert characteristic_polynomial(G, kind) == _sympy_charpoly(rows)


def test_batched_polynomials_agree_with_flint_route():
    rng = np.random.default_rng(7)
    count, n = 300, 9
    upper = np.triu((rng.random((count, n, n)) < 0.45).astype(np.int64), 1)
    adjacency = upper + upper.transpose(0, 2, 1)
    degree = adjacency.sum(axis=2)
    laplacian = -adjacency.copy()
    laplacian[:, np.arange(n), np.arange(n)] = degree
    batched = characteristic_polynomials(laplacian)
    for k in range(count):
        assert batched[k] == charpoly_of_rows(laplacian[k].tolist())


@pytest.mark.parametrize("n", [12, 15, 18])
def test_batched_polynomials_near_the_float_limit(n):
    # Dense graphs of these orders put some coefficients beyond 2^53, so the certified route
    # and the python-flint fall-back are both exercised; python-flint is the reference.
    rng = np.random.default_rng(n)
    upper = np.triu((rng.random((40, n, n)) < 0.85).astype(np.int64), 1)
    adjacency = upper + upper.transpose(0, 2, 1)
    signless = adjacency.copy()
    signless[:, np.arange(n), np.arange(n)] = adjacency.sum(axis=2)
    batched = characteristic_polynomials(signless)
    assert batched == [charpoly_of_rows(m.tolist()) for m in signless]


def test_batched_polynomials_fall_back_when_floats_would_round():
    # Entries near 2^40 push the Faddeev-LeVerrier products past 2^53; the routine must
    # detect it and still return the exact polynomial (reference: sympy).
    big = 2**40 + 3
    rows = [[big, 1, 0], [1, big, 1], [0, 1, big]]
    assert characteristic_polynomials(np.array([rows]))[0] == _sympy_charpoly(rows)


def test_eigenvalues_agree_with_numpy_and_polynomial_roots():
    G = nx.gnp_random_graph(14, 0.4, seed=11)
    spectrum = eigenvalues(G, "signless")
    assert spectrum.complete and len(spectrum.values) == 14
    dense = np.array(graph_matrix(G, "signless").to_lists(), dtype=float)
    assert np.allclose(spectrum.values, np.linalg.eigvalsh(dense))
    # the eigenvalues are the roots of the exact polynomial (sympy as the reference)
    x = sympy.Symbol("x")
    polynomial = sympy.Poly(list(characteristic_polynomial(G, "signless")), x)
    for value in spectrum.values:
        assert abs(float(polynomial.eval(value))) < 1e-6 * max(
            1.0, float(sum(abs(c) for c in polynomial.all_coeffs()))
        )


@pytest.mark.parametrize("seed", [5, 6])
def test_eigenvalue_product_matches_exact_tree_count(seed):
    # Matrix-tree theorem (Kirchhoff 1847): the product of the nonzero Laplacian eigenvalues
    # over n is the exact count; reference: networkx's number_of_spanning_trees.
    rng = random.Random(seed)
    for _ in range(10):
        G = nx.gnp_random_graph(rng.randint(2, 16), 0.5, seed=rng.randrange(10**6))
        if not nx.is_connected(G):
            continue
        check = spanning_trees_from_spectrum(G)
        assert check.exact == round(nx.number_of_spanning_trees(G))
        assert check.estimate == pytest.approx(check.exact, rel=1e-9)


# --- results and formatting ------------------------------------------------------------------


def test_relabelling_does_not_change_the_polynomial():
    G = nx.gnp_random_graph(10, 0.5, seed=3)
    mapping = dict(zip(G, random.Random(4).sample(list(G), len(G)), strict=True))
    H = nx.relabel_nodes(G, mapping)
    for kind in KINDS:
        assert characteristic_polynomial(G, kind) == characteristic_polynomial(H, kind)


def test_grouping_tolerance_is_relative_to_the_spectral_radius():
    # common fact: floating eigensolvers return repeated eigenvalues split by ~1e-15.
    ((value, multiplicity),) = group_eigenvalues([1e6, 1e6 + 1e-4], 1e-9)
    assert multiplicity == 2 and value == pytest.approx(1e6 + 5e-5, rel=1e-15)
    assert group_eigenvalues([0.0, 1e-3], 1e-9) == ((0.0, 1), (1e-3, 1))


def test_records_are_json_ready_and_labelled_numeric():
    record = eigenvalues(nx.complete_graph(3)).to_record()
    assert record["numeric"] == "float64" and record["complete"] is True
    assert [d["multiplicity"] for d in record["distinct"]] == [1, 2]
    assert "float64" in eigenvalues(nx.complete_graph(3))._repr_html_()
    check = spanning_trees_from_spectrum(nx.complete_graph(4)).to_record()
    assert check["spanning_trees"] == "16"  # Cayley: 4^2


def test_format_polynomial():
    assert format_polynomial((1, 0, -4, 0, 0, 0)) == "x^5 - 4x^3"
    assert format_polynomial((1, -1)) == "x - 1"
    assert format_polynomial((-2, 3, -1)) == "-2x^2 + 3x - 1"


# --- command line ----------------------------------------------------------------------------


def test_cli_spectrum_table_and_jsonl(cli_runner):
    from graphinv.cli import app
    from graphinv.report.jsonl import json_safe

    result = cli_runner.invoke(app, ["spectrum", "cycle:5"])
    assert result.exit_code == 0, result.output
    # L(C_5): x^5 - 10x^4 + 35x^3 - 50x^2 + 25x; 5 spanning trees (common fact: tau(C_n) = n)
    assert "x^5 - 10x^4 + 35x^3 - 50x^2 + 25x" in result.output
    assert "spanning trees (exact): 5" in result.output and "float64" in result.output
    result = cli_runner.invoke(app, ["spectrum", "cycle:4", "--matrix", "adjacency", "--jsonl"])
    assert result.exit_code == 0, result.output
    import json

    record = json.loads(result.output.splitlines()[0])
    assert record["polynomial"] == json_safe([1, 0, -4, 0, 0])  # A(C_4): x^4 - 4x^2
    assert record["spectrum"]["numeric"] == "float64"


def test_cli_spectrum_rejects_a_bad_matrix(cli_runner):
    from graphinv.cli import app

    result = cli_runner.invoke(app, ["spectrum", "cycle:5", "--matrix", "normal"])
    assert result.exit_code == 2
    assert "Argument 'matrix' must be one of" in result.output


# --- properties ------------------------------------------------------------------------------


@st.composite
def _small_graphs(draw):
    n = draw(st.integers(min_value=1, max_value=7))
    pairs = [(i, j) for i in range(n) for j in range(i + 1, n)]
    chosen = draw(st.lists(st.sampled_from(pairs), unique=True) if pairs else st.just([]))
    G = nx.empty_graph(n)
    G.add_edges_from(chosen)
    return G


@settings(max_examples=40, deadline=None, derandomize=True)
@given(_small_graphs(), _small_graphs(), st.sampled_from(KINDS))
def test_disjoint_union_multiplies_polynomials(G, H, kind):
    # The matrices of G + H are block diagonal, so the characteristic polynomials multiply
    # (common fact; Brouwer & Haemers 2012, §1.3); sympy does the multiplication.
    x = sympy.Symbol("x")
    product = sympy.Poly(list(characteristic_polynomial(G, kind)), x) * sympy.Poly(
        list(characteristic_polynomial(H, kind)), x
    )
    union = characteristic_polynomial(nx.disjoint_union(G, H), kind)
    assert union == tuple(int(c) for c in product.all_coeffs())


@settings(max_examples=40, deadline=None, derandomize=True)
@given(_small_graphs())
def test_laplacian_polynomial_counts_trees(G):
    # Kirchhoff (1847): the coefficient of x in det(xI - L) is (-1)^(n-1) n tau(G);
    # networkx's number_of_spanning_trees is the reference.
    n = G.number_of_nodes()
    polynomial = characteristic_polynomial(G)
    trees = round(nx.number_of_spanning_trees(G)) if n > 1 else 1
    if n > 1 and not nx.is_connected(G):
        trees = 0
    assert polynomial[-2] == (-1) ** (n - 1) * n * trees
