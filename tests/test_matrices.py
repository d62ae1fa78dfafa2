"""Exact graph matrices: identities every Laplacian satisfies, and bad input."""

from __future__ import annotations

import networkx as nx
import numpy as np
import pytest
import sympy
from hypothesis import given, settings
from strategies import multigraphs

from graphinv import (
    DisconnectedGraphError,
    InvalidGraphError,
    InvalidWeightError,
    adjacency_matrix,
    distance_matrix,
    incidence_matrix,
    laplacian_matrix,
    reduced_laplacian_matrix,
    signless_laplacian_matrix,
)


@settings(max_examples=60, deadline=None)
@given(multigraphs())
def test_laplacian_is_incidence_times_transpose(G):
    # L = B B^T for the oriented incidence matrix B: Biggs, Algebraic Graph Theory (1993), Prop. 4.8.
    L = sympy.Matrix(laplacian_matrix(G).to_lists())
    B = (
        incidence_matrix(G).to_sympy()
        if G.number_of_edges()
        else sympy.zeros(G.number_of_nodes(), 0)
    )
    assert B * B.T == L


@settings(max_examples=60, deadline=None)
@given(multigraphs())
def test_rows_sum_to_zero_and_kernel_counts_components(G):
    # Row sums of L vanish and dim ker L = number of components: common fact
    # (Biggs, Algebraic Graph Theory, 1993, Prop. 4.3).
    L = laplacian_matrix(G).to_sympy()
    assert all(sum(L.row(i)) == 0 for i in range(L.rows))
    assert L.rows - L.rank() == nx.number_connected_components(G)


def test_signless_is_degree_plus_adjacency():
    # Q = D + A by definition (Cvetković, Rowlinson, Simić 2007).
    G = nx.petersen_graph()
    Q = np.array(signless_laplacian_matrix(G).to_lists())
    A = np.array(adjacency_matrix(G).to_lists())
    assert (3 * np.eye(10, dtype=int) == Q - A).all()


def test_multigraph_parallel_edges_add_up():
    G = nx.MultiGraph([(0, 1), (0, 1), (1, 2)])
    G.add_edge(1, 2, weight=3)
    assert laplacian_matrix(G).to_lists() == [[2, -2, 0], [-2, 6, -4], [0, -4, 4]]


def test_reduced_laplacian_keeps_full_degrees_and_drops_one_vertex_per_component():
    G = nx.disjoint_union(nx.path_graph(3), nx.cycle_graph(3))
    M = reduced_laplacian_matrix(G)
    assert M.row_labels == (1, 2, 4, 5)
    assert M.to_lists() == [[2, -1, 0, 0], [-1, 1, 0, 0], [0, 0, 2, -1], [0, 0, -1, 2]]


def test_directed_reduced_laplacian_needs_a_sink():
    D = nx.DiGraph([(0, 1), (1, 2), (2, 0)])
    with pytest.raises(InvalidGraphError, match="sink"):
        reduced_laplacian_matrix(D)
    assert reduced_laplacian_matrix(D, sink=0).to_lists() == [[1, -1], [0, 1]]


def test_distance_matrix_needs_connected_graph():
    with pytest.raises(DisconnectedGraphError, match="2 components"):
        distance_matrix(nx.empty_graph(2))


def test_sparse_form_matches_dense():
    G = nx.grid_2d_graph(5, 4)
    M = laplacian_matrix(G)
    assert (M.to_scipy().toarray() == np.array(M.to_lists())).all()
    assert M.to_flint().tolist() == M.to_lists()


@pytest.mark.parametrize("weight", [0, -1, 1.5, "2", True])
def test_bad_weights_are_rejected(weight):
    G = nx.Graph()
    G.add_edge("a", "b", weight=weight)
    with pytest.raises(InvalidWeightError, match="positive integer multiplicity"):
        laplacian_matrix(G)


def test_empty_graph_is_rejected():
    with pytest.raises(InvalidGraphError, match="no vertices"):
        laplacian_matrix(nx.Graph())


def test_huge_multiplicities_stay_exact():
    G = nx.Graph()
    G.add_edge(0, 1, weight=2**70)
    M = laplacian_matrix(G)
    assert M.to_lists() == [[2**70, -(2**70)], [-(2**70), 2**70]]
    with pytest.raises(OverflowError):
        M.to_scipy()
