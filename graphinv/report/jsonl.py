"""JSON Lines output in which no integer loses precision.

Counts and group orders grow past 2^53, where many JSON readers (JavaScript, pandas' default)
silently round.  Results therefore write such quantities as decimal strings; as a safety net,
:func:`to_json_line` also turns any other integer of that size into a decimal string.
"""

from __future__ import annotations

import json
from collections.abc import Iterable, Mapping
from typing import IO, Any

__all__ = [
    "SAFE_INTEGER_LIMIT",
    "decimal_string",
    "json_safe",
    "read_json_lines",
    "to_json_line",
    "write_json_lines",
]

SAFE_INTEGER_LIMIT = 2**53

# Python refuses str() of ints beyond 4300 digits by default (CVE-2020-10735); counts of large
# networks go far past that, so such ints are converted through python-flint instead.
_PYTHON_STR_BITS = 14_000


def decimal_string(value: int) -> str:
    """The exact decimal digits of an int of any size.

    Examples
    --------
    >>> decimal_string(-42)
    '-42'
    >>> len(decimal_string(10**10000))
    10001
    """
    if value.bit_length() < _PYTHON_STR_BITS:
        return str(value)
    import flint

    return str(flint.fmpz(value))


def json_safe(value: Any) -> Any:
    """Return ``value`` with every integer of absolute value ``>= 2**53`` as a decimal string.

    Tuples become lists; mappings keep their keys (as strings); objects with a ``to_record()``
    method are replaced by that record.

    Examples
    --------
    >>> json_safe({"order": 2**60, "rank": 3, "factors": (2, 10)})
    {'order': '1152921504606846976', 'rank': 3, 'factors': [2, 10]}
    """
    if hasattr(value, "to_record"):
        return json_safe(value.to_record())
    if isinstance(value, bool) or value is None or isinstance(value, (str, float)):
        return value
    if isinstance(value, int):
        return decimal_string(value) if abs(value) >= SAFE_INTEGER_LIMIT else value
    if isinstance(value, Mapping):
        return {str(k): json_safe(v) for k, v in value.items()}
    if isinstance(value, Iterable):
        return [json_safe(v) for v in value]
    try:  # numpy scalars
        return json_safe(value.item())
    except AttributeError:
        raise TypeError(f"cannot write {type(value).__name__} as JSON") from None


def to_json_line(record: Any) -> str:
    """One compact JSON line (no trailing newline) for ``record``.

    Examples
    --------
    >>> to_json_line({"spanning_trees": str(3**40), "vertices": 9})
    '{"spanning_trees": "12157665459056928801", "vertices": 9}'
    """
    return json.dumps(json_safe(record), ensure_ascii=False, allow_nan=False)


def write_json_lines(records: Iterable[Any], stream: IO[str]) -> int:
    """Write one JSON line per record to ``stream``; return how many were written."""
    count = 0
    for record in records:
        stream.write(to_json_line(record))
        stream.write("\n")
        count += 1
    return count


def read_json_lines(stream: IO[str]) -> list[dict[str, Any]]:
    """Read back what :func:`write_json_lines` wrote (blank lines skipped)."""
    return [json.loads(line) for line in stream if line.strip()]
