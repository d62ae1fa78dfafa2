"""Helpers of the batch tests: graph6 text of known graphs and a plain store reader."""

from __future__ import annotations

import sqlite3

import networkx as nx


def graph6_line(G: nx.Graph) -> str:
    """The graph6 text of ``G`` (vertices in ``list(G)`` order), written by networkx."""
    return nx.to_graph6_bytes(G, nodes=list(G), header=False).decode("ascii").strip()


def stored_rows(path, *, without=("run_id",)) -> list[dict]:
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
