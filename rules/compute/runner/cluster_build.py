"""Start a batch-scheduler cluster from a ``ClusterSpec`` (dask-jobqueue).

Imported only by ``deckward run --cluster NAME``.  The spec's options go to
the dask_jobqueue class unchanged; deckward adds the bound on worker deaths
a state survives (the scheduler's ``allowed-failures``) and scales the
cluster to ``jobs`` batch jobs.
"""
from __future__ import annotations

from deckward.rules.engine.cluster_config import ClusterSpec


def jobqueue_cluster(spec: ClusterSpec, retries: int):
    """The dask_jobqueue cluster object, not yet scaled (no job submitted)."""
    import dask
    import dask_jobqueue

    from .dask_executor import scheduler_settings

    cls = getattr(dask_jobqueue, spec.jobqueue_class)
    with dask.config.set(scheduler_settings(retries)):
        return cls(**spec.options)


def build_cluster(spec: ClusterSpec, retries: int):
    """The cluster, scaled to the spec's number of batch jobs."""
    from .dask_executor import ClusterUnavailable

    try:
        cluster = jobqueue_cluster(spec, retries)
    except (OSError, ValueError, TypeError, RuntimeError) as e:
        text = str(e).strip().splitlines()[0] if str(e).strip() else type(e).__name__
        raise ClusterUnavailable(f"cluster `{spec.name}` ({spec.kind}) cannot be started: {text}") from None
    cluster.scale(jobs=spec.jobs)
    return cluster
