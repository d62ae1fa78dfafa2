"""The exceptions graphinv raises.

Every error the library raises on purpose derives from :class:`GraphInvError`, so a caller (and
the command-line interface) can catch one class and show its message.  Messages say what was
wrong and what was expected.
"""

from __future__ import annotations

__all__ = [
    "DisconnectedGraphError",
    "GraphFormatError",
    "GraphInvError",
    "InvalidGraphError",
    "InvalidWeightError",
    "StoreError",
]


class GraphInvError(Exception):
    """Base class of every error raised by graphinv on purpose."""


class GraphFormatError(GraphInvError, ValueError):
    """A graph file or text could not be read.

    Parameters
    ----------
    message : str
        What was wrong and what was expected.
    source : str, optional
        The file name (``"<stdin>"`` for standard input, ``"<string>"`` for text).
    line : int, optional
        The 1-based line number in the file where the problem is.
    graph_index : int, optional
        The 0-based position of the graph in a file holding many graphs.

    Examples
    --------
    >>> str(GraphFormatError("multiplicity must be a positive integer, not '-2'",
    ...                      source="campus.txt", line=7))
    "campus.txt, line 7: multiplicity must be a positive integer, not '-2'"
    """

    def __init__(
        self,
        message: str,
        *,
        source: str | None = None,
        line: int | None = None,
        graph_index: int | None = None,
    ) -> None:
        self.message = message
        self.source = source
        self.line = line
        self.graph_index = graph_index
        super().__init__(self._render())

    def _render(self) -> str:
        where = []
        if self.source is not None:
            where.append(str(self.source))
        if self.line is not None:
            where.append(f"line {self.line}")
        if self.graph_index is not None:
            where.append(f"graph {self.graph_index}")
        return f"{', '.join(where)}: {self.message}" if where else self.message


class InvalidGraphError(GraphInvError, ValueError):
    """A graph is not of the kind a function needs (empty, directed without a sink, ...)."""


class InvalidWeightError(InvalidGraphError):
    """An edge weight is not a positive integer multiplicity."""


class DisconnectedGraphError(InvalidGraphError):
    """The function needs a connected graph (or a sink reachable from every vertex)."""


class StoreError(GraphInvError):
    """A results store could not be opened, read or written."""
