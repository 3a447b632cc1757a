"""grammar/deck_parser.py, Lark's stand-alone parser of deck.lark, is up to
date with the grammar and parses, fails and recovers exactly as Lark built
from deck.lark does (same trees, same syntax-error messages and spans)."""
import glob
import os
import types

import lark
import pytest

from deckward.grammar import deck_parser, make_parser, parser
from deckward.grammar.text_index import LineIndex

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DECKS = sorted(glob.glob(os.path.join(ROOT, "examples", "**", "*.deck"), recursive=True))


def test_the_parser_was_generated_from_the_current_grammar():
    # After editing deck.lark: python -m deckward.grammar.make_parser
    assert deck_parser.GRAMMAR_SHA256 == make_parser.current_digest(), \
        "grammar/deck_parser.py is out of date: run python -m deckward.grammar.make_parser"
    assert make_parser.main(["--check"]) == 0


def test_the_check_command_of_the_generator_reports_a_changed_grammar(tmp_path, monkeypatch):
    changed = tmp_path / "deck.lark"
    changed.write_text(parser.grammar_text() + "\n// one more line\n")
    monkeypatch.setattr(make_parser, "GRAMMAR", str(changed))
    assert make_parser.main(["--check"]) == 1


def _lark_built():
    """deck.lark through Lark itself, with the options the generator uses."""
    return types.SimpleNamespace(
        UnexpectedInput=lark.exceptions.UnexpectedInput, UnexpectedToken=lark.exceptions.UnexpectedToken,
        UnexpectedCharacters=lark.exceptions.UnexpectedCharacters, UnexpectedEOF=lark.exceptions.UnexpectedEOF,
        Token=lark.Token,
        Lark_StandAlone=lambda: lark.Lark(parser.grammar_text(), parser="lalr", lexer="contextual",
                                          propagate_positions=True, maybe_placeholders=False))


def _plain(node):
    if hasattr(node, "children"):
        return (node.data, node.meta.start_pos if not node.meta.empty else None, [_plain(c) for c in node.children])
    return (node.type, str(node), node.start_pos, node.end_pos, node.line, node.column)


def _corpus():
    texts = []
    for path in DECKS:
        with open(path, encoding="utf-8") as f:
            text = f.read()
        texts.append(text)
        texts.extend(text[:i] for i in range(1, len(text), 17))  # typing, cut anywhere
        texts.extend(text[:i] + text[i + 1:] for i in range(0, len(text), 23))  # one character missing
        texts.extend(text[:i] + "=" + text[i:] for i in range(5, len(text), 41))  # one character too many
    return texts


def _results(monkeypatch, module):
    monkeypatch.setattr(parser, "_lark", lambda: module)
    monkeypatch.setattr(parser, "_parser", None)
    parser.clear_parse_cache()
    out = []
    for text in _corpus():
        parsed = parser.parse_text(text, LineIndex(text, "x.deck"))
        out.append(([_plain(s.tree) for s in parsed.statements],
                    [(f.message, f.span.start, f.span.end) for f in parsed.findings]))
    parser.clear_parse_cache()
    return out


def test_the_generated_parser_answers_as_lark_built_from_the_grammar(monkeypatch):
    assert DECKS
    ours = _results(monkeypatch, deck_parser)
    with pytest.MonkeyPatch.context() as mp:
        theirs = _results(mp, _lark_built())
    assert len(ours) == len(theirs)
    assert any(findings for _, findings in ours)  # the corpus has mistakes in it
    for i, (a, b) in enumerate(zip(ours, theirs)):
        assert a == b, _corpus()[i]
