"""Answer ``initialize`` before pygls and lsprotocol are imported.

Importing lsprotocol's full type set (which pygls needs) takes most of a
second on a loaded machine; the editor waits for the ``initialize`` answer
before it sends anything else.  The answer only depends on the features
the server registers and on two things the client says (its position
encodings, and whether it supports prepareRename), so it is kept in
``capabilities.json``, written from the real server by

    python -m deckward.server.lsp.fast_start > server/lsp/capabilities.json

and tests/test_lsp_start.py checks that it equals what pygls computes for
every bundled client profile.  The request is then handed to pygls as
well, so its state (client capabilities, encoding, workspace) is the same
as after a normal start; its own answer is compared, not sent.
"""
from __future__ import annotations

import json
import os
import sys
from typing import Optional

CAPABILITIES_FILE = os.path.join(os.path.dirname(os.path.abspath(__file__)), "capabilities.json")
ENCODINGS = ("utf-8", "utf-16", "utf-32")  # those pygls supports, in its terms


def _get(obj, *path):
    for key in path:
        if not isinstance(obj, dict):
            return None
        obj = obj.get(key)
    return obj


def initialize_result(params: dict) -> dict:
    """The result pygls would send for these ``initialize`` parameters."""
    from deckward import __version__

    with open(CAPABILITIES_FILE, encoding="utf-8") as f:
        caps = json.load(f)
    encoding = "utf-16"
    offered = _get(params, "capabilities", "general", "positionEncodings")
    if isinstance(offered, list):
        encoding = next((e for e in offered if e in ENCODINGS), encoding)
    caps["positionEncoding"] = encoding
    if not _get(params, "capabilities", "textDocument", "rename", "prepareSupport"):
        caps["renameProvider"] = True  # RenameOptions only for clients that support prepareRename
    for key in ("willSave", "willSaveWaitUntil"):  # not offered; pygls says so when the client asks
        if _get(params, "capabilities", "textDocument", "synchronization", key) is not None:
            caps["textDocumentSync"][key] = False
    return {"capabilities": caps, "serverInfo": {"name": "deckward", "version": __version__}}


def early_answer(body: Optional[bytes]) -> Optional[tuple[object, dict]]:
    """(request id, result) when ``body`` is an ``initialize`` request that
    can be answered now, else None (pygls answers it after loading)."""
    if not body or os.environ.get("DECKWARD_LSP_SLOW_START"):
        return None
    try:
        message = json.loads(body)
    except ValueError:
        return None
    if not isinstance(message, dict) or message.get("method") != "initialize":
        return None
    msg_id, params = message.get("id"), message.get("params")
    if isinstance(msg_id, bool) or not isinstance(msg_id, (int, str)) or not isinstance(params, dict):
        return None
    if not isinstance(params.get("capabilities"), dict):
        return None
    try:
        return msg_id, initialize_result(params)
    except (OSError, ValueError):
        return None


def response(msg_id, result: dict) -> bytes:
    return json.dumps({"jsonrpc": "2.0", "id": msg_id, "result": result}).encode("utf-8")


# ------------------------------------------------------------ the source of truth


def pygls_result(server, client_capabilities) -> dict:
    """What pygls answers to ``initialize`` for these client capabilities
    (the steps of its own handler, without sending anything)."""
    from lsprotocol import types as t
    from pygls.capabilities import ServerCapabilitiesBuilder

    fm = server.protocol.fm
    encoding = ServerCapabilitiesBuilder.choose_position_encoding(client_capabilities)
    caps = ServerCapabilitiesBuilder(
        client_capabilities, set({**fm.features, **fm.builtin_features}.keys()), fm.feature_options,
        list(fm.commands.keys()), server._text_document_sync_kind, server._notebook_document_sync, encoding,
    ).build()
    return server.protocol._converter.unstructure(t.InitializeResult(capabilities=caps, server_info=server.protocol.server_info))


def main() -> int:
    from lsprotocol import types as t

    from .server import build_server

    caps = t.ClientCapabilities(text_document=t.TextDocumentClientCapabilities(
        rename=t.RenameClientCapabilities(prepare_support=True)))
    result = pygls_result(build_server(), caps)["capabilities"]
    result.pop("positionEncoding", None)
    sys.stdout.write(json.dumps(result, indent=1, sort_keys=True) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
