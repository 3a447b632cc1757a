"""Dask cluster scaling: eight independent states on two workers against one.

Prints, measured in one run:
- the eight states' own times and SCF iterations (their spread: the states
  are meant to cost the same, so that the two-worker split is fair);
- the speed-up of a LocalCluster with two single-threaded worker processes
  over one with a single worker, as the ratio of their wall times (of the
  best runs, and the median over pairs of runs made one after the other);
  the ideal on two free cores is 2;
- the scheduling overhead per state: eight trivially short states
  (UHF/STO-3G on the H atom) run on the one-worker cluster and in this
  process, the difference per state, as a fraction of a short state's time
  (UHF/cc-pVDZ on NO2, as in examples/no2_ea_from_lumo.deck) in this process.

The eight timed states are one molecule, the NO2 radical of
examples/shared/acceptors.deck, UHF/cc-pVTZ with one OpenMP thread, placed
at eight positions along x: each is a plan of its own (nothing is merged or
cached) and all do the same work.  A bond scan would not: on the CN radical
the UHF/cc-pVTZ iterations of PySCF's defaults go from 15 at 1.10 angstrom
to 49 at 1.18, and from 1.20 on its DIIS does not converge, so those states
also pay for the runner's second-order retry (four times the time of the
short end).

Both clusters are started (and warmed up: PySCF imported on each worker)
before timing; the cache is off so every state is computed; the runs of one
and two workers alternate and the best of the repetitions is kept.  The
machine may be shared: the printed figures are what was measured, not a
promise.

    python bench/cluster_scaling.py [--repeats N]
"""
from __future__ import annotations

import argparse
import os
import re
import statistics
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tests"))

from runner_helpers import workspace  # noqa: E402

from deckward.rules.compute.runner.cache import RunCache  # noqa: E402
from deckward.rules.compute.runner.dask_executor import DaskExecutor  # noqa: E402
from deckward.rules.compute.runner.parallel import RunOptions  # noqa: E402
from deckward.rules.compute.runner.run import run_workspace  # noqa: E402

N_STATES = 8
SHIFT = 4.0  # angstrom between copies along x: far apart, each its own plan
NO2 = (("N", 0.0, 0.0, 0.0), ("O", 0.0, 1.0989, 0.4653), ("O", 0.0, -1.0989, 0.4653))
H_ATOM = (("H", 0.0, 0.0, 0.0),)


def deck(atoms, basis: str, multiplicity: int, tag: str) -> str:
    parts = [f"level hf_{tag} {{ method = hf basis = {basis} reference = unrestricted }}"]
    for i in range(N_STATES):
        lines = "\n".join(f"  {s} {x + i * SHIFT:.4f} {y:.4f} {z:.4f}" for s, x, y, z in atoms)
        parts.append(f"geometry g{i} {{\n{lines}\n}}")
        parts.append(f"state s{i} {{ geometry = g{i} level = hf_{tag} charge = 0 multiplicity = {multiplicity} }}")
    return "\n".join(parts) + "\n"


def timed(ws, folder: str, executor=None, per_state: bool = False):
    """(wall time, report) of one run of every state of ``ws``; with
    ``per_state``, (wall time, the states' spread in words), read while
    their logs are there."""
    options = RunOptions(threads=1, executor=executor, in_process=executor is None)
    t0 = time.perf_counter()
    report = run_workspace(ws, RunCache(folder, enabled=False), options, all_states=True)
    took = time.perf_counter() - t0
    if not report.ok:
        raise SystemExit(f"a state did not finish: {[s['reason'] for s in report.states if s['status'] != 'ok']}")
    return (took, spread(report)) if per_state else (took, report)


def iterations(state: dict) -> int:
    """SCF iterations in a state's PySCF log (DIIS cycles plus Newton macro iterations)."""
    with open(state["log"], encoding="utf-8") as f:
        text = f.read()
    return len(re.findall(r"^cycle= ", text, re.M)) + len(re.findall(r"^macro= ", text, re.M))


def spread(report) -> str:
    times = [s["wall_time_s"] for s in report.states]
    its = sorted({iterations(s) for s in report.states})
    mean = statistics.mean(times)
    return (f"{min(times):.2f}-{max(times):.2f} s (max/min {max(times) / min(times):.2f}, "
            f"stdev/mean {statistics.pstdev(times) / mean:.3f}); SCF iterations {'/'.join(map(str, its))}")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeats", type=int, default=3, help="timed repetitions; the best is kept (default 3)")
    args = ap.parse_args()
    os.environ.setdefault("OMP_NUM_THREADS", "1")
    with tempfile.TemporaryDirectory(prefix="deckward-bench-") as tmp:
        long_ws = workspace(tmp, deck(NO2, "cc-pvtz", 2, "tz"), "long.deck")
        short_ws = workspace(tmp, deck(NO2, "cc-pvdz", 2, "dz"), "short.deck")
        tiny_ws = workspace(tmp, deck(H_ATOM, "sto-3g", 2, "min"), "tiny.deck")
        folder = os.path.join(tmp, "cache")
        t_one, t_two, tiny_dask = [], [], []
        with DaskExecutor.local(1) as one, DaskExecutor.local(2) as two:
            for ex in (one, two):  # warm-up: imports on every worker
                timed(tiny_ws, folder, ex)
                timed(short_ws, folder, ex)
            for _ in range(args.repeats):
                t_one.append(timed(long_ws, folder, one, per_state=True))
                t_two.append(timed(long_ws, folder, two, per_state=True))
                tiny_dask.append(timed(tiny_ws, folder, one)[0])
        timed(tiny_ws, folder)  # warm-up of this process
        tiny_here = [timed(tiny_ws, folder)[0] for _ in range(args.repeats)]
        short_here = [timed(short_ws, folder)[0] for _ in range(args.repeats)]
        long_here = [timed(long_ws, folder, per_state=True) for _ in range(args.repeats)]
    n = N_STATES
    short_state = min(short_here) / n
    overhead = (min(tiny_dask) - min(tiny_here)) / n
    print(f"cores: {len(os.sched_getaffinity(0))}; load average at the end: {os.getloadavg()[0]:.2f}")
    for label, runs in (("this process", long_here), ("one worker", t_one), ("two workers", t_two)):
        best = min(runs, key=lambda x: x[0])
        every = ", ".join(f"{t:.2f}" for t, _ in runs)
        print(f"{n} states UHF/cc-pVTZ on NO2, {label}: {best[0]:.2f} s (runs {every}); per state {best[1]}")
    best_one, best_two = min(t[0] for t in t_one), min(t[0] for t in t_two)
    pairs = [a[0] / b[0] for a, b in zip(t_one, t_two)]  # runs next to each other in time
    print(f"speed-up two workers / one: {best_one / best_two:.2f} of the best runs, "
          f"{statistics.median(pairs):.2f} median of the pairs ({', '.join(f'{r:.2f}' for r in pairs)}); ideal 2.00")
    print(f"short state (UHF/cc-pVDZ on NO2) in this process: {short_state * 1000:.0f} ms")
    print(f"{n} trivial states (UHF/STO-3G on H): one worker {min(tiny_dask) * 1000:.0f} ms, "
          f"this process {min(tiny_here) * 1000:.0f} ms")
    print(f"scheduling overhead per state on Dask: {overhead * 1000:.1f} ms = "
          f"{overhead / short_state:.3f} of a short state's time")


if __name__ == "__main__":
    main()
