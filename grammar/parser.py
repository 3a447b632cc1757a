"""Parse deck text into Lark trees, one statement at a time, with recovery.

``parse_text`` never raises: every problem becomes a ``syntax-error``
finding with a located message saying what was expected and what was found.
The parser is ``deck_parser.py``, Lark's stand-alone LALR parser generated
from ``deck.lark`` (``python -m deckward.grammar.make_parser``): starting the
command line or the editor neither imports Lark nor rebuilds or loads tables.
"""
from __future__ import annotations

import os
from collections import OrderedDict
from typing import Optional

from .findings import Finding, Severity
from .records import record
from .scanner import STATEMENT_KEYWORDS, Chunk, content_end, scan
from .text_index import LineIndex

MAX_SYNTAX_FINDINGS = 50
MAX_SKIPS_PER_STATEMENT = 25

_parser = None


def grammar_text() -> str:
    """The grammar file beside this module (read directly: importlib.resources
    costs more to import than the read itself)."""
    with open(os.path.join(os.path.dirname(os.path.abspath(__file__)), "deck.lark"), encoding="utf-8") as f:
        return f.read()


def _cache_dir() -> str:
    base = os.environ.get("DECKWARD_CACHE_DIR") or os.environ.get("XDG_CACHE_HOME") or os.path.join(
        os.path.expanduser("~"), ".cache"
    )
    if not os.environ.get("DECKWARD_CACHE_DIR"):
        base = os.path.join(base, "deckward")
    return base


def _lark():
    """The module that holds the parser and its token and error classes."""
    from . import deck_parser

    return deck_parser


def get_parser():
    """The shared LALR parser of deck.lark, built once per process."""
    global _parser
    if _parser is None:
        _parser = _lark().Lark_StandAlone()
    return _parser


# Human names of terminals, for "expected ..." messages.
_TERMINAL_NAMES = {
    "NAME": "a name",
    "STRING": "a quoted string",
    "VALUE_NUMBER": "a number",
    "WORD": "a value",
    "COORD": "a coordinate",
    "NUMBER": "a number",
    "ORBITAL_REF": "an orbital (homo, lumo, homo-N, lumo+N)",
    "UNIT": "a unit",
    "LBRACE": "`{`",
    "RBRACE": "`}`",
    "LPAR": "`(`",
    "RPAR": "`)`",
    "EQUAL": "`=`",
    "COMMA": "`,`",
    "COLON": "`:`",
    "PLUS": "`+`",
    "MINUS": "`-`",
    "STAR": "`*`",
    "SLASH": "`/`",
    "GHOST": "`ghost`",
    "OPTIMIZE": "`optimize(`",
    "$END": "the end of the file",
}
for _kw in STATEMENT_KEYWORDS | {"add", "as", "in", "energy", "orbital"}:
    _TERMINAL_NAMES[_kw.upper()] = f"`{_kw}`"

_STATEMENT_START = {k.upper() for k in STATEMENT_KEYWORDS}


def describe_expected(expected) -> str:
    names = set(expected)
    parts = []
    if _STATEMENT_START <= names:
        parts.append("a statement (use, study, geometry, basis_set, level, state, derive)")
        names -= _STATEMENT_START
    # Value alternatives read better as one phrase.
    if {"VALUE_NUMBER", "WORD", "STRING"} <= names:
        parts.append("a value")
        names -= {"VALUE_NUMBER", "WORD", "STRING", "LBRACE", "OPTIMIZE"}
    for n in sorted(names, key=lambda s: (_TERMINAL_NAMES.get(s, s).startswith("`"), _TERMINAL_NAMES.get(s, s))):
        if n == "$END" and parts:
            continue
        parts.append(_TERMINAL_NAMES.get(n, f"`{n.lower()}`"))
    if not parts:
        return "nothing more"
    if len(parts) == 1:
        return parts[0]
    return ", ".join(parts[:-1]) + " or " + parts[-1]


def _describe_token(token) -> str:
    if token.type == "$END":
        return "the end of the statement"
    value = str(token)
    if len(value) > 30:
        value = value[:27] + "..."
    return f"`{value}`"


@record
class ParsedStatement:
    """The tree of one statement and the chunk of text it came from."""

    tree: object  # lark.Tree of one statement
    chunk: Chunk


@record
class ParseOutput:
    """What ``parse_text`` gives: statements, syntax errors, comments, broken chunks."""

    statements: list[ParsedStatement]
    findings: list[Finding]
    comments: list[tuple[int, int, bool]]
    broken: list[Chunk]  # chunks that did not parse (their names are known)


def parse_text(text: str, index: LineIndex) -> ParseOutput:
    """Parse a whole deck; never raises."""
    parser = get_parser()
    scanned = scan(text)
    findings: list[Finding] = []
    statements: list[ParsedStatement] = []
    broken: list[Chunk] = []

    def report(start: int, end: int, message: str) -> None:
        if len(findings) < MAX_SYNTAX_FINDINGS:
            findings.append(Finding("syntax-error", Severity.ERROR, message, index.span(start, end)))
        elif len(findings) == MAX_SYNTAX_FINDINGS:
            findings.append(Finding("syntax-error", Severity.ERROR,
                                    f"more than {MAX_SYNTAX_FINDINGS} syntax errors: the rest of the file is not "
                                    "reported", index.span(start, end)))

    for block, where, next_keyword in scanned.unclosed:
        line, _ = index.position(block.brace_start)
        what = f"the {block.keyword} block" if block.keyword else "the block"
        if next_keyword:
            nline, _ = index.position(where)
            msg = f"{what} opened on line {line} is not closed: expected `}}` before `{next_keyword}` on line {nline}"
        else:
            msg = f"{what} opened on line {line} is not closed: expected `}}` before the end of the file"
        report(block.brace_start, block.brace_start + 1, msg)
    for offset in scanned.stray_closers:
        report(offset, offset + 1, "unexpected `}`: no block is open here")

    for chunk in scanned.chunks:
        if len(findings) > MAX_SYNTAX_FINDINGS:
            break
        body = text[chunk.start : chunk.end]
        if not body.strip():
            continue
        if chunk.stray_closers:
            chars = list(body)
            for off in chunk.stray_closers:
                chars[off - chunk.start] = " "
            body = "".join(chars)
        if chunk.unclosed:
            body = body + "\n" + "}" * len(chunk.unclosed)
        chunk_len = chunk.end - chunk.start
        tree, located = _parse_chunk(parser, body, chunk_len)
        seen_lines: set[int] = set()
        for start, end, message in located:
            line = index.position(chunk.start + start)[0]
            if line in seen_lines:
                continue
            seen_lines.add(line)
            report(chunk.start + start, chunk.start + end, message)
        errors = located
        if tree is None or (errors and not tree.children):
            broken.append(chunk)
            continue
        if errors:
            broken.append(chunk)
        for child in tree.children:
            statements.append(ParsedStatement(child, chunk))
    return ParseOutput(statements, findings, scanned.comments, broken)


_CHUNK_CACHE: "OrderedDict[tuple[str, int], tuple]" = OrderedDict()
_CHUNK_CACHE_SIZE = 20000


def clear_parse_cache() -> None:
    """Forget remembered statement parses (benchmarks measure cold parses)."""
    _CHUNK_CACHE.clear()


def _parse_chunk(parser, body: str, chunk_len: int):
    """(tree or None, [(start, end, message)]) for one statement's text.

    Remembered by text: in the editor, typing in one statement re-parses
    that statement only (positions in the tree are relative to the chunk,
    so a cached tree is valid wherever the statement moves)."""
    lark = _lark()

    key = (body, chunk_len)
    hit = _CHUNK_CACHE.get(key)
    if hit is not None:
        _CHUNK_CACHE.move_to_end(key)
        return hit
    errors: list = []

    def on_error(e):
        errors.append(e)
        if len(errors) > MAX_SKIPS_PER_STATEMENT:
            return False
        _drop_unfinished_setting(e, body)
        return True

    try:
        tree = parser.parse(body, on_error=on_error)
    except lark.UnexpectedInput as e:
        if not errors or errors[-1] is not e:
            errors.append(e)
        tree = None
    except Exception as e:  # a defect in the grammar machinery: still never a traceback
        errors.append(e)
        tree = None
    result = (tree, [_error_location(e, body, chunk_len) for e in errors])
    if len(body) > 100_000:  # not worth remembering
        return result
    _CHUNK_CACHE[key] = result
    if len(_CHUNK_CACHE) > _CHUNK_CACHE_SIZE:
        _CHUNK_CACHE.popitem(last=False)
    return result


def _drop_unfinished_setting(e, body: str) -> None:
    """Recover from a setting typed without its value.

    ``state cation { geometry  level = x }``, ``{ geometry =  level = x }``
    (or either just before ``}``): Lark would skip the token it stumbled on
    and read ``geometry = x`` or ``geometry = level``, so the settings after
    the half-typed one change meaning (a level taken for a geometry, a key
    set twice).  Instead forget the unfinished setting and give the parser
    the tokens after it, as if it had not been typed yet; the finding then
    names it (``e.unfinished``: start, end, message).  A lone key counts as
    unfinished when what follows closes the block, starts a later line or is
    itself a key (``x =``); ``method hf`` alone is a missing ``=``, reported
    at ``hf``."""
    lark = _lark()

    ip = getattr(e, "interactive_parser", None)
    if not isinstance(e, lark.UnexpectedToken) or ip is None or e.token.start_pos is None:
        return
    state = ip.parser_state
    values, token = state.value_stack, e.token

    def top(n):  # the types of the last n values, when they are all tokens
        last = values[-n:] if len(values) >= n else []
        return [v.type for v in last] if last and all(isinstance(v, lark.Token) for v in last) else []

    follows_key = token.type == "RBRACE" or body[token.end_pos :].lstrip().startswith("=")
    if top(1) == ["NAME"] and "EQUAL" in e.expected and (follows_key or token.line > values[-1].line):
        drop, refeed, typed_end = 1, [token], values[-1]       # `key` then `}` / `next = ...`
        message = f"expected `=` and a value after `{values[-1]}`"
    elif top(2) == ["NAME", "EQUAL"] and token.type == "RBRACE":
        drop, refeed, typed_end = 2, [token], values[-1]       # `key =` then `}`
        message = f"expected a value after `{values[-2]} =`"
    elif top(3)[:2] == ["NAME", "EQUAL"] and token.type == "EQUAL" and _is_name(str(values[-1])):
        drop, refeed, typed_end = 3, [values[-1], token], values[-2]   # `key =` then `next = ...`
        message = f"expected a value after `{values[-3]} =`"
    else:
        return
    key = values[-drop]
    item_start = state.parse_conf.parse_table.states[state.state_stack[-drop - 1]]
    if "RBRACE" not in item_start:  # not where an item of a block starts
        return
    first = refeed[0]
    if first.type not in item_start:
        if "NAME" not in item_start or not _is_name(str(first)):
            return
        refeed[0] = lark.Token.new_borrow_pos("NAME", str(first), first)
    saved = (list(state.state_stack), list(values))
    del state.state_stack[-drop:]
    del values[-drop:]
    try:
        for t in refeed:
            ip.feed_token(t)
    except lark.UnexpectedInput:
        state.state_stack[:], values[:] = saved
        return
    e.unfinished = (key.start_pos, typed_end.end_pos, message)


def _is_name(text: str) -> bool:
    """Whether ``text`` could be a NAME of deck.lark (an ASCII identifier)."""
    return text.isascii() and text.isidentifier()


def _error_location(e, body: str, chunk_len: int) -> tuple[int, int, str]:
    lark = _lark()

    unfinished = getattr(e, "unfinished", None)
    if unfinished is not None and unfinished[0] < chunk_len:
        return unfinished[0], min(unfinished[1], chunk_len), unfinished[2]

    if isinstance(e, lark.UnexpectedToken):
        tok = e.token
        if tok.type == "$END" or tok.start_pos is None:
            pos = content_end(body[:chunk_len])
            return (max(0, pos - 1), pos, f"unexpected end of the statement: expected {describe_expected(e.expected)}")
        start = min(tok.start_pos, chunk_len)
        end = min(tok.end_pos or start, chunk_len)
        if tok.type == "RBRACE" and start >= chunk_len:  # a virtual closing brace
            pos = content_end(body[:chunk_len])
            return (max(0, pos - 1), pos, f"unexpected end of the block: expected {describe_expected(e.expected)}")
        return start, end, f"expected {describe_expected(e.expected)} but found {_describe_token(tok)}"
    if isinstance(e, lark.UnexpectedCharacters):
        pos = min(e.pos_in_stream, chunk_len)
        ch = body[pos : pos + 1] if pos < len(body) else ""
        if ch == '"':
            return pos, pos + 1, "unterminated string: a `\"` opened here is not closed on its line"
        allowed = getattr(e, "allowed", None) or set()
        shown = repr(ch)[1:-1] if ch and not ch.isprintable() else ch
        if allowed:
            return pos, pos + 1, f"unexpected character `{shown}`: expected {describe_expected(allowed)}"
        return pos, pos + 1, f"unexpected character `{shown}`"
    if isinstance(e, lark.UnexpectedEOF):
        pos = content_end(body[:chunk_len])
        return (max(0, pos - 1), pos, f"unexpected end of the statement: expected {describe_expected(e.expected)}")
    return 0, 0, f"the statement could not be parsed ({type(e).__name__})"
