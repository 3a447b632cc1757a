"""``deckward check PATH...``: report findings, optionally fix them."""
from __future__ import annotations

import sys

from .checking import check_paths
from .parallel_check import add_scale_arguments, scale_options
from .report_options import add_report_arguments, check_format, report

HELP = "check deck files or folders and report findings"


def add_arguments(p) -> None:
    add_report_arguments(p)
    fixing = p.add_argument_group("fixes")
    fixing.add_argument("--fix", action="store_true", help="apply safe fixes to the files")
    fixing.add_argument("--fix-risky", action="store_true", help="apply risky fixes too (implies --fix)")
    fixing.add_argument("--diff", action="store_true", help="print a unified diff of the fixes; write nothing")
    p.add_argument("--probe", action="store_true",
                   help="also run the PySCF probes (slow: minutes, not milliseconds)")
    add_scale_arguments(p)


def run(args) -> int:
    check_format(args)
    extra_output = ""
    if args.fix or args.fix_risky or args.diff:
        from .fixing import run_fixes  # the fix machinery (see docs/architecture.md)

        result, extra_output = run_fixes(args)
    else:
        result = check_paths(args.paths, config_path=args.config, probe=args.probe, probe_progress=True,
                             **scale_options(args))
    if extra_output:  # the diff goes to standard output even when the report goes to --output
        sys.stdout.write(extra_output)
    return report(args, result)
