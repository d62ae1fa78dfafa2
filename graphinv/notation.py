"""How graphinv writes a finitely generated abelian group.

One notation everywhere (tables, comparisons, surveys, chip-firing output): the group with
invariant factors ``d1 | d2 | … | dr`` and free rank ``f`` is written
``Z/d1 ⊕ … ⊕ Z/dr ⊕ Z^f``; the trivial group is ``0``.

References
----------
The structure theorem for finitely generated modules over a principal ideal domain; e.g.
N. Jacobson, *Basic Algebra I*, 2nd ed., W. H. Freeman, 1985, §3.8.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable

__all__ = ["abelian_group_text"]


def abelian_group_text(
    invariant_factors: Iterable[int],
    free_rank: int = 0,
    *,
    compact: bool = False,
    factor_text: Callable[[int], str] = str,
) -> str:
    """Write ``Z/d1 ⊕ … ⊕ Z/dr ⊕ Z^f``; unit factors are dropped.

    Parameters
    ----------
    invariant_factors : iterable of int
        The invariant factors (units ``1`` are skipped).
    free_rank : int, optional
        The rank of the free part.
    compact : bool, optional
        Write a run of ``k >= 3`` equal summands as ``(Z/d)^k``.
    factor_text : callable, optional
        How to write one factor ``d`` (default ``str``; tables shorten huge factors).

    Examples
    --------
    >>> abelian_group_text((2, 10, 10, 10))
    'Z/2 ⊕ Z/10 ⊕ Z/10 ⊕ Z/10'
    >>> abelian_group_text((1, 2, 10, 10, 10), compact=True)
    'Z/2 ⊕ (Z/10)^3'
    >>> abelian_group_text((4,), 1), abelian_group_text((), 2), abelian_group_text(())
    ('Z/4 ⊕ Z', 'Z^2', '0')
    """
    runs: list[list[int]] = []
    for d in invariant_factors:
        if d == 1:
            continue
        if runs and runs[-1][0] == d:
            runs[-1][1] += 1
        else:
            runs.append([d, 1])
    parts: list[str] = []
    for d, count in runs:
        if compact and count >= 3:
            parts.append(f"(Z/{factor_text(d)})^{count}")
        else:
            parts.extend([f"Z/{factor_text(d)}"] * count)
    if free_rank == 1:
        parts.append("Z")
    elif free_rank > 1:
        parts.append(f"Z^{free_rank}")
    return " ⊕ ".join(parts) if parts else "0"
