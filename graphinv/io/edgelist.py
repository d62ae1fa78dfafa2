"""Edge-list text: one edge per line, with an optional multiplicity.

Format
------
- One edge per line: ``u v`` or ``u v m``, the fields separated by spaces, tabs or commas.
- ``m`` is a positive integer multiplicity (default 1); an edge listed again adds up.
- A line with a single label declares a vertex (so isolated vertices survive the round trip).
- ``#`` starts a comment, at the start of a line or after the fields; blank lines are skipped.
- A first line made only of column names (``source,target,weight``, ``from to``, ``node1
  node2``...: the words in ``HEADER_WORDS``, any case) is a header and is skipped.
- A label that reads as an integer (``7``, ``-3``) becomes an ``int``; any other is a ``str``.
- A loop ``v v`` does not change a Laplacian; it is dropped with a warning naming the line
  (its vertex is kept).

Vertices appear in the loaded graph in the order of their first mention.

References
----------
N. Biggs, *Algebraic Graph Theory*, 2nd ed., 1993 (multigraphs as integer-weighted graphs).
"""

from __future__ import annotations

import re
import warnings
from collections.abc import Hashable, Iterable
from pathlib import Path
from typing import IO

import networkx as nx

from graphinv._graphs import weighted_edges
from graphinv.errors import GraphFormatError, InvalidGraphError

__all__ = ["parse_edgelist", "parse_label", "write_edgelist"]

HEADER_WORDS = frozenset(
    {"source", "target", "from", "to", "src", "dst", "tail", "head", "node1", "node2",
     "node_1", "node_2", "vertex1", "vertex2", "weight", "multiplicity", "count"}
)
"""Column names that make a first line a header (CSV exports of edge tables)."""

_SEPARATORS = re.compile(r"[\s,]+")
_INTEGER = re.compile(r"[+-]?\d+")
_UNSAFE_LABEL = re.compile(r"[\s,#]")


def parse_label(token: str) -> int | str:
    """A vertex label from a token: an ``int`` when it reads as one, else the string.

    Examples
    --------
    >>> parse_label("12"), parse_label("-3"), parse_label("hall-B")
    (12, -3, 'hall-B')
    """
    if token.isascii() and token.isdigit():
        return int(token)
    return int(token) if _INTEGER.fullmatch(token) else token


def _fields(line: str) -> list[str]:
    if "#" not in line and "," not in line:
        return line.split()
    text = line.split("#", 1)[0].strip()
    if not text:
        return []
    return [token for token in _SEPARATORS.split(text) if token]


def _multiplicity(token: str, *, source: str, line: int) -> int:
    if not _INTEGER.fullmatch(token) or int(token) <= 0:
        raise GraphFormatError(
            f"bad multiplicity {token!r} in the third column; "
            "expected a positive integer (the number of parallel edges)",
            source=source,
            line=line,
        )
    return int(token)


def parse_edgelist(lines: Iterable[str], *, source: str = "<string>") -> nx.Graph:
    """Build a graph from edge-list lines (see the module docstring for the format).

    Parameters
    ----------
    lines : iterable of str
        The text, line by line (an open file works).
    source : str
        The file name used in error messages and warnings.

    Returns
    -------
    networkx.Graph
        Edge attribute ``weight`` holds the multiplicity.

    Raises
    ------
    GraphFormatError
        For a bad multiplicity, more than three fields on a line, or no vertex at all.

    Examples
    --------
    >>> G = parse_edgelist(["# campus fibre", "hall lab", "lab 3 2", "3,hall", "depot"])
    >>> list(G), G["lab"][3]["weight"]
    (['hall', 'lab', 3, 'depot'], 2)
    >>> list(parse_edgelist(["source,target,weight", "hall,lab,2"]).edges(data="weight"))
    [('hall', 'lab', 2)]
    >>> parse_edgelist(["a b 0"], source="links.txt")
    Traceback (most recent call last):
    ...
    graphinv.errors.GraphFormatError: links.txt, line 1: bad multiplicity '0' in the third column; expected a positive integer (the number of parallel edges)

    References
    ----------
    Biggs, *Algebraic Graph Theory*, 1993.
    """
    vertices: dict[Hashable, None] = {}  # insertion-ordered set: order of first mention
    weights: dict[tuple[Hashable, Hashable], int] = {}
    first = True
    for number, line in enumerate(lines, start=1):
        fields = _fields(line)
        if not fields:
            continue
        if first:
            first = False
            if len(fields) > 1 and all(f.lower() in HEADER_WORDS for f in fields):
                continue  # a header row of column names
        if len(fields) == 1:
            vertices[parse_label(fields[0])] = None
            continue
        if len(fields) > 3:
            raise GraphFormatError(
                f"{len(fields)} fields; expected 'u v' or 'u v multiplicity' "
                "(or one label for an isolated vertex)",
                source=source,
                line=number,
            )
        u, v = parse_label(fields[0]), parse_label(fields[1])
        m = _multiplicity(fields[2], source=source, line=number) if len(fields) == 3 else 1
        vertices[u] = None
        if u == v:
            warnings.warn(
                f"{source}, line {number}: loop at {u!r} dropped (loops do not change the "
                "Laplacian)",
                stacklevel=2,
            )
            continue
        vertices[v] = None
        key = (u, v) if (v, u) not in weights else (v, u)
        weights[key] = weights.get(key, 0) + m
    if not vertices:
        raise GraphFormatError("no graph found (no edge or vertex lines)", source=source)
    G = nx.Graph()
    G.add_nodes_from(vertices)
    # Filling the adjacency directly (one shared data dict per edge, as networkx does itself)
    # is markedly faster than add_edges_from on files of millions of lines.
    adjacency = G._adj
    for (a, b), total in weights.items():
        adjacency[a][b] = adjacency[b][a] = {"weight": total}
    return G


def _label_text(label: Hashable) -> str:
    text = str(label)
    if not text or _UNSAFE_LABEL.search(text):
        raise InvalidGraphError(
            f"vertex label {label!r} cannot be written to an edge list; "
            "expected a label without spaces, commas or '#'"
        )
    return text


def write_edgelist(G: nx.Graph, target: str | Path | IO[str]) -> None:
    """Write ``G`` as an edge list that :func:`parse_edgelist` reads back.

    Each adjacent pair is one line ``u v`` (or ``u v m`` when the multiplicity ``m`` exceeds 1);
    vertices without edges get a line of their own.  The first line is a comment with the
    graph's name and size.

    Parameters
    ----------
    G : networkx graph
        Undirected; ``weight`` is read as a multiplicity.
    target : path or text stream

    Raises
    ------
    InvalidGraphError
        If ``G`` is directed or a label holds a space, comma or ``#``.

    Examples
    --------
    >>> import io
    >>> G = nx.Graph([(0, 1, {"weight": 2})]); G.add_node(5)
    >>> out = io.StringIO(); write_edgelist(G, out); print(out.getvalue(), end="")
    # 3 vertices, 1 edges (multiplicities counted: 2)
    0 1 2
    5

    References
    ----------
    Biggs, *Algebraic Graph Theory*, 1993.
    """
    if G.is_directed():
        raise InvalidGraphError("edge lists here hold undirected graphs; got a directed graph")
    lines = []
    name = G.graph.get("name")
    total = 0
    pairs = 0
    touched: set[Hashable] = set()
    for u, v, m in weighted_edges(G):
        lines.append(f"{_label_text(u)} {_label_text(v)}" + (f" {m}" if m > 1 else ""))
        touched.update((u, v))
        total += m
        pairs += 1
    for v in G:
        if v not in touched:
            lines.append(_label_text(v))
    header = f"# {name}: " if name else "# "
    header += f"{G.number_of_nodes()} vertices, {pairs} edges (multiplicities counted: {total})"
    text = "\n".join([header, *lines]) + "\n"
    if isinstance(target, (str, Path)):
        Path(target).write_text(text, encoding="utf-8")
    else:
        target.write(text)
