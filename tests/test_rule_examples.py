"""Every rule fires on its own bad example, at the documented text, and is
silent on its good example; its fix turns the bad example into the fixed one."""
import pytest

from deckward.rules.fixes.edits import apply_edits
from deckward.rules.engine.registry import all_rules
from rule_harness import check_text, covered

RULES = [r for r in all_rules().values() if r.check is not None]


@pytest.mark.parametrize("rule", RULES, ids=lambda r: r.id)
def test_metadata_complete(rule):
    info = rule.info
    assert info.title and info.why and info.references, info.id
    assert info.bad_example and info.good_example and info.fires_at, info.id
    if info.fix is not None:
        assert info.fixed_example, f"{info.id} declares a fix but no fixed_example"


@pytest.mark.parametrize("rule", RULES, ids=lambda r: r.id)
def test_bad_example_fires_at_the_documented_text(rule):
    findings, _ = check_text(rule.info.bad_example, select={rule.id})
    mine = [f for f in findings if f.rule == rule.id]
    assert mine, f"{rule.id} did not fire on its bad example"
    assert covered(mine[0], rule.info.bad_example) == rule.info.fires_at


@pytest.mark.parametrize("rule", RULES, ids=lambda r: r.id)
def test_good_example_is_silent(rule):
    findings, _ = check_text(rule.info.good_example, select={rule.id})
    assert [f for f in findings if f.rule == rule.id] == []


@pytest.mark.parametrize("rule", [r for r in RULES if r.info.fix is not None], ids=lambda r: r.id)
def test_fix_gives_the_fixed_example(rule):
    findings, _ = check_text(rule.info.bad_example, select={rule.id})
    mine = [f for f in findings if f.rule == rule.id and f.fixes]
    assert mine, f"{rule.id} offers no fix on its bad example"
    first = mine[0].fixes[0]
    assert first.applicability == rule.info.fix
    assert apply_edits(rule.info.bad_example, first.edits) == rule.info.fixed_example
    after, _ = check_text(rule.info.fixed_example, select={rule.id})
    assert [f for f in after if f.rule == rule.id] == []
