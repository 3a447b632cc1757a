"""Offsets to 1-based lines and columns, computed once per text."""
from __future__ import annotations

import bisect

from .findings import Span


class LineIndex:
    """Maps character offsets of one text to (line, column), both 1-based.

    Lines end at ``\\n``; a ``\\r`` before it belongs to the line's end, so
    CRLF files get the same columns as LF files."""

    __slots__ = ("path", "text", "_starts")

    def __init__(self, text: str, path: str = "") -> None:
        self.path = path
        self.text = text
        starts = [0]
        find = text.find
        i = find("\n")
        while i != -1:
            starts.append(i + 1)
            i = find("\n", i + 1)
        self._starts = starts

    @property
    def line_count(self) -> int:
        return len(self._starts)

    def position(self, offset: int) -> tuple[int, int]:
        offset = max(0, min(offset, len(self.text)))
        line = bisect.bisect_right(self._starts, offset) - 1
        return line + 1, offset - self._starts[line] + 1

    def line_start(self, line: int) -> int:
        """Offset of the first character of 1-based ``line``."""
        line = max(1, min(line, len(self._starts)))
        return self._starts[line - 1]

    def line_end(self, line: int) -> int:
        """Offset just past the last character of ``line``, before its line
        ending."""
        line = max(1, min(line, len(self._starts)))
        if line < len(self._starts):
            end = self._starts[line] - 1
        else:
            end = len(self.text)
        if end > self._starts[line - 1] and self.text[end - 1 : end] == "\r":
            end -= 1
        return end

    def offset(self, line: int, column: int) -> int:
        """Offset of 1-based (line, column), clamped to the line."""
        start = self.line_start(line)
        return min(start + max(column, 1) - 1, self.line_end(line))

    def span(self, start: int, end: int) -> Span:
        """The span of [start, end), clamped to the text.  Building the model
        asks for one per token, so this avoids a second search when the end
        lies on the start's line (nearly always)."""
        n = len(self.text)
        if start < 0:
            start = 0
        elif start > n:
            start = n
        if end > n:
            end = n
        if end < start:
            end = start
        starts = self._starts
        line = bisect.bisect_right(starts, start) - 1
        first = starts[line]
        if line + 1 == len(starts) or end < starts[line + 1]:
            return Span(self.path, start, end, line + 1, start - first + 1, line + 1, end - first + 1)
        end_line = bisect.bisect_right(starts, end) - 1
        return Span(self.path, start, end, line + 1, start - first + 1, end_line + 1, end - starts[end_line] + 1)
