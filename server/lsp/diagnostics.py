"""Findings as LSP diagnostics: pushed (debounced, versioned) and pulled.

Pushing: a change waits ``DEBOUNCE_S`` after the last keystroke, then checks
the buffer on the worker thread; a result is published only if the buffer
still has the version that was checked, so stale findings never reach the
editor and fast typing never queues work.  Opening and saving check at once.
Pulling (``textDocument/diagnostic``) answers from the same analysis, with a
result id that changes whenever the diagnostics do.

A broken ``deckward.yaml`` is never silent: its problems are published as
diagnostics on the file itself (pushed, or pulled when it is open) and,
each time they change, shown once with ``window/showMessage``.
"""
from __future__ import annotations

import asyncio
import hashlib
import json
from typing import TYPE_CHECKING

from lsprotocol import types as t

from deckward.grammar.findings import Finding, Severity
from deckward.server.rule_docs import rule_url  # the one place that knows where the rule docs are

from .workspace import path_to_uri, uri_to_path

if TYPE_CHECKING:
    from .server import DeckServer
    from .workspace import Analysis

SOURCE = "deckward"
DEBOUNCE_S = 0.15

_SEVERITY = {
    Severity.ERROR: t.DiagnosticSeverity.Error,
    Severity.WARNING: t.DiagnosticSeverity.Warning,
    Severity.INFO: t.DiagnosticSeverity.Information,
}
_UNNECESSARY = {"unused-suppression"}


def to_diagnostic(finding: Finding, analysis: "Analysis") -> t.Diagnostic:
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


def diagnostics_of(analysis: "Analysis", server: "DeckServer") -> list[t.Diagnostic]:
    """The document's own findings, plus probe findings computed for this
    exact text by the probe command."""
    from .probes import probe_findings_for

    found = analysis.own_findings + probe_findings_for(server, analysis)
    return [to_diagnostic(f, analysis) for f in found]


def result_id(diagnostics: list[t.Diagnostic], server: "DeckServer") -> str:
    payload = json.dumps(server.protocol._converter.unstructure(diagnostics), sort_keys=True)
    return hashlib.sha1(payload.encode()).hexdigest()[:16]


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

    def __init__(self, server: "DeckServer") -> None:
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


def register(server: "DeckServer") -> None:
    @server.feature(t.TEXT_DOCUMENT_DID_OPEN)
    def did_open(ls: "DeckServer", params: t.DidOpenTextDocumentParams):
        ls.store.set_buffer(params.text_document.uri, params.text_document.text)
        ls.changed()
        ls.publisher.schedule(params.text_document.uri, 0.0, dependents=True)

    @server.feature(t.TEXT_DOCUMENT_DID_CHANGE)
    def did_change(ls: "DeckServer", params: t.DidChangeTextDocumentParams):
        uri = params.text_document.uri
        ls.store.set_buffer(uri, ls.workspace.get_text_document(uri).source)
        ls.changed()
        ls.publisher.schedule(uri, DEBOUNCE_S, dependents=True)

    @server.feature(t.TEXT_DOCUMENT_DID_SAVE, t.SaveOptions(include_text=False))
    def did_save(ls: "DeckServer", params: t.DidSaveTextDocumentParams):
        uri = params.text_document.uri
        if ls.store.is_config(uri):
            ls.config_changed()
            return
        ls.changed()
        ls.publisher.schedule(uri, 0.0, dependents=True)

    @server.feature(t.TEXT_DOCUMENT_DID_CLOSE)
    def did_close(ls: "DeckServer", params: t.DidCloseTextDocumentParams):
        uri = params.text_document.uri
        ls.store.drop_buffer(uri)
        ls.changed()
        ls.publisher.clear(uri)
        # Decks that used the closed buffer now read the file from disk.
        for other in ls.store.dependents(uri_to_path(uri)):
            if ls.is_open(other):
                ls.publisher.schedule(other, 0.0)

    @server.feature(
        t.TEXT_DOCUMENT_DIAGNOSTIC,
        t.DiagnosticOptions(identifier=SOURCE, inter_file_dependencies=True, workspace_diagnostics=False),
    )
    async def pull(ls: "DeckServer", params: t.DocumentDiagnosticParams):
        uri = params.text_document.uri
        if ls.store.is_config(uri):
            items = config_diagnostics(ls.store.config_for(uri_to_path(uri)), ls.store.encoding)
            return t.FullDocumentDiagnosticReport(items=items, result_id=result_id(items, ls))
        analysis = await ls.analysis(uri)
        items = diagnostics_of(analysis, ls) if analysis is not None else []
        rid = result_id(items, ls)
        if params.previous_result_id == rid:
            return t.UnchangedDocumentDiagnosticReport(result_id=rid)
        return t.FullDocumentDiagnosticReport(items=items, result_id=rid)

