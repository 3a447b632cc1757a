"""``deckward serve``: the language server, on stdio or TCP."""
from __future__ import annotations

from .checking import UsageError

HELP = "run the language server (stdio by default) for editors"


def add_arguments(p) -> None:
    p.add_argument("--stdio", action="store_true", help="talk over standard input and output (the default)")
    p.add_argument("--tcp", metavar="HOST:PORT", help="listen on a TCP address instead, e.g. 127.0.0.1:2087")
    p.add_argument("--log-file", metavar="PATH", help="also write the server's log to PATH (appended)")
    p.add_argument("--log-level", metavar="LEVEL", default="warning", type=str.lower,
                   help="debug | info | warning | error (default: warning)")


def parse_address(text: str) -> tuple[str, int]:
    host, sep, port = text.rpartition(":")
    if not sep or not host or not port.isdigit() or not 0 < int(port) < 65536:
        raise UsageError(f"--tcp expects HOST:PORT (e.g. 127.0.0.1:2087), not `{text}`")
    return host.strip("[]"), int(port)


def run(args) -> int:
    from .lsp import logs

    if args.tcp and args.stdio:
        raise UsageError("choose one of --stdio and --tcp")
    if args.log_level not in logs.LEVELS:
        raise UsageError(f"--log-level takes one of {' | '.join(logs.LEVELS)}, not `{args.log_level}`")
    address = parse_address(args.tcp) if args.tcp else None
    try:
        logs.configure(args.log_file, args.log_level)
    except OSError as e:
        raise UsageError(f"cannot write the log file {args.log_file}: {e.strerror or e}") from None
    from .lsp.server import start

    start(address)
    return 0
