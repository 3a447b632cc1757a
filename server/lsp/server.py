"""The deckward language server: built from the core and its features, run on stdio or TCP.

``core.py`` holds the shared state and helpers; each feature module lists
its module-level handlers (``FEATURES``, ``COMMANDS``, ``SOURCE_ACTIONS``)
and ``build_server`` binds them to a new server.  Standard output carries
the protocol only: anything else a library might print is sent to
standard error.
"""
from __future__ import annotations

import asyncio
import logging
import sys
from concurrent.futures import ThreadPoolExecutor
from typing import Optional

from lsprotocol import types as t

from .core import DeckServer
from .positions import encoding_of
from .workspace import uri_to_path


# ------------------------------------------------------------------ lifecycle


def initialize(ls: DeckServer, params: t.InitializeParams):
    ls.store.encoding = encoding_of(ls.workspace.position_encoding)
    folders = [uri_to_path(f.uri) for f in params.workspace_folders or []]
    if not folders and (params.root_uri or params.root_path):
        folders = [uri_to_path(params.root_uri) if params.root_uri else params.root_path]
    ls.store.folders = folders
    caps = params.capabilities
    ls.push = caps.text_document is None or caps.text_document.diagnostic is None
    ws_caps = caps.workspace
    ls.pull_refresh = bool(ws_caps and ws_caps.diagnostics and ws_caps.diagnostics.refresh_support)


async def initialized(ls: DeckServer, params: t.InitializedParams):
    caps = ls.client_capabilities.workspace
    watch = caps and caps.did_change_watched_files and caps.did_change_watched_files.dynamic_registration
    if not watch:
        return
    try:
        await ls.client_register_capability_async(t.RegistrationParams(registrations=[t.Registration(
            id="deckward-watch", method=t.WORKSPACE_DID_CHANGE_WATCHED_FILES,
            register_options=t.DidChangeWatchedFilesRegistrationOptions(watchers=[
                t.FileSystemWatcher(glob_pattern="**/deckward.yaml"),
                t.FileSystemWatcher(glob_pattern="**/*.deck"),
            ]))]))
    except Exception as e:  # the client refused: mtime checks still catch config edits
        logging.getLogger(__name__).info("file watching not available: %s", e)


def watched(ls: DeckServer, params: t.DidChangeWatchedFilesParams):
    paths = [uri_to_path(c.uri) for c in params.changes]
    if any(ls.store.is_config(p) for p in paths):
        ls.config_changed()
        return
    ls.changed()
    for path in paths:
        ls.store.loader.forget(path)
        for uri in ls.store.dependents(path):
            if ls.is_open(uri):
                ls.publisher.schedule(uri, 0.0)
    ls.refresh_pull_diagnostics()


FEATURES = [
    (t.INITIALIZE, None, initialize),
    (t.INITIALIZED, None, initialized),
    (t.WORKSPACE_DID_CHANGE_WATCHED_FILES, None, watched),
]


def build_server() -> DeckServer:
    """A server with the lifecycle and every feature bound."""
    from . import actions, completion, diagnostics, formatting, hover, navigation, probes

    server = DeckServer()
    modules = (sys.modules[__name__], diagnostics, actions, hover, completion, navigation, formatting, probes)
    for module in modules:
        server.source_actions.extend(getattr(module, "SOURCE_ACTIONS", ()))
    for module in modules:
        for method, options, handler in module.FEATURES:
            if callable(options):  # options that depend on what the other features contribute
                options = options(server)
            (server.feature(method, options) if options is not None else server.feature(method))(handler)
        for name, handler in getattr(module, "COMMANDS", ()):
            server.command(name)(handler)
    return server


def start(tcp: Optional[tuple[str, int]] = None) -> None:
    """Run the server on stdio (default) or on a TCP address (logging is
    set up by the caller, ``deckward serve``)."""
    server = build_server()
    if tcp is not None:
        server.start_tcp(*tcp)
        return
    from .transport import MessageReader

    protocol_out = sys.stdout.buffer
    sys.stdout = sys.stderr  # a stray print must not corrupt the protocol stream
    serve_stdio(server, MessageReader(sys.stdin.buffer), protocol_out)


def serve_stdio(server: DeckServer, reader, out, first: Optional[bytes] = None, answered=None) -> None:
    """The message loop on stdio, with deckward's reader (``transport.py``).

    ``first``: a message read before the server existed; ``answered``:
    (id, result) when it was an ``initialize`` already answered
    (``fast_start.py``): pygls handles it too, for its state, and its own
    answer is only compared with the one sent."""
    import threading

    from pygls.io_ import StdoutWriter

    from .transport import dispatch

    server._stop_event = stop = threading.Event()
    server.protocol.set_writer(StdoutWriter(out))
    reading = ThreadPoolExecutor(max_workers=1, thread_name_prefix="deckward-stdin")

    async def loop() -> None:
        if first is not None:
            if answered is not None:
                _replay_initialize(server, first, *answered)
            else:
                dispatch(server.protocol, first)
        running = asyncio.get_running_loop()
        while not stop.is_set():
            body = await running.run_in_executor(reading, reader.read)
            if body is None:
                break
            dispatch(server.protocol, body)

    try:
        asyncio.run(loop())
    except BrokenPipeError:
        logging.getLogger(__name__).error("the client closed the connection")
    except (KeyboardInterrupt, SystemExit):
        pass
    finally:
        reading.shutdown(wait=False, cancel_futures=True)
        server.shutdown()


def _replay_initialize(server: DeckServer, body: bytes, msg_id, sent: dict) -> None:
    """Let pygls handle an ``initialize`` that was answered already."""
    import json

    protocol = server.protocol
    message = json.loads(body, object_hook=protocol.structure_message)

    def compare(future) -> None:
        try:
            own = protocol._converter.unstructure(future.result())
        except Exception as e:  # pygls would have answered with an error
            logging.getLogger(__name__).error("initialize failed after it was answered: %s", e)
            return
        if own != sent:
            logging.getLogger(__name__).warning(
                "the early initialize answer differs from pygls' (regenerate server/lsp/capabilities.json): %s",
                json.dumps(own, sort_keys=True))

    protocol._execute_handler(msg_id, protocol._get_handler(t.INITIALIZE), args=(message.params,), callback=compare)
