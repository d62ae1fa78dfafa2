"""Hypothesis strategies shared by the test modules."""

from __future__ import annotations

import networkx as nx
from hypothesis import strategies as st


@st.composite
def multigraphs(draw, max_vertices: int = 8, max_multiplicity: int = 4) -> nx.Graph:
    """Graphs on ``0..n-1`` whose edges carry integer multiplicities in ``weight``."""
    n = draw(st.integers(1, max_vertices))
    G = nx.Graph()
    G.add_nodes_from(range(n))
    pairs = [(i, j) for i in range(n) for j in range(i + 1, n)]
    chosen = draw(st.lists(st.sampled_from(pairs), unique=True) if pairs else st.just([]))
    for u, v in chosen:
        G.add_edge(u, v, weight=draw(st.integers(1, max_multiplicity)))
    return G
