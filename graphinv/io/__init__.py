"""Loading and writing graphs: edge lists, graph6/sparse6, GraphML, GML, adjacency matrices,
and named families.

The entry points are :func:`read_graphs` (lazy, any number of graphs), :func:`read_graph`
(exactly one), :func:`iter_records` (a stream that records bad graphs instead of stopping) and
:func:`family_graph` / :func:`family_graphs` for specs such as ``grid:4x4`` or ``cycle:3..10``.
Every graph is a networkx ``Graph`` whose integer edge attribute ``weight`` is a multiplicity.
"""

from __future__ import annotations

from graphinv.io.adjacency import parse_adjacency_matrix, write_adjacency_matrix
from graphinv.io.edgelist import parse_edgelist, write_edgelist
from graphinv.io.families import (
    count_family_graphs,
    family_graph,
    family_graphs,
    family_names,
    family_table,
)
from graphinv.io.graph6 import (
    encode_graph6,
    encode_sparse6,
    from_graph6,
    from_sparse6,
    parse_graph6,
    parse_sparse6,
    to_graph6,
    to_sparse6,
)
from graphinv.io.readers import (
    FORMATS,
    GraphRecord,
    infer_format,
    iter_records,
    read_graph,
    read_graphs,
)
from graphinv.io.writers import convert_graphs, write_graph6, write_sparse6

__all__ = [
    "FORMATS",
    "GraphRecord",
    "convert_graphs",
    "count_family_graphs",
    "encode_graph6",
    "encode_sparse6",
    "family_graph",
    "family_graphs",
    "family_names",
    "family_table",
    "from_graph6",
    "from_sparse6",
    "infer_format",
    "iter_records",
    "parse_adjacency_matrix",
    "parse_edgelist",
    "parse_graph6",
    "parse_sparse6",
    "read_graph",
    "read_graphs",
    "to_graph6",
    "to_sparse6",
    "write_adjacency_matrix",
    "write_edgelist",
    "write_graph6",
    "write_sparse6",
]
