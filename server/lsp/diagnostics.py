"""Findings as LSP diagnostics: pushed (debounced, versioned) and pulled.

Pushing: a change waits ``DEBOUNCE_S`` after the last keystroke, then checks
the buffer on the worker thread; a result is published only if the buffer
still has the version that was checked, so stale findings never reach the
editor and fast typing never queues work.  Opening and saving check at once.
Pulling (``textDocument/diagnostic``) answers from the same analysis, with a
result id made of the document's version and the server's change counter.
The scheduling and publishing itself is the core's ``Publisher``.

A broken ``deckward.yaml`` is never silent: its problems are published as
diagnostics on the file itself (pushed, or pulled when it is open) and,
each time they change, shown once with ``window/showMessage``.
"""
from __future__ import annotations

from lsprotocol import types as t

from .core import DEBOUNCE_S, SOURCE, DeckServer, config_diagnostics, diagnostics_of, result_id
from .workspace import uri_to_path


def did_open(ls: DeckServer, params: t.DidOpenTextDocumentParams):
    ls.store.open_buffer(params.text_document.uri)
    ls.changed()
    ls.publisher.schedule(params.text_document.uri, 0.0, dependents=True)


def did_change(ls: DeckServer, params: t.DidChangeTextDocumentParams):
    ls.changed()  # the buffer itself is pygls' document: nothing to copy
    ls.publisher.schedule(params.text_document.uri, DEBOUNCE_S, dependents=True)


def did_save(ls: DeckServer, params: t.DidSaveTextDocumentParams):
    uri = params.text_document.uri
    if ls.store.is_config(uri):
        ls.config_changed()
        return
    ls.changed()
    ls.publisher.schedule(uri, 0.0, dependents=True)


def did_close(ls: DeckServer, params: t.DidCloseTextDocumentParams):
    uri = params.text_document.uri
    ls.store.drop_buffer(uri)
    ls.changed()
    ls.publisher.clear(uri)
    # Decks that used the closed buffer now read the file from disk.
    for other in ls.store.dependents(uri_to_path(uri)):
        if ls.is_open(other):
            ls.publisher.schedule(other, 0.0)


async def pull(ls: DeckServer, params: t.DocumentDiagnosticParams):
    uri = params.text_document.uri
    if ls.store.is_config(uri):
        items = config_diagnostics(ls.store.config_for(uri_to_path(uri)), ls.store.encoding)
        return t.FullDocumentDiagnosticReport(items=items, result_id=f"config.{ls.generation}")
    analysis = await ls.analysis(uri)
    if analysis is None:
        return t.FullDocumentDiagnosticReport(items=[], result_id=f"closed.{ls.generation}")
    rid = result_id(analysis)
    if params.previous_result_id == rid:
        return t.UnchangedDocumentDiagnosticReport(result_id=rid)
    return t.FullDocumentDiagnosticReport(items=diagnostics_of(analysis, ls), result_id=rid)


FEATURES = [
    (t.TEXT_DOCUMENT_DID_OPEN, None, did_open),
    (t.TEXT_DOCUMENT_DID_CHANGE, None, did_change),
    (t.TEXT_DOCUMENT_DID_SAVE, t.SaveOptions(include_text=False), did_save),
    (t.TEXT_DOCUMENT_DID_CLOSE, None, did_close),
    (t.TEXT_DOCUMENT_DIAGNOSTIC,
     t.DiagnosticOptions(identifier=SOURCE, inter_file_dependencies=True, workspace_diagnostics=False), pull),
]
