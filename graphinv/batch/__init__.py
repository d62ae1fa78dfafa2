"""Batch analysis of graph families: parallel, resumable, on an embedded SQLite store.

:func:`run_batch` computes the invariants of every graph of graph6/sparse6 streams, folders of
graph files and family specs into a :class:`BatchStore`, on a local process pool or a Dask
cluster; :func:`survey_store`, :func:`cospectral_classes` and :func:`export_store` read it back.
"""

from __future__ import annotations

from graphinv.batch.engine import BatchResult, LocalExecutor, run_batch
from graphinv.batch.export import export_records, export_store
from graphinv.batch.invariants import INVARIANTS, compute_invariants, parse_invariants
from graphinv.batch.queries import (
    CospectralClass,
    CospectralCount,
    StoreSurvey,
    cospectral_classes,
    count_cospectral,
    survey_store,
)
from graphinv.batch.store import SCHEMA_VERSION, BatchStore

__all__ = [
    "INVARIANTS",
    "SCHEMA_VERSION",
    "BatchResult",
    "BatchStore",
    "CospectralClass",
    "CospectralCount",
    "LocalExecutor",
    "StoreSurvey",
    "compute_invariants",
    "cospectral_classes",
    "count_cospectral",
    "export_records",
    "export_store",
    "parse_invariants",
    "run_batch",
    "survey_store",
]
