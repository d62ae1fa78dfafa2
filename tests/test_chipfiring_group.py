"""The explicit isomorphism between recurrents and the invariant-factor presentation."""

from __future__ import annotations

import itertools
import random

import networkx as nx
import pytest
import sympy
from sympy.matrices.normalforms import smith_normal_form

import graphinv
from graphinv.chipfiring import (
    ConfigurationError,
    chip_graph,
    configuration_order,
    coordinates,
    from_coordinates,
    group_generators,
    is_recurrent,
    recurrent_configurations,
    recurrent_group,
    recurrent_sum,
)

GRAPHS = {
    # name: (graph, published invariant factors (non-unit), source)
    "K4": (nx.complete_graph(4), (4, 4), "Lorenzini 1991; Biggs 1999: (Z_n)^(n-2) (memory)"),
    "K3,3": (nx.complete_bipartite_graph(3, 3), (3, 3, 9), "Lorenzini 1991 (memory)"),
    "W4": (nx.wheel_graph(5), (3, 15), "Biggs 1999, wheels with even n (memory)"),
    "W5": (nx.wheel_graph(6), (11, 11), "Biggs 1999, wheels with odd n (memory)"),
    "Petersen": (nx.petersen_graph(), (2, 10, 10, 10), "common fact (memory)"),
    "Q3": (nx.hypercube_graph(3), (2, 8, 24), "Bai 2003; small cases common"),
}


@pytest.mark.parametrize("name", list(GRAPHS))
def test_invariant_factors_match_published_and_core(name):
    G, published, _source = GRAPHS[name]
    group = recurrent_group(G)
    assert group.invariant_factors == published
    assert group.invariant_factors == graphinv.critical_group(G).invariant_factors
    assert group.order == graphinv.spanning_tree_count(G)


def test_invariant_factors_match_sympy_on_a_directed_graph():
    # reference library: sympy's Smith normal form of the reduced out-degree Laplacian
    G = nx.DiGraph([(1, 2), (2, 1), (2, 3), (3, 1), (3, 2), (1, 0), (3, 0), (2, 4), (4, 0), (4, 1)])
    cg = chip_graph(G, sink=0)
    group = recurrent_group(cg)
    snf = smith_normal_form(sympy.Matrix(cg.laplacian.toarray().tolist()), domain=sympy.ZZ)
    diagonal = [abs(int(snf[i, i])) for i in range(snf.rows)]
    assert group.invariant_factors == tuple(d for d in diagonal if d != 1)
    assert len(list(recurrent_configurations(cg))) == group.order


@pytest.mark.parametrize("name", ["K4", "K3,3", "W4", "W5", "Petersen", "Q3"])
def test_coordinates_are_a_bijection_on_recurrents(name):
    G = GRAPHS[name][0]
    group = recurrent_group(G)
    recurrents = list(recurrent_configurations(group.graph))
    images = {group.coordinates(r) for r in recurrents}
    assert len(images) == len(recurrents) == group.order
    assert images == set(itertools.product(*(range(d) for d in group.invariant_factors)))
    for r in random.Random(1).sample(recurrents, min(40, len(recurrents))):
        assert group.from_coordinates(group.coordinates(r)) == r


@pytest.mark.parametrize("name", ["K3,3", "W5", "Petersen", "Q3"])
def test_coordinates_are_a_homomorphism(name):
    G = GRAPHS[name][0]
    group = recurrent_group(G)
    recurrents = list(recurrent_configurations(group.graph))
    rng = random.Random(2)
    for _ in range(40):
        a, b = rng.choice(recurrents), rng.choice(recurrents)
        total = group.coordinates(recurrent_sum(a, b))
        expected = tuple(
            (x + y) % d
            for x, y, d in zip(
                group.coordinates(a), group.coordinates(b), group.invariant_factors, strict=True
            )
        )
        assert total == expected
    assert group.coordinates(group.identity) == (0,) * len(group.invariant_factors)


@pytest.mark.parametrize("name", ["K4", "Petersen", "Q3"])
def test_generators_are_recurrent_with_the_right_orders(name):
    G = GRAPHS[name][0]
    generators = group_generators(G)
    group = recurrent_group(generators[0].graph)
    assert len(generators) == len(group.invariant_factors)
    for i, (g, d) in enumerate(zip(generators, group.invariant_factors, strict=True)):
        assert is_recurrent(g)
        assert configuration_order(g) == d
        assert coordinates(g) == tuple(int(j == i) for j in range(len(generators)))


def test_module_functions_and_bad_coordinates():
    cg = chip_graph(nx.complete_graph(4), sink=0)
    r = from_coordinates(cg, [1, 3])
    assert coordinates(r) == (1, 3)
    assert from_coordinates(cg, [5, -1]) == r  # taken modulo the invariant factors
    with pytest.raises(ConfigurationError, match="expected 2 coordinates"):
        from_coordinates(cg, [1])
    other = chip_graph(nx.complete_graph(4), sink=0)
    with pytest.raises(ConfigurationError, match="different chip graph"):
        recurrent_group(cg).coordinates(other.zero())


def test_trivial_group_of_a_tree():
    # common fact: a tree has one spanning tree, so the group is trivial
    group = recurrent_group(nx.balanced_tree(2, 3))
    assert group.invariant_factors == () and group.generators == ()
    assert group.from_coordinates([]) == group.identity


def test_size_limits_give_clear_errors():
    cg = chip_graph(graphinv.wired_grid(5), sink="sink")
    with pytest.raises(graphinv.GraphInvError, match="max_vertices=10"):
        recurrent_group(cg, max_vertices=10)
    with pytest.raises(graphinv.GraphInvError, match="max_vertices=10"):
        configuration_order(cg.zero(), max_vertices=10)
