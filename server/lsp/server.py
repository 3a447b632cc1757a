"""The deckward language server: one ``LanguageServer`` and its features.

Each feature lives in its own module with a ``register(server)`` function;
this module holds the shared state (open buffers, analyses, the worker
thread that runs checks) and starts the server on stdio or TCP.  Standard
output carries the protocol only: anything else a library might print is
sent to standard error.
"""
from __future__ import annotations

import asyncio
import logging
import sys
from concurrent.futures import ThreadPoolExecutor
from typing import Optional

from lsprotocol import types as t
from pygls.lsp.server import LanguageServer
from pygls.protocol import LanguageServerProtocol

from deckward import __version__

from .positions import encoding_of
from .workspace import Analysis, DeckWorkspace, uri_to_path

NAME = "deckward"


class DeckProtocol(LanguageServerProtocol):
    """pygls' protocol, without its memory growth.

    pygls 2.1.1 keeps the future of every handler it runs under a fresh id
    in ``_request_futures`` and removes only those of requests it answers,
    so each notification (every keystroke's ``didChange``) stays in memory
    with its parameters.  A finished future is forgotten here.  (Worth
    reporting upstream: ``_execute_handler`` should pop it itself.)"""

    def _execute_handler(self, msg_id, handler, args=None, kwargs=None, callback=None):
        super()._execute_handler(msg_id, handler, args=args, kwargs=kwargs, callback=callback)
        future = self._request_futures.get(msg_id)
        if future is not None:
            def forget(done, msg_id=msg_id):
                if self._request_futures.get(msg_id) is done:
                    del self._request_futures[msg_id]

            future.add_done_callback(forget)


class DeckServer(LanguageServer):
    """A language server whose documents are decks."""

    def __init__(self) -> None:
        super().__init__(NAME, __version__, text_document_sync_kind=t.TextDocumentSyncKind.Incremental,
                         protocol_cls=DeckProtocol)
        from .diagnostics import Publisher

        self.store = DeckWorkspace()
        self.publisher = Publisher(self)
        self.executor = ThreadPoolExecutor(max_workers=1, thread_name_prefix="deckward-check")
        self.push = True  # publish diagnostics (clients without pull support)
        self.pull_refresh = False
        self.generation = 0  # bumped whenever anything a check reads may have changed
        # uri -> (text, probe findings): results of the probe command for that exact text
        self.probe_results: dict[str, tuple[str, list]] = {}

    # -- document state ---------------------------------------------------
    def is_open(self, uri: str) -> bool:
        return uri in self.workspace.text_documents

    def is_current(self, uri: str, analysis: Analysis) -> bool:
        doc = self.workspace.text_documents.get(uri)
        return doc is not None and doc.version == analysis.version and doc.source == analysis.text

    async def analysis(self, uri: str) -> Optional[Analysis]:
        """The analysis of the open document ``uri`` at its current text
        (None when it is not open)."""
        doc = self.workspace.text_documents.get(uri)
        if doc is None or self.store.is_config(uri):
            return None
        cached = self.store.analyses.get(uri)
        if cached is not None and cached.generation == self.generation and self.is_current(uri, cached):
            return cached
        text, version, generation = doc.source, doc.version, self.generation
        loop = asyncio.get_running_loop()
        result = await loop.run_in_executor(self.executor, self.store.analyse, uri, text, version)
        result.generation = generation
        if self.is_open(uri) and self.is_current(uri, result):
            self.store.analyses[uri] = result
        return result

    def changed(self) -> None:
        self.generation += 1

    # -- workspace events -------------------------------------------------
    def config_changed(self) -> None:
        """deckward.yaml changed: re-read it and re-check every open deck."""
        self.store.forget_configs()
        self.changed()
        for uri in list(self.workspace.text_documents):
            self.publisher.schedule(uri, 0.0)  # a deck is re-checked, an open deckward.yaml re-reported
        self.refresh_pull_diagnostics()

    def refresh_pull_diagnostics(self) -> None:
        """Ask a pulling client to pull again (other files changed)."""
        if not self.push and self.pull_refresh:
            try:
                self.workspace_diagnostic_refresh(None)
            except Exception:  # a client that stopped listening
                pass

    def report_internal_error(self, uri: str, error: Exception) -> None:
        message = f"deckward could not check this document: {type(error).__name__}: {error}"
        logging.getLogger(__name__).error("%s (%s)", message, uri)
        self.window_log_message(t.LogMessageParams(type=t.MessageType.Error, message=f"{uri}: {message}"))
        if self.push and self.is_open(uri):
            self.text_document_publish_diagnostics(t.PublishDiagnosticsParams(uri=uri, diagnostics=[t.Diagnostic(
                range=t.Range(start=t.Position(line=0, character=0), end=t.Position(line=0, character=0)),
                message=message, severity=t.DiagnosticSeverity.Error, code="internal-error", source=NAME)]))


def _register_lifecycle(server: DeckServer) -> None:
    @server.feature(t.INITIALIZE)
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

    @server.feature(t.INITIALIZED)
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

    @server.feature(t.WORKSPACE_DID_CHANGE_WATCHED_FILES)
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


def build_server() -> DeckServer:
    """A server with every feature registered."""
    from . import actions, completion, diagnostics, formatting, hover, navigation, probes

    server = DeckServer()
    _register_lifecycle(server)
    for module in (diagnostics, actions, hover, completion, navigation, formatting, probes):
        module.register(server)
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
