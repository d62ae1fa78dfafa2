"""Exports: the JSON Lines contract, CSV and Parquet."""

from __future__ import annotations

import csv
import io
import json
import sys

import pytest

from graphinv.batch.engine import run_batch
from graphinv.batch.export import EXPORT_COLUMNS, export_store
from graphinv.errors import GraphInvError, StoreError


@pytest.fixture
def small_store(tmp_path):
    source = tmp_path / "mixed.g6"
    # K_4, a malformed line, the 5-cycle, the Petersen graph (graph6 by networkx)
    source.write_text("C~\nC!\nDhc\nIheA@GUAo\n")
    store = tmp_path / "mixed.db"
    run_batch([str(source)], store=store, workers=1)
    return store


def test_json_lines_contract(small_store):
    out = io.StringIO()
    assert export_store(small_store, format="jsonl", stream=out) == 4
    records = [json.loads(line) for line in out.getvalue().splitlines()]
    assert [r["index"] for r in records] == [0, 1, 2, 3]
    for record in records:
        assert {"index", "critical_group", "spanning_trees", "error"} <= set(record)
    # K(K_4) = Z4^2, 16 trees (Lorenzini 1991, memory; Cayley, OEIS A000272)
    assert (records[0]["critical_group"], records[0]["spanning_trees"]) == (["4", "4"], "16")
    assert records[0]["error"] is None
    assert records[1]["critical_group"] is None and records[1]["spanning_trees"] is None
    assert records[1]["error"].startswith("line 2: malformed graph6")
    # K(C_5) = Z5 (common fact); Petersen: Z2 + Z10^3, 2000 trees (common fact, memory)
    assert records[2]["critical_group"] == ["5"]
    assert (records[3]["critical_group"], records[3]["spanning_trees"]) == (
        ["2", "10", "10", "10"],
        "2000",
    )
    assert all(isinstance(x, str) for r in records[:1] for x in r["laplacian_polynomial"])


def test_csv_and_output_file(small_store, tmp_path):
    target = tmp_path / "out.csv"
    assert export_store(small_store, format="csv", output=target) == 4
    rows = list(csv.DictReader(target.open()))
    assert list(rows[0]) == list(EXPORT_COLUMNS)
    assert rows[3]["critical_group"] == "2,10,10,10" and rows[1]["error"].startswith("line 2")


def test_parquet_round_trip(small_store, tmp_path):
    pq = pytest.importorskip("pyarrow.parquet")
    target = tmp_path / "out.parquet"
    assert export_store(small_store, format="parquet", output=target) == 4
    table = pq.read_table(target).to_pylist()
    out = io.StringIO()
    export_store(small_store, format="jsonl", stream=out)
    assert table == [json.loads(line) for line in out.getvalue().splitlines()]


def test_parquet_without_pyarrow_is_a_clear_error(small_store, tmp_path, monkeypatch):
    monkeypatch.setitem(sys.modules, "pyarrow", None)
    monkeypatch.setitem(sys.modules, "pyarrow.parquet", None)
    with pytest.raises(GraphInvError, match=r"Parquet export needs pyarrow"):
        export_store(small_store, format="parquet", output=tmp_path / "x.parquet")


def test_bad_export_requests(small_store, tmp_path):
    with pytest.raises(GraphInvError, match="unknown export format 'xml'"):
        export_store(small_store, format="xml")
    with pytest.raises(GraphInvError, match="give an output file"):
        export_store(small_store, format="parquet")
    with pytest.raises(StoreError, match="no such store"):
        export_store(tmp_path / "missing.db")
    not_a_store = tmp_path / "other.db"
    import sqlite3

    sqlite3.connect(not_a_store).execute("CREATE TABLE t (x)").connection.commit()
    with pytest.raises(StoreError, match="not a graphinv batch store"):
        export_store(not_a_store)


def test_huge_multiplicities_stay_exact(tmp_path):
    # Two vertices joined by m parallel edges: K = Z_m and m spanning trees (common fact)
    m = 10**30
    source = tmp_path / "bundle.edges"
    source.write_text(f"a b {m}\nb c\n")
    store = tmp_path / "bundle.db"
    run_batch([str(source)], store=store, workers=1)
    out = io.StringIO()
    export_store(store, format="jsonl", stream=out)
    (record,) = [json.loads(line) for line in out.getvalue().splitlines()]
    assert record["critical_group"] == [str(m)] and record["spanning_trees"] == str(m)
    assert record["edges"] == str(m + 1)
    with pytest.raises(GraphInvError, match="beyond Parquet's 64-bit integers"):
        export_store(store, format="parquet", output=tmp_path / "bundle.parquet")
