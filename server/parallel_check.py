"""Checking many decks: on every core, and only the decks that changed.

``check_tasks`` takes the decks to check (each with its workspace root) and
returns their findings in task order, whatever the number of workers, so
output does not depend on ``--jobs``.  Work goes to a process pool in chunks
(one pickled batch of paths out, one batch of findings back) because a
deck takes milliseconds and per-deck messages would cost more than the
checking.  Below ``IN_PROCESS_BELOW`` decks to check it stays in this process:
starting workers costs more than it saves.  Each chunk has its own
``Loader``, so a file used by many decks is parsed once per chunk and a
worker does not keep thousands of parsed decks alive.

With a cache (``findings_cache.FindingsCache``), this process looks every
deck up first (hashing a file and reading an entry costs far less than
shipping the deck to a worker), and only the misses are checked; whoever
checks a deck stores its entry, renamed into place, so workers never see
each other's half-written files.

Probes run PySCF, which uses every core itself and has its own result
cache, so a probing check stays in one process.
"""
from __future__ import annotations

import math
import os
from dataclasses import dataclass, field
from typing import Optional

from deckward.grammar.findings import Finding
from deckward.grammar.resolve import Loader, Workspace, resolve
from deckward.rules.engine.config import Config
from deckward.rules.engine.project import check_resolved

from .checking import release_unshared
from .findings_cache import FindingsCache, config_fingerprint, entry_key
from .scale_options import IN_PROCESS_BELOW, default_jobs  # noqa: F401  (re-exported)

MAX_CHUNK = 512
CHUNKS_PER_WORKER = 3


class DeckUnreadable(Exception):
    """A deck named for checking cannot be read (``path``, ``reason``)."""

    def __init__(self, path: str, reason: str) -> None:
        super().__init__(f"{path}: cannot be read ({reason})")
        self.path = path
        self.reason = reason


@dataclass(frozen=True)
class Task:
    path: str  # as given / discovered: findings carry this path
    root: str  # the workspace root the deck resolves in


@dataclass
class CheckStats:
    decks: int = 0
    checked: int = 0  # decks actually parsed and checked
    cache_hits: int = 0
    cache_misses: int = 0
    cache_write_errors: int = 0
    workers: int = 1
    notes: list[str] = field(default_factory=list)
    from_summary: bool = False  # served whole from the run summary (nothing hashed or read per deck)

    def plus(self, other: "CheckStats") -> "CheckStats":
        """Both runs' counts together (decks of two projects)."""
        return CheckStats(self.decks + other.decks, self.checked + other.checked,
                          self.cache_hits + other.cache_hits, self.cache_misses + other.cache_misses,
                          self.cache_write_errors + other.cache_write_errors,
                          max(self.workers, other.workers), self.notes + other.notes,
                          self.from_summary and other.from_summary)


def used_paths(ws: Workspace) -> list[str]:
    """Every file whose contents can change this deck's findings: the deck,
    each file it uses (directly or not), and each ``use`` target that could
    not be loaded (creating it would change the findings)."""
    out: list[str] = []
    seen: set[str] = set()

    def add(p: str) -> None:
        key = os.path.abspath(p)
        if key not in seen:
            seen.add(key)
            out.append(p)

    for pf in ws.files:
        add(pf.path)
    for pf in ws.files:
        for use in pf.deck.uses:
            add(os.path.normpath(os.path.join(os.path.dirname(pf.path), use.path.value)))
        for g in pf.deck.geometries:
            if g.file is not None:  # an .xyz geometry, read or not (creating it changes the findings)
                add(os.path.normpath(os.path.join(os.path.dirname(pf.path), g.file.value)))
    return out


def check_one(task: Task, loader: Loader, config: Config, probe: bool,
              progress=None) -> tuple[list[Finding], list[str], Workspace]:
    """Findings of one deck, the files they depend on, and its workspace
    (raises DeckUnreadable)."""
    try:
        ws = resolve(task.path, loader, task.root)
    except OSError as e:
        raise DeckUnreadable(task.path, str(e.strerror or e))
    return check_resolved(ws, config, probe, progress), used_paths(ws), ws


class _Checker:
    """Looks decks up in the cache and checks the others; one per process."""

    def __init__(self, config: Config, probe: bool, cache_dir: Optional[str]) -> None:
        self.config = config
        self.probe = probe
        self.cache = FindingsCache(cache_dir) if cache_dir else None
        self.config_print = config_fingerprint(config) if cache_dir else ""
        self.checked = 0
        self.progress = None  # the probes' progress display (in the command's process only)

    def key(self, task: Task) -> Optional[str]:
        """The cache key of a deck (None without a cache, or when the deck
        cannot be read: resolve() then says why)."""
        if self.cache is None:
            return None
        digest = self.cache.digest(task.path)
        if digest is None:
            return None
        return entry_key(task.path, task.root, digest, self.config_print, self.probe, self.cache.real)

    def lookup(self, key: Optional[str]) -> Optional[tuple[list[Finding], list[str]]]:
        """(findings, the files they depend on) of a cached deck, else None."""
        if self.cache is None or key is None:
            return None
        return self.cache.entry(key)

    def run(self, jobs: list[tuple[Task, Optional[str]]], loader: Optional[Loader] = None) -> list[tuple[str, object]]:
        """Check each (task, cache key) and store the findings under the key:
        ``("ok", findings, files depended on)`` or ``("unreadable", reason,
        None)`` per task, in order."""
        own_loader = loader is None
        loader = loader or Loader()
        shared: set[str] = set()
        out: list[tuple[str, object]] = []
        for task, key in jobs:
            try:
                findings, deps, ws = check_one(task, loader, self.config, self.probe, self.progress)
            except DeckUnreadable as e:
                out.append(("unreadable", e.reason, None))
                continue
            if own_loader:
                release_unshared(loader, ws, shared)
            self.checked += 1
            if key is not None and self.cache is not None:
                self.cache.put(key, deps, findings)
            out.append(("ok", findings, deps))
        return out

    def counters(self) -> tuple[int, int, int, int]:
        c = self.cache
        return (self.checked, c.hits if c else 0, c.misses if c else 0, c.write_errors if c else 0)


# -- worker side -------------------------------------------------------------------------

_WORKER: Optional[_Checker] = None


def _init_worker(config: Config, probe: bool, cache_dir: Optional[str]) -> None:
    global _WORKER
    _WORKER = _Checker(config, probe, cache_dir)


def _warm_up() -> None:
    """Load the parser tables and import every rule before the workers
    start: forked workers then share them instead of each loading its own."""
    from deckward.grammar.parser import get_parser
    from deckward.rules.engine.registry import static_rules

    get_parser()
    static_rules()


def _run_chunk(jobs: list[tuple[Task, Optional[str]]]):
    """One chunk in a worker: its results and the worker's counters since
    the previous chunk (so the parent can add them up)."""
    assert _WORKER is not None
    before = _WORKER.counters()
    results = _WORKER.run(jobs)
    after = _WORKER.counters()
    return results, tuple(a - b for a, b in zip(after, before))


def chunks(tasks: list, jobs: int) -> list[list]:
    """About ``CHUNKS_PER_WORKER`` chunks a worker (so a slow chunk does not
    leave the others idle for long), at most ``MAX_CHUNK`` decks each.
    Chunks are large because each one costs a message each way and a fresh
    ``Loader``, and because a worker's statement parses are shared only
    within the worker: the fewer the pieces, the less is parsed twice."""
    size = max(1, min(MAX_CHUNK, math.ceil(len(tasks) / (jobs * CHUNKS_PER_WORKER))))
    return [tasks[i : i + size] for i in range(0, len(tasks), size)]


def check_tasks(tasks: list[Task], config: Config, probe: bool = False, jobs: int = 1,
                cache_dir: Optional[str] = None, loader: Optional[Loader] = None,
                progress=None) -> tuple[list[Finding], CheckStats]:
    """Findings of every task, concatenated in task order (raises
    DeckUnreadable for the first unreadable deck in that order).

    Cache look-ups happen here, in this process (hashing a file and reading
    an entry is cheaper than sending the work to a worker); only the decks
    that missed are checked, by workers when there are enough of them."""
    stats = CheckStats(decks=len(tasks))
    if jobs < 1:
        jobs = default_jobs()
    local = _Checker(config, probe, cache_dir)
    local.progress = progress
    summary = _summary_of(tasks, local, cache_dir)
    if summary is not None:
        served = summary.recall()
        if served is not None:
            stats.cache_hits = len(tasks)
            stats.from_summary = True
            return [f for per in served for f in per], stats
    results: list[Optional[tuple]] = [None] * len(tasks)
    todo: list[tuple[int, Task, Optional[str]]] = []
    for i, task in enumerate(tasks):
        key = local.key(task)
        found = local.lookup(key)
        if found is not None:
            results[i] = ("ok", *found)
        else:
            todo.append((i, task, key))
    counters = []
    if jobs == 1 or len(todo) < IN_PROCESS_BELOW or probe:
        for (i, _, _), r in zip(todo, local.run([(t, k) for _, t, k in todo], loader)):
            results[i] = r
    else:
        parts = chunks([(t, k) for _, t, k in todo], jobs)
        stats.workers = min(jobs, len(parts))
        done: list[tuple[str, object]] = []
        from concurrent.futures import ProcessPoolExecutor  # only when workers are needed

        _warm_up()
        with ProcessPoolExecutor(max_workers=stats.workers, initializer=_init_worker,
                                 initargs=(config, probe, cache_dir)) as pool:
            for part_results, part_counters in pool.map(_run_chunk, parts):
                done.extend(part_results)
                counters.append(part_counters)
        for (i, _, _), r in zip(todo, done):
            results[i] = r
    counters.append(local.counters())
    for checked, hits, misses, write_errors in counters:
        stats.checked += checked
        stats.cache_hits += hits
        stats.cache_misses += misses
        stats.cache_write_errors += write_errors
    if stats.cache_write_errors:
        stats.notes.append(f"note: the findings cache in {cache_dir} could not be written "
                           f"({stats.cache_write_errors} entries); checking went on without it")
    findings: list[Finding] = []
    for task, (status, value, _) in zip(tasks, results):  # type: ignore[misc]
        if status == "unreadable":
            raise DeckUnreadable(task.path, str(value))
        findings.extend(value)  # type: ignore[arg-type]
    if summary is not None and not stats.cache_write_errors:
        summary.store([r[1] for r in results], [p for r in results for p in r[2]])  # type: ignore[index]
    return findings, stats


def _summary_of(tasks: list[Task], checker: "_Checker", cache_dir: Optional[str]):
    """The run summary (``run_summary.RunSummary``) of these decks when there
    is a cache and they share one root (one project), else None."""
    if not cache_dir or not tasks or any(t.root != tasks[0].root for t in tasks):
        return None
    from .run_summary import RunSummary  # only a cached check pays for it

    return RunSummary(cache_dir, [(t.path, t.root) for t in tasks], checker.config_print, checker.probe)
