"""unknown-basis: a basis word that names no library set and no basis_set."""
from __future__ import annotations

from deckward.grammar import model as m
from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.knowledge import basis_library
from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace

INFO = RuleInfo(
    id="unknown-basis",
    severity=Severity.ERROR,
    category="basis",
    title="A basis set that is neither in the library nor defined in the deck",
    why=(
        "A basis word must name a set of PySCF's basis library or of the Basis Set Exchange (matched "
        "ignoring case, '-' and '_') or a `basis_set` of the deck. Anything else cannot be run, and a misspelt name is easily "
        "read as a different set (cc-pvtz for aug-cc-pvtz changes every anion result). The message "
        "names the closest library sets."
    ),
    references=(
        "B. P. Pritchard, D. Altarawy, B. Didier, T. D. Gibson, T. L. Windus, J. Chem. Inf. Model. "
        "59, 4814-4820 (2019): the Basis Set Exchange naming of basis sets",
        # from memory
        "Q. Sun et al., J. Chem. Phys. 153, 024109 (2020): the PySCF basis library the deck runs with",
    ),
    bad_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_tz { method = hf basis = cc-pvtzz }\n"
    ),
    fires_at="cc-pvtzz",
    good_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_tz { method = hf basis = cc-pvtz }\n"
    ),
    fix=Applicability.RISKY,
    fix_note=(
        "Replaces the word with the closest library name. Risky: the closest spelling is not always "
        "the set that was meant."
    ),
    fixed_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_tz { method = hf basis = cc-pvtz }\n"
    ),
)

_WORD_CHARS = set("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789+-*()._'")


def as_deck_word(name: str) -> str:
    """``name`` as the deck language writes it: a bare word, or a quoted
    string when it holds a comma, a space or another non-word character."""
    if name and set(name) <= _WORD_CHARS:
        return name
    return '"' + name.replace("\\", "\\\\").replace('"', '\\"') + '"'


def basis_words(deck: m.Deck):
    """(word, where) for every basis word a deck writes: in levels, in state
    overrides and in basis_set ``from``."""
    for level in deck.levels:
        if level.settings.basis is not None:
            for word in level.settings.basis.words():
                yield word, f"level `{level.name.value}`"
    for state in deck.states:
        if state.overrides.basis is not None:
            for word in state.overrides.basis.words():
                yield word, f"state `{state.name.value}`"
    for bs in deck.basis_sets:
        if bs.source is not None:
            for word in bs.source.words():
                yield word, f"basis_set `{bs.name.value}`"


def _or_list(names: list[str]) -> str:
    quoted = [f"`{n}`" for n in names]
    return quoted[0] if len(quoted) == 1 else ", ".join(quoted[:-1]) + " or " + quoted[-1]


def check(ctx: Context):
    ws = ctx.workspace
    for pf in ws.files:
        for word, where in basis_words(pf.deck):
            name = word.value
            if basis_library.lookup(name) is not None or ws.basis_set(name) is not None:
                continue
            if name in ws.broken_names:
                continue  # its definition did not parse; the syntax error says so
            close = basis_library.closest(name, n=3)
            hint = f"; did you mean {_or_list(close)}?" if close else ""
            yield ctx.finding(
                word.span,
                f"`{name}` in {where} is neither a basis set of the library nor a basis_set of this deck{hint}",
                fixes=tuple(
                    fix(f"Use `{c}`", replace(word.span, as_deck_word(c)), risky=True) for c in close
                ),
            )
