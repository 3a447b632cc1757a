"""vertical-geometry-mismatch: a vertical difference of states at different geometries."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, Related, RuleInfo, Severity

from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace
from .derives import QUANTITY_NOUN, energy_states, kind_derives
from .wording import span_text

_HEAD = (
    'study "cn-screening" { goal = electron_affinity kind = vertical }\n'
    "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
    "geometry cn_anion {\n  C 0 0 0\n  N 0 0 1.1765\n}\n"
    "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
)
_DERIVE = "derive ea = energy(radical) - energy(anion) in ev\n"

INFO = RuleInfo(
    id="vertical-geometry-mismatch",
    severity=Severity.WARNING,
    category="ion-states",
    title="Vertical energy difference across different geometries",
    why=(
        "A vertical ionization energy or electron affinity is the energy change with the nuclei held "
        "where they are: both states at one geometry. With the states at different structures (or "
        "each relaxed separately with optimize) the difference is partly or wholly adiabatic, and "
        "the study's own label for it is wrong."
    ),
    references=(
        "J. C. Rienstra-Kiracofe, G. S. Tschumper, H. F. Schaefer III, S. Nandi, G. B. Ellison, "
        "Chem. Rev. 102, 231-282 (2002) (adiabatic and vertical electron affinities, vertical "
        "detachment energies)",
    ),
    bad_example=_HEAD
    + "state anion { geometry = cn_anion level = hf_adz charge = -1 multiplicity = 1 }\n"
    + _DERIVE,
    fires_at="cn_anion",
    good_example=_HEAD.replace("geometry cn_anion {\n  C 0 0 0\n  N 0 0 1.1765\n}\n", "")
    + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
    + _DERIVE,
    fix=Applicability.RISKY,
    fix_note=(
        "Puts the state at the first state's geometry (when that one is fixed, not optimize(...)). "
        "Risky: the number changes."
    ),
    fixed_example=_HEAD
    + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
    + _DERIVE,
)


def check(ctx: Context):
    ws = ctx.workspace
    seen = set()
    for derive, quantity in kind_derives(ws, "vertical"):
        states = [s for s in energy_states(ws, derive) if s.state.geometry is not None]
        if len(states) < 2:
            continue
        first = states[0]
        g1 = first.state.geometry
        for other in states[1:]:
            g2 = other.state.geometry
            same_name = g1.name.value == g2.name.value
            if (same_name and not g1.optimize and not g2.optimize) or (first.name, other.name) in seen:
                continue  # one fixed geometry: vertical as asked
            seen.add((first.name, other.name))
            t1, t2 = span_text(ws, g1.span), span_text(ws, g2.span)
            noun = QUANTITY_NOUN[quantity]
            if same_name and g1.optimize and g2.optimize:
                message = (
                    f"the study asks for vertical energies, but `{first.name}` and `{other.name}` in "
                    f"`{derive.name.value}` are each relaxed with `{t1}`: they end at different structures and "
                    f"the difference is adiabatic; a vertical {noun} takes both states at one fixed geometry"
                )
            else:
                message = (
                    f"the study asks for vertical energies, but in `{derive.name.value}` `{first.name}` is at "
                    f"geometry `{t1}` and `{other.name}` at `{t2}`: a vertical {noun} keeps the nuclei where they are"
                )
            fixes = ()
            if not g1.optimize:
                fixes = (fix(f"Put `{other.name}` at geometry `{t1}`", replace(g2.span, t1), risky=True),)
            yield ctx.finding(
                g2.span,
                message,
                related=(Related(g1.span, f"`{first.name}` is at `{t1}`"),),
                fixes=fixes,
            )
