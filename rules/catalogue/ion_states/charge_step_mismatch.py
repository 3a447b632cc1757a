"""charge-step-mismatch: an IE/EA difference whose states do not differ by one charge."""
from __future__ import annotations

from deckward.grammar.findings import Related, RuleInfo, Severity

from deckward.rules.engine.context import Context
from .derives import EA, difference_states, ion_derives
from .wording import charge_text, span_text
from .ion_fixes import difference_span
from .._examples import CN_RADICAL

_HEAD = CN_RADICAL

INFO = RuleInfo(
    id="charge-step-mismatch",
    severity=Severity.ERROR,
    category="ion-states",
    title="Ion energy difference whose charges do not differ by one",
    why=(
        "An ionization energy removes exactly one electron and an electron affinity adds exactly one: "
        "in E(cation) - E(neutral) and E(neutral) - E(anion) the first state's charge is one higher "
        "than the second's. A difference of two states with equal charges, or charges two apart, is "
        "some other quantity (an excitation energy, a double ionization), whatever the derive is "
        "called. Usually a charge was mistyped or the derive names the wrong state."
    ),
    references=(
        "NIST Chemistry WebBook, NIST SRD 69, Gas phase ion energetics data (S. G. Lias, "
        "J. E. Bartmess et al.)",
        "J. C. Rienstra-Kiracofe et al., Chem. Rev. 102, 231-282 (2002)",
    ),
    bad_example=(
        _HEAD
        + "state anion { geometry = cn level = hf_adz charge = -2 multiplicity = 2 }\n"
        "derive ea = energy(radical) - energy(anion) in ev\n"
    ),
    fires_at="energy(radical) - energy(anion)",
    good_example=(
        _HEAD
        + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea = energy(radical) - energy(anion) in ev\n"
    ),
)


def check(ctx: Context):
    ws = ctx.workspace
    for d in ion_derives(ws):
        states = difference_states(ws, d)
        if states is None:
            continue
        plus, minus = states
        if abs(plus.charge - minus.charge) == 1:
            continue  # +1 is right; -1 is the sign-convention rules' case
        verb = "adds" if d.quantity == EA else "removes"
        related = tuple(
            Related(rs.state.charge.span, f"`{rs.name}` has charge {charge_text(rs.charge)}")
            for rs in (plus, minus)
            if rs.state.charge is not None
        )
        yield ctx.finding(
            difference_span(ws, d.difference),
            f"the {d.noun} `{d.name}` is {span_text(ws, d.difference.plus_node.span)} - "
            f"{span_text(ws, d.difference.minus_node.span)}, but `{plus.name}` has charge {charge_text(plus.charge)} "
            f"and `{minus.name}` charge {charge_text(minus.charge)}: an {d.noun} {verb} exactly one electron, so "
            f"the first state's charge must be one higher than the second's",
            related=related,
        )
