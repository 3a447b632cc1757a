"""``deckward rules``: list the rule catalogue."""
import sys

HELP = "list every rule with its default severity and fix"


def add_arguments(p) -> None:
    p.add_argument("--markdown", action="store_true", help="print docs/rules.md instead of the listing")


def run(args) -> int:
    from .rule_docs import listing, markdown

    sys.stdout.write(markdown() if args.markdown else listing())
    return 0
