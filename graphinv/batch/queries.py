"""Questions asked of a batch store: what is in it, what failed, and which graphs share spectra.

Everything here runs as SQL over the store, so a survey of millions of rows needs no more
memory than its answer.  Statistics about critical groups count connected graphs only (the
critical group is defined for connected graphs; for a disconnected one the store keeps the
torsion of ``coker L``, the product of its components' groups).

References
----------
N. Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999).
W. H. Haemers and E. Spence, "Enumeration of cospectral graphs", European J. Combin. 25 (2004).
"""

from __future__ import annotations

import os
from collections.abc import Iterator
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from graphinv.batch.store import BatchStore, decode_value
from graphinv.errors import GraphInvError

__all__ = [
    "MATRIX_COLUMNS",
    "CospectralClass",
    "CospectralCount",
    "StoreSurvey",
    "cospectral_classes",
    "count_cospectral",
    "survey_store",
]

#: The stored polynomial column of each matrix kind.
MATRIX_COLUMNS = {
    "laplacian": "laplacian_polynomial",
    "signless": "signless_polynomial",
    "adjacency": "adjacency_polynomial",
}


@dataclass(frozen=True)
class CospectralCount:
    """How many graphs of a store share a ``matrix`` spectrum with a non-isomorphic graph.

    Attributes
    ----------
    matrix : str
        ``laplacian``, ``signless`` or ``adjacency``.
    classes : int
        Spectra shared by at least two non-isomorphic graphs.
    graphs : int
        Isomorphism classes of graphs in those classes (the count tabulated by Haemers and
        Spence 2004).
    """

    matrix: str
    classes: int
    graphs: int

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict of the fields."""
        return {"matrix": self.matrix, "classes": self.classes, "graphs": self.graphs}


@dataclass(frozen=True)
class StoreSurvey:
    """A summary of a batch store.

    Attributes
    ----------
    store : str
        The store file.
    inputs : list of dict
        Per input: source, kind, total (None until read to the end), stored rows, failures.
    runs : int
        Runs recorded.
    graphs, failed : int
        Rows stored, and rows with an error.
    failures : list of dict
        The first failures: source, index, line, error.
    by_vertices : dict
        Rows per vertex count (successful rows).
    connected : int
        Successful rows of connected graphs with a critical group.
    rank_counts : dict
        Connected graphs by the number of invariant factors > 1 of their critical group.
    cyclic : Fraction
        The fraction of those connected graphs with a cyclic critical group (exact).
    largest : list of dict
        The connected graphs with the largest critical groups (order = spanning-tree count).
    cospectral : list of CospectralCount
        Shared spectra for each stored polynomial kind.
    """

    store: str
    inputs: list[dict[str, Any]]
    runs: int
    graphs: int
    failed: int
    failures: list[dict[str, Any]]
    by_vertices: dict[int, int]
    connected: int
    rank_counts: dict[int, int]
    cyclic: Fraction | None
    largest: list[dict[str, Any]]
    cospectral: list[CospectralCount] = field(default_factory=list)

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict (the cyclic fraction as ``"p/q"`` text and a float)."""
        return {
            "store": self.store,
            "inputs": self.inputs,
            "runs": self.runs,
            "graphs": self.graphs,
            "failed": self.failed,
            "failures": self.failures,
            "by_vertices": {str(k): v for k, v in self.by_vertices.items()},
            "connected": self.connected,
            "rank_counts": {str(k): v for k, v in self.rank_counts.items()},
            "cyclic_fraction": None if self.cyclic is None else str(self.cyclic),
            "cyclic_fraction_float": None if self.cyclic is None else float(self.cyclic),
            "largest": self.largest,
            "cospectral": [c.to_record() for c in self.cospectral],
        }


def _open(store: str | os.PathLike[str] | BatchStore) -> tuple[BatchStore, bool]:
    if isinstance(store, BatchStore):
        return store, False
    return BatchStore(store, create=False), True


def survey_store(
    store: str | os.PathLike[str] | BatchStore, *, largest: int = 5, failures: int = 10
) -> StoreSurvey:
    """Summarise a batch store.

    Parameters
    ----------
    store : path or BatchStore
        The store to read (never modified).
    largest : int
        How many of the largest critical groups to list.
    failures : int
        How many failures to list.

    Returns
    -------
    StoreSurvey

    Raises
    ------
    StoreError
        If the store does not exist or is not a graphinv store.

    Examples
    --------
    >>> import tempfile, os
    >>> from graphinv.batch.engine import run_batch
    >>> path = os.path.join(tempfile.mkdtemp(), "wheels.db")
    >>> _ = run_batch(["wheel:3..6", "complete:5"], store=path, workers=1)
    >>> survey = survey_store(path)
    >>> survey.graphs, survey.rank_counts, survey.cyclic
    (5, {2: 4, 3: 1}, Fraction(0, 1))
    >>> survey.largest[0]["critical_group"]   # W_6: Z_8 + Z_40 (Biggs 1999)
    ['8', '40']

    References
    ----------
    Biggs 1999 (critical group, order = number of spanning trees); Haemers and Spence 2004.
    """
    db, owned = _open(store)
    try:
        c = db.connection
        inputs = [
            {
                **item.to_record(),
                "stored": c.execute(
                    "SELECT COUNT(*) FROM graphs WHERE input_id = ?", (item.input_id,)
                ).fetchone()[0],
                "failed": c.execute(
                    "SELECT COUNT(*) FROM graphs WHERE input_id = ? AND error IS NOT NULL",
                    (item.input_id,),
                ).fetchone()[0],
            }
            for item in db.inputs()
        ]
        runs = c.execute("SELECT COUNT(*) FROM runs").fetchone()[0]
        total = db.count()
        failed = db.count(errors=True)
        failure_rows = [
            {"source": source, "index": position, "line": line, "error": error}
            for source, position, line, error in c.execute(
                "SELECT source, position, line, error FROM graphs JOIN inputs USING (input_id) "
                "WHERE error IS NOT NULL ORDER BY input_id, position LIMIT ?",
                (failures,),
            )
        ]
        by_vertices = dict(
            c.execute(
                "SELECT vertices, COUNT(*) FROM graphs WHERE error IS NULL "
                "GROUP BY vertices ORDER BY vertices"
            ).fetchall()
        )
        connected_rows = "error IS NULL AND components = 1"
        rank_counts = dict(
            c.execute(
                f"SELECT group_rank, COUNT(*) FROM graphs WHERE {connected_rows} "
                "GROUP BY group_rank ORDER BY group_rank"
            ).fetchall()
        )
        connected = sum(rank_counts.values())
        cyclic_count = rank_counts.get(0, 0) + rank_counts.get(1, 0)
        cyclic = Fraction(cyclic_count, connected) if connected else None
        top = [
            {
                "source": source,
                "index": position,
                "graph": content,
                "vertices": vertices,
                "order": trees,
                "critical_group": decode_value("critical_group", group),
            }
            for source, position, content, vertices, trees, group in c.execute(
                "SELECT source, position, content, vertices, spanning_trees, critical_group "
                f"FROM graphs JOIN inputs USING (input_id) WHERE {connected_rows} "
                "AND spanning_trees IS NOT NULL AND critical_group IS NOT NULL "
                "ORDER BY length(spanning_trees) DESC, spanning_trees DESC, input_id, position "
                "LIMIT ?",
                (largest,),
            )
        ]
        spectra = [
            count_cospectral(db, matrix)
            for matrix, column in MATRIX_COLUMNS.items()
            if c.execute(f"SELECT 1 FROM graphs WHERE {column} IS NOT NULL LIMIT 1").fetchone()
        ]
        return StoreSurvey(
            db.path,
            inputs,
            runs,
            total,
            failed,
            failure_rows,
            by_vertices,
            connected,
            rank_counts,
            cyclic,
            top,
            spectra,
        )
    finally:
        if owned:
            db.close()


def count_cospectral(store: str | os.PathLike[str] | BatchStore, matrix: str) -> CospectralCount:
    """Count the spectra shared by non-isomorphic graphs of a store, and the graphs sharing them.

    Isomorphic rows count once (by canonical key), so a store holding all graphs on ``n``
    vertices reproduces the counts of Haemers and Spence (2004, Table 1).

    Parameters
    ----------
    store : path or BatchStore
    matrix : {"laplacian", "signless", "adjacency"}

    Examples
    --------
    ``K_{1,4}`` and ``C_4`` plus an isolated vertex share their adjacency spectrum (the
    smallest such pair, a common textbook example):

    >>> import tempfile, os
    >>> from graphinv.batch.engine import run_batch
    >>> folder = tempfile.mkdtemp()
    >>> with open(os.path.join(folder, "pair.g6"), "w") as f:
    ...     _ = f.write("Ds_\\nDl?\\nD?{\\n")    # K_{1,4}, C_4 + K_1, and K_{1,4} relabelled
    >>> _ = run_batch([os.path.join(folder, "pair.g6")], store=folder + "/s.db", workers=1)
    >>> count_cospectral(folder + "/s.db", "adjacency")
    CospectralCount(matrix='adjacency', classes=1, graphs=2)

    References
    ----------
    W. H. Haemers and E. Spence, "Enumeration of cospectral graphs", European J. Combin. 25
    (2004).
    """
    classes = 0
    graphs = 0
    for item in cospectral_classes(store, matrix=matrix):
        classes += 1
        graphs += len(item.members)
    return CospectralCount(matrix, classes, graphs)


@dataclass(frozen=True)
class CospectralClass:
    """Non-isomorphic stored graphs sharing one characteristic polynomial.

    Attributes
    ----------
    matrix : str
        ``laplacian``, ``signless`` or ``adjacency``.
    polynomial : tuple of int
        The coefficients of ``det(xI - M)``, leading first.
    members : list of dict
        One stored row per isomorphism class: source, index, graph (content key).
    """

    matrix: str
    polynomial: tuple[int, ...]
    members: list[dict[str, Any]]

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict (coefficients as decimal strings)."""
        return {
            "matrix": self.matrix,
            "polynomial": [str(c) for c in self.polynomial],
            "members": self.members,
        }


def _column(matrix: str) -> str:
    try:
        return MATRIX_COLUMNS[matrix]
    except KeyError:
        raise GraphInvError(
            f"unknown matrix {matrix!r}; expected one of: {', '.join(MATRIX_COLUMNS)}"
        ) from None


def cospectral_classes(
    store: str | os.PathLike[str] | BatchStore, *, matrix: str = "laplacian"
) -> Iterator[CospectralClass]:
    """The classes of non-isomorphic stored graphs that share a ``matrix`` spectrum.

    Rows are streamed in polynomial order; within a class each isomorphism class appears once
    (the first stored row).

    Parameters
    ----------
    store : path or BatchStore
    matrix : {"laplacian", "signless", "adjacency"}

    Yields
    ------
    CospectralClass

    Examples
    --------
    The smallest pair with the same signless Laplacian spectrum: ``K_{1,3}`` and
    ``K_3 + K_1`` (common fact).

    >>> import tempfile, os
    >>> from graphinv.batch.engine import run_batch
    >>> folder = tempfile.mkdtemp()
    >>> with open(os.path.join(folder, "pair.g6"), "w") as f:
    ...     _ = f.write("Cs\\nCw\\n")                  # K_{1,3}, then K_3 plus a vertex
    >>> _ = run_batch([os.path.join(folder, "pair.g6")], store=folder + "/s.db", workers=1)
    >>> [len(c.members) for c in cospectral_classes(folder + "/s.db", matrix="signless")]
    [2]

    References
    ----------
    W. H. Haemers and E. Spence, European J. Combin. 25 (2004).
    """
    from graphinv.cospectral import classes_from_keys

    column = _column(matrix)
    db, owned = _open(store)
    try:
        cursor = db.connection.execute(
            f"SELECT g.{column}, inputs.source, inputs.kind, g.position, g.content, "
            f"g.canonical_key FROM graphs AS g JOIN inputs USING (input_id) WHERE g.{column} IN ("
            f"SELECT {column} FROM graphs WHERE error IS NULL AND {column} IS NOT NULL "
            f"GROUP BY {column} HAVING COUNT(*) > 1) "
            f"AND g.error IS NULL ORDER BY g.{column}, g.input_id, g.position"
        )
        group: list[tuple[str, str, int, str, str | None]] = []
        current: str | None = None
        for polynomial, source, kind, position, content, key in cursor:
            if polynomial != current:
                if group and current is not None:
                    yield from _classes_of(matrix, current, group, classes_from_keys)
                current, group = polynomial, []
            group.append((source, kind, position, content, key))
        if group and current is not None:
            yield from _classes_of(matrix, current, group, classes_from_keys)
    finally:
        if owned:
            db.close()


def _classes_of(
    matrix: str,
    polynomial: str,
    group: list[tuple[str, str, int, str, str | None]],
    classes_from_keys: Any,
) -> Iterator[CospectralClass]:
    """The cospectral classes among rows sharing one polynomial, isomorphic copies removed."""

    def same_graph(i: int, j: int) -> bool:
        import networkx as nx

        return bool(
            nx.is_isomorphic(
                _stored_graph(*group[i][:2], group[i][3]), _stored_graph(*group[j][:2], group[j][3])
            )
        )

    found = classes_from_keys(
        ((i, polynomial, row[4]) for i, row in enumerate(group)), same_graph=same_graph
    )
    for positions in found.classes:
        members = [
            {"source": group[i][0], "index": group[i][2], "graph": group[i][3]} for i in positions
        ]
        yield CospectralClass(matrix, _coefficients(polynomial), members)


def _stored_graph(source: str, kind: str, content: str) -> Any:
    """Rebuild a stored graph from its content key (only needed without canonical keys)."""
    from graphinv.io import from_graph6, from_sparse6, read_graph

    if kind == "lines":
        return from_sparse6(content) if content[:1] in (":", ";") else from_graph6(content)
    if kind == "files":
        base = source if os.path.isdir(source) else os.path.dirname(source)
        return read_graph(os.path.join(base, content))
    return read_graph(content)


def _coefficients(text: str) -> tuple[int, ...]:
    return tuple(int(c) for c in text.split(","))
