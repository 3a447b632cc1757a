"""ie-sign-convention: an ionization energy written as E(neutral) - E(cation)."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix
from .derives import IE, reversed_differences
from .wording import charge_text, span_text
from .ion_fixes import difference_span, swap_edits
from .._examples import NO2_NEUTRAL_AND_CATION

_HEAD = NO2_NEUTRAL_AND_CATION

INFO = RuleInfo(
    id="ie-sign-convention",
    severity=Severity.WARNING,
    category="ion-states",
    title="Ionization energy with the wrong sign convention",
    why=(
        "The ionization energy is IE = E(cation) - E(neutral): the energy needed to remove an "
        "electron, positive for a bound electron. Written as E(neutral) - E(cation) the number comes "
        "out negative and cannot be compared with measured ionization energies."
    ),
    references=(
        "NIST Chemistry WebBook, NIST SRD 69, Gas phase ion energetics data (S. G. Lias, "
        "J. E. Bartmess et al.)",
        "A. Szabo, N. S. Ostlund, Modern Quantum Chemistry (Dover 1996), section 3.3 "
        "(IP = E(N-1) - E(N))",  # from memory
    ),
    bad_example=_HEAD + "derive ie = energy(neutral) - energy(cation) in ev\n",
    fires_at="energy(neutral) - energy(cation)",
    good_example=_HEAD + "derive ie = energy(cation) - energy(neutral) in ev\n",
    fix=Applicability.SAFE,
    fix_note="Swaps the two energy(...) operands; everything else stays as written.",
    fixed_example=_HEAD + "derive ie = energy(cation) - energy(neutral) in ev\n",
)


def check(ctx: Context):
    ws = ctx.workspace
    for d, plus, minus in reversed_differences(ws, IE):
        yield ctx.finding(
            difference_span(ws, d.difference),
            f"the ionization energy `{d.name}` is {span_text(ws, d.difference.plus_node.span)} - "
            f"{span_text(ws, d.difference.minus_node.span)}, with `{minus.name}` (charge "
            f"{charge_text(minus.charge)}) subtracted: by convention IE = E(cation) - E(neutral), positive "
            f"for a bound electron",
            fixes=(fix("Swap the operands", *swap_edits(ws, d.difference)),),
        )
