"""Dask cluster scaling: eight independent states on two workers against one.

Prints, measured in one run:
- the speed-up of a LocalCluster with two single-threaded worker processes
  over one with a single worker, on eight independent Hartree-Fock states
  (the CN radical at eight bond lengths, UHF/cc-pVTZ, one OpenMP thread
  each); the ideal on two free cores is 2;
- the scheduling overhead per state: on a one-worker cluster, the run's
  wall time minus the compute time the worker reports for its short states
  (UHF/6-31G on CN), per state, as a fraction of one short state's time in
  this process.

Both clusters are started (and warmed up: PySCF imported on each worker)
before timing; the cache is off so every state is computed.  The machine
may be shared: the printed figures are what was measured, not a promise.

    python bench/cluster_scaling.py [--repeats N]
"""
from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tests"))

from runner_helpers import workspace  # noqa: E402

from deckward.rules.compute.runner.cache import RunCache  # noqa: E402
from deckward.rules.compute.runner.dask_executor import DaskExecutor  # noqa: E402
from deckward.rules.compute.runner.parallel import RunOptions  # noqa: E402
from deckward.rules.compute.runner.run import run_workspace  # noqa: E402

LENGTHS = (1.10, 1.12, 1.14, 1.16, 1.18, 1.20, 1.22, 1.24)  # angstrom, around CN's 1.1718


def deck(basis: str, tag: str) -> str:
    parts = [f"level hf_{tag} {{ method = hf basis = {basis} reference = unrestricted }}"]
    for i, r in enumerate(LENGTHS):
        parts.append(f"geometry cn{i} {{\n  C 0 0 0\n  N 0 0 {r}\n}}")
        parts.append(f"state s{i} {{ geometry = cn{i} level = hf_{tag} charge = 0 multiplicity = 2 }}")
    return "\n".join(parts) + "\n"


def timed(ws, folder: str, executor=None) -> float:
    return timed_report(ws, folder, executor)[0]


def timed_report(ws, folder: str, executor=None):
    options = RunOptions(threads=1, executor=executor, in_process=executor is None)
    t0 = time.perf_counter()
    report = run_workspace(ws, RunCache(folder, enabled=False), options, all_states=True)
    took = time.perf_counter() - t0
    assert report.ok, [s["reason"] for s in report.states if s["status"] != "ok"]
    return took, report


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeats", type=int, default=2, help="timed repetitions; the best is kept (default 2)")
    args = ap.parse_args()
    os.environ.setdefault("OMP_NUM_THREADS", "1")
    with tempfile.TemporaryDirectory(prefix="deckward-bench-") as tmp:
        long_ws = workspace(tmp, deck("cc-pvtz", "tz"), "long.deck")
        short_ws = workspace(tmp, deck("6-31g", "dz"), "short.deck")
        folder = os.path.join(tmp, "cache")
        with DaskExecutor.local(1) as one, DaskExecutor.local(2) as two:
            for ex in (one, two):  # warm-up: imports on every worker
                timed(short_ws, folder, ex)
            t_one = min(timed(long_ws, folder, one) for _ in range(args.repeats))
            t_two = min(timed(long_ws, folder, two) for _ in range(args.repeats))
            t_short_here = min(timed(short_ws, folder) for _ in range(args.repeats))
            # Time on the cluster not spent computing: wall time of the run
            # minus the states' own compute time reported by the workers.
            idle = []
            for _ in range(args.repeats):
                took, report = timed_report(short_ws, folder, one)
                idle.append(took - sum(s["wall_time_s"] for s in report.states))
    n = len(LENGTHS)
    per_state = t_short_here / n
    overhead = max(0.0, min(idle) / n)
    print(f"cores: {len(os.sched_getaffinity(0))}; load average: {os.getloadavg()[0]:.2f}")
    print(f"{n} states UHF/cc-pVTZ: one worker {t_one:.2f} s, two workers {t_two:.2f} s")
    print(f"speed-up two workers / one: {t_one / t_two:.2f} (ideal 2.00)")
    print(f"short state (UHF/6-31G) in this process: {per_state * 1000:.0f} ms")
    print(f"scheduling overhead per state on Dask: {overhead * 1000:.0f} ms = "
          f"{overhead / per_state:.2f} of a short state's time")


if __name__ == "__main__":
    main()
