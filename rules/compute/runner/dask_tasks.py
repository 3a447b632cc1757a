"""The function a Dask worker runs for one state plan.

Kept apart from ``dask_executor`` so that a worker imports only this module
and the runner (``deckward`` must be installed where the workers run).  The
state's threads and memory follow the worker it lands on unless the run
fixed them: OpenMP threads = the cores the worker may use shared among its
task slots, PySCF's memory limit = the worker's memory limit shared the
same way.
"""
from __future__ import annotations

import os
import socket
import tempfile
from typing import Optional

STARTED_TOPIC = "deckward-state-started"

# PySCF's max_memory bounds its own arrays only; the interpreter, integrals
# and libraries need the rest (common practice, no source).
MEMORY_SHARE = 0.75


def usable_cores() -> int:
    """Cores this process may run on (a batch job's allotment, not the
    whole node)."""
    try:
        return len(os.sched_getaffinity(0))
    except (AttributeError, OSError):
        return os.cpu_count() or 1


def _worker():
    try:
        from distributed import get_worker

        return get_worker()
    except (ImportError, ValueError):
        return None


def worker_resources(dask_worker, threads: Optional[int] = None, max_memory_mb: Optional[float] = None) -> tuple:
    """(threads, memory in MB) for one state on ``dask_worker`` (the name
    ``Client.run`` fills in)."""
    worker = dask_worker
    if worker is None:
        return threads, max_memory_mb
    slots = max(1, int(worker.state.nthreads))
    if not threads:
        threads = max(1, usable_cores() // slots)
    limit = getattr(getattr(worker, "memory_manager", None), "memory_limit", None)
    if not max_memory_mb and limit:
        max_memory_mb = round(limit / slots / 2**20 * MEMORY_SHARE)
    return threads, max_memory_mb


def _log_path(log_path: Optional[str], label: str) -> str:
    """The client's log path when the worker shares its file system, else
    a file in the worker's temporary folder."""
    if log_path and os.path.isdir(os.path.dirname(log_path)):
        return log_path
    folder = os.path.join(tempfile.gettempdir(), "deckward-logs")
    os.makedirs(folder, exist_ok=True)
    return os.path.join(folder, os.path.basename(log_path) if log_path else label + ".log")


def compute_task(plan_dict: dict, log_path: Optional[str], max_memory_mb: Optional[float],
                 threads: Optional[int], task_name: str, relaxed: Optional[dict] = None) -> dict:
    """Compute one state on a Dask worker; announces its start (for the
    progress display) and returns the result dict."""
    from .compute import compute_state
    from .plan import plan_from_dict

    worker = _worker()
    threads, max_memory_mb = worker_resources(worker, threads, max_memory_mb)
    if worker is not None:
        worker.log_event(STARTED_TOPIC, {"task": task_name, "worker": worker.address,
                                         "host": socket.gethostname(), "pid": os.getpid()})
    log = _log_path(log_path, task_name)
    result = compute_state(plan_from_dict(plan_dict), log, max_memory_mb, threads, relaxed=relaxed)
    if worker is not None:
        result["host"] = f"{socket.gethostname()} ({worker.address})"
    return result
