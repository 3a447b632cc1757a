"""Messages over standard input and output, read by deckward itself.

pygls' own stdio loop trusts the client's framing: after one header
without a valid ``Content-Length`` it never finds the next message (the
body, which ends without a newline, is read together with the next
header line), a ``Content-Length`` of a terabyte is allocated as asked,
and a request whose parameters do not fit the protocol's types is dropped
without an answer.  This reader finds the next header even after junk,
refuses messages larger than ``MAX_MESSAGE_BYTES``, and a request that
cannot be read is answered with an error.  Only the standard library is
imported here: ``deckward serve`` reads the first request with it before
pygls is loaded (``fast_start.py``).
"""
from __future__ import annotations

import json
import logging
import re
from typing import BinaryIO, Optional

MAX_MESSAGE_BYTES = 64 * 1024 * 1024  # far above any deck; a lie about the length is refused
MAX_HEADER_LINE = 64 * 1024
_LENGTH = re.compile(rb"Content-Length[ \t]*:[ \t]*([^\r\n]*)\r?\n?$", re.IGNORECASE)

log = logging.getLogger(__name__)


class MessageReader:
    """Reads one message body at a time from a binary stream."""

    def __init__(self, stream: BinaryIO) -> None:
        self.stream = stream
        self.refused = 0  # headers that were skipped (for the log and the tests)

    def read(self) -> Optional[bytes]:
        """The next message body, or None at the end of the stream."""
        length: Optional[int] = None
        while True:
            line = self.stream.readline(MAX_HEADER_LINE)
            if not line:
                return None
            if not line.strip():
                if length is None:
                    continue  # no usable Content-Length: look for the next header
                break
            found = _LENGTH.search(line)  # search: junk before a header is skipped
            if found is None:
                continue  # Content-Type, or the rest of a message that could not be read
            value = found.group(1).strip()
            if value.isdigit() and int(value) <= MAX_MESSAGE_BYTES:
                length = int(value)
            else:
                self.refused += 1
                length = None
                shown = value[:40].decode("ascii", "replace")
                log.error("ignoring a message with Content-Length `%s` (a whole number up to %d is needed)",
                          shown, MAX_MESSAGE_BYTES)
        body = self.stream.read(length)
        if len(body) < length:
            return None
        return body


def frame(body: bytes) -> bytes:
    return b"Content-Length: %d\r\n\r\n" % len(body) + body


def request_id(body: bytes):
    """(id, method) of a request, None for anything else."""
    try:
        raw = json.loads(body)
    except (ValueError, RecursionError):
        return None
    if isinstance(raw, dict) and "id" in raw and isinstance(raw.get("method"), str):
        if isinstance(raw["id"], (int, str)) and not isinstance(raw["id"], bool):
            return raw["id"], raw["method"]
    return None


def dispatch(protocol, body: bytes) -> None:
    """Hand one message to pygls; answer a request it could not read."""
    try:
        message = json.loads(body, object_hook=protocol.structure_message)
    except Exception as exc:  # bad JSON, or parameters that do not fit the method
        from pygls.exceptions import JsonRpcInternalError, JsonRpcInvalidParams, JsonRpcParseError

        found = request_id(body)
        if found is None:
            log.error("ignoring a message that is not JSON-RPC: %s", " ".join(str(exc).split()) or type(exc).__name__)
            return
        msg_id, method = found
        if isinstance(exc, JsonRpcInvalidParams):
            error = JsonRpcInvalidParams(message=f"invalid parameters for {method}")
        elif isinstance(exc, ValueError):
            error = JsonRpcParseError(message=f"the request {msg_id} is not valid JSON")
        else:
            error = JsonRpcInternalError(message=f"{method} could not be read: {type(exc).__name__}")
        log.warning("request %s (%s) refused: %s", msg_id, method, error.message)
        protocol._send_response(msg_id, error=error.to_response_error())
        return
    protocol.handle_message(message)
