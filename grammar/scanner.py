"""A light pre-scan of deck text: statement boundaries, comments, braces.

The deck language is a sequence of independent statements, so the parser
works statement by statement: a mistake in one statement cannot hide the
next one, and a missing ``}`` is reported where its block was opened instead
of at the end of the file.  The scanner knows just enough of the lexical
rules (strings, comments, braces, parentheses, statement keywords) to find
where statements start.
"""
from __future__ import annotations

import re
from dataclasses import field

from .records import record

STATEMENT_KEYWORDS = frozenset({"use", "study", "geometry", "basis_set", "level", "state", "derive"})
# Tokens after which a keyword-looking word is a name, not a new statement.
_CONTINUATIONS = frozenset(STATEMENT_KEYWORDS | {"as", "in", "=", "(", ",", ":", "+", "-", "*", "/"})

# Words that continue a statement on a later line (`derive ea\n  as ...`).
_INFIXES = frozenset({"as", "in", "reference"})  # `reference`: a derive's measured value

_TOKEN = re.compile(
    r"""
    (?P<ws>[ \t\f\r\ufeff]+)
  | (?P<nl>\n)
  | (?P<comment>\#[^\n]*)
  | (?P<string>"(?:[^"\\\n]|\\.)*"?)
  | (?P<ident>[A-Za-z_][A-Za-z0-9_]*)
  | (?P<open>\{)
  | (?P<close>\})
  | (?P<popen>\()
  | (?P<pclose>\))
  | (?P<other>[^\sA-Za-z_{}()"\#]+|.)
    """,
    re.VERBOSE | re.DOTALL,
)


@record(frozen=True)
class OpenBlock:
    """A ``{`` still open while scanning."""

    keyword: str  # statement keyword that owns the block
    keyword_start: int
    brace_start: int


@record
class Chunk:
    """A stretch of text holding (at most) one statement."""

    start: int
    end: int
    keyword: str | None = None  # statement keyword, lower case
    name: str | None = None  # the statement's name, when it has one
    unclosed: list[OpenBlock] = field(default_factory=list)  # blocks to close virtually
    stray_closers: list[int] = field(default_factory=list)  # offsets of unmatched `}`


@record
class ScanResult:
    """Statement chunks, comments and unbalanced braces of one text."""

    chunks: list[Chunk]
    comments: list[tuple[int, int, bool]]  # (start, end, own_line)
    # (block, offset where the next statement started or len(text) at EOF)
    unclosed: list[tuple[OpenBlock, int, str | None]]
    stray_closers: list[int]


def scan(text: str) -> ScanResult:
    tokens: list[tuple[str, int, int]] = []
    comments: list[tuple[int, int, bool]] = []
    line_has_token = False
    for m in _TOKEN.finditer(text):
        kind = m.lastgroup
        if kind == "ws":
            continue
        if kind == "nl":
            line_has_token = False
            tokens.append(("nl", m.start(), m.end()))
            continue
        if kind == "comment":
            comments.append((m.start(), m.end(), not line_has_token))
            continue
        line_has_token = True
        tokens.append((kind, m.start(), m.end()))

    chunks: list[Chunk] = [Chunk(0, len(text))]
    unclosed_all: list[tuple[OpenBlock, int, str | None]] = []
    strays: list[int] = []
    blocks: list[OpenBlock] = []
    parens = 0
    prev = None  # previous significant token text (lower case)
    at_line_start = True
    current_keyword: tuple[str, int] | None = None
    n = len(tokens)
    for i, (kind, start, end) in enumerate(tokens):
        if kind == "nl":
            at_line_start = True
            continue
        value = text[start:end]
        low = value.lower()
        if kind == "ident" and low in STATEMENT_KEYWORDS and _starts_statement(
            tokens, i, n, text, low, at_line_start, bool(blocks) or parens > 0, prev in _CONTINUATIONS
        ):
            if blocks:
                for b in blocks:
                    unclosed_all.append((b, start, low))
                chunks[-1].unclosed.extend(blocks)
                blocks = []
            parens = 0
            chunks[-1].end = start
            nxt = _next_significant(tokens, i + 1, n)
            name = text[nxt[1] : nxt[2]] if nxt and nxt[0] == "ident" else None
            chunks.append(Chunk(start, len(text), low, name))
            current_keyword = (low, start)
        elif (kind == "ident" and at_line_start and not blocks and parens == 0
              and prev not in _CONTINUATIONS and low not in _INFIXES):
            # A word typed after a finished statement (`le` on its way to
            # `level`) is a statement of its own, not part of the one before.
            chunks[-1].end = start
            chunks.append(Chunk(start, len(text)))
            current_keyword = None
        if kind == "open":
            kw = current_keyword or ("", start)
            blocks.append(OpenBlock(kw[0], kw[1], start))
        elif kind == "close":
            if blocks:
                blocks.pop()
            else:
                strays.append(start)
                chunks[-1].stray_closers.append(start)
        elif kind == "popen":
            parens += 1
        elif kind == "pclose":
            parens = max(0, parens - 1)
        prev = low if kind in ("ident", "other", "popen", "pclose", "open", "close") else kind
        if kind == "other":
            prev = value
        at_line_start = False
    if blocks:
        for b in blocks:
            unclosed_all.append((b, len(text), None))
        chunks[-1].unclosed.extend(blocks)
    return ScanResult(chunks, comments, unclosed_all, strays)


def content_end(text: str) -> int:
    """Where the last token of ``text`` that is not a comment ends: the place
    to report "unexpected end" at, rather than after trailing comments and
    blank lines (which belong, in an editor, to whatever follows)."""
    end = 0
    for m in _TOKEN.finditer(text):
        if m.lastgroup not in ("ws", "nl", "comment"):
            end = m.end()
    return end


def _starts_statement(tokens, i, n, text, keyword, at_line_start, nested, after_continuation) -> bool:
    """Whether the statement keyword ``tokens[i]`` starts a new statement.

    Outside any block a keyword starts a statement unless it continues the
    one before (``energy(state)``, ``geometry level {``).  Inside an open
    block, or after a token that expects more, it is a key being typed
    (``state cation { geometry = cn  level``) unless a whole statement head
    follows on a fresh line, which no setting can look like: that is a
    missing ``}``, reported where its block was opened.  So a half-typed
    word never swallows the statements after it."""
    if at_line_start and _has_statement_head(tokens, i, n, text, keyword):
        return True
    return not nested and not after_continuation


def _has_statement_head(tokens, i, n, text, keyword) -> bool:
    """``KEYWORD name {``, ``derive name =``/``derive name as``, ``use "..."``,
    ``study "..."`` or ``study {`` starting at ``tokens[i]``."""
    j = _next_index(tokens, i + 1, n)
    if j is None:
        return False
    first = tokens[j][0]
    if keyword == "use":
        return first == "string"
    if keyword == "study":
        return first in ("string", "open")
    k = _next_index(tokens, j + 1, n) if first == "ident" else None
    if k is None:
        return False
    kind, start, end = tokens[k]
    if keyword == "derive":
        word = text[start:end]
        return (kind == "other" and word.startswith("=")) or (kind == "ident" and word.lower() == "as")
    return kind == "open"


def _next_index(tokens, i, n):
    while i < n:
        if tokens[i][0] != "nl":
            return i
        i += 1
    return None


def _next_significant(tokens, i, n):
    while i < n:
        if tokens[i][0] != "nl":
            return tokens[i]
        i += 1
    return None
