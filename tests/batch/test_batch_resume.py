"""Interrupting a batch and resuming it: no row lost, none stored twice, results unchanged."""

from __future__ import annotations

import os
import random
import signal
import sqlite3
import subprocess
import sys
import time

import networkx as nx
import pytest

from graphinv.batch.engine import run_batch
from graphinv.errors import StoreError


def _count(store) -> int:
    try:
        connection = sqlite3.connect(f"file:{store}?mode=ro", uri=True, timeout=5)
        try:
            return int(connection.execute("SELECT COUNT(*) FROM graphs").fetchone()[0])
        finally:
            connection.close()
    except sqlite3.OperationalError:
        return 0  # the store is not created yet


@pytest.fixture
def random_graphs(tmp_path, graph6_line):
    rng = random.Random(2026)
    lines = [
        graph6_line(nx.gnp_random_graph(rng.randrange(7, 10), 0.5, seed=rng.randrange(10**9)))
        for _ in range(4000)
    ]
    path = tmp_path / "random.g6"
    path.write_text("\n".join(lines) + "\n")
    return path, len(lines)


def _start_batch(source, store, *, rows: int) -> subprocess.Popen:
    """Start ``graphinv batch`` in its own process group; return once ``rows`` are stored."""
    command = [sys.executable, "-m", "graphinv", "batch", str(source), "--store", str(store)]
    command += ["--workers", "2", "--chunk", "50", "--commit-every", "0", "--quiet"]
    process = subprocess.Popen(command, start_new_session=True, stderr=subprocess.PIPE)
    deadline = time.monotonic() + 120
    try:
        while _count(store) < rows:
            assert process.poll() is None, process.stderr.read().decode() if process.stderr else ""
            assert time.monotonic() < deadline, "the batch stored nothing in two minutes"
            time.sleep(0.02)
    except BaseException:
        os.killpg(process.pid, signal.SIGKILL)
        process.wait()
        raise
    return process


def test_sigkill_midway_then_rerun_gives_exactly_one_row_per_graph(
    tmp_path, random_graphs, stored_rows
):
    source, total = random_graphs
    store = tmp_path / "killed.db"
    process = _start_batch(source, store, rows=200)
    os.killpg(process.pid, signal.SIGKILL)  # kill -9, workers included
    process.wait()
    stored_before = _count(store)
    assert 0 < stored_before < total, "the kill must land midway for this test to mean anything"

    resumed = run_batch([str(source)], store=store, workers=2, chunk_size=50, progress=False)
    assert resumed.skipped == stored_before
    assert resumed.computed == total - stored_before

    clean = tmp_path / "clean.db"
    run_batch([str(source)], store=clean, workers=2, progress=False)
    after = stored_rows(store)
    assert [row["position"] for row in after] == list(range(total))
    assert after == stored_rows(clean)

    connection = sqlite3.connect(store)
    statuses = [row[0] for row in connection.execute("SELECT status FROM runs ORDER BY run_id")]
    connection.close()
    assert statuses == ["running", "finished"]  # the killed run never got to record its end


def test_rerun_of_a_finished_batch_computes_nothing(tmp_path, stored_rows):
    store = tmp_path / "again.db"
    first = run_batch(["cycle:3..12"], store=store, workers=1)
    second = run_batch(["cycle:3..12"], store=store, workers=1)
    assert (first.computed, second.computed, second.skipped) == (10, 0, 10)
    assert len(stored_rows(store)) == 10


def test_widening_the_selection_computes_only_missing_columns(tmp_path, stored_rows):
    store = tmp_path / "widen.db"
    run_batch(["complete:3..6"], store=store, workers=1, invariants="spanning-trees")
    assert stored_rows(store)[0]["critical_group"] is None
    again = run_batch(["complete:3..6"], store=store, workers=1, invariants="critical-group")
    assert again.computed == 4
    rows = stored_rows(store)
    # K_4: Z4 + Z4 and 16 spanning trees (Lorenzini 1991, memory; Cayley, OEIS A000272)
    assert (rows[1]["critical_group"], rows[1]["spanning_trees"]) == ("4,4", "16")


def test_changed_input_is_refused(tmp_path):
    source = tmp_path / "input.g6"
    store = tmp_path / "changed.db"
    source.write_text("Bw\nCF\n")
    run_batch([str(source)], store=store, workers=1)
    source.write_text("Bw\nC~\n")
    with pytest.raises(StoreError, match="has changed since it was stored: graph 1 was 'CF'"):
        run_batch([str(source)], store=store, workers=1)


def test_ctrl_c_keeps_finished_rows_and_records_the_interruption(tmp_path, random_graphs):
    source, total = random_graphs
    store = tmp_path / "interrupted.db"
    process = _start_batch(source, store, rows=100)
    try:
        os.killpg(process.pid, signal.SIGINT)  # Ctrl-C reaches the whole process group
        _, stderr = process.communicate(timeout=60)
    finally:
        if process.poll() is None:
            os.killpg(process.pid, signal.SIGKILL)
            process.wait()
    assert process.returncode == 130
    assert stderr.decode().strip().splitlines()[-1] == "interrupted"
    connection = sqlite3.connect(store)
    status, computed = connection.execute("SELECT status, computed FROM runs").fetchone()
    stored = connection.execute("SELECT COUNT(*) FROM graphs").fetchone()[0]
    connection.close()
    assert status == "interrupted" and computed == stored and 0 < stored < total
    resumed = run_batch([str(source)], store=store, workers=2, progress=False)
    assert resumed.skipped == stored and resumed.computed == total - stored
