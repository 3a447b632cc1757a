"""``deckward explain RULE-ID``: why a rule exists, with references and examples."""
import sys

from .checking import UsageError

HELP = "explain one rule: rationale, references, examples, fix"


def add_arguments(p) -> None:
    p.add_argument("rule", metavar="RULE-ID")


def run(args) -> int:
    from deckward.grammar.build import did_you_mean
    from deckward.rules.registry import all_rules

    from .rule_docs import explain

    rules = all_rules()
    rule = rules.get(args.rule.strip().lower())
    if rule is None:
        raise UsageError(f"no rule is named `{args.rule}`{did_you_mean(args.rule, list(rules))} "
                         "(`deckward rules` lists them)")
    sys.stdout.write(explain(rule.info))
    return 0
