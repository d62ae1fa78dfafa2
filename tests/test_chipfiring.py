"""Chip-firing: stabilization, recurrents, superstables, the identity, group operations."""

from __future__ import annotations

import itertools
import random

import networkx as nx
import numpy as np
import pytest
import sympy
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import graphinv
from graphinv.chipfiring import (
    Configuration,
    ConfigurationError,
    StabilizationError,
    burning_configuration,
    chip_graph,
    configuration_order,
    equivalent_recurrent,
    equivalent_superstable,
    identity_configuration,
    is_recurrent,
    is_superstable,
    recurrent_configurations,
    recurrent_identity,
    recurrent_negative,
    recurrent_sum,
    stabilize,
    superstable_configurations,
    wired_grid,
)
from graphinv.chipfiring.stabilize import _rounds_int64
from graphinv.errors import DisconnectedGraphError, InvalidGraphError

# ---------------------------------------------------------------- helpers (independent routes)


def sequential_stabilize(graph, chips, rng):
    """Reference: fire one unstable vertex at a time, chosen at random (pure Python)."""
    out = [[] for _ in range(len(graph))]
    transfer = graph.transfer.tocsc()
    for v in range(len(graph)):
        lo, hi = transfer.indptr[v], transfer.indptr[v + 1]
        out[v] = list(
            zip(transfer.indices[lo:hi].tolist(), transfer.data[lo:hi].tolist(), strict=True)
        )
    degree = graph.degree.tolist()
    chips = [int(x) for x in chips]
    firings = [0] * len(chips)
    while True:
        unstable = [v for v, c in enumerate(chips) if c >= degree[v]]
        if not unstable:
            return chips, firings
        v = rng.choice(unstable)
        chips[v] -= degree[v]
        firings[v] += 1
        for w, m in out[v]:
            chips[w] += m


def stable_configurations(graph):
    """Every stable nonnegative configuration (full enumeration)."""
    for values in itertools.product(*(range(d) for d in graph.degree.tolist())):
        yield Configuration(graph, np.array(values, dtype=np.int64))


def reduced_laplacian_det(G, sink):
    """Kirchhoff / Tutte: det of the reduced Laplacian, by sympy (reference library)."""
    order = [v for v in G if v != sink]
    index = {v: i for i, v in enumerate(order)}
    n = len(order)
    M = sympy.zeros(n, n)
    edges = G.edges(data="weight", default=1)
    for u, v, m in edges:
        if u == v:
            continue
        arcs = [(u, v)] if G.is_directed() else [(u, v), (v, u)]
        for a, b in arcs:
            if a == sink:
                continue
            M[index[a], index[a]] += m
            if b != sink:
                M[index[a], index[b]] -= m
    return int(M.det())


def has_legal_set_firing(graph, chips):
    """Brute force: a nonempty set S can fire at once without any vertex going negative."""
    transfer = graph.transfer.toarray()  # [w, v] = edges v -> w
    n = len(graph)
    for size in range(1, n + 1):
        for S in itertools.combinations(range(n), size):
            inside = set(S)
            ok = True
            for v in S:
                stay = sum(transfer[w, v] for w in inside if w != v)
                if chips[v] < graph.degree[v] - stay:
                    ok = False
                    break
            if ok:
                return True
    return False


def odometer_is_least(graph, final, firings):
    """Least action certificate (undirected): no nonempty S inside supp(u) may be unfired,
    i.e. Dhar's burning from outside supp(u) burns all of supp(u)."""
    transfer = graph.transfer.toarray()
    unburnt = {v for v in range(len(graph)) if firings[v] > 0}
    changed = True
    while changed:
        changed = False
        for v in list(unburnt):
            into_unburnt = sum(transfer[w, v] for w in unburnt if w != v)
            if final[v] >= into_unburnt:
                unburnt.discard(v)
                changed = True
    return not unburnt


SMALL_GRAPHS = {
    # name: (graph, number of spanning trees, source)
    "K4": (nx.complete_graph(4), 16, "Cayley's formula, OEIS A000272"),
    "K5": (nx.complete_graph(5), 125, "Cayley's formula, OEIS A000272"),
    "K2,3": (nx.complete_bipartite_graph(2, 3), 12, "m^(n-1) n^(m-1), Scoins 1962"),
    "C6": (nx.cycle_graph(6), 6, "common fact"),
    "wheel4": (nx.wheel_graph(5), 45, "OEIS A004146"),
    "ladder4": (nx.ladder_graph(4), 56, "OEIS A001353"),
    "wired2x2": (wired_grid(2), 192, "dual of the 3x3 grid, OEIS A007341"),
    "tree": (nx.balanced_tree(2, 2), 1, "common fact"),
}


# ------------------------------------------------------------------------ chip graphs, input


def test_chip_graph_conventions():
    cg = chip_graph(nx.MultiGraph([(0, 1), (0, 1), (1, 2)]), sink=0)
    assert cg.vertices == (1, 2)
    assert cg.degree.tolist() == [3, 1]
    assert cg.sink_edges.tolist() == [2, 0]


def test_unknown_vertex_and_sink_key_rejected():
    cg = chip_graph(nx.path_graph(3), sink=0)
    with pytest.raises(ConfigurationError, match="unknown vertex 7"):
        cg.configuration({7: 1})
    with pytest.raises(ConfigurationError, match="is the sink"):
        cg.configuration({0: 1})
    with pytest.raises(ConfigurationError, match="integers"):
        cg.configuration({1: 1.5})


def test_no_path_to_sink_is_an_error():
    with pytest.raises(DisconnectedGraphError, match="no path from vertex 3 to the sink 0"):
        chip_graph(nx.DiGraph([(1, 0), (2, 1), (3, 4), (4, 3)]), sink=0)
    with pytest.raises(DisconnectedGraphError, match="no path"):
        chip_graph(nx.Graph([(0, 1), (2, 3)]), sink=0)
    with pytest.raises(InvalidGraphError, match="not a vertex"):
        chip_graph(nx.path_graph(3), sink=9)
    with pytest.raises(InvalidGraphError, match="needs a sink"):
        chip_graph(nx.DiGraph([(0, 1), (1, 0)]))


def test_round_cap_raises():
    cg = chip_graph(nx.path_graph(30), sink=0)
    with pytest.raises(StabilizationError, match="did not finish within 3 rounds"):
        # one extra chip on the maximal stable configuration sets off a long avalanche
        stabilize(cg.maximal_stable() + cg.configuration({15: 1}), max_rounds=3)


# ------------------------------------------------------------------------- stabilization


def random_graph(rng, kind):
    n = rng.randint(3, 8)
    if kind == "directed":
        while True:
            G = nx.gnp_random_graph(n, 0.5, seed=rng.randint(0, 10**6), directed=True)
            G.add_edge(n - 1, 0)
            if all(nx.has_path(G, v, 0) for v in G):
                return G, 0
    G = nx.gnp_random_graph(n, 0.6, seed=rng.randint(0, 10**6))
    G.add_edges_from((i, i + 1) for i in range(n - 1))
    if kind == "multi":
        for u, v in G.edges:
            G[u][v]["weight"] = rng.randint(1, 3)
    return G, rng.choice(list(G))


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(seed=st.integers(0, 10**6), kind=st.sampled_from(["simple", "multi", "directed"]))
def test_abelian_property_against_one_vertex_at_a_time(seed, kind):
    # Dhar 1990: the stable result and the firing vector do not depend on the firing order.
    rng = random.Random(seed)
    G, sink = random_graph(rng, kind)
    cg = chip_graph(G, sink=sink)
    chips = [rng.randint(-3, 4 * int(d)) for d in cg.degree]  # negative counts never fire
    result = stabilize(Configuration(cg, np.array(chips, dtype=np.int64)))
    for _ in range(2):
        final, firings = sequential_stabilize(cg, chips, rng)
        assert result.stable.chips.tolist() == final
        assert result.firings.tolist() == firings


def test_head_start_agrees_with_plain_rounds():
    # The certified least-action head start must not change the result (Fey-Levine-Peres 2010).
    G = wired_grid(24)
    cg = chip_graph(G, sink="sink")
    rng = np.random.default_rng(5)
    chips = rng.integers(0, 40, len(cg))
    chips[cg.index[(12, 12)]] = 20_000
    result = stabilize(Configuration(cg, chips))
    final, firings, _ = _rounds_int64(cg, chips, 10**8)
    assert result.stable.chips.tolist() == final.tolist()
    assert result.firings.tolist() == firings.tolist()
    assert result.rounds < _rounds_int64(cg, chips, 10**8)[2]


def test_huge_counts_are_exact():
    # Beyond int64 the stabilizer works in Python integers; the result must satisfy
    # c - L~^T u = f with f stable, and u must be least (least action principle).
    cg = chip_graph(nx.cycle_graph(7), sink=0)
    big = 3 * 2**80 + 12345
    chips = [big, 0, 5, 0, 0, big // 7]
    result = stabilize(Configuration(cg, np.array(chips, dtype=object)))
    u = [int(x) for x in result.firings.tolist()]
    f = [int(x) for x in result.stable.chips.tolist()]
    M = cg.laplacian.toarray().tolist()
    assert [c - sum(M[i][j] * u[j] for j in range(6)) for i, c in enumerate(chips)] == f
    assert result.stable.is_stable() and min(f) >= 0
    assert odometer_is_least(cg, f, u)


def test_single_vertex_with_many_sink_edges():
    # common fact: one vertex with m edges to the sink keeps N mod m chips and fires N div m times
    G = nx.Graph([(0, 1, {"weight": 7})])
    cg = chip_graph(G, sink=0)
    result = stabilize(cg.configuration({1: 10**40 + 3}))
    assert result.stable.to_dict() == {1: (10**40 + 3) % 7}
    assert result.firing_dict() == {1: (10**40 + 3) // 7}


# ------------------------------------------------------------------ recurrents: enumeration


@pytest.mark.parametrize("name", list(SMALL_GRAPHS))
def test_recurrents_count_spanning_trees(name):
    # Dhar 1990; Biggs 1999: |recurrents| = number of spanning trees.
    G, trees, _source = SMALL_GRAPHS[name]
    cg = chip_graph(G)
    found = {c for c in stable_configurations(cg) if is_recurrent(c)}
    assert len(found) == trees
    assert set(recurrent_configurations(cg)) == found
    assert graphinv.spanning_tree_count(G) == trees


def test_superstables_by_definition_and_duality():
    # Holroyd et al. 2008: c superstable (no legal set-firing) iff c_max - c recurrent;
    # superstables are as many as spanning trees.
    for G in (
        nx.complete_graph(4),
        nx.wheel_graph(5),
        nx.MultiGraph([(0, 1), (0, 1), (1, 2), (2, 0)]),
    ):
        cg = chip_graph(G)
        found = set()
        for c in stable_configurations(cg):
            brute = not has_legal_set_firing(cg, c.chips.tolist())
            assert is_superstable(c) == brute
            assert is_recurrent(cg.maximal_stable() - c) == brute
            if brute:
                found.add(c)
        assert len(found) == reduced_laplacian_det(G, cg.sink)
        assert set(superstable_configurations(cg)) == found


def test_directed_recurrents_match_search_and_arborescences():
    # Holroyd et al. 2008, Thm 2.? (matrix-tree): |recurrents| = det(reduced Laplacian) =
    # number of spanning arborescences into the sink (checked with sympy).  Speer's burning test
    # must agree with the search from c_max.
    rng = random.Random(11)
    for _ in range(6):
        G, sink = random_graph(rng, "directed")
        cg = chip_graph(G, sink=sink)
        found = set(recurrent_configurations(cg))
        assert len(found) == reduced_laplacian_det(G, sink)
        assert len(found) == graphinv.spanning_tree_count(G, sink=sink)
        for c in stable_configurations(cg):
            assert is_recurrent(c) == (c in found)


def test_burning_configuration_undirected():
    # Dhar 1990: b(v) = number of edges from v to the sink.
    b = burning_configuration(wired_grid(3), sink="sink")
    assert b.to_dict() == {
        (0, 0): 2,
        (0, 1): 1,
        (0, 2): 2,
        (1, 0): 1,
        (1, 1): 0,
        (1, 2): 1,
        (2, 0): 2,
        (2, 1): 1,
        (2, 2): 2,
    }


# ---------------------------------------------------------------------------- the identity


@pytest.mark.parametrize(
    ("n", "expected"),
    [
        # reference README, OEIS A007341 comments
        (2, [[2, 2], [2, 2]]),
        (3, [[2, 1, 2], [1, 0, 1], [2, 1, 2]]),
        (4, [[2, 3, 3, 2], [3, 2, 2, 3], [3, 2, 2, 3], [2, 3, 3, 2]]),
    ],
)
def test_identity_of_wired_grid_matches_published(n, expected):
    identity = recurrent_identity(wired_grid(n), "sink")
    assert "sink" not in identity
    assert [[identity[(r, c)] for c in range(n)] for r in range(n)] == expected


@pytest.mark.parametrize(
    "G",
    [
        nx.petersen_graph(),
        nx.wheel_graph(6),
        nx.MultiGraph([(0, 1), (0, 1), (1, 2), (2, 3), (3, 0), (1, 3)]),
    ],
)
def test_identity_is_recurrent_and_neutral(G):
    # Biggs 1999: the recurrents form a group; the identity fixes every element.
    cg = chip_graph(G)
    e = identity_configuration(cg)
    assert is_recurrent(e)
    for r in itertools.islice(recurrent_configurations(cg), 300):
        assert recurrent_sum(e, r) == r
    assert equivalent_recurrent(cg.zero()) == e


def test_identity_symmetry_of_larger_wired_grid():
    # The identity is invariant under the symmetries of the square (common fact: the identity
    # is unique, and the dihedral group maps it to itself).
    n = 9
    identity = recurrent_identity(wired_grid(n), "sink")
    grid = np.array([[identity[(r, c)] for c in range(n)] for r in range(n)])
    assert (grid == grid.T).all() and (grid == grid[::-1]).all() and (grid == grid[:, ::-1]).all()
    assert is_recurrent(identity_configuration(wired_grid(n), sink="sink")) is True


def test_identity_for_directed_graph():
    G = nx.DiGraph([(1, 2), (2, 1), (2, 3), (3, 1), (3, 0), (1, 0)])
    cg = chip_graph(G, sink=0)
    e = identity_configuration(cg)
    assert is_recurrent(e)
    for r in recurrent_configurations(cg):
        assert recurrent_sum(e, r) == r


# ------------------------------------------------------------------- group operations, order


@pytest.mark.parametrize(
    "G", [nx.petersen_graph(), nx.complete_bipartite_graph(3, 3), nx.wheel_graph(5)]
)
def test_group_order_and_element_orders(G):
    # Biggs 1999: recurrents ~ critical group; Lagrange: element orders divide the exponent.
    cg = chip_graph(G)
    group = graphinv.critical_group(G)
    recurrents = list(recurrent_configurations(cg))
    assert len(recurrents) == group.order
    rng = random.Random(3)
    for r in rng.sample(recurrents, 20):
        k = configuration_order(r)
        assert group.exponent % k == 0
        # k r = identity and no smaller positive multiple is
        total = r
        for _ in range(2, k + 1):
            assert total != identity_configuration(cg)
            total = recurrent_sum(total, r)
        assert total == identity_configuration(cg) or k == 1


def test_negation_and_superstable_equivalent():
    cg = chip_graph(nx.petersen_graph())
    rng = random.Random(4)
    e = identity_configuration(cg)
    for r in rng.sample(list(recurrent_configurations(cg)), 15):
        assert recurrent_sum(r, recurrent_negative(r)) == e
        s = equivalent_superstable(r)
        assert is_superstable(s)
        assert equivalent_recurrent(s) == r


def test_group_operations_reject_bad_input():
    cg = chip_graph(nx.cycle_graph(4), sink=0)
    good = cg.maximal_stable()
    with pytest.raises(ConfigurationError, match="negative chips"):
        recurrent_sum(good, cg.configuration({1: -1}))
    with pytest.raises(ConfigurationError, match="not recurrent"):
        recurrent_sum(good, cg.zero())
    with pytest.raises(ConfigurationError, match="stable"):
        recurrent_negative(cg.configuration({1: 5}))
    other = chip_graph(nx.cycle_graph(4), sink=0)
    with pytest.raises(ConfigurationError, match="different chip graphs"):
        good + other.maximal_stable()
    assert not is_recurrent(cg.configuration({1: -1, 2: 1, 3: 1}))


def test_contract_accepts_multigraph_and_positional_sink():
    G = nx.MultiGraph([(0, 1), (0, 1), (1, 2), (2, 0)])
    identity = graphinv.recurrent_identity(G, 0)
    assert set(identity) == {1, 2}
    assert all(isinstance(v, int) for v in identity.values())
    cg = chip_graph(G, sink=0)
    assert is_recurrent(cg.configuration(identity))


@pytest.mark.parametrize("mode", ["iterative", "garbage"])
def test_head_start_is_safe_whatever_the_solver_returns(mode, monkeypatch):
    # The head start relies only on its exact certificate: an iterative solve, or even a
    # solve returning noise, must leave the result identical to plain rounds.
    import importlib

    stabilize_module = importlib.import_module("graphinv.chipfiring.stabilize")
    monkeypatch.setattr(stabilize_module, "_DIRECT_VERTICES", 10)
    monkeypatch.setattr(stabilize_module, "_DIRECT_PROFILE", 10)
    cg = chip_graph(wired_grid(22), sink="sink")
    if mode == "garbage":
        assert stabilize_module._solver(cg).green_bound is not None  # a true bound on L~^-1
        noise = np.random.default_rng(9)
        monkeypatch.setattr(
            stabilize_module._Solver,
            "solve",
            lambda self, rhs: noise.normal(0.0, 1e4, rhs.shape[0]) + 1e3,
        )
    chips = np.zeros(len(cg), dtype=np.int64)
    chips[cg.index[(3, 17)]] = 30_000
    chips[cg.index[(11, 11)]] = 12_345
    result = stabilize(Configuration(cg, chips))
    final, firings, rounds = _rounds_int64(cg, chips, 10**8)
    assert result.stable.chips.tolist() == final.tolist()
    assert result.firings.tolist() == firings.tolist()
    if mode == "iterative":
        assert result.rounds < rounds / 2  # the certified head start did apply


@pytest.mark.slow
def test_identity_of_the_100_grid_is_idempotent_and_symmetric():
    # The identity e satisfies e + e = e, is recurrent, and is invariant under the symmetries of
    # the square (common fact: the identity is unique in the group).
    cg = chip_graph(wired_grid(100), sink="sink")
    e = identity_configuration(cg)
    assert is_recurrent(e)
    assert stabilize(e + e).stable == e
    grid = e.chips.reshape(100, 100)
    assert (grid == grid.T).all() and (grid == grid[::-1, ::-1]).all()
