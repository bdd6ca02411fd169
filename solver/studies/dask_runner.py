"""Run study cases on Dask (dask.distributed): a local cluster, or an existing one by address.

``cluster`` may be

- ``"local"``: start a local cluster of worker processes on this machine (one per core,
  one thread each), use it and shut it down afterwards;
- a dict of :class:`distributed.LocalCluster` options, e.g. ``{"n_workers": 2,
  "processes": False}`` (threads in this process, quick for tests);
- a scheduler address such as ``"tcp://10.0.0.5:8786"``: connect to a running cluster (its
  workers need Edgewise and its dependencies installed; start them with ``dask scheduler``
  and ``dask worker tcp://10.0.0.5:8786``);
- a :class:`distributed.Client` you already hold (left open).

The base project is sent to the workers once; each case is one task running
:func:`solver.studies.cases.run_case`. Results come back in case order; a case whose task
fails (even a lost worker) becomes a row naming the error, and the others go on. ``cancel()``
is polled as results arrive; it cancels every task not yet finished.
"""

from __future__ import annotations

import logging
import math
import os
from collections.abc import Mapping, Sequence
from typing import Any

from solver.errors import SolverError
from solver.studies.cases import StudyCancel, StudyProgress, not_run_row, run_case

logger = logging.getLogger(__name__)


def _client_for(cluster: Any):
    try:
        from distributed import Client, LocalCluster
    except ImportError:
        raise SolverError("Running on a cluster needs dask.distributed; install 'distributed', or run with cluster=None.") from None
    if isinstance(cluster, Client):
        return cluster, None
    if cluster == "local" or isinstance(cluster, Mapping):
        options = {"n_workers": os.cpu_count() or 1, "threads_per_worker": 1, "processes": True,
                   "dashboard_address": None}
        if isinstance(cluster, Mapping):
            options.update(cluster)
        local = LocalCluster(**options)
        return Client(local), local
    if isinstance(cluster, str):
        try:
            return Client(cluster, timeout="20s"), None
        except OSError as e:
            raise SolverError(f"Cannot reach the Dask scheduler at '{cluster}' ({e}); check the address "
                              "and that 'dask scheduler' runs there.") from None
    raise SolverError(f"cluster={cluster!r} is not understood; use None, 'local', a dict of LocalCluster "
                      "options, a scheduler address or a distributed.Client.")


def run_on_dask(
    base: dict,
    cases: Sequence[Mapping[str, float]],
    figures: Sequence[str],
    *,
    cluster: Any = "local",
    estimate_error: bool = False,
    progress: StudyProgress | None = None,
    cancel: StudyCancel | None = None,
) -> list[dict]:
    """Run ``cases`` on Dask and return their rows in case order (see the module notes)."""
    from distributed import as_completed

    client, owned_cluster = _client_for(cluster)
    owned_client = owned_cluster is not None or not _is_client(cluster)
    try:
        base_future = client.scatter(base, broadcast=True)
        futures = [client.submit(run_case, base_future, dict(values), tuple(figures), estimate_error, i,
                                 pure=False, key=f"edgewise-case-{i}-{os.getpid()}-{id(cases)}")
                   for i, values in enumerate(cases)]
        index = {f.key: i for i, f in enumerate(futures)}
        rows: list[dict | None] = [None] * len(cases)
        completed = as_completed(futures)
        for done, future in enumerate(completed, start=1):
            i = index[future.key]
            if future.status == "finished":
                rows[i] = future.result()
            elif future.status != "cancelled":
                error = future.exception()
                logger.warning("case %d (%s) failed on the cluster: %s", i, dict(cases[i]), error)
                rows[i] = {"case": i, **{k: float(v) for k, v in cases[i].items()},
                           **{n: math.nan for n in figures}, "error": f"{type(error).__name__}: {error}"}
            if progress is not None:
                progress(done, len(cases))
            if cancel is not None and cancel():
                pending = [f for f in futures if not f.done()]
                logger.info("study cancelled with %d of %d cases unfinished", len(pending), len(cases))
                client.cancel(pending)
                completed.clear()
                break
        return [r if r is not None else not_run_row(cases[i], figures, i) for i, r in enumerate(rows)]
    finally:
        if owned_client:
            client.close()
        if owned_cluster is not None:
            owned_cluster.close()


def _is_client(obj: Any) -> bool:
    try:
        from distributed import Client
    except ImportError:
        return False
    return isinstance(obj, Client)
