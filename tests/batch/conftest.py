"""Shared pieces of the batch tests: graph6 files of known graphs and store readers."""

from __future__ import annotations

import sqlite3

import networkx as nx
import pytest


def _graph6_line(G: nx.Graph) -> str:
    """The graph6 text of ``G`` (vertices in ``list(G)`` order), written by networkx."""
    return nx.to_graph6_bytes(G, nodes=list(G), header=False).decode("ascii").strip()


def _stored_rows(path, *, without=("run_id",)) -> list[dict]:
    """Every graph row of a store as a dict, in input order (columns in ``without`` dropped)."""
    connection = sqlite3.connect(path)
    try:
        cursor = connection.execute(
            "SELECT inputs.source, graphs.* FROM graphs JOIN inputs USING (input_id) "
            "ORDER BY graphs.input_id, graphs.position"
        )
        names = [d[0] for d in cursor.description]
        rows = [dict(zip(names, row, strict=True)) for row in cursor]
    finally:
        connection.close()
    for row in rows:
        for name in (*without, "input_id"):
            row.pop(name, None)
    return rows


@pytest.fixture(scope="session")
def graph6_line():
    """The function giving the graph6 text of a networkx graph."""
    return _graph6_line


@pytest.fixture(scope="session")
def stored_rows():
    """The function reading every graph row of a store (see ``_stored_rows``)."""
    return _stored_rows


@pytest.fixture(scope="session")
def atlas_file(tmp_path_factory):
    """All 1253 graphs on at most 7 vertices (networkx's atlas) as a graph6 file.

    Atlas graph 0 has no vertices, so its line gets an error row.
    """
    path = tmp_path_factory.mktemp("atlas") / "atlas.g6"
    lines = [
        nx.to_graph6_bytes(G, nodes=list(G), header=False).decode("ascii").strip()
        for G in nx.graph_atlas_g()
    ]
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
