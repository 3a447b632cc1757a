"""Building text edits for fixes, so that comments and layout survive.

Edits replace the smallest span that expresses the change (one token, one
operand) and insert whole lines with the indentation and line ending of
their neighbours.
"""
from __future__ import annotations

from deckward.grammar.findings import Applicability, Fix, Span, TextEdit
from deckward.grammar.text_index import LineIndex


def replace(span: Span, new_text: str) -> TextEdit:
    return TextEdit(span, new_text)


def fix(title: str, *edits: TextEdit, risky: bool = False) -> Fix:
    return Fix(title, tuple(edits), Applicability.RISKY if risky else Applicability.SAFE)


def line_ending(text: str) -> str:
    """The file's line ending: CRLF if its first line ends so, else LF."""
    i = text.find("\n")
    return "\r\n" if i > 0 and text[i - 1] == "\r" else "\n"


def indentation_of_line(index: LineIndex, line: int) -> str:
    start = index.line_start(line)
    end = index.line_end(line)
    text = index.text[start:end]
    return text[: len(text) - len(text.lstrip(" \t"))]


def insert_lines_after(index: LineIndex, span: Span, block: str) -> TextEdit:
    """Insert ``block`` (lines separated by \\n, no trailing newline) on new
    lines after the line where ``span`` ends, in the file's line ending."""
    nl = line_ending(index.text)
    end = index.line_end(span.end_line)
    body = nl.join(block.split("\n"))
    return TextEdit(index.span(end, end), nl + body)


class OverlappingEdits(ValueError):
    """Two edits of one fix touch the same text."""


def apply_edits(text: str, edits) -> str:
    """Apply non-overlapping edits (offsets into ``text``) in one pass."""
    ordered = sorted(edits, key=lambda e: (e.span.start, e.span.end))
    out = []
    pos = 0
    for e in ordered:
        if e.span.start < pos:
            raise OverlappingEdits(f"edits overlap at offset {e.span.start}")
        out.append(text[pos : e.span.start])
        out.append(e.new_text)
        pos = e.span.end
    out.append(text[pos:])
    return "".join(out)
