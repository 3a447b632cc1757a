"""``deckward serve``: the language server, on stdio or TCP.

An editor waits for the answer to ``initialize`` before anything else, so
on stdio the first request is read and answered (``lsp/fast_start.py``)
before pygls, lsprotocol and the checker are imported; ``main`` is the
command line's own short path to here, without the other subcommands.
"""
from __future__ import annotations

import sys

HELP = "run the language server (stdio by default) for editors"
LOG_LEVELS = ("debug", "info", "warning", "error")


class _Refused(Exception):
    """A usage error found before the command line's own classes are loaded."""


def add_arguments(p) -> None:
    p.add_argument("--stdio", action="store_true", help="talk over standard input and output (the default)")
    p.add_argument("--tcp", metavar="HOST:PORT", help="listen on a TCP address instead, e.g. 127.0.0.1:2087")
    p.add_argument("--log-file", metavar="PATH", help="also write the server's log to PATH (appended)")
    p.add_argument("--log-level", metavar="LEVEL", default="warning", type=str.lower,
                   help=f"{' | '.join(LOG_LEVELS)} (default: warning)")


def parse_address(text: str) -> tuple[str, int]:
    host, sep, port = text.rpartition(":")
    if not sep or not host or not port.isdigit() or not 0 < int(port) < 65536:
        raise _Refused(f"--tcp expects HOST:PORT (e.g. 127.0.0.1:2087), not `{text}`")
    return host.strip("[]"), int(port)


def _checked(args) -> tuple:
    if args.tcp and args.stdio:
        raise _Refused("choose one of --stdio and --tcp")
    if args.log_level not in LOG_LEVELS:
        raise _Refused(f"--log-level takes one of {' | '.join(LOG_LEVELS)}, not `{args.log_level}`")
    address = parse_address(args.tcp) if args.tcp else None
    if args.log_file:
        try:
            open(args.log_file, "a", encoding="utf-8").close()
        except OSError as e:
            raise _Refused(f"cannot write the log file {args.log_file}: {e.strerror or e}") from None
    return address, args.log_file, args.log_level


def run(args) -> int:
    """``deckward serve`` through the full command line."""
    try:
        address, log_file, level = _checked(args)
    except _Refused as e:
        from .checking import UsageError

        raise UsageError(str(e)) from None
    return serve(address, log_file, level)


def main(argv: list[str]) -> int:
    """``deckward serve ARGS``, parsed without loading the other subcommands."""
    import argparse

    p = argparse.ArgumentParser(prog="deckward serve", description=HELP)
    add_arguments(p)
    args = p.parse_args(argv)
    try:
        address, log_file, level = _checked(args)
    except _Refused as e:
        sys.stderr.write(f"deckward: error: {e}\n")
        return 2
    return serve(address, log_file, level)


def answer_first(reader, out):
    """Read the first message and answer it if it is ``initialize``:
    (the message, (id, result) or None).  Imports the standard library only."""
    from .lsp import fast_start
    from .lsp.transport import frame

    first = reader.read()
    answered = fast_start.early_answer(first)
    if answered is not None:
        out.write(frame(fast_start.response(*answered)))
        out.flush()
    return first, answered


def serve(address, log_file, level: str) -> int:
    if address is not None:
        from .lsp import logs
        from .lsp.server import start

        logs.configure(log_file, level)
        start(address)
        return 0
    from .lsp.transport import MessageReader

    stdin, out = sys.stdin.buffer, sys.stdout.buffer
    sys.stdout = sys.stderr  # a stray print must not corrupt the protocol stream
    reader = MessageReader(stdin)
    first, answered = answer_first(reader, out)
    if first is None:
        return 0
    from .lsp import logs

    logs.configure(log_file, level)
    from .lsp.server import build_server, serve_stdio

    serve_stdio(build_server(), reader, out, first=first, answered=answered)
    return 0
