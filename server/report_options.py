"""The options and output shared by commands that report findings
(``check``, ``probe``): format, fail-on, configuration and output file."""
from __future__ import annotations

import sys

from .checking import CheckResult, UsageError, exceeds
from .formats import FORMATS, available, renderer


def add_report_arguments(p, paths_metavar: str = "PATH") -> None:
    p.add_argument("paths", nargs="+", metavar=paths_metavar, help="deck files or folders (searched for *.deck)")
    p.add_argument("--format", default="text", choices=sorted(FORMATS), help="output format (default: text)")
    p.add_argument("--fail-on", default="warning", choices=("error", "warning", "info", "never"),
                   help="exit 1 when a finding is at or above this severity (default: warning)")
    p.add_argument("--config", metavar="FILE", help="configuration file (default: deckward.yaml at or above the path)")
    p.add_argument("--output", "-o", metavar="FILE", help="write the report to FILE instead of standard output")


def check_format(args) -> None:
    if args.format not in available():
        raise UsageError(f"the {args.format} format is not available in this build")


def report(args, result: CheckResult) -> int:
    """Write the report (to --output or standard output); the exit status."""
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
