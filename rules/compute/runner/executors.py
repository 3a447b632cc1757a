"""Where state plans run: one interface, three places.

``parallel.execute`` looks up the cache, merges identical plans and hands
the rest to an executor, which computes each plan somewhere and calls
``finish(key, result)`` once per plan, in this process and in the order the
results arrive (so the cache, the results database and the progress display
have a single writer):

- ``InProcessExecutor``: one state after the other in this process (nothing
  between the deck and PySCF).
- ``LocalProcessExecutor``: worker processes on this machine (``--jobs``),
  with a time limit that can stop a state.
- ``DaskExecutor`` (``dask_executor.py``): a Dask cluster, reached through a
  scheduler address, a ``LocalCluster`` or a batch-scheduler cluster.

``todo`` maps a plan's cache key to the plans sharing it (the first one is
computed).  An executor never raises for a failed state: a failure is a
result with ``status = "failed"`` and the reason.
"""
from __future__ import annotations

from typing import Callable, Protocol

from .plan import StatePlan

Finish = Callable[[str, dict], None]


class Executor(Protocol):
    """What ``parallel.execute`` needs from a place that runs plans."""

    description: str

    def run(self, todo: dict[str, list[StatePlan]], cache, options, progress, finish: Finish) -> None:
        ...


class InProcessExecutor:
    description = "this process"

    def run(self, todo, cache, options, progress, finish: Finish) -> None:
        from .compute import compute_state
        from .interrupt import immediate_interrupt
        from .parallel import _run_here

        with immediate_interrupt():
            _run_here(todo, cache, options, progress, finish, compute_state)


class LocalProcessExecutor:
    description = "local worker processes"

    def run(self, todo, cache, options, progress, finish: Finish) -> None:
        from .parallel import _run_workers

        _run_workers(todo, cache, options, progress, finish)


def default_executor(options) -> Executor:
    """The executor ``options`` ask for: theirs, else worker processes when
    there are several jobs or a time limit, else this process."""
    if getattr(options, "executor", None) is not None:
        return options.executor
    return LocalProcessExecutor() if options.use_workers() else InProcessExecutor()


_probe_executor: list = [None]


def set_probe_executor(executor) -> None:
    """Where the probes' calculations run in this process (None: here).
    Probes are reached through the checker's many entry points; the command
    that owns a cluster sets it once instead of threading it through each."""
    _probe_executor[0] = executor


def probe_executor():
    return _probe_executor[0]
