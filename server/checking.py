"""Checking files: find the decks, resolve each once, run the rules.

Shared by ``deckward check``, ``deckward review`` and the benchmarks; the
language server calls the same engine on its open documents.
"""
from __future__ import annotations

import os
from dataclasses import dataclass, field
from typing import Iterable, Optional

from deckward.grammar.findings import Finding, Severity
from deckward.grammar.resolve import Loader, resolve, shown
from deckward.rules.config import Config, find_config, load_config
from deckward.rules.engine import check_workspace, dedupe, known_rule_ids

from .scale_options import IN_PROCESS_BELOW


class UsageError(Exception):
    """A problem with the command line itself (exit status 2)."""


@dataclass
class CheckResult:
    files: list[str]
    findings: list[Finding]  # sorted; suppressed ones included (``suppressed`` set)
    config: Config
    fixes_applied: int = 0
    notes: list[str] = field(default_factory=list)
    stats: Optional[object] = None  # parallel_check.CheckStats when run through it

    @property
    def active(self) -> list[Finding]:
        return [f for f in self.findings if f.suppressed is None]

    @property
    def suppressed(self) -> list[Finding]:
        return [f for f in self.findings if f.suppressed is not None]

    def counts(self) -> dict[str, int]:
        c = {"error": 0, "warning": 0, "info": 0}
        for f in self.active:
            c[f.severity.value] += 1
        return c


def discover(paths: Iterable[str], config: Config, skipped: Optional[list[str]] = None) -> list[str]:
    """Deck files named or found below the given paths, in a stable order.
    Raises UsageError for a path that does not exist.  Found below a
    folder, only regular files inside the workspace count: a FIFO or device
    named ``*.deck`` would hang the reader, and a link out of the workspace
    would read (and let ``--fix`` write) a file that is not the project's;
    each one skipped adds a note to ``skipped``."""
    out: list[str] = []
    seen: set[str] = set()
    for p in paths:
        if os.path.isfile(p):
            candidates = [p]
        elif os.path.isdir(p):
            candidates = []
            for folder, dirs, files in os.walk(p):
                dirs[:] = sorted(d for d in dirs if not d.startswith("."))
                candidates.extend(os.path.join(folder, f) for f in sorted(files) if f.endswith(".deck"))
            candidates = [c for c in candidates if not config.is_excluded(c)]
            candidates = confined(candidates, root_for(p, config, p), skipped)
        elif os.path.exists(p):
            raise UsageError(f"{p}: not a file or folder")
        else:
            raise UsageError(f"{p}: no such file or folder")
        for c in candidates:
            key = os.path.abspath(c)
            if key not in seen:
                seen.add(key)
                out.append(os.path.normpath(c))
    return out


def confined(candidates: list[str], root: str, skipped: Optional[list[str]] = None) -> list[str]:
    from deckward.grammar.resolve import inside_root
    from deckward.grammar.safe_open import is_regular_file

    kept = []
    real_root = os.path.realpath(root)
    for c in candidates:
        if not is_regular_file(c):
            why = "it is not a regular file"
        elif not inside_root(os.path.realpath(c), real_root):
            why = "it is a link to a file outside the workspace"
        else:
            kept.append(c)
            continue
        if skipped is not None:
            skipped.append(f"deckward: skipped {shown(os.path.normpath(c))}: {why}")
    return kept


def config_for(paths: list[str], explicit: Optional[str]) -> Config:
    known = known_rule_ids()
    if explicit is not None:
        if not os.path.isfile(explicit):
            raise UsageError(f"{explicit}: no such configuration file")
        return load_config(explicit, known)
    first = paths[0] if paths else "."
    return load_config(find_config(first) if os.path.exists(first) else None, known)


def root_for(path: str, config: Config, given: str) -> str:
    """The workspace root: the configuration's folder, else the folder given
    on the command line (or a given file's folder)."""
    if config.root:
        return config.root
    return given if os.path.isdir(given) else os.path.dirname(os.path.abspath(given))


def check_paths(paths: list[str], config: Optional[Config] = None, config_path: Optional[str] = None,
                loader: Optional[Loader] = None, probe: bool = False, jobs: int = 1,
                cache_dir: Optional[str] = None, cache_from: int = 1) -> CheckResult:
    """Check every deck below ``paths``.  With ``probe``, the PySCF probes
    run too (``deckward.rules.probes``) and their findings go through the
    same severity and suppression handling.

    ``jobs``: worker processes (0: one per core); ``cache_dir``: a findings
    cache folder (None: no cache).  Both go through
    ``deckward.server.parallel_check``; the findings are the same either
    way.  ``cache_from``: use the cache only from this many decks on (the
    command line's default cache is not worth opening for one deck).  A
    loader with unsaved editor text is never cached or shared.

    Few decks without a cache are checked right here: the single-deck path
    imports neither the parallel checker nor the cache."""
    config = config or config_for(paths, config_path)
    findings: list[Finding] = list(config.findings)
    files: list[str] = []
    tasks = []
    skipped: list[str] = []
    for given in paths:
        for path in discover([given], config, skipped):
            files.append(path)
            tasks.append((path, root_for(path, config, given)))
    if (loader is not None and loader.overlay) or len(tasks) < cache_from:
        cache_dir = None
    if loader is not None and loader.overlay:
        jobs = 1
    if cache_dir is None and (jobs == 1 or len(tasks) < IN_PROCESS_BELOW):
        loader = loader or Loader()
        for path, root in tasks:
            try:
                ws = resolve(path, loader, root)
            except OSError as e:
                raise UsageError(f"{path}: cannot be read ({e.strerror or e})")
            extra = []
            if probe:
                from deckward.rules.probes import run_probes

                extra = run_probes(ws, config)
            findings.extend(check_workspace(ws, config, extra=extra, probed=probe))
        return CheckResult(files, dedupe(findings), config, notes=skipped)

    from .parallel_check import DeckUnreadable, Task, check_tasks

    try:
        found, stats = check_tasks([Task(p, r) for p, r in tasks], config, probe=probe, jobs=jobs,
                                   cache_dir=cache_dir, loader=loader)
    except DeckUnreadable as e:
        raise UsageError(str(e))
    findings.extend(found)
    return CheckResult(files, dedupe(findings), config, notes=skipped + list(stats.notes), stats=stats)


def exceeds(findings: Iterable[Finding], fail_on: str) -> bool:
    if fail_on == "never":
        return False
    threshold = Severity(fail_on).rank
    return any(f.severity.rank >= threshold for f in findings if f.suppressed is None)
