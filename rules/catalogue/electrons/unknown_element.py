"""unknown-element: an atom symbol that is not a chemical element."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.knowledge import elements
from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace

INFO = RuleInfo(
    id="unknown-element",
    severity=Severity.ERROR,
    category="electrons",
    title="An atom symbol that is not an element",
    why=(
        "Every atom line starts with an element symbol; the nuclear charge, the electron count and "
        "the basis functions all follow from it. A symbol that names no element (a typo such as "
        "`Ox`, or a label such as `O1`) makes the molecule impossible to build. Ghost centres are "
        "written as an element with the flag `ghost`, not as a special symbol."
    ),
    references=(
        "IUPAC, Nomenclature of Inorganic Chemistry (Red Book, 2005), Table I: element names and "
        "symbols",  # from memory
    ),
    bad_example="geometry cn {\n  C 0 0 0\n  Nn 0 0 1.1718\n}\n",
    fires_at="Nn",
    good_example="geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n",
    fix=Applicability.RISKY,
    fix_note=(
        "Replaces the symbol with the closest element symbol. Risky: a different element is a "
        "different molecule, so check that it is the one you meant."
    ),
    fixed_example="geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n",
)


def check(ctx: Context):
    for pf in ctx.workspace.files:
        for geometry in pf.deck.geometries:
            for number, atom in enumerate(geometry.atoms, start=1):
                symbol = atom.symbol
                if elements.lookup(symbol.value) is not None:
                    continue
                close = elements.closest_symbols(symbol.value, n=3)
                hint = f"; did you mean `{close[0]}`?" if close else ""
                yield ctx.finding(
                    symbol.span,
                    f"`{symbol.value}` (atom {number} of geometry `{geometry.name.value}`) "
                    f"is not an element symbol{hint}",
                    fixes=tuple(
                        fix(f"Use element `{c}`", replace(symbol.span, c), risky=True) for c in close[:1]
                    ),
                )
