"""Offsets <-> LSP positions in the client's encoding, at the edge.

Everything inside deckward counts code points (``Span`` offsets and
columns).  The protocol counts UTF-16 code units by default, UTF-8 bytes or
code points when the client and server agreed on it at initialisation.  The
conversion happens here and nowhere else, on lines split at ``\\n`` exactly as
``LineIndex`` splits them, so a diagnostic after a comment with ``é`` or an
emoji lands on the right character in every editor.
"""
from __future__ import annotations

from lsprotocol import types as t

from deckward.grammar.text_index import LineIndex

UTF8, UTF16, UTF32 = "utf-8", "utf-16", "utf-32"


def units(text: str, encoding: str) -> int:
    """Length of ``text`` in the encoding's code units."""
    if encoding == UTF32:
        return len(text)
    if encoding == UTF8:
        return len(text.encode("utf-8", "surrogatepass"))
    if text.isascii():
        return len(text)
    return len(text) + sum(1 for ch in text if ord(ch) > 0xFFFF)


class PositionMap:
    """Converts between offsets of one text and protocol positions."""

    def __init__(self, text: str, encoding: str = UTF16, index: LineIndex | None = None) -> None:
        self.text = text
        self.encoding = encoding
        self.index = index if index is not None and index.text is text else LineIndex(text)

    def position(self, offset: int) -> t.Position:
        line, column = self.index.position(offset)
        start = self.index.line_start(line)
        return t.Position(line=line - 1, character=units(self.text[start : start + column - 1], self.encoding))

    def range(self, start: int, end: int) -> t.Range:
        return t.Range(start=self.position(start), end=self.position(end))

    def offset(self, position: t.Position) -> int:
        """Offset of a client position (clamped to the text)."""
        if position.line < 0:
            return 0
        if position.line >= self.index.line_count:
            return len(self.text)
        start = self.index.line_start(position.line + 1)
        end = self.index.line_end(position.line + 1)
        line = self.text[start:end]
        if self.encoding == UTF32 or line.isascii():
            return start + min(max(position.character, 0), len(line))
        count = 0
        for i, ch in enumerate(line):
            if count >= position.character:
                return start + i
            count += units(ch, self.encoding)
        return end


def encoding_of(kind) -> str:
    """The encoding name for a negotiated ``PositionEncodingKind``."""
    value = getattr(kind, "value", kind) or UTF16
    return {"utf-8": UTF8, "utf-32": UTF32}.get(str(value), UTF16)
