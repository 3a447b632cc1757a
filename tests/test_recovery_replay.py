"""Typing one statement never disturbs the others.

Every statement of every example deck (examples/*.deck and the examples of
the language specification) is typed again, cut at the end of each token
and in the middle of each longer word, twice: as the last statement of the
file (the file typed top to bottom) and in the middle of the file (with the
rest of the file after it).  Compared with the same file without that
statement:

- the syntax findings (``syntax-error``, ``unknown-key``, ``duplicate-key``,
  ``invalid-value``) outside the statement being typed are the same, at the
  same places;
- every other statement parses to the same tree, and is broken or not as
  before, so the rules see the same deck around the half-typed statement;
- the name findings outside it are the same, except those naming what the
  statement being typed defines (typing ``level cc_dz`` defines ``cc_dz``;
  a ``use`` brings in the used file's names).
"""
from __future__ import annotations

import glob
import os
import re
import shutil

import pytest

from deckward.grammar.parser import parse_text
from deckward.grammar.resolve import Loader, resolve
from deckward.grammar.scanner import scan
from deckward.grammar.text_index import LineIndex
from test_spec_examples import SPEC_DECKS

EXAMPLES = os.path.join(os.path.dirname(__file__), "..", "examples")
SYNTAX_RULES = ("syntax-error", "unknown-key", "duplicate-key", "invalid-value")
NAME_RULES = ("undefined-name", "duplicate-name")
# The tokens a user types: a word, a string, a number or symbol run, a brace.
_TOKEN = re.compile(r'"[^"\n]*"?|[A-Za-z_][A-Za-z0-9_]*|[{}()]|[^\s#"{}()A-Za-z_]+|#[^\n]*')


def _decks() -> dict[str, str]:
    decks = {}
    for path in sorted(glob.glob(os.path.join(EXAMPLES, "*.deck")) + glob.glob(os.path.join(EXAMPLES, "*", "*.deck"))):
        with open(path, encoding="utf-8") as f:
            decks[os.path.relpath(path, EXAMPLES)] = f.read()
    for name, text in SPEC_DECKS.items():
        decks["spec-" + re.sub(r"\W", "_", name) + ".deck"] = text
    return decks


DECKS = _decks()


def statements(text: str):
    """(start, end, cut offsets) of each statement: the end is where its
    last token (not a comment) ends; the cuts are where a user typing it
    pauses (after each token, in the middle of each word of 4 or more)."""
    out = []
    for chunk in scan(text).chunks:
        if chunk.keyword is None:
            continue
        tokens = [m for m in _TOKEN.finditer(text, chunk.start, chunk.end) if not m.group().startswith("#")]
        cuts = []
        for m in tokens:
            if m.group()[0].isalpha() and len(m.group()) >= 4:
                cuts.append(m.start() + len(m.group()) // 2)
            cuts.append(m.end())
        out.append((chunk.start, tokens[-1].end(), cuts))
    return out


class Replay:
    """The deck in a copy of the examples folder (so ``use`` files load),
    checked through an editor-style overlay."""

    def __init__(self, folder, name):
        self.folder, self.path = str(folder), os.path.join(str(folder), name)

    def view(self, text: str):
        """(syntax findings, name findings, statements) as comparable rows."""
        ws = resolve(self.path, Loader(overlay={self.path: text}), self.folder)
        own = [f for f in ws.findings if f.span.path == self.path]
        parsed = parse_text(text, LineIndex(text, self.path))
        broken = {c.start for c in parsed.broken}
        trees = [(_first_token(text, st.chunk), st.chunk.start in broken, st.tree) for st in parsed.statements]
        trees += [(_first_token(text, c), True, None) for c in parsed.broken
                  if not any(st.chunk is c for st in parsed.statements)]
        self.defined = set(ws.definitions)
        return ([(f.rule, f.message, f.span.start, f.span.end) for f in own if f.rule in SYNTAX_RULES],
                [(f.rule, f.message, f.span.start, f.span.end) for f in own if f.rule in NAME_RULES],
                trees)


def _first_token(text, chunk) -> int:
    """Where a statement's text starts (after the comments before it)."""
    for m in _TOKEN.finditer(text, chunk.start, chunk.end):
        if not m.group().startswith("#"):
            return m.start()
    return chunk.start


def _outside(rows, start, typed_len):
    """Rows not starting inside [start, start + typed_len), moved to where
    they are in the file without the typed text."""
    kept = []
    for row in rows:
        where = row[-2] if len(row) == 4 else row[0]
        if start <= where < start + typed_len:
            continue
        if where >= start + typed_len:
            shift = -typed_len
            row = (row[0], row[1], row[2] + shift, row[3] + shift) if len(row) == 4 else (row[0] + shift,) + row[1:]
        kept.append(row)
    return sorted(kept, key=repr)


def _unclosed_before_anything(row):
    """An unclosed block's finding names what follows it: the typed text."""
    return (row[0], row[1].split(" before ")[0]) + tuple(row[2:]) if "is not closed" in row[1] else row


def _without_suggestion(row):
    """A "did you mean" depends on which names exist, so on the typed one."""
    return (row[0], row[1].split("; did you mean")[0]) + tuple(row[2:])


def _drop(rows, region):
    """Rows not starting inside ``region`` (the statement being edited)."""
    if region is None:
        return list(rows)
    return [r for r in rows if not region[0] <= (r[-2] if len(r) == 4 else r[0]) < region[1]]


def _check(replay, before, typed, after, start, names, region=None):
    base_syntax, base_names, base_trees = replay.view(before + after)
    base_defined = replay.defined
    syntax, names_found, trees = replay.view(before + typed + after)
    # What the typed statement defines (or a `use` brings in) may be named
    # in findings elsewhere: that is the statement's meaning, not recovery.
    names = set(names) | (replay.defined ^ base_defined)
    problems = []
    got = sorted(map(_unclosed_before_anything, _drop(_outside(syntax, start, len(typed)), region)), key=repr)
    want = sorted(map(_unclosed_before_anything, _drop(base_syntax, region)), key=repr)
    if got != want:
        problems.append(("syntax", got, want))
    mentions = lambda row: any(f"`{n}`" in row[1] for n in names if n)  # noqa: E731
    got = [r for r in map(_without_suggestion, _drop(_outside(names_found, start, len(typed)), region))
           if not mentions(r)]
    want = [r for r in map(_without_suggestion, _drop(sorted(base_names, key=repr), region)) if not mentions(r)]
    if got != want:
        problems.append(("names", got, want))
    got = _drop(_outside(trees, start, len(typed)), region)
    want = _drop(sorted(base_trees, key=repr), region)
    if got != want:
        problems.append(("statements", [t[:2] for t in got], [t[:2] for t in want]))
    return problems


@pytest.fixture(scope="module")
def folder(tmp_path_factory):
    folder = tmp_path_factory.mktemp("replay")
    shutil.copytree(EXAMPLES, folder, dirs_exist_ok=True)
    return folder


@pytest.mark.parametrize("mode", ["top-down", "middle"])
@pytest.mark.parametrize("name", sorted(DECKS))
def test_typing_a_statement_leaves_the_others_alone(folder, name, mode):
    text = DECKS[name]
    replay = Replay(folder, name)
    failures = []
    checked = 0
    for start, end, cuts in statements(text):
        after = text[end:] if mode == "middle" else ""
        full_name = scan(text[start:end]).chunks[-1].name
        swallowed = bool(scan(text[:start]).unclosed)
        for cut in cuts:
            typed = text[start:cut]
            typed_name = scan(typed).chunks[-1].name
            if swallowed and not any(c.start == start for c in scan(text[:cut] + after).chunks):
                # After a block the deck never closes (no2_typos.deck), the
                # typed words belong to that block until a statement head
                # (`state anion {`) is complete.
                continue
            problems = _check(replay, text[:start], typed, after, start, {full_name, typed_name})
            checked += 1
            if problems:
                failures.append((typed[-50:], problems))
    assert checked > 0
    assert failures == []


def test_every_statement_of_the_examples_is_replayed():
    """The replay covers each statement kind the language has."""
    kinds = {chunk.keyword for text in DECKS.values() for chunk in scan(text).chunks if chunk.keyword}
    assert kinds == {"use", "study", "geometry", "basis_set", "level", "state", "derive"}


def block_items(text):
    """(statement start, statement end, item start, item end, cuts) for each
    item of each block (a setting, an atom line, an added shell)."""
    parsed = parse_text(text, LineIndex(text))
    out = []
    for st in parsed.statements:
        base = st.chunk.start
        stmt_start, stmt_end = base + st.tree.meta.start_pos, base + st.tree.meta.end_pos
        for item in st.tree.children:
            if getattr(item, "data", None) not in ("setting", "atom", "add_shell"):
                continue
            lo, hi = base + item.meta.start_pos, base + item.meta.end_pos
            cuts = []
            for m in _TOKEN.finditer(text, lo, hi):
                if m.group()[0].isalpha() and len(m.group()) >= 4:
                    cuts.append(m.start() + len(m.group()) // 2)
                cuts.append(m.end())
            out.append((stmt_start, stmt_end, lo, hi, cuts))
    return out


@pytest.mark.parametrize("name", sorted(DECKS))
def test_retyping_a_setting_leaves_the_other_statements_alone(folder, name):
    """An edit in the middle of a block (a setting, an atom, a shell typed
    again word by word, the rest of the block and file in place) changes
    findings only in the statement being edited."""
    text = DECKS[name]
    if scan(text).unclosed:  # no2_typos.deck: its open block takes everything after it
        pytest.skip("the deck leaves a block open on purpose")
    replay = Replay(folder, name)
    failures, checked = [], 0
    for stmt_start, stmt_end, lo, hi, cuts in block_items(text):
        region = (stmt_start, stmt_end - (hi - lo))
        for cut in cuts:
            typed = text[lo:cut]
            problems = _check(replay, text[:lo], typed, text[hi:], lo, set(), region)
            checked += 1
            if problems:
                failures.append((typed, problems))
    if not checked:
        pytest.skip("no block items")
    assert failures == []
