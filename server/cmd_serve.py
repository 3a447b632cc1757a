"""``deckward serve``: the language server, on stdio or TCP."""
from __future__ import annotations

from .checking import UsageError

HELP = "run the language server (stdio by default) for editors"


def add_arguments(p) -> None:
    p.add_argument("--stdio", action="store_true", help="talk over standard input and output (the default)")
    p.add_argument("--tcp", metavar="HOST:PORT", help="listen on a TCP address instead, e.g. 127.0.0.1:2087")


def parse_address(text: str) -> tuple[str, int]:
    host, sep, port = text.rpartition(":")
    if not sep or not host or not port.isdigit() or not 0 < int(port) < 65536:
        raise UsageError(f"--tcp expects HOST:PORT (e.g. 127.0.0.1:2087), not `{text}`")
    return host.strip("[]"), int(port)


def run(args) -> int:
    from .lsp.server import start

    if args.tcp and args.stdio:
        raise UsageError("choose one of --stdio and --tcp")
    start(parse_address(args.tcp) if args.tcp else None)
    return 0
