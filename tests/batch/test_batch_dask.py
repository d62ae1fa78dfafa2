"""The Dask engine stores the same rows as the local process pool."""

from __future__ import annotations

import pytest

from graphinv.batch.engine import run_batch

pytest.importorskip("distributed")
pytestmark = pytest.mark.dask


def test_local_cluster_gives_the_same_rows_as_the_local_pool(tmp_path, atlas_file, stored_rows):
    from graphinv.batch.distributed import DaskExecutor

    inputs = [str(atlas_file), "gnp:12,0.4,seed=1..40", "wheel:3..9"]
    local = tmp_path / "local.db"
    run_batch(inputs, store=local, workers=2, chunk_size=200, progress=False)

    executor = DaskExecutor(workers=2, processes=False)
    try:
        dask = tmp_path / "dask.db"
        result = run_batch(
            inputs, store=dask, engine="dask", executor=executor, chunk_size=200, progress=False
        )
    finally:
        executor.close(cancel=False)
    assert result.computed == 1253 + 40 + 7
    assert stored_rows(dask) == stored_rows(local)


def test_unreachable_scheduler_is_a_clear_error():
    from graphinv.batch.distributed import DaskExecutor
    from graphinv.errors import GraphInvError

    with pytest.raises(
        GraphInvError, match=r"cannot reach the Dask scheduler tcp://127\.0\.0\.1:9"
    ):
        DaskExecutor(scheduler="tcp://127.0.0.1:9", connect_timeout=1)
