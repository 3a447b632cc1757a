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
from typing import Optional

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
    "results": "deckward.server.cmd_results",
    "new": "deckward.server.cmd_new",
    "converge": "deckward.server.cmd_converge",
}


class _Formatter(argparse.HelpFormatter):
    """argparse's formatter, reading the terminal's width as shutil does
    without importing it: argparse makes a formatter for every option it
    adds, and shutil (with the compression modules it imports) costs about
    1.5 ms of every start."""

    def __init__(self, prog, indent_increment=2, max_help_position=24, width=None):
        super().__init__(prog, indent_increment, max_help_position, _columns() - 2 if width is None else width)


def _columns() -> int:
    """``shutil.get_terminal_size().columns``: $COLUMNS, else the terminal's, else 80."""
    try:
        columns = int(os.environ["COLUMNS"])
    except (KeyError, ValueError):
        columns = 0
    if columns <= 0:
        try:
            columns = os.get_terminal_size(sys.__stdout__.fileno()).columns
        except (AttributeError, ValueError, OSError):
            columns = 0
    return columns or 80


class _Parser(argparse.ArgumentParser):
    def __init__(self, *args, **kwargs):
        kwargs.setdefault("formatter_class", _Formatter)
        super().__init__(*args, **kwargs)

    def error(self, message: str):  # one line, exit 2
        sys.stderr.write(f"{self.prog}: error: {message} (see `{self.prog} --help`)\n")
        sys.exit(2)


def build_parser(only: Optional[str] = None) -> argparse.ArgumentParser:
    """The whole command line, or with ``only`` just that subcommand: each
    command module imports what its command needs, so ``deckward check``
    does not pay for the formatter, the runner or the language server."""
    parser = _Parser(prog="deckward", description="Check, run and probe calculation decks.")
    parser.add_argument("--version", action="version", version=f"deckward {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name, module in COMMANDS.items():
        if only is not None and name != only:
            continue
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

    _never_fail_to_print()
    # The first word names the command (no option comes before it); anything
    # else (--help, --version, a typo) gets the whole parser and its message.
    parser = build_parser(argv[0] if argv and argv[0] in COMMANDS else None)
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


def run_program() -> None:
    """The ``deckward`` program (console script and ``python -m deckward``):
    ``main``, then the exit.  Tearing the interpreter down (freeing every
    module and object one by one) costs a short command a sixth of its run,
    so when nothing waits for it (no ``atexit`` handler, no other thread)
    the process ends once the output is flushed."""
    code = main()
    try:
        sys.stdout.flush()
        sys.stderr.flush()
    except (OSError, ValueError):
        sys.exit(code)
    if _nothing_waits_for_the_exit():
        os._exit(code)
    sys.exit(code)


def _nothing_waits_for_the_exit() -> bool:
    import atexit

    handlers = getattr(atexit, "_ncallbacks", None)
    if handlers is None or handlers() != 0:
        return False
    threading = sys.modules.get("threading")
    return threading is None or threading.active_count() == 1


def _never_fail_to_print() -> None:
    """A file name that is not UTF-8 (or any odd character) must not turn a
    report into an encoding error: a strict output stream escapes instead."""
    for stream in (sys.stdout, sys.stderr):
        if getattr(stream, "errors", None) == "strict" and hasattr(stream, "reconfigure"):
            try:
                stream.reconfigure(errors="backslashreplace")
            except (ValueError, OSError):
                pass


if __name__ == "__main__":
    run_program()
