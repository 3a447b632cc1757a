"""The ``deckward`` command line: subcommands, exit codes, no tracebacks.

Each subcommand lives in its own module (``cmd_<name>.py``) exposing
``HELP``, ``add_arguments(parser)`` and ``run(args) -> int``.  Exit status:
0 nothing at or above ``--fail-on``, 1 findings at or above it, 2 usage
errors and unreadable paths, 3 an internal defect (reported in one line;
``DECKWARD_DEBUG=1`` shows the traceback).
"""
from __future__ import annotations

import argparse
import importlib
import importlib.util
import os
import sys

from deckward import __version__

COMMANDS = {
    "check": "deckward.server.cmd_check",
    "rules": "deckward.server.cmd_rules",
    "explain": "deckward.server.cmd_explain",
    "format": "deckward.server.cmd_format",
    "serve": "deckward.server.cmd_serve",
    "run": "deckward.server.cmd_run",
    "probe": "deckward.server.cmd_probe",
    "review": "deckward.server.cmd_review",
}


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # one line, exit 2
        sys.stderr.write(f"{self.prog}: error: {message} (see `{self.prog} --help`)\n")
        sys.exit(2)


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="deckward", description="Check, run and probe calculation decks.")
    parser.add_argument("--version", action="version", version=f"deckward {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name, module in COMMANDS.items():
        if importlib.util.find_spec(module) is None:
            continue
        mod = importlib.import_module(module)
        p = sub.add_parser(name, help=mod.HELP, description=mod.HELP)
        mod.add_arguments(p)
        p.set_defaults(_run=mod.run)
    return parser


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    if argv[:1] == ["serve"]:  # the language server starts without loading the other commands
        from .cmd_serve import main as serve

        return serve(argv[1:])
    from .checking import UsageError

    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "_run", None):
        parser.print_help()
        return 2
    try:
        return int(args._run(args) or 0)
    except UsageError as e:
        sys.stderr.write(f"deckward: error: {e}\n")
        return 2
    except KeyboardInterrupt:
        sys.stderr.write("deckward: interrupted\n")
        return 130
    except BrokenPipeError:
        try:
            sys.stdout = open(os.devnull, "w")
        except OSError:
            pass
        return 0
    except Exception as e:  # a defect: one line, never a traceback unless asked
        if os.environ.get("DECKWARD_DEBUG"):
            raise
        sys.stderr.write(f"deckward: internal error: {type(e).__name__}: {e} (set DECKWARD_DEBUG=1 for details)\n")
        return 3


if __name__ == "__main__":
    sys.exit(main())
