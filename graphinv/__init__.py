"""graphinv: exact graph invariants built from Laplacian normal forms.

The data flows one way: loaders (:mod:`graphinv.io`) build graphs, :mod:`graphinv.matrices`
turns them into exact integer matrices, :mod:`graphinv.normalform` computes Smith and Hermite
normal forms, and the invariant modules (critical group, spectra, chip-firing, cospectral
classes) sit on top, with batch processing and reporting above them.
"""

from __future__ import annotations

from graphinv.errors import (
    DisconnectedGraphError,
    GraphFormatError,
    GraphInvError,
    InvalidGraphError,
    InvalidWeightError,
    StoreError,
)
from graphinv.group import (
    CertificationError,
    CriticalGroup,
    LogTreeCount,
    TreeCountCertificate,
    critical_group,
    log_spanning_tree_count,
    matrix_cokernel,
    spanning_tree_count,
)
from graphinv.io import (
    GraphRecord,
    family_graph,
    family_graphs,
    iter_records,
    read_graph,
    read_graphs,
)
from graphinv.matrices import (
    LabelledMatrix,
    adjacency_matrix,
    distance_matrix,
    incidence_matrix,
    laplacian_matrix,
    reduced_laplacian_matrix,
    signless_laplacian_matrix,
)

__version__ = "0.1.0"

__all__ = [
    "CertificationError",
    "CriticalGroup",
    "DisconnectedGraphError",
    "GraphFormatError",
    "GraphInvError",
    "GraphRecord",
    "InvalidGraphError",
    "InvalidWeightError",
    "LabelledMatrix",
    "LogTreeCount",
    "StoreError",
    "TreeCountCertificate",
    "__version__",
    "adjacency_matrix",
    "critical_group",
    "distance_matrix",
    "family_graph",
    "family_graphs",
    "incidence_matrix",
    "iter_records",
    "laplacian_matrix",
    "log_spanning_tree_count",
    "matrix_cokernel",
    "read_graph",
    "read_graphs",
    "reduced_laplacian_matrix",
    "signless_laplacian_matrix",
    "spanning_tree_count",
]
