"""``deckward explain RULE-ID...``: why rules exist, with references and examples."""
import sys

from .checking import UsageError

HELP = "explain rules: rationale, references, examples, fix"


def add_arguments(p) -> None:
    p.add_argument("rules", nargs="+", metavar="RULE-ID", help="one or more rule ids (`deckward rules` lists them)")


def run(args) -> int:
    from deckward.grammar.build import did_you_mean
    from deckward.rules.engine.registry import all_rules

    from .rule_docs import explain

    rules = all_rules()
    unknown = [name for name in args.rules if name.strip().lower() not in rules]
    if len(unknown) == 1:
        name = unknown[0]
        raise UsageError(f"no rule is named `{name}`{did_you_mean(name, list(rules))} (`deckward rules` lists them)")
    if unknown:
        named = []
        for name in unknown:
            hint = did_you_mean(name, list(rules)).lstrip("; ")
            named.append(f"`{name}`" + (f" ({hint})" if hint else ""))
        raise UsageError(f"no rules are named {', '.join(named)} (`deckward rules` lists them)")
    sys.stdout.write("\n".join(explain(rules[name.strip().lower()].info) for name in args.rules))
    return 0
