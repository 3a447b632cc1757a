"""``deckward check PATH...``: report findings, optionally fix them."""
from __future__ import annotations

import os
import sys

from .checking import CheckResult, UsageError, check_paths, projects_for
from .scale_options import add_scale_arguments, scale_options
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
    p.add_argument("--stdin-name", metavar="PATH", default="stdin.deck",
                   help="with the path `-`: the deck read from standard input is checked as if it were this "
                        "file (its `use` lines are relative to it; default: stdin.deck here)")
    add_scale_arguments(p)


def run(args) -> int:
    check_format(args)
    extra_output = ""
    if "-" in args.paths:
        result = _check_standard_input(args)
    elif args.fix or args.fix_risky or args.diff:
        from .fixing import run_fixes  # the fix machinery (see docs/architecture.md)

        result, extra_output = run_fixes(args)
    else:
        result = check_paths(args.paths, config_path=args.config, probe=args.probe, probe_progress=True,
                             **scale_options(args))
    if extra_output:  # the diff goes to standard output even when the report goes to --output
        sys.stdout.write(extra_output)
    return report(args, result)


def _check_standard_input(args):
    """``deckward check -``: one deck from standard input (an editor or a
    pipe), checked as the file ``--stdin-name`` would be, never written."""
    if args.paths != ["-"]:
        raise UsageError("`-` (standard input) cannot be combined with other paths")
    if args.fix or args.fix_risky or args.diff:
        raise UsageError("--fix, --fix-risky and --diff need files: standard input cannot be written back")
    try:
        text = sys.stdin.buffer.read().decode("utf-8")
    except UnicodeDecodeError as e:
        raise UsageError(f"standard input: not valid UTF-8 (byte {e.start})")
    from deckward.rules.engine.checker import dedupe

    path = os.path.normpath(args.stdin_name)
    project = projects_for(args.config).for_path(path, None)
    analysis = project.analyse(path, text=text, probe=args.probe)
    return CheckResult([path], dedupe(list(analysis.config.findings) + analysis.findings), analysis.config)
