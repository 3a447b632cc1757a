"""``deckward check PATH...``: report findings, optionally fix them."""
from __future__ import annotations

import sys

from .checking import UsageError, check_paths, exceeds
from .formats import FORMATS, available, renderer
from .parallel_check import add_scale_arguments, scale_options

HELP = "check deck files or folders and report findings"


def add_arguments(p) -> None:
    p.add_argument("paths", nargs="+", metavar="PATH", help="deck files or folders (searched for *.deck)")
    p.add_argument("--format", default="text", choices=sorted(FORMATS), help="output format (default: text)")
    p.add_argument("--fail-on", default="warning", choices=("error", "warning", "info", "never"),
                   help="exit 1 when a finding is at or above this severity (default: warning)")
    p.add_argument("--config", metavar="FILE", help="configuration file (default: deckward.yaml at or above the path)")
    p.add_argument("--output", "-o", metavar="FILE", help="write the report to FILE instead of standard output")
    fixing = p.add_argument_group("fixes")
    fixing.add_argument("--fix", action="store_true", help="apply safe fixes to the files")
    fixing.add_argument("--fix-risky", action="store_true", help="apply risky fixes too (implies --fix)")
    fixing.add_argument("--diff", action="store_true", help="print a unified diff of the fixes; write nothing")
    p.add_argument("--probe", action="store_true",
                   help="also run the PySCF probes (slow: minutes, not milliseconds)")
    add_scale_arguments(p)


def run(args) -> int:
    if args.format not in available():
        raise UsageError(f"the {args.format} format is not available in this build")
    extra_output = ""
    if args.fix or args.fix_risky or args.diff:
        from .fixing import run_fixes  # the fix machinery (see docs/architecture.md)

        result, extra_output = run_fixes(args)
    else:
        result = check_paths(args.paths, config_path=args.config, probe=args.probe, **scale_options(args))
    text = renderer(args.format)(result)
    if extra_output:  # the diff goes to standard output even when the report goes to --output
        sys.stdout.write(extra_output)
    if args.output:
        try:
            with open(args.output, "w", encoding="utf-8") as f:
                f.write(text)
        except OSError as e:
            raise UsageError(f"{args.output}: cannot be written ({e.strerror or e})")
    else:
        sys.stdout.write(text)
    return 1 if exceeds(result.findings, args.fail_on) else 0
