"""Run state plans on a Dask cluster (``distributed``; imported only here).

Each plan is one Dask task (``dask_tasks.compute_task``).  A state that
optimises its geometry and then computes frequencies is two dependent
tasks: the optimisation (a plan of its own in the cache, so a sibling state
without frequencies reuses it) and the frequency job that starts from its
geometry.

Faults: when a worker dies mid-state (killed, out of memory) the scheduler
gives the task to another worker, up to its ``allowed-failures`` bound (the
clusters deckward starts set it from ``retries``); past the bound the state
is reported failed with the reason while every other state finishes.  The
client alone writes the cache and the results database, as each result
arrives; interrupting it cancels every future that has not finished.
"""
from __future__ import annotations

import time
import uuid
import warnings
from dataclasses import asdict
from typing import Optional

from .dask_tasks import STARTED_TOPIC, compute_task
from .plan import StatePlan

DEFAULT_RETRIES = 2
DEFAULT_CONNECT_TIMEOUT_S = 10.0


def scheduler_settings(retries: int) -> dict:
    """Dask settings of the schedulers deckward starts: the bound on worker
    deaths a task survives, and no task waiting on a busy worker (a queued
    task would count as a victim when that worker dies)."""
    return {"distributed.scheduler.allowed-failures": int(retries),
            "distributed.scheduler.worker-saturation": 1.0}


class SchedulerUnreachable(Exception):
    """The scheduler did not answer (a one-line message for the user)."""


class ClusterUnavailable(Exception):
    """A cluster described in deckward.yaml cannot be started."""


def _failure(plan: StatePlan, reason: str, log_path: Optional[str], took: float) -> dict:
    from .parallel import _failure as failure

    return failure(plan, reason, log_path, took)


class DaskExecutor:
    """Runs plans through a ``distributed.Client``.  Use as a context
    manager: leaving it closes the client and any cluster it started."""

    def __init__(self, client, cluster=None, description: str = "a Dask cluster") -> None:
        self.client = client
        self.cluster = cluster
        self.description = description

    # -- making one ------------------------------------------------------------
    @classmethod
    def connect(cls, address: str, timeout_s: float = DEFAULT_CONNECT_TIMEOUT_S) -> "DaskExecutor":
        """A client of the running scheduler at ``address`` (tcp://host:port)."""
        from distributed import Client

        try:
            client = Client(address, timeout=f"{timeout_s}s", set_as_default=False)
        except (OSError, TimeoutError, ValueError) as e:
            text = str(e).strip().splitlines()[0] if str(e).strip() else type(e).__name__
            raise SchedulerUnreachable(f"cannot reach the Dask scheduler at {address} within {timeout_s:g} s "
                                       f"({text})") from None
        return cls(client, None, f"the Dask scheduler at {address}")

    @classmethod
    def local(cls, workers: int, retries: int = DEFAULT_RETRIES) -> "DaskExecutor":
        """A ``LocalCluster`` of ``workers`` processes with one task slot each,
        on 127.0.0.1 only."""
        import dask
        from distributed import Client, LocalCluster

        with dask.config.set(scheduler_settings(retries)), warnings.catch_warnings():
            warnings.simplefilter("ignore", UserWarning)  # "port 8787 in use" when another cluster runs
            cluster = LocalCluster(n_workers=int(workers), threads_per_worker=1, processes=True,
                                   host="127.0.0.1", dashboard_address=None)
        client = Client(cluster, set_as_default=False)
        return cls(client, cluster, f"a local Dask cluster of {workers} workers")

    @classmethod
    def from_spec(cls, spec, retries: Optional[int] = None) -> "DaskExecutor":
        """A batch-scheduler cluster described in deckward.yaml (``ClusterSpec``)."""
        from distributed import Client

        from .cluster_build import build_cluster

        retries = spec.retries if retries is None else retries
        cluster = build_cluster(spec, retries)
        client = Client(cluster, set_as_default=False)
        return cls(client, cluster, f"cluster `{spec.name}` ({spec.kind})")

    def __enter__(self) -> "DaskExecutor":
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def close(self) -> None:
        try:
            self.client.close()
        finally:
            if self.cluster is not None:
                self.cluster.close()

    # -- running ---------------------------------------------------------------
    def slots(self) -> int:
        """Task slots (worker threads) the cluster has now; at least one, so
        that a batch cluster still waiting for its jobs gets work queued."""
        try:
            workers = self.client.scheduler_info().get("workers", {})
        except Exception:  # the scheduler went away: the futures will say so
            return 1
        return max(1, sum(int(w.get("nthreads", 1)) for w in workers.values()))

    def run(self, todo: dict[str, list[StatePlan]], cache, options, progress, finish) -> None:
        from distributed import wait

        client = self.client
        futures: dict = {}  # future -> (cache key, plan) of deck states
        by_task: dict[str, tuple] = {}  # task name -> (cache key, plan)
        helpers: dict = {}  # future -> cache key of an optimisation a frequency job needs
        started_at: dict[str, float] = {}
        submitted: dict[str, object] = {}  # cache key -> future

        def on_started(event) -> None:
            _, msg = event
            entry = by_task.get(msg.get("task"))
            if entry is None:
                return
            key, shown, step = entry
            started_at[key] = time.monotonic()
            progress.started(shown, f"{msg.get('host')} {msg.get('worker')}" + step)

        def submit(key: str, plan: StatePlan, relaxed=None, shown: Optional[str] = None):
            name = f"{plan.name}-{key[:12]}-{uuid.uuid4().hex[:8]}"
            by_task[name] = (key, shown or plan.name, " (optimisation)" if shown else "")
            fut = client.submit(compute_task, asdict(plan), cache.log_path(key), options.max_memory_mb,
                                options.threads, name, relaxed, key=name, pure=False)
            submitted[key] = fut
            return fut

        client.subscribe_topic(STARTED_TOPIC, on_started)
        try:
            waiting = list(todo.items())
            for _, group in waiting:
                progress.queue(group[0].name)
            pending: set = set()
            stored: set = set()  # optimisation helpers already handled

            def top_up() -> None:
                # Only as many tasks as the cluster has task slots: a task
                # waiting on a worker would die with it.
                while waiting and len(pending) < self.slots():
                    key, group = waiting.pop(0)
                    plan = group[0]
                    relaxed = None
                    if plan.optimize and plan.frequencies:
                        relaxed = self._optimisation_for(plan, todo, cache, submit, helpers, submitted)
                    fut = submitted[key] if key in submitted else submit(key, plan, relaxed)
                    futures[fut] = (key, plan)
                    pending.add(fut)
                    pending.update(f for f in helpers if f not in stored)

            limit = options.time_limit_s
            top_up()
            while pending:
                try:
                    with client.as_current():
                        done, _ = wait(list(pending), timeout=0.5, return_when="FIRST_COMPLETED")
                except TimeoutError:
                    done = set()
                for fut in done:
                    pending.discard(fut)
                    if fut in helpers:
                        stored.add(fut)
                        self._store_helper(fut, helpers[fut], cache)
                    if fut in futures:
                        key, plan = futures[fut]
                        finish(key, self._result(fut, plan, cache.log_path(key), started_at.get(key)))
                if limit:
                    now = time.monotonic()
                    for fut in [f for f in pending if f in futures]:
                        key, plan = futures[fut]
                        t0 = started_at.get(key)
                        if t0 is not None and now - t0 > limit:
                            fut.cancel()
                            pending.discard(fut)
                            finish(key, _failure(plan, f"stopped at the time limit of {limit:g} s (the worker may "
                                                 "finish it in the background; the result is not kept)",
                                                 cache.log_path(key), now - t0))
                top_up()
        except BaseException:
            unfinished = [f for f in list(futures) + list(helpers) if not f.done()]
            if unfinished:
                client.cancel(unfinished, force=True)
            raise
        finally:
            try:
                client.unsubscribe_topic(STARTED_TOPIC)
            except Exception:  # the client may already be gone
                pass

    @staticmethod
    def _optimisation_for(plan, todo, cache, submit, helpers, submitted):
        """The optimisation a frequency job depends on: a cached result, the
        future of a deck state with the same plan, or a new task."""
        upstream = plan.with_changes(frequencies=False, name=plan.name + ".optimisation")
        up_key = cache.key(upstream)
        if up_key in submitted:
            return submitted[up_key]
        hit = cache.get(up_key)
        if hit is not None:
            return hit
        if up_key in todo:
            return submit(up_key, todo[up_key][0])
        fut = submit(up_key, upstream, shown=plan.name)
        helpers[fut] = up_key
        return fut

    @staticmethod
    def _store_helper(fut, key: str, cache) -> None:
        if fut.status == "finished":
            cache.put(key, fut.result())

    @staticmethod
    def _result(fut, plan: StatePlan, log_path: Optional[str], t0: Optional[float]) -> dict:
        took = time.monotonic() - t0 if t0 is not None else 0.0
        if fut.status == "finished":
            return fut.result()
        if fut.status == "cancelled":
            return _failure(plan, "the cluster cancelled the task (the scheduler restarted or lost it)",
                            log_path, took)
        return _failure(plan, task_failure_reason(fut.exception()), log_path, took)


def task_failure_reason(error: BaseException) -> str:
    """Why a Dask task ended without a result, in one line."""
    from distributed.scheduler import KilledWorker

    if isinstance(error, KilledWorker):
        allowed = error.args[2] if len(error.args) > 2 else None
        deaths = allowed + 1 if isinstance(allowed, int) else None
        bound = {None: "", 1: " once", 2: " twice"}.get(deaths, f" {deaths} times")
        return (f"the worker computing it died{bound} (killed, or out of memory); the scheduler stopped "
                "retrying it on other workers")
    text = str(error).strip().splitlines()[0] if str(error).strip() else ""
    return f"the Dask task failed: {type(error).__name__}: {text}"
