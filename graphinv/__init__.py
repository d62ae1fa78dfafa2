"""graphinv: exact graph invariants built from Laplacian normal forms.

The data flows one way: loaders (:mod:`graphinv.io`) build graphs, :mod:`graphinv.matrices`
turns them into exact integer matrices, :mod:`graphinv.normalform` computes Smith and Hermite
normal forms, and the invariant modules (critical group, spectra, chip-firing, cospectral
classes) sit on top, with batch processing and reporting above them.
"""

from __future__ import annotations

from graphinv.chipfiring import (
    ChipGraph,
    Configuration,
    chip_graph,
    identity_configuration,
    is_recurrent,
    recurrent_group,
    recurrent_identity,
    stabilize,
    wired_grid,
)
from graphinv.cospectral import (
    Comparison,
    CospectralReport,
    classes_from_keys,
    compare_graphs,
    cospectral_classes,
    find_cospectral,
)
from graphinv.divisors import (
    canonical_divisor,
    divisor_rank,
    genus,
    is_linearly_equivalent,
    reduced_divisor,
)
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
from graphinv.report import GraphSummary, summarize, write_report
from graphinv.spectrum import (
    Spectrum,
    algebraic_connectivity,
    characteristic_polynomial,
    eigenvalues,
    spanning_trees_from_spectrum,
    spectral_profile,
)
from graphinv.switching import cospectral_mates, godsil_mckay_sets, godsil_mckay_switch

__version__ = "0.1.0"

__all__ = [
    "CertificationError",
    "ChipGraph",
    "Comparison",
    "Configuration",
    "CospectralReport",
    "CriticalGroup",
    "DisconnectedGraphError",
    "GraphFormatError",
    "GraphInvError",
    "GraphRecord",
    "GraphSummary",
    "InvalidGraphError",
    "InvalidWeightError",
    "LabelledMatrix",
    "LogTreeCount",
    "Spectrum",
    "StoreError",
    "TreeCountCertificate",
    "__version__",
    "adjacency_matrix",
    "algebraic_connectivity",
    "canonical_divisor",
    "characteristic_polynomial",
    "chip_graph",
    "classes_from_keys",
    "compare_graphs",
    "cospectral_classes",
    "cospectral_mates",
    "critical_group",
    "distance_matrix",
    "divisor_rank",
    "eigenvalues",
    "family_graph",
    "family_graphs",
    "find_cospectral",
    "genus",
    "godsil_mckay_sets",
    "godsil_mckay_switch",
    "identity_configuration",
    "incidence_matrix",
    "is_linearly_equivalent",
    "is_recurrent",
    "iter_records",
    "laplacian_matrix",
    "log_spanning_tree_count",
    "matrix_cokernel",
    "read_graph",
    "read_graphs",
    "recurrent_group",
    "recurrent_identity",
    "reduced_divisor",
    "reduced_laplacian_matrix",
    "signless_laplacian_matrix",
    "spanning_tree_count",
    "spanning_trees_from_spectrum",
    "spectral_profile",
    "stabilize",
    "summarize",
    "wired_grid",
    "write_report",
]
