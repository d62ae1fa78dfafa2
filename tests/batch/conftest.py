"""Shared pieces of the batch tests: graph6 files of known graphs and store readers."""

from __future__ import annotations

import networkx as nx
import pytest
from batch_helpers import graph6_line


@pytest.fixture(scope="session")
def atlas_file(tmp_path_factory):
    """All 1253 graphs on at most 7 vertices (networkx's atlas) as a graph6 file.

    Atlas graph 0 has no vertices, so its line gets an error row.
    """
    path = tmp_path_factory.mktemp("atlas") / "atlas.g6"
    lines = [graph6_line(G) for G in nx.graph_atlas_g()]
    path.write_text("\n".join(lines) + "\n")
    return path


@pytest.fixture(scope="session")
def atlas_store(atlas_file, tmp_path_factory):
    """The atlas through the full invariant set (two local workers)."""
    from graphinv.batch.engine import run_batch

    store = tmp_path_factory.mktemp("atlas-store") / "atlas.db"
    result = run_batch([str(atlas_file)], store=store, workers=2, progress=False)
    assert result.computed == 1253
    return store
