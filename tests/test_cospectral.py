"""Cospectral classes, duplicates and comparisons (graphinv.cospectral)."""

from __future__ import annotations

import random
import shutil
import subprocess

import networkx as nx
import pytest

import graphinv.cospectral as cospectral_module
from graphinv.cospectral import (
    canonical_key,
    classes_from_keys,
    compare_graphs,
    cospectral_classes,
    find_cospectral,
    is_isomorphic,
    polynomial_keys,
)
from graphinv.errors import InvalidGraphError
from graphinv.report.jsonl import to_json_line

KINDS = ("adjacency", "laplacian", "signless")

# Haemers & Spence, "Enumeration of cospectral graphs", European J. Combin. 25 (2004), Table 1:
# number of graphs on n vertices having a non-isomorphic mate, for A, L and Q.  The A column is
# also OEIS A006608; the L and Q columns are marked "(memory)" in /work/shared/reference.
HAEMERS_SPENCE = {
    4: (0, 0, 2),
    5: (2, 0, 4),
    6: (10, 4, 16),
    7: (110, 130, 102),
    8: (1722, 1767, 1201),
    9: (51039, 42595, 19001),
}


def _atlas(n: int) -> list[nx.Graph]:
    # networkx's graph atlas lists every graph on up to 7 vertices exactly once
    # (Read & Wilson, An Atlas of Graphs, 1998).
    return [G for G in nx.graph_atlas_g() if G.number_of_nodes() == n]


def _mate_counts(graphs: list[nx.Graph]) -> tuple[int, ...]:
    return tuple(sum(len(c) for c in cospectral_classes(graphs, kind)) for kind in KINDS)


def _geng(n: int) -> list[nx.Graph]:
    from graphinv.io import from_graph6

    done = subprocess.run(["nauty-geng", "-q", str(n)], capture_output=True, text=True, check=True)
    return [from_graph6(line) for line in done.stdout.split()]


needs_geng = pytest.mark.skipif(shutil.which("nauty-geng") is None, reason="nauty-geng missing")


# --- bad input -------------------------------------------------------------------------------


def test_directed_graph_is_refused():
    with pytest.raises(InvalidGraphError, match="graph 1: cospectral analysis needs undirected"):
        cospectral_classes([nx.path_graph(3), nx.DiGraph([(0, 1)])])


def test_non_graph_is_refused():
    with pytest.raises(InvalidGraphError, match="expected a networkx graph, not list"):
        cospectral_classes([[(0, 1)]])  # type: ignore[list-item]


def test_bad_matrix_is_refused():
    with pytest.raises(InvalidGraphError, match="Argument 'matrix'"):
        cospectral_classes([nx.path_graph(3)], "distance")


def test_missing_canonical_key_needs_a_decider():
    with pytest.raises(InvalidGraphError, match="no canonical key"):
        classes_from_keys([(0, "p", None), (1, "p", "a")])


def test_repeated_position_is_refused():
    with pytest.raises(InvalidGraphError, match="appears twice"):
        classes_from_keys([(0, "p", "a"), (0, "p", "b")])


def test_unknown_invariant_is_refused():
    with pytest.raises(InvalidGraphError, match="Argument 'invariants'"):
        find_cospectral([nx.path_graph(3)], invariants=["girth"])


# --- published values ------------------------------------------------------------------------


def test_smallest_adjacency_pair():
    # K_{1,4} and C_4 + K_1: the smallest A-cospectral pair (Brouwer & Haemers, Spectra of
    # Graphs, 2012, §1.3.1).
    graphs = _atlas(5)
    star = next(k for k, G in enumerate(graphs) if nx.is_isomorphic(G, nx.star_graph(4)))
    square = next(
        k
        for k, G in enumerate(graphs)
        if nx.is_isomorphic(G, nx.disjoint_union(nx.cycle_graph(4), nx.empty_graph(1)))
    )
    assert cospectral_classes(graphs, "adjacency") == [sorted([star, square])]
    # and no smaller graphs have an A-mate (Haemers & Spence 2004, Table 1)
    for n in range(1, 5):
        assert cospectral_classes(_atlas(n), "adjacency") == []


def test_smallest_signless_pair():
    # K_{1,3} and K_3 + K_1 share the Q-polynomial (common fact; Haemers & Spence 2004
    # count 2 graphs with a Q-mate on 4 vertices).
    pair = [nx.star_graph(3), nx.disjoint_union(nx.complete_graph(3), nx.empty_graph(1))]
    assert cospectral_classes(pair, "signless") == [[0, 1]]
    assert cospectral_classes(pair, "laplacian") == []
    assert cospectral_classes(pair, "adjacency") == []


def test_smallest_laplacian_pairs_have_six_vertices():
    # Haemers & Spence 2004, Table 1: no L-mates below 6 vertices, 4 graphs with one on 6.
    for n in range(1, 6):
        assert cospectral_classes(_atlas(n), "laplacian") == []
    graphs = _atlas(6)
    classes = cospectral_classes(graphs, "laplacian")
    assert [len(c) for c in classes] == [2, 2]
    for first, second in classes:
        G, H = graphs[first], graphs[second]
        assert not nx.is_isomorphic(G, H)
        # reference library: networkx's own Laplacian spectrum agrees to float accuracy
        assert sorted(nx.laplacian_spectrum(G)) == pytest.approx(
            sorted(nx.laplacian_spectrum(H)), abs=1e-9
        )


@pytest.mark.parametrize("n", [4, 5, 6, 7])
def test_mate_counts_match_haemers_spence(n):
    assert _mate_counts(_atlas(n)) == HAEMERS_SPENCE[n]


@pytest.mark.nauty
@needs_geng
def test_mate_counts_on_eight_vertices():
    graphs = _geng(8)
    assert len(graphs) == 12346  # OEIS A000088
    assert _mate_counts(graphs) == HAEMERS_SPENCE[8]


@pytest.mark.nauty
@pytest.mark.slow
@needs_geng
def test_mate_counts_on_nine_vertices():
    # 274,668 graphs: the lean route used by batch work (graph6 -> edge list -> stacked
    # polynomials, nauty keys -> classes_from_keys), checked against Haemers & Spence 2004.
    import numpy as np

    from graphinv.cospectral import canonical_key_of_edges
    from graphinv.io import parse_graph6
    from graphinv.spectrum import characteristic_polynomials

    done = subprocess.run(["nauty-geng", "-q", "9"], capture_output=True, text=True, check=True)
    parsed = [parse_graph6(line) for line in done.stdout.split()]
    assert len(parsed) == 274668  # OEIS A000088
    keys = [canonical_key_of_edges(n, edges) for n, edges in parsed]
    A = np.zeros((len(parsed), 9, 9), dtype=np.int64)
    for slot, (_, edges) in enumerate(parsed):
        if edges:
            i, j = np.asarray(edges).T
            A[slot, i, j] = A[slot, j, i] = 1
    D = np.zeros_like(A)
    D[:, np.arange(9), np.arange(9)] = A.sum(axis=2)
    counts = []
    for stack in (A, D - A, D + A):
        polynomials = characteristic_polynomials(stack)
        found = classes_from_keys(zip(range(len(parsed)), polynomials, keys, strict=True))
        assert found.duplicates == ()
        counts.append(sum(len(c) for c in found.classes))
    assert tuple(counts) == HAEMERS_SPENCE[9]


def test_critical_group_separates_the_signless_pair():
    # K(K_{1,3}) is trivial (a tree) and K(K_3) = Z_3 (common fact: K(C_n) = Z_n).
    pair = [nx.star_graph(3), nx.disjoint_union(nx.complete_graph(3), nx.empty_graph(1))]
    report = find_cospectral(pair, matrices=["signless"])
    (found,) = report.classes["signless"]
    assert found.values["critical_group"] == (((), 0), ((3,), 0))
    assert found.separated_by["critical_group"]
    assert found.separated_by["degree_sequence"]
    (row,) = report.summary
    assert row.with_mate == 2 and row.separated["critical_group"] == 2


# --- duplicates and the isomorphism fallback -------------------------------------------------


def test_isomorphic_copies_are_duplicates_not_mates():
    rng = random.Random(17)
    star = nx.star_graph(4)
    square = nx.disjoint_union(nx.cycle_graph(4), nx.empty_graph(1))
    shuffled = nx.relabel_nodes(square, dict(zip(square, rng.sample(list(square), 5), strict=True)))
    graphs = [star, nx.path_graph(5), square, star.copy(), shuffled]
    assert cospectral_classes(graphs, "adjacency") == [[0, 2]]
    report = find_cospectral(graphs)
    assert report.duplicates == ((0, 3), (2, 4))
    assert all(row.graphs == 3 for row in report.summary)


def test_only_copies_make_no_class():
    graphs = [nx.petersen_graph(), nx.petersen_graph()]
    for kind in KINDS:
        assert cospectral_classes(graphs, kind) == []


def test_without_certificates_the_networkx_fallback_gives_the_same_counts(monkeypatch):
    # Simulates a machine without pynauty: isomorphism within a polynomial class falls back to
    # networkx.is_isomorphic; the Haemers & Spence 2004 counts must not change.
    monkeypatch.setattr(cospectral_module, "_certificate", lambda n, edges: None)
    assert _mate_counts(_atlas(6)) == HAEMERS_SPENCE[6]
    graphs = [nx.star_graph(3), nx.relabel_nodes(nx.star_graph(3), {0: 3, 3: 0})]
    assert find_cospectral(graphs).duplicates == ((0, 1),)


def test_multigraph_duplicates_respect_multiplicities():
    # Two multigraphs on a path, doubled edge at an end versus in the middle (P_4 shape):
    # not isomorphic; a relabelled copy of the first is.
    first = nx.MultiGraph([(0, 1), (0, 1), (1, 2), (2, 3)])
    second = nx.MultiGraph([(0, 1), (1, 2), (1, 2), (2, 3)])
    copy = nx.relabel_nodes(first, {0: 3, 1: 2, 2: 1, 3: 0})
    assert canonical_key(first) is None
    assert is_isomorphic(first, copy) and not is_isomorphic(first, second)
    report = find_cospectral([first, second, copy])
    assert report.duplicates == ((0, 2),)


def test_canonical_key_agrees_with_networkx_on_random_pairs():
    # reference library: networkx.is_isomorphic (VF2)
    rng = random.Random(23)
    for _ in range(60):
        n = rng.randint(1, 8)
        G = nx.gnp_random_graph(n, 0.5, seed=rng.randrange(10**6))
        H = nx.gnp_random_graph(n, 0.5, seed=rng.randrange(10**6))
        assert (canonical_key(G) == canonical_key(H)) == nx.is_isomorphic(G, H)


def test_classes_do_not_depend_on_vertex_labels():
    rng = random.Random(29)
    graphs = _atlas(6)
    relabelled = [
        nx.relabel_nodes(G, dict(zip(G, rng.sample(range(100), len(G)), strict=True)))
        for G in graphs
    ]
    for kind in KINDS:
        assert cospectral_classes(relabelled, kind) == cospectral_classes(graphs, kind)


def test_classes_from_stored_keys_match_the_graph_route():
    graphs = _atlas(7)
    for kind in KINDS:
        keys = [
            (k, str(p), canonical_key(G))
            for k, (G, p) in enumerate(zip(graphs, polynomial_keys(graphs, kind), strict=True))
        ]
        stored = classes_from_keys(keys)
        assert [list(c) for c in stored.classes] == cospectral_classes(graphs, kind)
        assert stored.duplicates == ()


# --- the report and comparisons --------------------------------------------------------------


def test_report_counts_are_consistent_and_json_ready():
    report = find_cospectral(_atlas(7))
    for row in report.summary:
        classes = report.classes[row.matrix]
        assert row.with_mate == sum(len(c.members) for c in classes)
        for name, separated in row.separated.items():
            assert 0 <= separated <= row.with_mate
            fully = sum(len(c.members) for c in classes if c.separated_by[name])
            assert separated >= fully
    for record in report.records():
        to_json_line(record)
    assert "with a mate" in report._repr_html_()


def test_laplacian_mates_share_the_tree_count():
    # Kirchhoff (1847): the tree count is read off the Laplacian polynomial, so L-mates share
    # it, and compare_graphs must still name some invariant (or isomorphism) that differs.
    graphs = _atlas(7)
    for first, second, *_ in cospectral_classes(graphs, "laplacian")[:10]:
        comparison = compare_graphs(graphs[first], graphs[second])
        rows = {row.invariant: row for row in comparison.rows}
        assert rows["laplacian_polynomial"].same and rows["spanning_trees"].same
        assert not comparison.isomorphic
        assert comparison.first_difference is not None


def test_compare_reports_the_first_separating_invariant():
    star = nx.star_graph(3)
    triangle = nx.disjoint_union(nx.complete_graph(3), nx.empty_graph(1))
    comparison = compare_graphs(star, triangle)
    assert comparison.first_difference == "degree_sequence"
    rows = {row.invariant: row for row in comparison.rows}
    assert rows["signless_polynomial"].same  # Q-cospectral (common fact)
    assert rows["spanning_trees"].first == "1" and rows["spanning_trees"].second == "0"
    # K(K_3) = Z_3, K(tree) = 0 (common fact)
    assert rows["critical_group"].first == "0" and rows["critical_group"].second == "Z/3"
    assert compare_graphs(nx.path_graph(4), nx.Graph([(2, 0), (0, 3), (3, 1)])).isomorphic
    record = comparison.to_record()
    assert record["first_difference"] == "degree_sequence"
    to_json_line(record)


def test_compare_counts_spanning_trees_exactly():
    # Cayley: K_6 has 6^4 = 1296 spanning trees (OEIS A000272).
    rows = {r.invariant: r for r in compare_graphs(nx.complete_graph(6), nx.path_graph(6)).rows}
    assert rows["spanning_trees"].first == "1296" and rows["spanning_trees"].second == "1"
    assert rows["vertices"].same and not rows["edges"].same


# --- command line ----------------------------------------------------------------------------


def _write_graph6(path, graphs):
    from graphinv.io import to_graph6

    path.write_text("".join(to_graph6(G) + "\n" for G in graphs))
    return str(path)


def test_cli_mates_finds_the_signless_pair_and_a_duplicate(cli_runner, tmp_path):
    from graphinv.cli import app

    # K_{1,3} and K_3 + K_1 are Q-cospectral (common fact); a copy of K_{1,3} is a duplicate
    graphs = [
        nx.star_graph(3),
        nx.disjoint_union(nx.complete_graph(3), nx.empty_graph(1)),
        nx.relabel_nodes(nx.star_graph(3), {0: 2, 2: 0}),
    ]
    source = _write_graph6(tmp_path / "four.g6", graphs)
    result = cli_runner.invoke(app, ["mates", source, "--matrix", "signless"])
    assert result.exit_code == 0, result.output
    assert "signless-cospectral: 2 graphs" in result.output
    assert "duplicate: four#2 isomorphic to four#0" in result.output
    result = cli_runner.invoke(app, ["mates", source, "--jsonl"])
    import json

    records = [json.loads(line) for line in result.output.splitlines()]
    kinds = [r["record"] for r in records]
    assert kinds.count("duplicate") == 1 and kinds.count("summary") == 3
    (found,) = [r for r in records if r["record"] == "class"]
    assert found["members"] == [0, 1] and found["values"]["critical_group"] == ["0", "Z/3"]


def test_cli_compare_names_the_first_difference(cli_runner, tmp_path):
    from graphinv.cli import app

    first = _write_graph6(tmp_path / "star.g6", [nx.star_graph(4)])
    second = _write_graph6(
        tmp_path / "square.g6", [nx.disjoint_union(nx.cycle_graph(4), nx.empty_graph(1))]
    )
    result = cli_runner.invoke(app, ["compare", first, second])
    assert result.exit_code == 0, result.output
    assert "first separated by: degree sequence" in result.output
    result = cli_runner.invoke(app, ["compare", first, first, "--jsonl"])
    assert '"isomorphic": true' in result.output


def test_cli_compare_needs_single_graphs(cli_runner, tmp_path):
    from graphinv.cli import app

    two = _write_graph6(tmp_path / "two.g6", [nx.path_graph(3), nx.path_graph(4)])
    result = cli_runner.invoke(app, ["compare", two, two])
    assert result.exit_code == 2 and "error:" in result.output


def test_cli_mates_reads_a_folder_of_edge_lists(cli_runner, tmp_path):
    from graphinv.cli import app

    # K_{1,4} and C_4 + K_1 (Brouwer & Haemers 2012, §1.3.1) as two edge-list files
    folder = tmp_path / "pair"
    folder.mkdir()
    (folder / "star.txt").write_text("0 1\n0 2\n0 3\n0 4\n")
    (folder / "square.txt").write_text("0 1\n1 2\n2 3\n3 0\n4\n")
    result = cli_runner.invoke(app, ["mates", str(folder), "-m", "adjacency"])
    assert result.exit_code == 0, result.output
    assert "adjacency-cospectral: 2 graphs" in result.output
    empty = tmp_path / "empty"
    empty.mkdir()
    result = cli_runner.invoke(app, ["mates", str(empty)])
    assert result.exit_code == 2 and "the folder holds no graph files" in result.output
