"""The language server's core: shared state and the helpers every feature uses.

Feature modules (diagnostics, actions, hover, completion, navigation,
formatting, probes) import this module and never each other.  Each one
lists module-level handlers in ``FEATURES`` (and ``COMMANDS``,
``SOURCE_ACTIONS``), bound to the server when it is built
(``server.build_server``).  The core holds:

- ``DeckServer``: the open buffers (held once, by pygls: the checker's
  overlay reads them from there), analyses, the change counter, probe
  results, the source actions features contribute, and one executor for
  all blocking work (checks, fix-all, references, probes);
- ``Publisher``: debounced, versioned diagnostics, and the report of a
  broken ``deckward.yaml``;
- helpers: findings as diagnostics, rule links, ``minimal_edit``, the name
  under the cursor, result ids made of document versions.
"""
from __future__ import annotations

import asyncio
import logging
from concurrent.futures import ThreadPoolExecutor
from typing import Callable, Optional

from lsprotocol import types as t
from pygls.lsp.server import LanguageServer
from pygls.protocol import LanguageServerProtocol

from deckward import __version__
from deckward.grammar import model as m
from deckward.grammar.findings import Finding, Severity
from deckward.grammar.resolve import Definition, Workspace
from deckward.server.rule_docs import rule_url  # the one place that knows where the rule docs are

from .workspace import Analysis, DeckWorkspace, path_to_uri, uri_to_path

NAME = "deckward"
SOURCE = "deckward"
DEBOUNCE_S = 0.15


class DeckProtocol(LanguageServerProtocol):
    """pygls' protocol, without its memory growth.

    pygls 2.1.1 keeps the future of every handler it runs under a fresh id
    in ``_request_futures`` and removes only those of requests it answers,
    so each notification (every keystroke's ``didChange``) stays in memory
    with its parameters.  A finished future is forgotten here.  (Worth
    reporting upstream: ``_execute_handler`` should pop it itself.)"""

    def _execute_handler(self, msg_id, handler, args=None, kwargs=None, callback=None):
        self._forget_finished()
        super()._execute_handler(msg_id, handler, args=args, kwargs=kwargs, callback=callback)
        future = self._request_futures.get(msg_id)
        if future is not None:
            # Only noted here: a future can finish while pygls iterates the dict (shutdown cancels the
            # pending ones), so entries are removed before the next handler runs, never during.
            future.add_done_callback(lambda done, msg_id=msg_id: self._finished.append((msg_id, done)))

    def _forget_finished(self) -> None:
        finished = getattr(self, "_finished", None)
        if finished is None:
            self._finished = []
            return
        while finished:
            msg_id, done = finished.pop()
            if self._request_futures.get(msg_id) is done:
                del self._request_futures[msg_id]


class DeckServer(LanguageServer):
    """A language server whose documents are decks."""

    def __init__(self) -> None:
        super().__init__(NAME, __version__, text_document_sync_kind=t.TextDocumentSyncKind.Incremental,
                         protocol_cls=DeckProtocol)
        self.store = DeckWorkspace(lambda: self.workspace.text_documents)
        self.publisher = Publisher(self)
        # The one pool for blocking work: checks (one at a time, ``store.lock``), fix-all,
        # references and the probes; two workers, so a probe never stops typing diagnostics.
        self.executor = ThreadPoolExecutor(max_workers=2, thread_name_prefix="deckward-work")
        self.push = True  # publish diagnostics (clients without pull support)
        self.pull_refresh = False
        self.generation = 0  # bumped whenever anything a check reads may have changed
        # uri -> (text, probe findings): results of the probe command for that exact text
        self.probe_results: dict[str, tuple[str, list]] = {}
        # (code action kind, uri -> CodeAction): source actions features contribute
        self.source_actions: list[tuple[str, Callable[[str], t.CodeAction]]] = []

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


_SEVERITY = {
    Severity.ERROR: t.DiagnosticSeverity.Error,
    Severity.WARNING: t.DiagnosticSeverity.Warning,
    Severity.INFO: t.DiagnosticSeverity.Information,
}
_UNNECESSARY = {"unused-suppression"}


def to_diagnostic(finding: Finding, analysis: Analysis) -> t.Diagnostic:
    pos = analysis.positions
    related = []
    for r in finding.related:
        where = analysis.positions_for(r.span.path)
        if where is None:
            continue
        related.append(t.DiagnosticRelatedInformation(
            location=t.Location(uri=path_to_uri(r.span.path), range=where.range(r.span.start, r.span.end)),
            message=r.message,
        ))
    return t.Diagnostic(
        range=pos.range(finding.span.start, finding.span.end),
        message=finding.message,
        severity=_SEVERITY[finding.severity],
        code=finding.rule,
        code_description=t.CodeDescription(href=rule_url(finding.rule)),
        source=SOURCE,
        related_information=related or None,
        tags=[t.DiagnosticTag.Unnecessary] if finding.rule in _UNNECESSARY else None,
        data={"rule": finding.rule, "start": finding.span.start, "end": finding.span.end},
    )


def probe_findings_for(server: DeckServer, analysis: Analysis) -> list[Finding]:
    """Probe findings computed for exactly this text of the document."""
    kept = server.probe_results.get(analysis.uri)
    if kept is None or kept[0] != analysis.text:
        return []
    return kept[1]


def diagnostics_of(analysis: Analysis, server: DeckServer) -> list[t.Diagnostic]:
    """The document's own findings, plus probe findings computed for this
    exact text by the probe command."""
    found = analysis.own_findings + probe_findings_for(server, analysis)
    return [to_diagnostic(f, analysis) for f in found]


def result_id(analysis: Analysis) -> str:
    """Changes whenever the diagnostics may: a new version of the document,
    or anything else a check reads (``DeckServer.generation``)."""
    return f"{analysis.version}.{analysis.generation}"


def config_diagnostics(config, encoding: str) -> list[t.Diagnostic]:
    """The problems of a configuration file as diagnostics on that file."""
    from .positions import PositionMap

    try:
        with open(config.path, "rb") as f:
            text = f.read().decode("utf-8", errors="replace")
    except OSError:
        text = ""
    pos = PositionMap(text, encoding)
    return [t.Diagnostic(range=pos.range(min(f.span.start, len(text)), min(f.span.end, len(text))),
                         message=f.message, severity=_SEVERITY[f.severity], code=f.rule, source=SOURCE)
            for f in config.findings]


class Publisher:
    """Schedules checks of open documents and publishes their results."""

    def __init__(self, server: DeckServer) -> None:
        self.server = server
        self.pending: dict[str, asyncio.Task] = {}
        self.config_states: dict[str, tuple] = {}  # config path -> its problems as last reported

    def report_config(self, config, force: bool = False) -> None:
        """Publish a configuration's problems on the file and tell the user
        once per change."""
        if not config.path:
            return
        state = tuple((f.span.start, f.span.end, f.message) for f in config.findings)
        if not force and self.config_states.get(config.path) == state:
            return
        changed = self.config_states.get(config.path) != state
        self.config_states[config.path] = state
        if self.server.push:
            self.server.text_document_publish_diagnostics(t.PublishDiagnosticsParams(
                uri=path_to_uri(config.path), diagnostics=config_diagnostics(config, self.server.store.encoding)))
        if config.findings and changed:
            first = config.findings[0]
            n = len(config.findings)
            self.server.window_show_message(t.ShowMessageParams(type=t.MessageType.Warning, message=(
                f"deckward: {config.path} has {n} problem{'s' * (n != 1)} and the settings it could not read "
                f"are not applied; line {first.span.line}: {first.message}")))

    def schedule(self, uri: str, delay: float = DEBOUNCE_S, dependents: bool = False) -> None:
        """Check ``uri`` after ``delay`` unless another change comes first."""
        old = self.pending.pop(uri, None)
        if old is not None and not old.done():
            old.cancel()
        self.pending[uri] = asyncio.get_running_loop().create_task(self._run(uri, delay, dependents))

    async def _run(self, uri: str, delay: float, dependents: bool) -> None:
        try:
            if delay:
                await asyncio.sleep(delay)
            if self.server.store.is_config(uri):
                self.report_config(self.server.store.config_for(uri_to_path(uri)), force=True)
                return
            analysis = await self.server.analysis(uri)
            if analysis is None:
                return
            if self.server.push and self.server.is_current(uri, analysis):
                self.server.text_document_publish_diagnostics(t.PublishDiagnosticsParams(
                    uri=uri, version=analysis.version, diagnostics=diagnostics_of(analysis, self.server)))
            self.report_config(analysis.config)
            if dependents:
                for other in self.server.store.dependents(analysis.path):
                    if other != uri and self.server.is_open(other):
                        self.schedule(other, 0.0)
                self.server.refresh_pull_diagnostics()
        except asyncio.CancelledError:
            raise
        except Exception as e:  # never let one document's check stop the server
            self.server.report_internal_error(uri, e)
        finally:
            if self.pending.get(uri) is asyncio.current_task():
                del self.pending[uri]

    def cancel(self, uri: str) -> None:
        task = self.pending.pop(uri, None)
        if task is not None:
            task.cancel()

    def clear(self, uri: str) -> None:
        """A closed document shows no diagnostics."""
        self.cancel(uri)
        if self.server.push:
            self.server.text_document_publish_diagnostics(t.PublishDiagnosticsParams(uri=uri, diagnostics=[]))


def minimal_edit(analysis: Analysis, new_text: str) -> t.TextEdit:
    """One edit turning the analysed text into ``new_text``, covering only
    the part that differs (the cursor and folds elsewhere stay put)."""
    old = analysis.text
    prefix = 0
    limit = min(len(old), len(new_text))
    while prefix < limit and old[prefix] == new_text[prefix]:
        prefix += 1
    suffix = 0
    while suffix < limit - prefix and old[len(old) - 1 - suffix] == new_text[len(new_text) - 1 - suffix]:
        suffix += 1
    return t.TextEdit(range=analysis.positions.range(prefix, len(old) - suffix),
                      new_text=new_text[prefix : len(new_text) - suffix])


def target_at(ws: Workspace, path: str, offset: int) -> Optional[tuple[m.Located, Optional[Definition]]]:
    """The name under ``offset`` in ``path``: (the name, what it refers to)."""
    for d in ws.definitions.values():
        if d.path == path and d.name.span.contains(offset):
            return d.name, d
    for r in ws.references:
        if r.name.span.path == path and r.name.span.contains(offset):
            return r.name, r.target
    return None
