"""ea-sign-convention: an electron affinity written as E(anion) - E(neutral)."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix
from .derives import EA, reversed_differences
from .wording import charge_text, span_text
from .ion_fixes import difference_span, swap_edits

_HEAD = (
    "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
    "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
    "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
)

INFO = RuleInfo(
    id="ea-sign-convention",
    severity=Severity.WARNING,
    category="ion-states",
    title="Electron affinity with the wrong sign convention",
    why=(
        "By convention the electron affinity is EA = E(neutral) - E(anion): the energy released when "
        "the neutral binds an electron, positive when the anion is bound. Written the other way round "
        "the number has the opposite sign, and a bound anion looks unbound when compared with "
        "tables of measured electron affinities."
    ),
    references=(
        "J. C. Rienstra-Kiracofe, G. S. Tschumper, H. F. Schaefer III, S. Nandi, G. B. Ellison, "
        "Chem. Rev. 102, 231-282 (2002) (EA = E(neutral) - E(anion))",
        "NIST Chemistry WebBook, NIST SRD 69, Gas phase ion energetics data (S. G. Lias, "
        "J. E. Bartmess et al.)",
    ),
    bad_example=_HEAD + "derive ea = energy(anion) - energy(radical) in ev\n",
    fires_at="energy(anion) - energy(radical)",
    good_example=_HEAD + "derive ea = energy(radical) - energy(anion) in ev\n",
    fix=Applicability.SAFE,
    fix_note="Swaps the two energy(...) operands; everything else stays as written.",
    fixed_example=_HEAD + "derive ea = energy(radical) - energy(anion) in ev\n",
)


def check(ctx: Context):
    ws = ctx.workspace
    for d, plus, minus in reversed_differences(ws, EA):
        yield ctx.finding(
            difference_span(ws, d.difference),
            f"the electron affinity `{d.name}` is {span_text(ws, d.difference.plus_node.span)} - "
            f"{span_text(ws, d.difference.minus_node.span)}, with `{plus.name}` (charge {charge_text(plus.charge)}) "
            f"first: by convention EA = E(neutral) - E(anion), positive when the anion is bound",
            fixes=(fix("Swap the operands", *swap_edits(ws, d.difference)),),
        )
