"""Completion: what may be written at the cursor.

The text before the cursor is usually unfinished, so the context is read
with a small tokenizer (comments and strings skipped, braces and
parentheses tracked) instead of the parser.  It answers: at the top level,
the statement keywords; inside a block, its keys; after ``key =``, the
values the key takes (enumerations, method names, basis names that cover
every element of the geometry in use, names of geometries and levels);
inside a map, element symbols and basis names; inside a derive, ``energy(``
and ``orbital(``, state names, orbitals and spins, quantities after ``as``
and units after ``in``.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Optional

from lsprotocol import types as t

from deckward.grammar import model as m
from deckward.grammar.build import KEYS
from deckward.grammar.resolve import Workspace
from deckward.grammar.scanner import STATEMENT_KEYWORDS

from .core import DeckServer
from .geometry_files import file_items

if TYPE_CHECKING:
    from .workspace import Analysis

_TOKEN = re.compile(
    r"""(?P<ws>\s+)|(?P<comment>\#[^\n]*)|(?P<string>"(?:[^"\\\n]|\\.)*"?)
      |(?P<optimize>optimize\s*\()|(?P<word>[A-Za-z0-9_.'][A-Za-z0-9_+\-*.']*)|(?P<punct>[{}()=,:/+\-*])
      |(?P<other>.)""",
    re.VERBOSE | re.IGNORECASE | re.DOTALL,
)
# A basis or method word (6-31+g*, ccsd(t), 6-31g(d,p)): commas only inside parentheses.
_WIDE_WORD = re.compile(r"(?:[A-Za-z0-9+\-*._')]+|\([A-Za-z0-9+\-*._',]*\)?)+")
_NAME_WORD = re.compile(r"[A-Za-z0-9_.'][A-Za-z0-9_+\-*.']*")
_STRING = re.compile(r'"(?:[^"\\\n]|\\.)*"?')
_CLOSED_STRING = re.compile(r'"(?:[^"\\\n]|\\.)*"')
# Keys whose value is a basis or method word.
WORD_KEYS = frozenset({"method", "basis", "from"})
# Typing one of these opens a place where a completion is useful (a value, an
# argument, a map entry); a space does not, or keywords pop up in comments.
TRIGGER_CHARACTERS = ["=", "(", ",", ":"]
STATEMENT_ORDER = ("study", "geometry", "basis_set", "level", "state", "derive", "use")
ENUMS = {
    "goal": m.GOALS,
    "kind": m.KINDS,
    "compare": m.COMPARES,
    "units": m.UNITS_LENGTH,
    "reference": m.REFERENCES,
    "frozen_core": ("true", "false"),
    "frequencies": ("true", "false"),
}
ORBITALS = ("homo", "lumo", "homo-1", "lumo+1")
SHELL_LETTERS = ("s", "p", "d", "f", "g", "h", "i")
# Tokens after which a statement keyword is a name, not a new statement.
_CONTINUATIONS = frozenset(STATEMENT_KEYWORDS | {"=", "(", ",", ":", "+", "-", "*", "/", "as", "in"})


@dataclass
class Block:
    kind: str  # statement keyword, or "map"
    key: Optional[str] = None  # for a map: the key it is the value of
    name: Optional[str] = None  # the statement's name
    keys: set = field(default_factory=set)  # keys already written


@dataclass
class Context:
    what: str  # statement | key | value | map_key | map_value | expression | state | orbital | spin | quantity | unit | shell | none
    block: Optional[Block] = None
    key: Optional[str] = None
    statement: Optional[str] = None  # the statement keyword around the cursor
    name: Optional[str] = None  # its name
    # The word being completed: offsets of its start and end in the text (the
    # end may lie after the cursor); ``quoted`` when it is a string started
    # with `"`.  A completion replaces all of it.
    start: int = 0
    end: int = 0
    quoted: bool = False
    typed: str = ""  # the part of the word before the cursor


def _is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


@dataclass
class _Token:
    text: str
    kind: str
    start: int
    end: int


def _tokens(before: str) -> list[_Token]:
    """The tokens of ``before`` (whitespace dropped).  After ``method =``,
    ``basis =``, ``from =`` and a map's ``:`` a whole basis or method word
    is one token, parentheses and commas included."""
    out: list[_Token] = []
    pos = 0
    while pos < len(before):
        wide = (out and (out[-1].text == ":" or (out[-1].text == "=" and len(out) > 1
                                                    and out[-2].text.lower() in WORD_KEYS)))
        if wide:
            mt = _WIDE_WORD.match(before, pos)
            if mt:
                out.append(_Token(mt.group(), "wide", pos, mt.end()))
                pos = mt.end()
                continue
        mt = _TOKEN.match(before, pos)
        if mt.lastgroup != "ws":
            out.append(_Token(mt.group(), mt.lastgroup, pos, mt.end()))
        pos = mt.end()
    return out


def _in_word_value(tokens: list[_Token]) -> bool:
    """The next token is a basis or method word."""
    return bool(tokens) and (tokens[-1].text == ":" or (
        tokens[-1].text == "=" and len(tokens) > 1 and tokens[-2].text.lower() in WORD_KEYS))


def context_at(text: str, offset: int) -> Context:
    """What the cursor at ``offset`` expects, and the word it is in."""
    before = text[:offset]
    tokens = _tokens(before)
    start, end, quoted = offset, offset, False
    last_tok = tokens[-1] if tokens else None
    if last_tok is not None and last_tok.end == offset:
        if last_tok.kind == "comment":
            return Context("none", start=offset, end=offset)
        if last_tok.kind == "string" and not _CLOSED_STRING.fullmatch(last_tok.text):
            if not _in_word_value(tokens[:-1]):
                return Context("none", start=offset, end=offset)  # a title, a path, a note
            start, quoted = last_tok.start, True
            end = _STRING.match(text, start).end()
            tokens = tokens[:-1]
        elif last_tok.kind in ("word", "wide"):
            start = last_tok.start
            pattern = _WIDE_WORD if last_tok.kind == "wide" else _NAME_WORD
            end = max(offset, pattern.match(text, start).end())
            tokens = tokens[:-1]
    if start == offset:  # the cursor may sit before a word: replace it too
        pattern = _WIDE_WORD if _in_word_value(tokens) else _NAME_WORD
        mt = pattern.match(text, offset)
        end = mt.end() if mt else offset
    ctx = _context(tokens, text[:start])
    ctx.start, ctx.end, ctx.quoted, ctx.typed = start, end, quoted, text[start:offset].lstrip('"')
    if quoted and not (ctx.what == "map_value" or (ctx.what == "value" and ctx.key in WORD_KEYS)):
        return Context("none", start=offset, end=offset)
    return ctx


def _line_is_blank_before(before: str) -> bool:
    return before[before.rfind("\n") + 1:].strip() == ""


def _context(toks: list[_Token], before: str) -> Context:
    tokens: list[str] = []
    stack: list[Block] = []
    statement: Optional[str] = None
    name: Optional[str] = None
    derive_eq = False
    for tk in toks:
        kind = tk.kind
        tok = tk.text
        low = tok.lower()
        prev = tokens[-1].lower() if tokens else None
        if kind == "word" and not stack and low in STATEMENT_KEYWORDS and prev not in _CONTINUATIONS:
            statement, name, derive_eq = low, None, False
            tokens.append(tok)
            continue
        if statement and name is None and kind == "word" and prev == statement:
            name = tok
        if tok == "{":
            if prev == "=" and stack:
                stack.append(Block("map", key=tokens[-2].lower() if len(tokens) > 1 else None))
            else:
                stack.append(Block(statement or "", name=name))
        elif tok == "}":
            if stack:
                stack.pop()
        elif tok == "=":
            if stack and len(tokens) and stack[-1].kind != "map":
                stack[-1].keys.add(tokens[-1].lower())
            if statement == "derive" and not stack:
                derive_eq = True
        elif stack and stack[-1].kind == "geometry" and kind == "word" and prev != "=" and _is_number(tok):
            stack[-1].keys.add("file")  # a geometry with atoms of its own takes no .xyz file
        tokens.append(tok)
    last = tokens[-1].lower() if tokens else None
    if stack:
        block = stack[-1]
        if block.kind == "map":
            if last == ":":
                return Context("map_value", block, block.key, statement, name)
            if last in ("{", ",") or (len(tokens) > 1 and tokens[-2] == ":"):
                return Context("map_key", block, block.key, statement, name)
            return Context("none", block, block.key, statement, name)
        if last == "=":
            return Context("value", block, tokens[-2].lower(), statement, name)
        if last == "optimize(" or (last and last.startswith("optimize")):
            return Context("value", block, "geometry", statement, name)
        if block.kind == "geometry" and not _line_is_blank_before(before):
            return Context("none", block, None, statement, name)  # an atom line: coordinates follow the symbol
        if block.kind == "basis_set":
            shell = _after_add(tokens)
            if shell is not None:
                return Context(shell, block, None, statement, name)
        return Context("key", block, None, statement, name)
    if statement == "derive":
        if not derive_eq:
            if last == "as":
                return Context("quantity", statement=statement, name=name)
            return Context("none", statement=statement, name=name)
        if last == "in":
            return Context("unit", statement=statement, name=name)
        if len(tokens) > 1 and tokens[-2].lower() == "in":  # the unit is written: the derive is complete
            return Context("statement")
        depth, commas = 0, 0
        for i in range(len(tokens) - 1, -1, -1):  # inside energy( / orbital( ?
            tk = tokens[i].lower()
            if tk == ")":
                depth += 1
            elif tk == "(":
                if depth == 0:
                    fn = tokens[i - 1].lower() if i > 0 else ""
                    if fn in ("energy", "orbital"):
                        if commas == 0:
                            return Context("state", statement=statement, name=name)
                        if fn == "orbital":
                            return Context("orbital" if commas == 1 else "spin", statement=statement, name=name)
                        return Context("none", statement=statement, name=name)
                    break
                depth -= 1
            elif tk == "," and depth == 0:
                commas += 1
        if last in ("=", "+", "-", "*", "/", "(") or last is None:
            return Context("expression", statement=statement, name=name)
        return Context("after_expression", statement=statement, name=name)
    if last is None or last in ("}",) or statement is None:
        return Context("statement")
    if statement == "use" and last and last.startswith('"'):
        return Context("statement")
    return Context("none", statement=statement, name=name)


def _after_add(tokens: list[str]) -> Optional[str]:
    """Inside ``add ELEMENT SHELL EXPONENT``: what comes next (None when the
    cursor is not inside one)."""
    for back in range(1, 4):
        if len(tokens) >= back and tokens[-back].lower() == "add":
            return ("map_key", "shell", "none")[back - 1]
    return None


# ------------------------------------------------------------------ items


def _item(label: str, kind: t.CompletionItemKind, detail: Optional[str] = None, insert: Optional[str] = None,
          sort: Optional[str] = None) -> t.CompletionItem:
    return t.CompletionItem(label=label, kind=kind, detail=detail, insert_text=insert, sort_text=sort)


def _names(ws: Workspace, kind: str) -> list[str]:
    return sorted(d.name.value for d in ws.definitions.values() if d.kind == kind)


def _elements_in_use(ws: Workspace, ctx: Context) -> set[str]:
    """Element symbols of the geometry the cursor's block computes with."""
    geometries: list[m.Geometry] = []
    if ctx.statement == "state" and ctx.name and ctx.name in ws.states and ws.states[ctx.name].geometry is not None:
        geometries = [ws.states[ctx.name].geometry]
    elif ctx.statement == "level" and ctx.name:
        geometries = [rs.geometry for rs in ws.states.values()
                      if rs.level is not None and rs.level.name.value == ctx.name and rs.geometry is not None]
    if not geometries:
        geometries = [d.node for d in ws.of_kind("geometry")]
    return {a.symbol.value[:1].upper() + a.symbol.value[1:].lower() for g in geometries for a in g.atoms}


def _basis_items(ws: Workspace, ctx: Context, only: Optional[str] = None) -> list[t.CompletionItem]:
    from deckward.rules.knowledge import basis_library

    symbols = {only} if only else _elements_in_use(ws, ctx)
    names = basis_library.covering(symbols) if symbols else basis_library.all_names()
    items = [_item(n, t.CompletionItemKind.Module, "basis_set of this deck", sort="0" + n)
             for n in _names(ws, "basis_set") if n != ctx.name]
    if "(" in ctx.typed:  # the polarisation written out: 6-31g(d,p) for 6-31g**
        names = list(names) + [n for n in basis_library.all_names() if "(" in n and n not in names and (
            (info := basis_library.lookup(n)) is not None and (not symbols or symbols <= info.elements))]
    for n in names:
        info = basis_library.lookup(n)
        detail = f"{info.zeta} zeta, {info.family}" if info is not None else None
        items.append(_item(n, t.CompletionItemKind.Value, detail, sort="1" + n))
    return items


def _method_items() -> list[t.CompletionItem]:
    from deckward.rules.knowledge import methods

    out = []
    for n in methods.all_names():
        info = methods.lookup(n)
        out.append(_item(n, t.CompletionItemKind.Value, f"family {info.family}" if info else None))
    return out


def items_for(ctx: Context, ws: Optional[Workspace]) -> list[t.CompletionItem]:
    K = t.CompletionItemKind
    what = ctx.what
    if what == "statement":
        return [_item(k, K.Keyword, "statement", sort=f"{i}") for i, k in enumerate(STATEMENT_ORDER)]
    if what == "key":
        keys = KEYS.get(ctx.block.kind, ())
        out = [_item(k, K.Property, f"key of {ctx.block.kind}", insert=f"{k} = ")
               for k in keys if k not in ctx.block.keys]
        if ctx.block.kind == "basis_set":
            out.append(_item("add", K.Keyword, "an extra primitive shell: add ELEMENT s|p|d EXPONENT"))
        return out
    if what == "value":
        key = ctx.key
        if key in ENUMS:
            return [_item(v, K.EnumMember, key) for v in ENUMS[key]]
        if ws is None:
            return []
        if key == "method":
            return _method_items()
        if key in ("basis", "from"):
            return _basis_items(ws, ctx)
        if key == "geometry":
            names = [_item(n, K.Reference, "geometry") for n in _names(ws, "geometry")]
            if ctx.block is not None and ctx.block.kind == "state":
                names += [_item(f"optimize({n})", K.Reference, "relax this geometry at the state's level")
                          for n in _names(ws, "geometry")]
            return names
        if key == "level":
            return [_item(n, K.Reference, "level") for n in _names(ws, "level")]
        if key == "file":
            return file_items(ws)
        return []
    if what == "map_key":
        syms = sorted(_elements_in_use(ws, ctx)) if ws is not None else []
        out = [_item(s, K.Constant, "element") for s in syms]
        if ctx.key is not None:
            out.insert(0, _item("default", K.Keyword, "every other element"))
        return out
    if what == "map_value":
        return _basis_items(ws, ctx) if ws is not None else []
    if what == "expression":
        return [_item("energy(", K.Function, "energy of a state", insert="energy("),
                _item("orbital(", K.Function, "orbital energy: orbital(STATE, homo|lumo[, alpha|beta])",
                      insert="orbital(")]
    if what == "after_expression":
        return [_item("in", K.Keyword, "unit of the result")]
    if what == "state":
        if ws is None:
            return []
        return [_item(n, K.Reference, "state") for n in _names(ws, "state")]
    if what == "shell":
        return [_item(letter, K.EnumMember, "shell angular momentum") for letter in SHELL_LETTERS]
    if what == "orbital":
        return [_item(o, K.EnumMember, "orbital") for o in ORBITALS]
    if what == "spin":
        return [_item(s, K.EnumMember, "spin") for s in m.SPINS]
    if what == "quantity":
        return [_item(q, K.EnumMember, "quantity") for q in m.QUANTITIES]
    if what == "unit":
        return [_item(u, K.Unit, "energy unit") for u in m.ENERGY_UNITS]
    return []


def with_edits(items: list[t.CompletionItem], ctx: Context, text: str, positions) -> list[t.CompletionItem]:
    """Give every item a text edit over the whole word being completed, so
    that a client never splits a basis word at `-` or `(`: the label (or its
    insert text), quoted where the deck language needs quotes, after a space
    when the cursor sits right after `=` or `:`."""
    from deckward.rules.catalogue.basis.unknown_basis import as_deck_word

    word_value = ctx.what == "map_value" or (ctx.what == "value" and ctx.key in WORD_KEYS)
    spaced = ctx.start > 0 and text[ctx.start - 1] in "=:"
    rng = positions.range(ctx.start, ctx.end)
    for item in items:
        new = item.insert_text or item.label
        if ctx.quoted:
            new = '"' + new.replace("\\", "\\\\").replace('"', '\\"') + '"'
        elif word_value:
            new = as_deck_word(new)
        if new != item.label and not item.filter_text:
            item.filter_text = ('"' + item.label) if ctx.quoted else item.label
        item.insert_text = None
        item.text_edit = t.TextEdit(range=rng, new_text=(" " if spaced else "") + new)
    return items


async def complete(ls: DeckServer, params: t.CompletionParams):
    analysis: Optional["Analysis"] = await ls.analysis(params.text_document.uri)
    if analysis is None:
        return None
    offset = analysis.positions.offset(params.position)
    ctx = context_at(analysis.text, offset)
    items = with_edits(items_for(ctx, analysis.workspace), ctx, analysis.text, analysis.positions)
    return t.CompletionList(is_incomplete=False, items=items)


FEATURES = [(t.TEXT_DOCUMENT_COMPLETION, t.CompletionOptions(trigger_characters=TRIGGER_CHARACTERS), complete)]
