"""Run state plans: from the cache, in this process, or in worker processes.

With one job and no time limit, states run in this process one after the
other (nothing is added between the deck and PySCF).  With ``jobs > 1`` or a
time limit, each state runs in its own worker process, so that independent
states run side by side and a state over its time limit can be stopped
without losing the others.  Workers are forked from a clean server process
that has PySCF loaded already (``forkserver``), which keeps start-up cheap
and avoids forking a process whose OpenMP threads are running.
"""
from __future__ import annotations

import multiprocessing
import os
import time
from dataclasses import asdict, dataclass
from multiprocessing.connection import wait
from typing import Optional

from .cache import RunCache
from .plan import StatePlan, plan_from_dict
from .progress import Progress


@dataclass
class RunOptions:
    jobs: int = 1
    threads: Optional[int] = None  # OpenMP threads per state (None: PySCF's default, or cores / jobs)
    max_memory_mb: Optional[float] = None  # None: PySCF's default
    time_limit_s: Optional[float] = None  # per state
    in_process: Optional[bool] = None  # None: decide from jobs and time limit
    executor: Optional[object] = None  # an ``executors.Executor`` (None: this process or local workers)

    def use_workers(self) -> bool:
        if self.in_process is not None:
            return not self.in_process
        return self.jobs > 1 or bool(self.time_limit_s)

    def threads_per_state(self) -> Optional[int]:
        if self.threads:
            return int(self.threads)
        if self.jobs > 1:
            return max(1, (os.cpu_count() or 1) // self.jobs)
        return None


_PRELOAD = ["deckward.rules.compute.runner.compute", "deckward.rules.compute.runner.pyscf_build", "pyscf", "pyscf.scf",
            "pyscf.dft", "pyscf.mp", "pyscf.cc"]


def _context():
    methods = multiprocessing.get_all_start_methods()
    if "forkserver" in methods:
        ctx = multiprocessing.get_context("forkserver")
        ctx.set_forkserver_preload(_PRELOAD)
        return ctx
    return multiprocessing.get_context("spawn")


def _worker(plan_dict: dict, log_path: Optional[str], max_memory_mb, threads, conn) -> None:
    from .compute import compute_state
    from .interrupt import ignore_in_worker

    ignore_in_worker()
    try:
        conn.send(("started", None))  # the time limit counts from here, not from process start-up
        try:
            result = compute_state(plan_from_dict(plan_dict), log_path, max_memory_mb, threads)
        except BaseException as e:  # compute_state catches everything; this is the last guard
            result = {"status": "failed", "reason": f"worker failed: {type(e).__name__}: {e}"}
        conn.send(("result", result))
        conn.close()
    except OSError:
        pass  # the command stopped (Ctrl-C) and closed its end: nobody is waiting for the result


def _failure(plan: StatePlan, reason: str, log_path: Optional[str], took: float) -> dict:
    from .compute import empty_result

    out = empty_result(plan)
    out["reason"] = reason
    out["log"] = log_path
    out["wall_time_s"] = round(took, 3)
    return out


def execute(plans: list[StatePlan], cache: RunCache, options: Optional[RunOptions] = None,
            progress: Optional[Progress] = None, on_result=None) -> dict[str, dict]:
    """Results by state name, for every plan (cached ones are not recomputed;
    identical plans are computed once).  ``on_result(result)`` is called in
    this process for each state as its result arrives (the results database
    records them there)."""
    options = options or RunOptions()
    progress = progress or Progress(len(plans), enabled=False)
    results: dict[str, dict] = {}
    todo: dict[str, list[StatePlan]] = {}  # key -> plans sharing it
    for plan in plans:
        key = cache.key(plan)
        hit = cache.get(key)
        if hit is not None:
            hit = dict(hit, name=plan.name, basis=plan.basis_label, cached=True, key=key)
            results[plan.name] = hit
            if on_result is not None:  # recorded before it is shown as done
                on_result(hit)
            progress.finished(plan.name, hit)
            continue
        todo.setdefault(key, []).append(plan)

    def finish(key: str, result: dict) -> None:
        cache.put(key, result)
        for i, p in enumerate(todo[key]):
            r = dict(result, name=p.name, basis=p.basis_label, key=key, cached=i > 0)
            results[p.name] = r
            if on_result is not None:
                on_result(r)
            progress.finished(p.name, r)

    from .executors import default_executor

    with progress:
        if todo:
            default_executor(options).run(todo, cache, options, progress, finish)
    return {p.name: results[p.name] for p in plans}


def _run_here(todo, cache: RunCache, options: RunOptions, progress: Progress, finish, compute_state) -> None:
    for key, group in todo.items():
        plan = group[0]
        progress.started(plan.name)
        finish(key, compute_state(plan, cache.log_path(key), options.max_memory_mb, options.threads_per_state()))


def poll_timeout(starts, limit: Optional[float], now: float, tick: float = 0.25) -> float:
    """How long to wait for workers: the display tick, or less when a state
    reaches its time limit sooner (a limit below the tick is kept too)."""
    if not limit:
        return tick
    left = [start + limit - now for start in starts if start is not None]
    return max(0.0, min([tick] + left))


def _run_workers(todo, cache: RunCache, options: RunOptions, progress: Progress, finish) -> None:
    ctx = _context()
    pending = list(todo.items())
    running: dict[str, tuple] = {}  # key -> (plan, process, connection, start)
    jobs = max(1, int(options.jobs))
    limit = options.time_limit_s
    try:
        while pending or running:
            while pending and len(running) < jobs:
                key, group = pending.pop(0)
                plan = group[0]
                receive, send = ctx.Pipe(duplex=False)
                log = cache.log_path(key)
                proc = ctx.Process(target=_worker, args=(asdict(plan), log, options.max_memory_mb,
                                                         options.threads_per_state(), send), daemon=True)
                proc.start()
                send.close()
                progress.started(plan.name)
                running[key] = [plan, proc, receive, None]
            wait([r[2] for r in running.values()] + [r[1].sentinel for r in running.values()],
                 timeout=poll_timeout([r[3] for r in running.values()], limit, time.monotonic()))
            for key in list(running):
                plan, proc, conn, start = running[key]
                result = None
                if conn.poll():
                    try:
                        kind, payload = conn.recv()
                    except EOFError:
                        kind, payload = "result", None
                    if kind == "started":
                        running[key][3] = time.monotonic()
                        continue
                    took = time.monotonic() - (start or time.monotonic())
                    result = payload
                    proc.join()
                    if result is None:
                        result = _failure(plan, f"the worker ended without a result (exit code {proc.exitcode})",
                                          cache.log_path(key), took)
                elif not proc.is_alive():
                    took = time.monotonic() - (start or time.monotonic())
                    proc.join()
                    result = _failure(plan, f"the worker ended without a result (exit code {proc.exitcode}; "
                                      "out of memory?)", cache.log_path(key), took)
                elif limit and start is not None and time.monotonic() - start >= limit:
                    took = time.monotonic() - start
                    proc.kill()
                    proc.join()
                    result = _failure(plan, f"stopped at the time limit of {limit:g} s", cache.log_path(key), took)
                if result is not None:
                    conn.close()
                    del running[key]
                    finish(key, result)
    finally:
        for plan, proc, conn, start in running.values():
            proc.kill()
            proc.join()
