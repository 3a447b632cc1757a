"""``deckward probe DECK...``: run the PySCF probes and report their findings.

The probes run cheap Hartree-Fock calculations on the deck's own molecules
(see docs/running.md); PySCF is imported only when one runs.  Findings go
through the same severities, suppressions and output formats as
``deckward check``.
"""
from __future__ import annotations

import os
import sys

from .checking import CheckResult, UsageError, config_for, discover, root_for
from .report_options import add_report_arguments, check_format, report

HELP = "run the PySCF probes (cheap Hartree-Fock checks with numbers) on deck files"


def add_arguments(p) -> None:
    add_report_arguments(p, paths_metavar="DECK")
    p.add_argument("--cache-dir", metavar="DIR",
                   help="results cache (default: $DECKWARD_CACHE_DIR/runs or ~/.cache/deckward/runs)")


def run(args) -> int:
    from deckward.grammar.resolve import Loader, resolve
    from deckward.rules.engine import check_workspace, dedupe
    from deckward.rules.probes import PROBE_RULES, run_probes, unprobed_reason
    from deckward.rules.runner.cache import RunCache

    check_format(args)
    config = config_for(args.paths, args.config)
    cache = RunCache(os.path.join(args.cache_dir, "runs") if args.cache_dir else None)
    ids = {info.id for info in PROBE_RULES}
    loader = Loader()
    files, findings, notes = [], list(config.findings), []
    for given in args.paths:
        for path in discover([given], config, notes):
            files.append(path)
            try:
                ws = resolve(path, loader, root_for(path, config, given))
            except OSError as e:
                raise UsageError(f"{path}: cannot be read ({e.strerror or e})")
            errors = [f for f in ws.findings if f.severity.value == "error"]
            findings.extend(errors)
            if errors:
                sys.stderr.write(f"deckward: {path} has errors and is not probed (see `deckward check`)\n")
                continue
            unprobed = unprobed_reason(ws)
            if unprobed is not None:
                notes.append(f"deckward: {path} was not probed: {unprobed}")
                continue
            extra = run_probes(ws, config, cache)
            findings.extend(check_workspace(ws, config, select=ids, extra=extra, probed=True))
    if notes and getattr(args, "format", "text") != "text":
        sys.stderr.write("".join(n + "\n" for n in notes))
    return report(args, CheckResult(files, dedupe(findings), config, notes=notes))
