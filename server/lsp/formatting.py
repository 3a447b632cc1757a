"""Formatting requests: the canonical layout of ``deckward.grammar.formatter``.

A document with syntax errors is left alone (no edits), as ``deckward
format`` refuses it; the edit covers only the part of the text that changes.
"""
from __future__ import annotations

from typing import TYPE_CHECKING

from lsprotocol import types as t

from deckward.grammar.formatter import format_text

from .actions import minimal_edit

if TYPE_CHECKING:
    from .server import DeckServer


def register(server: "DeckServer") -> None:
    @server.feature(t.TEXT_DOCUMENT_FORMATTING)
    async def formatting(ls: "DeckServer", params: t.DocumentFormattingParams):
        analysis = await ls.analysis(params.text_document.uri)
        if analysis is None:
            return None
        formatted = format_text(analysis.text)
        if formatted is None or formatted == analysis.text:
            return []
        return [minimal_edit(analysis, formatted)]
