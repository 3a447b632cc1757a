"""Decks that are correct set-ups, for counting false alarms of rules.

Three sources, none written for the rules being counted: the demo decks of
``examples/`` whose header says "Clean", the examples of the deck-language
specification (``test_spec_examples.SPEC_DECKS``), and the good and fixed
examples of every rule of the catalogue.  A finding of a rule on one of
these is a false alarm unless the deck shows that very mistake on purpose
(listed in ``KNOWN_TRUE`` with the reason).
"""
from __future__ import annotations

import os
from dataclasses import dataclass
from typing import Optional

from deckward.grammar.resolve import Loader, resolve
from deckward.rules.engine.checker import check_workspace
from deckward.rules.engine.registry import all_rules

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
EXAMPLES = os.path.join(ROOT, "examples")

# (source label, rule id): the deck shows that mistake on purpose.
KNOWN_TRUE = {
    # The specification's derive section shows `ea_eig = -orbital(neutral, lumo)`
    # as syntax; it is the mistake virtual-eigenvalue-as-ea exists for.
    ("spec:study+geometry+level+states+derives", "virtual-eigenvalue-as-ea"),
    # Its study says kind = vertical and compare = experiment: a vertical EA
    # set against photodetachment's adiabatic values.
    ("spec:study+geometry+level+states+derives", "experiment-needs-adiabatic"),
    # The suppression example keeps a LUMO estimate on purpose (suppressed with
    # a reason) and has no anion state: the missing anion is real.
    ("spec:suppression", "missing-ion-state"),
}


@dataclass(frozen=True)
class Deck:
    label: str
    text: Optional[str]  # None: check the file at ``path`` in its own workspace
    path: Optional[str] = None


def clean_examples() -> list[Deck]:
    out = []
    for name in sorted(os.listdir(EXAMPLES)):
        path = os.path.join(EXAMPLES, name)
        if name.endswith(".deck") and open(path, encoding="utf-8").read().lstrip().startswith("# Clean"):
            out.append(Deck(f"example:{name}", None, path))
    return out


def spec_examples() -> list[Deck]:
    from test_spec_examples import SPEC_DECKS

    return [Deck(f"spec:{k}", v) for k, v in sorted(SPEC_DECKS.items())]


def rule_examples() -> list[Deck]:
    out = []
    for rule in all_rules().values():
        if rule.check is None:
            continue
        out.append(Deck(f"good:{rule.id}", rule.info.good_example))
        if rule.info.fixed_example:
            out.append(Deck(f"fixed:{rule.id}", rule.info.fixed_example))
    return out


def corpus() -> list[Deck]:
    return clean_examples() + spec_examples() + rule_examples()


def findings_of(deck: Deck, rules: set[str]):
    if deck.path is not None:
        ws = resolve(deck.path, Loader(), EXAMPLES)
        return check_workspace(ws, select=rules)
    from rule_harness import check_text

    return check_text(deck.text, select=rules)[0]


def false_alarms(rules: set[str]) -> list[tuple[str, str, str]]:
    """(deck label, rule, message) of every finding of ``rules`` on the
    corpus that is not a known true positive; a rule's own examples of
    itself are left out (its good example is test_rule_examples' job)."""
    out = []
    for deck in corpus():
        for f in findings_of(deck, rules):
            if f.rule not in rules or f.suppressed is not None or (deck.label, f.rule) in KNOWN_TRUE:
                continue
            out.append((deck.label, f.rule, f.message))
    return out
