"""Running a batch on a Dask cluster: the same chunks, computed by ``dask.distributed`` workers.

The coordinating process stays the only writer of the store: it submits chunks as Dask
futures, a few per worker at a time, and commits the rows each future returns.  Workers need
graphinv (and pynauty, for the canonical key) installed; they never touch the store, so they
need no access to its file.

Point a batch at a running cluster with its scheduler address::

    dask scheduler                        # on the head node: prints tcp://HOST:8786
    dask worker tcp://HOST:8786 --nworkers 8 --nthreads 1   # on each machine
    graphinv batch family.g6 --store family.db --engine dask --scheduler tcp://HOST:8786

Without ``--scheduler`` a ``LocalCluster`` of worker processes is started for the run.

References
----------
Dask distributed documentation, "Futures" and "Setup" (distributed.dask.org).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from graphinv.batch.invariants import KernelSettings, ResultItem, TaskItem, process_chunk
from graphinv.errors import GraphInvError

__all__ = ["DaskExecutor"]


class DaskExecutor:
    """Chunks computed as futures on a Dask cluster.

    Parameters
    ----------
    scheduler : str, optional
        The scheduler address (``tcp://host:8786``); None starts a ``LocalCluster``.
    workers : int, optional
        Workers of the ``LocalCluster`` (default all cores); ignored with a scheduler address.
    processes : bool
        Whether the ``LocalCluster`` runs its workers as processes (threads otherwise).
    client : distributed.Client, optional
        An existing client to use (it is not closed).
    connect_timeout : float
        Seconds to wait for the scheduler.

    Raises
    ------
    GraphInvError
        If dask.distributed is missing or the scheduler cannot be reached.

    Examples
    --------
    >>> executor = DaskExecutor(workers=1, processes=False)  # doctest: +SKIP
    >>> executor.workers  # doctest: +SKIP
    1
    """

    def __init__(
        self,
        *,
        scheduler: str | None = None,
        workers: int | None = None,
        processes: bool = True,
        client: Any = None,
        connect_timeout: float = 20.0,
    ) -> None:
        try:
            from distributed import Client, LocalCluster
        except ImportError:
            raise GraphInvError(
                "the dask engine needs dask.distributed: pip install 'graphinv[dask]'"
            ) from None
        self._cluster: Any = None
        self._own_client = client is None
        if client is not None:
            self.client = client
        elif scheduler is not None:
            try:
                self.client = Client(scheduler, timeout=f"{connect_timeout}s")
            except OSError as exc:
                raise GraphInvError(f"cannot reach the Dask scheduler {scheduler}: {exc}") from None
        else:
            import logging
            import os

            count = workers or os.cpu_count() or 1
            self._cluster = LocalCluster(
                n_workers=count,
                threads_per_worker=1,
                processes=processes,
                dashboard_address=None,
                # Shutting the cluster down races worker heartbeats; those logs are noise here.
                silence_logs=logging.CRITICAL,
            )
            self.client = Client(self._cluster)
        info = self.client.scheduler_info()
        self.workers = max(1, sum(w.get("nthreads", 1) for w in info["workers"].values()))

    def submit(self, items: Sequence[TaskItem], settings: KernelSettings, kind: str) -> Any:
        """Send one chunk to the cluster as a future."""
        return self.client.submit(process_chunk, list(items), settings, kind=kind, pure=False)

    def wait(self, handles: set[Any]) -> list[tuple[Any, list[ResultItem]]]:
        """Finished chunks (at least one); a failed task raises here."""
        from distributed import wait

        done, _ = wait(list(handles), return_when="FIRST_COMPLETED")
        finished = []
        for future in done:
            finished.append((future, future.result()))
            future.release()
        return finished

    def close(self, *, cancel: bool) -> None:
        """Close the client (and the local cluster, if this executor started one)."""
        if self._own_client:
            self.client.close()
        if self._cluster is not None:
            self._cluster.close()
