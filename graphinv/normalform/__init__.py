"""The exact integer normal-form core: pure integers in, integers out.

Smith and Hermite normal forms, cokernels (finitely generated abelian groups) and exact
determinants of integer matrices given as sequences of rows.  Nothing here knows about graphs;
:mod:`graphinv.group` builds the critical group on top.
"""

from __future__ import annotations

from graphinv.normalform._matrix import InvalidMatrixError
from graphinv.normalform.cokernel import Cokernel, cokernel, sparse_cokernel
from graphinv.normalform.determinant import determinant, sparse_determinant
from graphinv.normalform.hermite import HermiteForm, hermite_form
from graphinv.normalform.smith import SmithForm, smith_diagonal, smith_form

__all__ = [
    "Cokernel",
    "HermiteForm",
    "InvalidMatrixError",
    "SmithForm",
    "cokernel",
    "determinant",
    "hermite_form",
    "smith_diagonal",
    "smith_form",
    "sparse_cokernel",
    "sparse_determinant",
]
