"""Modular finish for dense cores (see :mod:`graphinv.normalform.cokernel`)."""

from __future__ import annotations

__all__ = ["modular_core_diagonal"]


def modular_core_diagonal(rows: list[list[int]]) -> list[int]:
    """Nonzero Smith invariants (ones included, chain order) of a dense integer matrix."""
    import flint

    S = flint.fmpz_mat(rows).snf()
    k = min(S.nrows(), S.ncols())
    return [int(S[i, i]) for i in range(k) if S[i, i] != 0]
