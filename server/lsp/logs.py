"""The server's log: standard error, and a file when asked for.

``deckward serve --log-file PATH --log-level LEVEL``.  A request the
server refuses on purpose (a rename to a taken name, invalid parameters)
is the user's mistake, not the server's: pygls logs it with a traceback,
so those records are cut to one line here.  Anything else keeps its
traceback.
"""
from __future__ import annotations

import logging
import sys
from typing import Optional

FORMAT = "%(asctime)s deckward-lsp %(levelname)s %(name)s: %(message)s"


class OneLineRefusals(logging.Filter):
    """A JSON-RPC error the server answered with (the request's fault)
    becomes one line without a traceback."""

    def filter(self, record: logging.LogRecord) -> bool:
        if isinstance(record.msg, str) and record.msg.startswith("Unable to deserialize message"):
            return False  # transport.py answers the request and logs one line
        exc = record.exc_info[1] if record.exc_info else None
        if exc is not None:
            from pygls.exceptions import JsonRpcException

            if isinstance(exc, JsonRpcException):
                record.msg = "request refused: %s"
                record.args = (" ".join(str(exc).split()) or type(exc).__name__,)
                record.exc_info = None
                record.exc_text = None
                record.levelno, record.levelname = logging.WARNING, "WARNING"
        return True


def configure(log_file: Optional[str] = None, level: str = "warning") -> None:
    """Log to standard error (never standard output: it carries the
    protocol) and to ``log_file`` if given, at ``level``."""
    handlers: list[logging.Handler] = [logging.StreamHandler(sys.stderr)]
    if log_file:
        handlers.append(logging.FileHandler(log_file, encoding="utf-8"))
    for h in handlers:
        h.setFormatter(logging.Formatter(FORMAT))
        h.addFilter(OneLineRefusals())
    root = logging.getLogger()
    for h in list(root.handlers):
        root.removeHandler(h)
    for h in handlers:
        root.addHandler(h)
    root.setLevel(getattr(logging, level.upper()))
