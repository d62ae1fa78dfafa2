"""Batch results against the single-graph API, reference libraries and published values."""

from __future__ import annotations

import math
import random

import flint
import networkx as nx
import pytest
import sympy

import graphinv
from graphinv.batch.engine import run_batch
from graphinv.batch.invariants import (
    INVARIANTS,
    KernelSettings,
    canonical_graph6,
    compute_invariants,
    parse_invariants,
    process_chunk,
)
from graphinv.errors import GraphInvError


def rows_of(G: nx.Graph) -> list[list[int]]:
    order = list(G)
    return [[1 if G.has_edge(u, v) else 0 for v in order] for u in order]


def ints(text: str) -> list[int]:
    return [int(x) for x in text.split(",")] if text else []


def test_atlas_agrees_with_single_graph_api(atlas_store, stored_rows):
    # networkx's atlas: all 1253 graphs on 0..7 vertices (Read & Wilson, An Atlas of Graphs, 1998)
    atlas = nx.graph_atlas_g()
    rows = stored_rows(atlas_store)
    assert [row["position"] for row in rows] == list(range(len(atlas)))
    assert rows[0]["error"] == "line 1: the graph has no vertices; expected at least one"
    for G, row in zip(atlas[1:], rows[1:], strict=True):
        assert row["error"] is None, row
        group = graphinv.critical_group(G)
        assert ints(row["critical_group"]) == list(group.invariant_factors)
        assert row["components"] == nx.number_connected_components(G)
        assert row["spanning_trees"] == str(graphinv.spanning_tree_count(G))
        assert row["vertices"] == G.number_of_nodes()
        assert row["edges"] == G.number_of_edges()
        assert ints(row["degrees"]) == sorted((d for _, d in G.degree()), reverse=True)


def test_atlas_smith_forms_agree_with_python_flint(atlas_store, stored_rows):
    # python-flint's fmpz_mat.snf is the reference Smith normal form (FLINT, Hart et al.)
    atlas = nx.graph_atlas_g()
    for G, row in zip(atlas[1:], stored_rows(atlas_store)[1:], strict=True):
        A = rows_of(G)
        degrees = [sum(r) for r in A]
        Q = [[degrees[i] if i == j else A[i][j] for j in range(len(A))] for i in range(len(A))]
        for matrix, column in ((A, "adjacency_smith"), (Q, "signless_smith")):
            snf = flint.fmpz_mat(matrix).snf()
            assert ints(row[column]) == [int(snf[i, i]) for i in range(len(matrix))]


def test_polynomials_agree_with_sympy_on_a_seeded_sample(atlas_store, stored_rows):
    # sympy's Matrix.charpoly is the reference characteristic polynomial
    atlas = nx.graph_atlas_g()
    rows = stored_rows(atlas_store)
    for index in random.Random(6).sample(range(1, len(atlas)), 40):
        G = atlas[index]
        A = sympy.Matrix(rows_of(G))
        D = sympy.diag(*[sum(A.row(i)) for i in range(A.rows)])
        x = sympy.Symbol("x")
        for M, column in (
            (D - A, "laplacian_polynomial"),
            (D + A, "signless_polynomial"),
            (A, "adjacency_polynomial"),
        ):
            expected = [int(c) for c in M.charpoly(x).all_coeffs()]
            assert ints(rows[index][column]) == expected


def test_atlas_canonical_keys_separate_exactly_the_isomorphism_classes(atlas_store, stored_rows):
    # The atlas lists each isomorphism class once (Read & Wilson 1998), so all keys differ;
    # a relabelled copy must get the same key (networkx.is_isomorphic as reference).
    rows = stored_rows(atlas_store)[1:]
    keys = [row["canonical_key"] for row in rows]
    assert len(set(keys)) == len(keys)
    rng = random.Random(7)
    atlas = nx.graph_atlas_g()
    for index in rng.sample(range(1, len(atlas)), 60):
        G = atlas[index]
        order = list(G)
        rng.shuffle(order)
        H = nx.relabel_nodes(G, dict(zip(G, order, strict=True)))
        assert canonical_graph6(rows_of(nx.convert_node_labels_to_integers(H))) == keys[index - 1]
        assert nx.is_isomorphic(nx.from_graph6_bytes(keys[index - 1].encode()), G)


@pytest.mark.parametrize(
    ("n", "adjacency", "laplacian", "signless"),
    # Haemers & Spence, "Enumeration of cospectral graphs", European J. Combin. 25 (2004),
    # Table 1 (A column also OEIS A006608; L and Q columns from memory of that table)
    [(4, 0, 0, 2), (5, 2, 0, 4), (6, 10, 4, 16), (7, 110, 130, 102)],
)
def test_cospectral_counts_match_haemers_spence(atlas_store, n, adjacency, laplacian, signless):
    from graphinv.batch.queries import cospectral_classes

    counts = {}
    for matrix in ("adjacency", "laplacian", "signless"):
        counts[matrix] = sum(
            len(c.members)
            for c in cospectral_classes(atlas_store, matrix=matrix)
            if len(c.polynomial) == n + 1
        )
    assert counts == {"adjacency": adjacency, "laplacian": laplacian, "signless": signless}


def test_published_critical_groups_and_tree_counts(tmp_path, stored_rows):
    store = tmp_path / "families.db"
    specs = ["complete:3..8", "cycle:3..9", "wheel:3..7", "petersen:5,2", "bipartite:3,3"]
    run_batch(specs, store=store, workers=1, invariants="critical-group,spanning-trees")
    rows = {row["content"]: row for row in stored_rows(store)}
    for n in range(3, 9):
        # K(K_n) = (Z_n)^(n-2): Lorenzini, Discrete Math. 91 (1991); Biggs 1999 (memory)
        assert ints(rows[f"complete:{n}"]["critical_group"]) == [n] * (n - 2)
        # Cayley's formula n^(n-2), OEIS A000272
        assert rows[f"complete:{n}"]["spanning_trees"] == str(n ** (n - 2))
    for n in range(3, 10):
        # K(C_n) = Z_n: common fact
        assert ints(rows[f"cycle:{n}"]["critical_group"]) == [n]
    wheels = {3: [4, 4], 4: [3, 15], 5: [11, 11], 6: [8, 40], 7: [29, 29]}
    trees = {3: 16, 4: 45, 5: 121, 6: 320, 7: 841}  # OEIS A004146
    for n, factors in wheels.items():
        # Biggs 1999, section 9 (memory): Z_{L_n}^2 for odd n, Z_{F_n} + Z_{5 F_n} for even n
        assert ints(rows[f"wheel:{n}"]["critical_group"]) == factors
        assert rows[f"wheel:{n}"]["spanning_trees"] == str(trees[n])
    # Petersen graph: Z2 + Z10^3, order 2000 (common fact, memory)
    assert ints(rows["petersen:5,2"]["critical_group"]) == [2, 10, 10, 10]
    # K_{3,3}: Z3 + Z3 + Z9 (Lorenzini 1991, memory)
    assert ints(rows["bipartite:3,3"]["critical_group"]) == [3, 3, 9]


def test_kernel_reports_bad_lines_without_stopping():
    items = [(0, 1, "Bw", None), (1, 2, "B!", None), (2, 3, "C~~", None), (3, 4, "A_", None)]
    rows = process_chunk(items, KernelSettings(("spanning_trees",)))
    assert [row[0] for row in rows] == [0, 1, 2, 3]
    assert rows[0][-1] is None and rows[0][8] == "3"  # the triangle has 3 spanning trees
    assert rows[1][-1].startswith("line 2: malformed graph6")
    assert rows[2][-1].startswith("line 3: malformed graph6")
    assert rows[3][-1] is None and rows[3][8] == "1"


def test_multigraph_rows_and_keys():
    # Two vertices joined by m parallel edges: L = [[m, -m], [-m, m]], K = Z_m, m spanning
    # trees (common fact)
    for m in (2, 3, 7):
        row = compute_invariants([[0, m], [m, 0]])
        assert row.critical_group == str(m) and row.spanning_trees == str(m)
        assert row.canonical_key.startswith("multi:")
    assert (
        compute_invariants([[0, 2], [2, 0]]).canonical_key
        != compute_invariants([[0, 3], [3, 0]]).canonical_key
    )
    # A path a-b-c with the doubled edge at either end: isomorphic, so equal keys
    left = [[0, 2, 0], [2, 0, 1], [0, 1, 0]]
    right = [[0, 1, 0], [1, 0, 2], [0, 2, 0]]
    assert canonical_graph6(left) == canonical_graph6(right)


def test_tree_count_and_group_order_are_independent_routes():
    # random seeded graphs: product of invariant factors = tau(G) (Kirchhoff; Biggs 1999),
    # tau from networkx's number_of_spanning_trees as the reference
    rng = random.Random(11)
    for _ in range(30):
        G = nx.gnp_random_graph(rng.randrange(5, 14), 0.5, seed=rng.randrange(10**6))
        if not nx.is_connected(G):
            continue
        row = compute_invariants(rows_of(G), invariants=("critical_group", "spanning_trees"))
        assert math.prod(ints(row.critical_group)) == int(row.spanning_trees)
        assert int(row.spanning_trees) == round(nx.number_of_spanning_trees(G))


def test_selection_of_invariants():
    assert parse_invariants("all") == INVARIANTS
    assert parse_invariants(["degrees", "critical-group"]) == ("critical_group", "degrees")
    with pytest.raises(GraphInvError, match="unknown invariant 'eigenvalues'"):
        parse_invariants("eigenvalues")
    with pytest.raises(GraphInvError, match="empty"):
        parse_invariants(" , ")
    row = compute_invariants(rows_of(nx.cycle_graph(5)), invariants=("degrees",))
    assert row.degrees == "2,2,2,2,2" and row.critical_group is None


def test_graph6_lines_round_trip_through_the_kernel(graph6_line):
    G = nx.petersen_graph()
    (row,) = process_chunk([(0, 1, graph6_line(G), None)], KernelSettings())
    assert row[-1] is None and row[6] == "2,10,10,10"


@pytest.mark.slow
@pytest.mark.nauty
@pytest.mark.parametrize(
    ("n", "graphs", "connected", "adjacency", "laplacian", "signless"),
    # graphs: OEIS A000088; connected: OEIS A001349; cospectral counts: Haemers & Spence,
    # European J. Combin. 25 (2004), Table 1 (A column also OEIS A006608; L and Q columns
    # from memory of that table)
    [(8, 12346, 11117, 1722, 1767, 1201), (9, 274668, 261080, 51039, 42595, 19001)],
)
def test_all_graphs_from_geng(tmp_path, n, graphs, connected, adjacency, laplacian, signless):
    import shutil
    import subprocess

    from graphinv.batch.queries import count_cospectral, survey_store

    if shutil.which("nauty-geng") is None:
        pytest.skip("nauty-geng is not installed (Debian package nauty)")
    source = tmp_path / f"all{n}.g6"
    with source.open("w") as handle:
        subprocess.run(["nauty-geng", "-q", str(n)], check=True, stdout=handle)
    store = tmp_path / f"all{n}.db"
    result = run_batch([str(source)], store=store, progress=False)
    assert (result.computed, result.failed) == (graphs, 0)
    assert survey_store(store).connected == connected
    counts = {m: count_cospectral(store, m).graphs for m in ("adjacency", "laplacian", "signless")}
    assert counts == {"adjacency": adjacency, "laplacian": laplacian, "signless": signless}


def test_without_pynauty_the_default_set_drops_only_the_canonical_key(
    tmp_path, monkeypatch, stored_rows
):
    import sys

    monkeypatch.setitem(sys.modules, "pynauty", None)
    with pytest.warns(UserWarning, match="pynauty is not installed"):
        run_batch(["cycle:4..5"], store=tmp_path / "plain.db", workers=1)
    rows = stored_rows(tmp_path / "plain.db")
    # K(C_n) = Z_n (common fact)
    assert [(r["critical_group"], r["canonical_key"]) for r in rows] == [("4", None), ("5", None)]
    with pytest.raises(GraphInvError, match="the canonical key needs pynauty"):
        run_batch(["cycle:4"], store=tmp_path / "k.db", workers=1, invariants="canonical-key")
