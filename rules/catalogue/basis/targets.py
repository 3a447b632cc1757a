"""Shared by the basis-set rules: which states a reported number needs, which
basis word each element of a state gets, and how to word lists of states.

The basis rules all ask the same questions: "is this state used for an
ionization energy, an electron affinity or a gap?", "which word in the deck
would a user change to give element X another basis?" and "how do I name
three states in one sentence?".  Answering them once keeps the rules short
and their wording consistent.  The module name starts with an underscore so
that the rule registry does not take it for a rule.
"""
from __future__ import annotations

from typing import Iterable, Optional

from deckward.grammar import model as m
from deckward.grammar.records import record
from deckward.grammar.resolve import ResolvedState, Workspace

from deckward.rules.knowledge import deck_facts

QUANTITY_WORDS = {
    "ionization_energy": "ionization energy",
    "electron_affinity": "electron affinity",
    "fundamental_gap": "fundamental gap",
    "excitation_energy": "excitation energy",
    "reaction_energy": "reaction energy",
    "energy": "energy",
}


@record(frozen=True)
class Purpose:
    """Why a state is computed: a derive's quantity, or only the study goal."""

    quantity: str
    derive: Optional[str]  # None when only the study goal says so

    def describe(self) -> str:
        word = QUANTITY_WORDS.get(self.quantity, self.quantity)
        if self.derive is None:
            return f"the study goal ({word})"
        return f"{word} `{self.derive}`"


def purposes(ws: Workspace, quantities: Iterable[str]) -> dict[str, list[Purpose]]:
    """State name -> the purposes among ``quantities`` it serves.

    A derive whose quantity is wanted claims the states it needs; when the
    study goal is wanted, every state serves it (the goal names what all the
    numbers are for), listed after any derive that names it explicitly."""
    wanted = set(quantities)
    out: dict[str, list[Purpose]] = {}
    for derive in ws.derives:
        q = ws.quantity_of(derive)
        if q not in wanted:
            continue
        for name in deck_facts.states_of(derive):
            if name in ws.states:
                out.setdefault(name, []).append(Purpose(q, derive.name.value))
    goal = study_goal(ws)
    if goal in wanted:
        for name in ws.states:
            out.setdefault(name, []).append(Purpose(goal, None))
    return out


def study_goal(ws: Workspace) -> Optional[str]:
    study = ws.study
    return study.goal.value if study is not None and study.goal is not None else None


def element_symbols(rs: ResolvedState, *, include_ghosts: bool = False) -> list[str]:
    """Distinct element symbols of the state's geometry in order of first
    appearance, spelled canonically (Cl, not CL)."""
    if rs.geometry is None:
        return []
    out: list[str] = []
    for atom in rs.geometry.atoms:
        if atom.ghost and not include_ghosts:
            continue
        text = atom.symbol.value
        symbol = text[:1].upper() + text[1:].lower()
        if symbol not in out:
            out.append(symbol)
    return out


def library_words(ws: Workspace, rs: ResolvedState) -> list[tuple[str, m.Located[str]]]:
    """(element, library word) for each element of the state that gets a
    library set: the word in the level, the state override, or a basis_set's
    ``from`` -- the word a user would change."""
    out = []
    for symbol in element_symbols(rs, include_ghosts=True):
        eb = deck_facts.element_basis(ws, rs.settings.basis, symbol)
        if eb is not None and eb.library_word is not None:
            out.append((symbol, eb.library_word))
    return out


def span_key(loc: m.Located) -> tuple:
    s = loc.span
    return (s.path, s.start, s.end)


def join_words(items: list[str]) -> str:
    """`a`; `a` and `b`; `a`, `b` and `c`."""
    if len(items) <= 1:
        return "".join(items)
    return ", ".join(items[:-1]) + " and " + items[-1]


def states_phrase(names: list[str]) -> tuple[str, str]:
    """('state `a`', 'uses') or ('states `a` and `b`', 'use')."""
    quoted = [f"`{n}`" for n in names]
    if len(quoted) == 1:
        return f"state {quoted[0]}", "uses"
    return f"states {join_words(quoted)}", "use"


def in_case_of(written: str, canonical: str) -> str:
    """``canonical`` in the letter case the user wrote ``written`` in: all
    capitals stay capitals, anything else gets the library's lower case."""
    letters = [c for c in written if c.isalpha()]
    if letters and all(c.isupper() for c in letters):
        return canonical.upper()
    return canonical


def times_word(ratio: float) -> str:
    """'twice', 'three times', or '2.6 times' (how much tighter)."""
    words = {2: "twice", 3: "three times", 4: "four times", 5: "five times", 6: "six times",
             7: "seven times", 8: "eight times", 9: "nine times", 10: "ten times"}
    nearest = round(ratio)
    if nearest in words and abs(ratio - nearest) <= 0.15:
        return words[nearest]
    return f"{ratio:.1f} times"
