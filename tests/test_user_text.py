"""Text users read never carries the project's internal markers.

"from memory" and "not confirmed" are notes for contributors (a comment
beside a reference, a flag in the reference table), not words for the reader
of a finding, a rule page or a review.  The check covers every rule's
metadata, the messages and fix titles its examples produce, and the text of
the reference table.
"""
import re

import pytest

from deckward.rules.knowledge import reference_data
from deckward.rules.engine.registry import all_rules
from rule_harness import check_text

# Markers of contributors' notes: bracketed tags and the bare words.
INTERNAL = re.compile(r"\[[^\]]*(memory|confirm|todo|fixme|tbd|conf\.)[^\]]*\]|from memory|not confirmed", re.I)

RULES = list(all_rules().values())


def _metadata_text(info) -> list[str]:
    return [
        info.title,
        info.why,
        info.fix_note,
        info.threshold_note,
        *info.references,
        info.bad_example,
        info.good_example,
        info.fixed_example,
    ]


@pytest.mark.parametrize("rule_id", [r.id for r in RULES])
def test_rule_metadata_has_no_internal_markers(rule_id):
    info = all_rules()[rule_id].info
    leaks = [t for t in _metadata_text(info) if t and INTERNAL.search(t)]
    assert leaks == []


@pytest.mark.parametrize("rule", [r for r in RULES if r.check is not None], ids=lambda r: r.id)
def test_messages_of_the_examples_have_no_internal_markers(rule):
    texts = []
    for example in (rule.info.bad_example, rule.info.good_example):
        findings, _ = check_text(example)
        for f in findings:
            texts.append(f.message)
            texts += [fx.title for fx in f.fixes]
            texts += [r.message for r in f.related]
    assert [t for t in texts if INTERNAL.search(t)] == []


def test_reference_table_text_has_no_internal_markers():
    for sp in reference_data.all_species():
        shown = [sp.name, sp.multiplicity_source, sp.anion_source, sp.anion_note]
        for m in (sp.electron_affinity, sp.ionization_energy):
            if m is not None:
                shown += [m.source, m.note, reference_data.format_value(m)]
        assert [t for t in shown if INTERNAL.search(t)] == [], sp.key


def test_the_marker_pattern_catches_the_tags_it_is_for():
    # The pattern itself must recognise what it guards against.
    assert INTERNAL.search("Szabo & Ostlund (1996) [from memory]")
    assert INTERNAL.search("Janak 1978 [volume and page from memory]")
    assert INTERNAL.search("value recalled, from memory")
    assert not INTERNAL.search("J. C. Rienstra-Kiracofe et al., Chem. Rev. 102, 231 (2002)")
