"""``deckward run DECK``: compute the deck's states with PySCF and print the
derived quantities.  PySCF is imported only when a state is computed."""
from __future__ import annotations

import json
import os
import sys

from .checking import UsageError, config_for

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
    p.add_argument("--force", action="store_true",
                   help="run states above run.max_basis_functions or the memory estimate anyway")


def _positive(name: str, value):
    if value is not None and not value > 0:
        raise UsageError(f"{name} must be a positive number, not {value:g}")
    return value


def _bounded_threads(threads, name: str) -> None:
    """OpenMP crashes (segfaults) when asked for tens of thousands of
    threads; more than a few per core only slows a calculation."""
    from deckward.rules.runner.limits import max_threads

    if threads is not None and threads > max_threads():
        raise UsageError(f"{name} {threads:g} is more than this machine can use ({os.cpu_count() or 1} cores); "
                         f"use at most {max_threads()}")


def options_from(args, config):
    from deckward.rules.runner.parallel import RunOptions

    run_cfg = config.run
    jobs = _positive("--jobs", args.jobs) or int(run_cfg.get("jobs", 1))
    threads = _positive("--threads", args.threads) or (int(run_cfg["threads"]) if "threads" in run_cfg else None)
    _bounded_threads(threads, "--threads" if args.threads else "run.threads")
    memory = _positive("--max-memory", args.max_memory) or run_cfg.get("max_memory_mb")
    limit = _positive("--time-limit", args.time_limit) or run_cfg.get("time_limit_s")
    return RunOptions(jobs=int(jobs), threads=threads, max_memory_mb=memory, time_limit_s=limit)


def run(args) -> int:
    from deckward.grammar.findings import Severity
    from deckward.grammar.resolve import Loader, resolve
    from deckward.rules.runner.cache import RunCache
    from deckward.rules.runner.results import format_report
    from deckward.rules.runner.run import run_workspace

    from .checking import root_for

    if not os.path.isfile(args.deck):
        raise UsageError(f"{args.deck}: no such deck file")
    config = config_for([args.deck], args.config)
    options = options_from(args, config)
    try:
        ws = resolve(args.deck, Loader(), root_for(args.deck, config, args.deck))
    except OSError as e:
        raise UsageError(f"{args.deck}: cannot be read ({e.strerror or e})")
    errors = [f for f in ws.findings if f.severity is Severity.ERROR]
    if errors:
        for f in errors:
            sys.stderr.write(f"{f.span.path}:{f.span.line}:{f.span.column}: {f.rule}: {f.message}\n")
        sys.stderr.write("deckward: the deck has errors and cannot be run (see `deckward check`)\n")
        return 2
    cache_dir = os.path.join(args.cache_dir, "runs") if args.cache_dir else None
    cache = RunCache(cache_dir, enabled=not args.no_cache)
    from deckward.rules.runner.limits import check_before_running

    problem = check_before_running(ws, cache, config, options, all_states=args.all, force=args.force)
    if problem is not None:
        sys.stderr.write(problem + "\n")
        return 2
    report = run_workspace(ws, cache, options, all_states=args.all, show_progress=not args.quiet)
    sys.stdout.write(format_report(report))
    sys.stderr.write("".join(f"deckward: {n}\n" for n in cache.notes))
    if args.json:
        try:
            with open(args.json, "w", encoding="utf-8") as f:
                json.dump(report.to_dict(), f, indent=2)
                f.write("\n")
        except OSError as e:
            raise UsageError(f"{args.json}: cannot be written ({e.strerror or e})")
    return 0 if report.ok else 1
