"""The user documentation is generated from the rules' metadata."""
import os
import subprocess
import sys

from deckward.rules.engine.registry import all_rules
from deckward.server.rule_docs import explain, markdown

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def test_docs_rules_md_is_up_to_date():
    with open(os.path.join(ROOT, "docs", "rules.md"), encoding="utf-8") as f:
        current = f.read()
    assert current == markdown(), "docs/rules.md is stale: python -m deckward.server.rule_docs > docs/rules.md"


def test_every_rule_is_documented_with_references():
    doc = markdown()
    for rule_id, rule in all_rules().items():
        assert f"### {rule_id}\n" in doc
        if rule.info.category != "hygiene":
            assert rule.info.references, f"{rule_id} names no reference"


def test_rule_ids_are_kebab_case_and_unique():
    ids = list(all_rules())
    assert len(ids) == len(set(ids))
    for rid in ids:
        assert rid == rid.lower() and " " not in rid and "_" not in rid


def test_explain_command_prints_rationale_and_examples():
    out = subprocess.run([sys.executable, "-m", "deckward", "explain", "restricted-open-shell"],
                         capture_output=True, text=True, check=True).stdout
    assert out == explain(all_rules()["restricted-open-shell"].info)
    assert out.startswith("restricted-open-shell (error): Restricted reference for an open-shell state\n")
    assert "\nExample:\n" in out and "\nBetter:\n" in out and "\nFix: safe" in out


def test_explain_unknown_rule_exits_2_with_suggestion():
    proc = subprocess.run([sys.executable, "-m", "deckward", "explain", "restricted-open-shel"],
                          capture_output=True, text=True)
    assert proc.returncode == 2
    assert proc.stderr == ("deckward: error: no rule is named `restricted-open-shel`; did you mean "
                           "`restricted-open-shell`? (`deckward rules` lists them)\n")
