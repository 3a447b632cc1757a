"""``deckward probe DECK...``: run the PySCF probes and report their findings.

The probes run cheap Hartree-Fock calculations on the deck's own molecules
(see docs/running.md); PySCF is imported only when one runs.  Findings go
through the same severities, suppressions and output formats as
``deckward check``.
"""
from __future__ import annotations

import os
import sys

from .checking import CheckResult, UsageError, discover, probe_progress_display, projects_for, require_decks
from .executor_options import add_executor_arguments, executor_from, probes_on
from .report_options import add_report_arguments, check_format, report

HELP = "run the PySCF probes (cheap Hartree-Fock checks with numbers) on deck files"


def add_arguments(p) -> None:
    add_report_arguments(p, paths_metavar="DECK")
    p.add_argument("--quiet", "-q", action="store_true", help="no progress display on standard error")
    p.add_argument("--cache-dir", metavar="DIR",
                   help="results cache (default: $DECKWARD_CACHE_DIR/runs or ~/.cache/deckward/runs)")
    p.add_argument("--jobs", "-j", type=int, default=1, metavar="N", help="workers of --cluster local (default 1)")
    add_executor_arguments(p)


def run(args) -> int:
    check_format(args)
    projects = projects_for(args.config)
    config = projects.config_for(args.paths[0], args.paths[0])  # where a `cluster:` section is looked up
    with executor_from(args, config, args.jobs) as executor, probes_on(executor):
        return _probe_all(args, projects)


def _probe_all(args, projects) -> int:
    from deckward.rules.engine.checker import check_workspace, dedupe
    from deckward.rules.engine.project import config_findings
    from deckward.rules.compute.probes import PROBE_RULES, run_probes, unprobed_reason
    from deckward.rules.compute.runner.cache import RunCache

    cache = RunCache(os.path.join(args.cache_dir, "runs") if args.cache_dir else None)
    ids = {info.id for info in PROBE_RULES}
    progress = None if args.quiet else probe_progress_display()
    notes: list[str] = []
    tasks = [(path, projects.for_path(path, given)) for given in args.paths
             for path in discover([given], projects, notes)]
    require_decks([p for p, _ in tasks], args.paths, notes)
    files, findings = [], config_findings(project for _, project in tasks)
    with_states = 0
    for path, project in tasks:
        files.append(path)
        config = project.config
        try:
            ws = project.resolve(path)
        except OSError as e:
            raise UsageError(f"{path}: cannot be read ({e.strerror or e})")
        with_states += bool(ws.states)
        errors = [f for f in ws.findings if f.severity.value == "error"]
        findings.extend(errors)
        if errors:
            sys.stderr.write(f"deckward: {path} has errors and is not probed (see `deckward check`)\n")
            continue
        unprobed = unprobed_reason(ws)
        if unprobed is not None:
            notes.append(f"deckward: {path} was not probed: {unprobed}")
            continue
        extra = run_probes(ws, config, cache, progress=progress)
        findings.extend(check_workspace(ws, config, select=ids, extra=extra, probed=True))
    if tasks and not with_states:
        raise UsageError(f"nothing to probe: no deck in {', '.join(args.paths)} has a state")
    if notes and getattr(args, "format", "text") != "text":
        sys.stderr.write("".join(n + "\n" for n in notes))
    primary = tasks[0][1].config if tasks else projects.config_for(args.paths[0], args.paths[0])
    return report(args, CheckResult(files, dedupe(findings), primary, notes=notes))
