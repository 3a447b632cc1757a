"""``--scheduler``, ``--cluster`` and friends: where ``run``, ``probe`` and
``review --probe`` compute their states.

Dask is imported only when one of these options is given, so the commands
start as fast as before without them.  Every way this can go wrong (no
scheduler at the address, an unknown cluster name, a cluster that cannot
start) is one line and exit status 2.
"""
from __future__ import annotations

import sys
from contextlib import contextmanager
from typing import Optional

from .checking import UsageError


def add_executor_arguments(p) -> None:
    g = p.add_argument_group("where states run")
    g.add_argument("--scheduler", metavar="ADDRESS",
                   help="submit each state to the running Dask scheduler at ADDRESS (tcp://host:port)")
    g.add_argument("--cluster", metavar="NAME",
                   help="`local`: start a local Dask cluster of --jobs workers; NAME: the cluster of that name "
                        "in deckward.yaml's `cluster:` section")
    g.add_argument("--retries", type=int, metavar="N",
                   help="worker deaths a state survives on a cluster deckward starts (default 2)")
    g.add_argument("--connect-timeout", type=float, default=10.0, metavar="S",
                   help="seconds to wait for the scheduler (default 10)")


@contextmanager
def executor_from(args, config, jobs: int = 1):
    """The Dask executor the options ask for (None: the local default),
    closed on leaving."""
    scheduler: Optional[str] = getattr(args, "scheduler", None)
    cluster: Optional[str] = getattr(args, "cluster", None)
    retries = getattr(args, "retries", None)
    if scheduler and cluster:
        raise UsageError("--scheduler and --cluster exclude each other (a scheduler address is a running cluster)")
    if retries is not None and retries < 0:
        raise UsageError(f"--retries must be 0 or more, not {retries}")
    if not scheduler and not cluster:
        yield None
        return
    from deckward.rules.compute.runner import dask_executor as de

    try:
        if scheduler:
            if "://" not in scheduler:
                raise UsageError(f"--scheduler takes an address such as tcp://host:8786, not `{scheduler}`")
            executor = de.DaskExecutor.connect(scheduler, args.connect_timeout)
            if retries is not None:
                sys.stderr.write(f"deckward: note: --retries applies to clusters deckward starts; the scheduler at "
                                 f"{scheduler} keeps its own bound (distributed.scheduler.allowed-failures)\n")
        elif cluster == "local":
            executor = de.DaskExecutor.local(max(1, jobs), de.DEFAULT_RETRIES if retries is None else retries)
        else:
            spec = config.clusters.get(cluster)
            if spec is None:
                mistakes = [f"{f.span.path}:{f.span.line}:{f.span.column}: {f.message}" for f in config.findings]
                if mistakes:
                    raise UsageError(f"--cluster {cluster}: the configuration has mistakes: " + "; ".join(mistakes))
                known = ", ".join(["local"] + sorted(config.clusters))
                where = f" in {config.path}" if config.path else " (no deckward.yaml found)"
                raise UsageError(f"--cluster {cluster}: no such cluster{where}; known: {known}")
            executor = de.DaskExecutor.from_spec(spec, retries)
    except (de.SchedulerUnreachable, de.ClusterUnavailable) as e:
        raise UsageError(str(e)) from None
    try:
        yield executor
    finally:
        executor.close()


@contextmanager
def probes_on(executor):
    """Send the probes' calculations in this process to ``executor``."""
    if executor is None:
        yield
        return
    from deckward.rules.compute.runner.executors import set_probe_executor

    set_probe_executor(executor)
    try:
        yield
    finally:
        set_probe_executor(None)
