"""Input checks and small integer helpers shared by the normal-form modules.

Every public function of :mod:`graphinv.normalform` accepts a matrix as a sequence of rows, each
a sequence of integers (nested lists or tuples, a NumPy integer array, ...).  The helpers here turn
that into nested lists of Python ints and reject anything else with one clear message.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from math import gcd
from numbers import Integral
from typing import Any

from graphinv.errors import GraphInvError

__all__ = [
    "IntMatrix",
    "InvalidMatrixError",
    "as_int_rows",
    "as_sparse_int_rows",
    "chain_normalize",
    "identity",
]

IntMatrix = tuple[tuple[int, ...], ...]


class InvalidMatrixError(GraphInvError, ValueError):
    """A matrix is not a rectangular array of integers (or not of the shape a function needs)."""


def _as_int(value: Any, i: int, j: int) -> int:
    if isinstance(value, bool) or not isinstance(value, Integral):
        # NumPy integer scalars are Integral; python-flint fmpz converts through int().
        if type(value).__name__ == "fmpz":
            return int(value)
        raise InvalidMatrixError(
            f"matrix entry ({i}, {j}) must be an integer, not {value!r} ({type(value).__name__})"
        )
    return int(value)


def as_int_rows(matrix: Sequence[Sequence[Any]] | Any) -> tuple[list[list[int]], int, int]:
    """Return ``(rows, number of rows, number of columns)`` with every entry a Python int.

    Raises
    ------
    InvalidMatrixError
        If the rows have different lengths or an entry is not an integer.

    Examples
    --------
    >>> as_int_rows([[1, 2], [3, 4]])
    ([[1, 2], [3, 4]], 2, 2)
    >>> as_int_rows([[1, 2], [3]])
    Traceback (most recent call last):
    ...
    graphinv.normalform._matrix.InvalidMatrixError: matrix row 1 has 1 entries; row 0 has 2
    """
    if hasattr(matrix, "tolist") and not isinstance(matrix, (list, tuple)):
        matrix = matrix.tolist()
    if isinstance(matrix, (str, bytes)) or not isinstance(matrix, Iterable):
        raise InvalidMatrixError(
            f"expected a matrix as a sequence of rows of integers, not {type(matrix).__name__}"
        )
    rows: list[list[int]] = []
    width = -1
    for i, row in enumerate(matrix):
        if isinstance(row, (str, bytes)) or not isinstance(row, Iterable):
            raise InvalidMatrixError(
                f"matrix row {i} must be a sequence of integers, not {type(row).__name__}"
            )
        converted = list(row)
        if not all(type(value) is int for value in converted):
            converted = [_as_int(value, i, j) for j, value in enumerate(converted)]
        if width < 0:
            width = len(converted)
        elif len(converted) != width:
            raise InvalidMatrixError(
                f"matrix row {i} has {len(converted)} entries; row 0 has {width}"
            )
        rows.append(converted)
    return rows, len(rows), max(width, 0)


def as_sparse_int_rows(rows: Sequence[Any], n_columns: int) -> list[dict[int, int]]:
    """Check sparse rows ``{column: value}`` and return them as plain ints, zeros dropped.

    Examples
    --------
    >>> as_sparse_int_rows([{0: 2, 1: 0}, {1: -1}], 2)
    [{0: 2}, {1: -1}]
    >>> as_sparse_int_rows([{3: 1}], 2)
    Traceback (most recent call last):
    ...
    graphinv.normalform._matrix.InvalidMatrixError: row 0: column index 3 is outside 0..1
    """
    checked: list[dict[int, int]] = []
    for i, row in enumerate(rows):
        clean: dict[int, int] = {}
        for j, v in row.items():
            if type(j) is not int and not isinstance(j, Integral):
                raise InvalidMatrixError(f"row {i}: column index {j!r} is not an integer")
            if not 0 <= int(j) < n_columns:
                raise InvalidMatrixError(
                    f"row {i}: column index {j!r} is outside 0..{n_columns - 1}"
                )
            if type(v) is not int and (isinstance(v, bool) or not isinstance(v, Integral)):
                raise InvalidMatrixError(f"row {i}, column {j}: entry {v!r} is not an integer")
            if v:
                clean[int(j)] = int(v)
        checked.append(clean)
    return checked


def identity(n: int) -> list[list[int]]:
    """The ``n`` by ``n`` identity matrix as nested lists."""
    return [[1 if i == j else 0 for j in range(n)] for i in range(n)]


def chain_normalize(values: Iterable[int]) -> list[int]:
    """Turn the diagonal of a diagonal matrix into its Smith invariant factors.

    ``diag(a, b)`` and ``diag(gcd(a, b), lcm(a, b))`` have the same Smith form, so repeated
    gcd/lcm exchanges give the divisibility chain.  Zeros go last, ones first.

    Examples
    --------
    >>> chain_normalize([6, 4, 0, 1, 10])
    [1, 2, 2, 60, 0]
    """
    values = list(values)
    nonzero = sorted(abs(v) for v in values if v)
    zeros = len(values) - len(nonzero)
    ones = [v for v in nonzero if v == 1]
    rest = [v for v in nonzero if v != 1]
    for i in range(len(rest)):
        a = rest[i]
        if a == 1:
            continue
        for j in range(i + 1, len(rest)):
            b = rest[j]
            if b % a:
                g = gcd(a, b)
                rest[j] = a // g * b
                a = g
                if a == 1:
                    break
        rest[i] = a
    rest.sort()
    return ones + rest + [0] * zeros
