"""Graph summaries: published values, notebook views, bad input."""

from __future__ import annotations

import networkx as nx
import pytest
from rich.console import Console

from graphinv.errors import InvalidGraphError
from graphinv.report.summary import (
    format_group,
    format_primary_decomposition,
    primary_parts,
    scientific,
    summaries_table,
    summarize,
    summary_table,
)


def test_petersen_summary():
    s = summarize(nx.petersen_graph(), name="Petersen")
    # Petersen graph: K = Z2 ⊕ Z10^3, order 2000 (common fact, memory; shared/reference).
    assert s.critical_group.invariant_factors == (2, 10, 10, 10)
    assert s.spanning_trees == 2000
    assert format_group(s.critical_group) == "Z/2 ⊕ (Z/10)^3"
    assert format_primary_decomposition(s.critical_group) == "(Z/2)^4 ⊕ (Z/5)^3"
    # The Petersen graph is 3-regular with adjacency spectrum 3, 1^5, (-2)^4, so its Laplacian
    # spectrum is 0, 2^5, 5^4 (Brouwer & Haemers, Spectra of Graphs, 2012, memory):
    # λ2 = 2 and the largest eigenvalue is 5.
    assert s.algebraic_connectivity == pytest.approx(2.0)
    assert s.largest_laplacian_eigenvalue == pytest.approx(5.0)
    assert (s.vertices, s.edges, s.components, s.min_degree, s.max_degree) == (10, 15, 1, 3, 3)


def test_wheel_and_multigraph_counts():
    # W5 (5 spokes): K = Z11 ⊕ Z11 (Biggs 1999, Lucas numbers, memory); τ = 121 (OEIS A004146).
    s = summarize(nx.wheel_graph(6))
    assert s.critical_group.invariant_factors == (11, 11)
    assert s.spanning_trees == 121
    # A 4-cycle with every edge doubled: each spanning tree of C4 (4 of them) picks one of two
    # parallel copies for each of its 3 edges, so τ = 4 · 2^3 = 32 (common fact).
    M = nx.MultiGraph()
    for u, v in nx.cycle_graph(4).edges():
        M.add_edge(u, v)
        M.add_edge(u, v)
    doubled = summarize(M, spectra=False)
    assert doubled.spanning_trees == 32
    assert doubled.edges == 8


def test_disconnected_graph():
    G = nx.disjoint_union(nx.cycle_graph(3), nx.cycle_graph(4))
    s = summarize(G)
    assert s.components == 2
    assert s.spanning_trees == 0
    # Torsion of coker L is the sum of the components' groups: Z3 ⊕ Z4 = Z12 (common fact).
    assert s.critical_group.invariant_factors == (12,)
    assert s.algebraic_connectivity == pytest.approx(0.0, abs=1e-9)


def test_bad_input():
    with pytest.raises(InvalidGraphError, match="no vertices"):
        summarize(nx.Graph())
    with pytest.raises(InvalidGraphError, match="undirected"):
        summarize(nx.DiGraph([(0, 1), (1, 0)]))
    G = nx.Graph()
    G.add_edge(0, 1, weight=0.5)
    with pytest.raises(InvalidGraphError, match="positive integer"):
        summarize(G)


def test_scientific_is_exact():
    # OEIS A007341: τ(8 x 8 grid) = 126231322912498539682594816.
    assert scientific(126231322912498539682594816) == "1.262e+26"
    assert scientific(126231322912498539682594816, digits=8) == "1.2623132e+26"
    assert scientific(10**5000 - 1) == "1.000e+5000"


def test_huge_factor_is_split_by_small_primes_only():
    import sympy

    prime = sympy.nextprime(10**45)  # a 46-digit prime
    G = nx.Graph()
    G.add_edge("a", "b", weight=8 * int(prime))  # one edge of multiplicity m: group Z/m
    s = summarize(G, spectra=False)
    assert s.critical_group.invariant_factors == (8 * int(prime),)
    parts, rest = primary_parts(s.critical_group)
    assert parts == {2: (8,)}
    assert rest == (int(prime),)
    assert "46 digits" in format_primary_decomposition(s.critical_group)


def test_notebook_views():
    s = summarize(nx.petersen_graph(), name="Petersen")
    page = s._repr_html_()
    assert "<caption>Petersen</caption>" in page and "Z/2 ⊕ (Z/10)^3" in page
    latex = s._repr_latex_()
    assert latex.startswith("$$") and r"\mathbb{Z}/2 \oplus \mathbb{Z}/10" in latex


def test_rich_tables_render():
    console = Console(width=100, color_system=None, record=True)
    console.print(summary_table(summarize(nx.petersen_graph(), name="Petersen")))
    console.print(summaries_table([summarize(nx.cycle_graph(n)) for n in (3, 4, 5)]))
    text = console.export_text()
    assert "Z/2 ⊕ (Z/10)^3" in text
    assert "2000" in text and "2.000e+3" in text
