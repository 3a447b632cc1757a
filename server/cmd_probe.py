"""``deckward probe DECK...``: run the PySCF probes and report their findings.

The probes run cheap Hartree-Fock calculations on the deck's own molecules
(see docs/running.md); PySCF is imported only when one runs.  Findings go
through the same severities, suppressions and output formats as
``deckward check``.
"""
from __future__ import annotations

import os
import sys

from .checking import CheckResult, UsageError, config_for, discover, exceeds, root_for
from .formats import FORMATS, available, renderer

HELP = "run the PySCF probes (cheap Hartree-Fock checks with numbers) on deck files"


def add_arguments(p) -> None:
    p.add_argument("paths", nargs="+", metavar="DECK", help="deck files or folders (searched for *.deck)")
    p.add_argument("--format", default="text", choices=sorted(FORMATS), help="output format (default: text)")
    p.add_argument("--fail-on", default="warning", choices=("error", "warning", "info", "never"),
                   help="exit 1 when a finding is at or above this severity (default: warning)")
    p.add_argument("--config", metavar="FILE", help="configuration file (default: deckward.yaml at or above the path)")
    p.add_argument("--output", "-o", metavar="FILE", help="write the report to FILE instead of standard output")
    p.add_argument("--cache-dir", metavar="DIR",
                   help="results cache (default: $DECKWARD_CACHE_DIR/runs or ~/.cache/deckward/runs)")


def run(args) -> int:
    from deckward.grammar.resolve import Loader, resolve
    from deckward.rules.engine import check_workspace, dedupe
    from deckward.rules.probes import PROBE_RULES, run_probes
    from deckward.rules.runner.cache import RunCache

    if args.format not in available():
        raise UsageError(f"the {args.format} format is not available in this build")
    config = config_for(args.paths, args.config)
    cache = RunCache(os.path.join(args.cache_dir, "runs") if args.cache_dir else None)
    ids = {info.id for info in PROBE_RULES}
    loader = Loader()
    files, findings = [], list(config.findings)
    for given in args.paths:
        for path in discover([given], config):
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
            extra = run_probes(ws, config, cache)
            findings.extend(check_workspace(ws, config, select=ids, extra=extra, probed=True))
    result = CheckResult(files, dedupe(findings), config)
    text = renderer(args.format)(result)
    if args.output:
        try:
            with open(args.output, "w", encoding="utf-8") as f:
                f.write(text)
        except OSError as e:
            raise UsageError(f"{args.output}: cannot be written ({e.strerror or e})")
    else:
        sys.stdout.write(text)
    return 1 if exceeds(result.findings, args.fail_on) else 0
