"""False alarms of rules on correct set-ups, counted in one run.

The corpus (tests/false_alarm_corpus.py): the clean demo decks of examples/,
the deck-language specification's examples and every rule's good and fixed
examples.  For each rule it prints the decks checked, the findings, those
that are known true positives (a deck showing the mistake on purpose) and
the false alarms, which should be none.
Usage: python bench/false_alarms.py [RULE ...]   (default: every static rule)
"""
from __future__ import annotations

import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "tests"))

from false_alarm_corpus import KNOWN_TRUE, corpus, findings_of  # noqa: E402


def main() -> None:
    from deckward.rules.engine.registry import all_rules

    rules = sys.argv[1:] or [r.id for r in all_rules().values() if r.check is not None]
    decks = corpus()
    counts = {r: [0, 0, 0] for r in rules}  # findings, known true, false
    for deck in decks:
        for f in findings_of(deck, set(rules)):
            if f.rule not in counts or f.suppressed is not None:
                continue
            counts[f.rule][0] += 1
            if (deck.label, f.rule) in KNOWN_TRUE:
                counts[f.rule][1] += 1
            else:
                counts[f.rule][2] += 1
                print(f"  false alarm: {f.rule} on {deck.label}: {f.message}")
    print(f"{len(decks)} correct decks")
    print(f"{'rule':40} {'findings':>8} {'true':>5} {'false':>6}")
    for rule, (n, true, false) in counts.items():
        print(f"{rule:40} {n:8d} {true:5d} {false:6d}")
    print(f"false alarms in total: {sum(c[2] for c in counts.values())}")


if __name__ == "__main__":
    main()
