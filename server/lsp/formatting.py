"""Formatting requests: the canonical layout of ``deckward.grammar.formatter``.

A document with syntax errors is left alone (no edits), as ``deckward
format`` refuses it, and the editor is told why (``window/showMessage``):
formatting that silently does nothing looks broken.  The edit covers only
the part of the text that changes.
"""
from __future__ import annotations

from lsprotocol import types as t

from deckward.grammar.formatter import format_text

from .core import DeckServer, minimal_edit


def refusal(analysis) -> str:
    """Why the document is not formatted, with the first syntax error."""
    errors = sorted((f for f in analysis.own_findings if f.rule == "syntax-error"), key=lambda f: f.span.start)
    if not errors:
        return "deckward: not formatted: the document does not parse"
    first = errors[0]
    count = f"{len(errors)} syntax error{'s' * (len(errors) != 1)}"
    return f"deckward: not formatted: {count}; line {first.span.line}: {first.message}"


async def formatting(ls: DeckServer, params: t.DocumentFormattingParams):
    analysis = await ls.analysis(params.text_document.uri)
    if analysis is None:
        return None
    formatted = format_text(analysis.text)
    if formatted is None:
        ls.window_show_message(t.ShowMessageParams(type=t.MessageType.Warning, message=refusal(analysis)))
        return []
    if formatted == analysis.text:
        return []
    return [minimal_edit(analysis, formatted)]


FEATURES = [(t.TEXT_DOCUMENT_FORMATTING, None, formatting)]
