"""Checking files: find the decks, resolve each once, run the rules.

Shared by ``deckward check``, ``deckward review`` and the benchmarks; the
language server calls the same engine on its open documents.
"""
from __future__ import annotations

import os
from dataclasses import field
from typing import Iterable, Optional

from deckward.grammar.findings import Finding, Severity
from deckward.grammar.records import record
from deckward.grammar.resolve import Loader, shown
from deckward.rules.engine.config import Config
from deckward.rules.engine.checker import dedupe
from deckward.rules.engine.project import Project, Projects, config_findings

from .scale_options import IN_PROCESS_BELOW


class UsageError(Exception):
    """A problem with the command line itself (exit status 2)."""


@record
class CheckResult:
    """The decks checked and their findings, ready for a report."""

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


def discover(paths: Iterable[str], projects: Projects, skipped: Optional[list[str]] = None) -> list[str]:
    """Deck files named or found below the given paths, in a stable order.
    Raises UsageError for a path that does not exist.  Found below a
    folder, a deck counts unless its project's configuration excludes it,
    and only regular files inside its workspace count: a FIFO or device
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
            candidates = confined(candidates, projects, p, skipped)
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


def require_decks(files: list[str], paths: Iterable[str], skipped: Iterable[str] = ()) -> None:
    """A UsageError (exit 2) when the paths hold no deck: "0 files" and
    exit 0 would read as a clean check.  Decks skipped with a note (links
    out of the workspace) are not "nothing": the note says what happened."""
    if not files and not list(skipped):
        raise UsageError(f"nothing to check: no deck files (*.deck) in {', '.join(paths)}")


def confined(candidates: list[str], projects: Projects, anchor: str,
             skipped: Optional[list[str]] = None) -> list[str]:
    """The decks found below the folder ``anchor`` that their projects keep."""
    from deckward.grammar.safe_open import is_regular_file

    kept = []
    for c in candidates:
        project = projects.for_path(c, anchor)
        if project.config.is_excluded(c):
            continue
        if not is_regular_file(c):
            why = "it is not a regular file"
        elif not project.contains(c):
            why = "it is a link to a file outside the workspace"
        else:
            kept.append(c)
            continue
        if skipped is not None:
            skipped.append(f"deckward: skipped {shown(os.path.normpath(c))}: {why}")
    return kept


def projects_for(config_path: Optional[str] = None, loader: Optional[Loader] = None) -> Projects:
    """The projects of a command (``--config``: one configuration for every
    deck); a UsageError when the named configuration file does not exist."""
    if config_path is not None and not os.path.isfile(config_path):
        raise UsageError(f"{config_path}: no such configuration file")
    return Projects(config_path, loader)


def project_of(path: str, config_path: Optional[str] = None) -> Project:
    """The project of one deck named on the command line (``run``,
    ``converge``)."""
    return projects_for(config_path).for_path(path, None)


def check_paths(paths: list[str], config_path: Optional[str] = None, projects: Optional[Projects] = None,
                probe: bool = False, jobs: int = 1, cache_dir: Optional[str] = None, cache_from: int = 1,
                probe_progress: bool = False) -> CheckResult:
    """Check every deck below ``paths``, each in its own project
    (``deckward.rules.engine.project``).  With ``probe``, the PySCF probes run
    too and their findings go through the same severity and suppression
    handling.

    ``jobs``: worker processes (0: one per core); ``cache_dir``: a findings
    cache folder (None: no cache).  Both go through
    ``deckward.server.parallel_check``; the findings are the same either
    way.  ``cache_from``: use the cache only from this many decks on (the
    command line's default cache is not worth opening for one deck).
    Projects whose loader holds unsaved editor text are never cached or
    shared.

    Few decks without a cache are checked right here: the single-deck path
    imports neither the parallel checker nor the cache.  ``probe_progress``
    shows each probe calculation on standard error (the display of
    ``deckward run``)."""
    projects = projects or projects_for(config_path)
    progress = probe_progress_display() if probe and probe_progress else None
    files: list[str] = []
    tasks: list[tuple[str, Project]] = []
    skipped: list[str] = []
    for given in paths:
        for path in discover([given], projects, skipped):
            files.append(path)
            tasks.append((path, projects.for_path(path, given)))
    require_decks(files, paths, skipped)
    findings: list[Finding] = config_findings(project for _, project in tasks)
    primary = tasks[0][1].config if tasks else Config()  # the configuration a report names
    loader = projects.loader
    if loader.overlay or len(tasks) < cache_from:
        cache_dir = None
    if loader.overlay:
        jobs = 1
    if cache_dir is None and (jobs == 1 or len(tasks) < IN_PROCESS_BELOW):
        shared: set[str] = set()
        for path, project in tasks:
            try:
                analysis = project.analyse(path, probe=probe, progress=progress)
            except OSError as e:
                raise UsageError(f"{path}: cannot be read ({e.strerror or e})")
            if not loader.overlay:
                release_unshared(loader, analysis.workspace, shared)
            findings.extend(analysis.findings)
        return CheckResult(files, dedupe(findings), primary, notes=skipped)

    from .parallel_check import DeckUnreadable, Task, check_tasks

    notes = list(skipped)
    total = None
    for project, group in _by_project(tasks):
        try:
            found, stats = check_tasks([Task(p, project.root) for p in group], project.config, probe=probe,
                                       jobs=jobs, cache_dir=cache_dir, progress=progress)
        except DeckUnreadable as e:
            raise UsageError(str(e))
        findings.extend(found)
        notes.extend(stats.notes)
        total = stats if total is None else total.plus(stats)
    return CheckResult(files, dedupe(findings), primary, notes=notes, stats=total)


def _by_project(tasks: list[tuple[str, Project]]) -> list[tuple[Project, list[str]]]:
    """The decks grouped by project, in the order the projects were met (a
    group shares one configuration, so one pool and one cache key scheme)."""
    groups: dict[int, tuple[Project, list[str]]] = {}
    for path, project in tasks:
        groups.setdefault(id(project), (project, []))[1].append(path)
    return list(groups.values())


def release_unshared(loader: Loader, ws, shared: set[str]) -> None:
    """Forget a checked deck's parse unless another deck has used it so far.

    A repository check would otherwise keep every parsed deck alive to the
    end: memory in proportion to the repository, and a garbage collector
    that walks it all again and again.  Files that decks ``use`` stay (many
    decks share them); a deck used only later is parsed again then, from the
    remembered statement parses."""
    for pf in ws.files[1:]:
        shared.add(os.path.abspath(pf.path))
    if os.path.abspath(ws.root.path) not in shared:
        loader.forget(ws.root.path)


def probe_progress_display():
    """The runner's progress display for probe calculations, on standard error."""
    from deckward.rules.compute.runner.progress import Progress

    return Progress(0, enabled=True)


def exceeds(findings: Iterable[Finding], fail_on: str) -> bool:
    if fail_on == "never":
        return False
    threshold = Severity(fail_on).rank
    return any(f.severity.rank >= threshold for f in findings if f.suppressed is None)
