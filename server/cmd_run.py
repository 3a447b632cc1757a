"""``deckward run DECK``: compute the deck's states with PySCF and print the
derived quantities.  PySCF is imported only when a state is computed."""
from __future__ import annotations

import json
import os
import sys

from .checking import UsageError
from .executor_options import add_executor_arguments, executor_from
from .results_view import add_database_arguments, earlier_values, open_database

HELP = "run a deck's calculations with PySCF and print energies and derived quantities"


def add_arguments(p) -> None:
    p.add_argument("deck", metavar="DECK", help="the deck file to run")
    p.add_argument("--all", action="store_true", help="run every state, not only those the derives need")
    p.add_argument("--json", metavar="FILE", help="also write all results as JSON to FILE")
    p.add_argument("--jobs", "-j", type=int, metavar="N", help="run up to N independent states in parallel processes")
    p.add_argument("--threads", type=int, metavar="N", help="OpenMP threads per state")
    p.add_argument("--max-memory", type=float, metavar="MB", help="PySCF memory limit per state, in MB")
    p.add_argument("--time-limit", type=float, metavar="S", help="stop a state after S seconds (reported as failed)")
    p.add_argument("--cache-dir", metavar="DIR",
                   help="results cache (default: $DECKWARD_CACHE_DIR/runs or ~/.cache/deckward/runs)")
    p.add_argument("--no-cache", action="store_true", help="recompute every state and store nothing")
    p.add_argument("--quiet", "-q", action="store_true", help="no progress display on standard error")
    p.add_argument("--config", metavar="FILE", help="configuration file (default: deckward.yaml at or above the deck)")
    add_database_arguments(p)
    add_executor_arguments(p)
    p.add_argument("--write-geometries", metavar="DIR", help="write each optimised geometry to DIR/<state>.xyz")
    p.add_argument("--force", action="store_true",
                   help="run states above run.max_basis_functions or the memory estimate anyway")


def _positive(name: str, value):
    if value is not None and not value > 0:
        raise UsageError(f"{name} must be a positive number, not {value:g}")
    return value


def _bounded_threads(threads, name: str) -> None:
    """OpenMP crashes (segfaults) when asked for tens of thousands of
    threads; more than a few per core only slows a calculation."""
    from deckward.rules.compute.runner.limits import max_threads

    if threads is not None and threads > max_threads():
        raise UsageError(f"{name} {threads:g} is more than this machine can use ({os.cpu_count() or 1} cores); "
                         f"use at most {max_threads()}")


def options_from(args, config):
    from deckward.rules.compute.runner.parallel import RunOptions

    run_cfg = config.run
    jobs = _positive("--jobs", args.jobs) or int(run_cfg.get("jobs", 1))
    threads = _positive("--threads", args.threads) or (int(run_cfg["threads"]) if "threads" in run_cfg else None)
    _bounded_threads(threads, "--threads" if args.threads else "run.threads")
    memory = _positive("--max-memory", args.max_memory) or run_cfg.get("max_memory_mb")
    limit = _positive("--time-limit", args.time_limit) or run_cfg.get("time_limit_s")
    return RunOptions(jobs=int(jobs), threads=threads, max_memory_mb=memory, time_limit_s=limit)


def run(args) -> int:
    from deckward.rules.compute.runner.cache import RunCache
    from deckward.rules.compute.runner.results import format_report
    from deckward.rules.compute.runner.run import run_workspace

    from .checking import project_of
    from .run_gate import gate

    if not os.path.isfile(args.deck):
        raise UsageError(f"{args.deck}: no such deck file")
    project = project_of(args.deck, args.config)
    config = project.config
    options = options_from(args, config)
    try:
        ws = project.resolve(args.deck)
    except OSError as e:
        raise UsageError(f"{args.deck}: cannot be read ({e.strerror or e})")
    refused = gate(ws, config, sys.stderr)
    if refused is not None:
        return refused
    cache_dir = os.path.join(args.cache_dir, "runs") if args.cache_dir else None
    cache = RunCache(cache_dir, enabled=not args.no_cache)
    from deckward.rules.compute.runner.limits import check_before_running

    problem = check_before_running(ws, cache, config, options, all_states=args.all, force=args.force)
    if problem is not None:
        sys.stderr.write(problem + "\n")
        return 2
    with open_database(args, cache.folder) as db, executor_from(args, config, options.jobs) as executor:
        options.executor = executor
        before = db.derived([ws.path]) if db is not None else []
        report = run_workspace(ws, cache, options, all_states=args.all, show_progress=not args.quiet, database=db)
    sys.stdout.write(format_report(report))
    sys.stdout.write(earlier_values(report, before))
    sys.stderr.write("".join(f"deckward: {n}\n" for n in cache.notes))
    if args.json:
        try:
            with open(args.json, "w", encoding="utf-8") as f:
                json.dump(report.to_dict(), f, indent=2)
                f.write("\n")
        except OSError as e:
            raise UsageError(f"{args.json}: cannot be written ({e.strerror or e})")
    if args.write_geometries:
        from .geometry_output import write_geometries

        written = write_geometries(report, args.write_geometries)
        sys.stderr.write(f"deckward: wrote {len(written)} optimised geometr{'y' if len(written) == 1 else 'ies'} to "
                         f"{args.write_geometries}\n" if written else "deckward: no state was optimised "
                         "(optimize(...)): no geometry written\n")
    return 0 if report.ok else 1
