"""missing-ion-state: an IE or EA is asked for, but the ion state is missing."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, Related, RuleInfo, Severity

from deckward.rules.engine.context import Context
from .derives import (
    EA,
    ION_QUANTITIES,
    ION_WORD,
    NOUN,
    STEP,
    IonDerive,
    geometry_name,
    ion_derives,
    orbital_pair,
    partner,
)
from .wording import charge_text
from .ion_fixes import add_ion_fix
from .species import anion_is_unbound, unbound_anion_in

_CNL = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
_HEAD = (
    'study "cn-screening" { goal = electron_affinity kind = vertical }\n'
    + _CNL
    + "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
)

INFO = RuleInfo(
    id="missing-ion-state",
    severity=Severity.WARNING,
    category="ion-states",
    title="Ionization energy or electron affinity without the ion state",
    why=(
        "An ionization energy is E(cation) - E(neutral) and an electron affinity is E(neutral) - "
        "E(anion): both need the ion, computed at the same geometry and level as the neutral. "
        "Without it the deck can only offer an orbital-energy estimate (Koopmans' theorem), which "
        "leaves out the relaxation of the other orbitals and the change in correlation when an "
        "electron is removed or added. The rule looks for a state whose charge is one higher (IE) or "
        "one lower (EA) than the neutral's, at the same geometry."
    ),
    references=(
        "J. C. Rienstra-Kiracofe, G. S. Tschumper, H. F. Schaefer III, S. Nandi, G. B. Ellison, "
        "Chem. Rev. 102, 231-282 (2002): definitions of electron affinities and their computation "
        "as energy differences",
        "T. Koopmans, Physica 1, 104-113 (1934), doi:10.1016/S0031-8914(34)90011-2",
        "A. Szabo, N. S. Ostlund, Modern Quantum Chemistry (Dover 1996), section 3.3 "
        "(Koopmans' theorem: no relaxation, no correlation)",  # from memory
    ),
    bad_example=_HEAD + "derive ea_eig = -orbital(radical, lumo) in ev\n",
    fires_at="ea_eig",
    good_example=(
        _HEAD
        + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea = energy(radical) - energy(anion) in ev\n"
    ),
    fix=Applicability.RISKY,
    fix_note=(
        "Adds the ion state after the neutral one: same geometry, level and overrides, charge one "
        "higher (cation) or lower (anion), the lowest multiplicity its electron count allows, "
        "reference = unrestricted when it is open-shell and the level says restricted; an "
        "orbital-energy derive is rewritten as the energy difference with the conventional sign. "
        "Risky: it adds a calculation, and the ion's ground state may have a higher multiplicity."
    ),
    fixed_example=(
        _HEAD
        + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea_eig = energy(radical) - energy(anion) in ev\n"
    ),
)


def _needed_by(ws, d: IonDerive):
    """The neutral state ``d`` needs an ion of, when that ion is missing
    (not for a species without a bound anion: unbound-anion says why)."""
    if unbound_anion_in(ws, d) is not None:
        return None
    if d.orbital_term is not None:
        pair = orbital_pair(ws, d)
        return pair.neutral if pair is not None and pair.ion is None else None
    terms = [s for s, c in d.form.energies.items() if abs(c) > 1e-12]
    if not d.form.linear or d.form.orbitals or len(terms) != 1:
        return None  # several states: charge-step-mismatch judges them
    rs = ws.states.get(terms[0])
    if rs is None or partner(ws, rs, STEP[d.quantity]) is not None:
        return None
    return rs


def _article(word: str) -> str:
    return "an" if word[0] in "aeiou" else "a"


def _explain(quantity: str) -> str:
    if quantity == EA:
        return "an electron affinity is E(neutral) - E(anion), which needs both states"
    return "an ionization energy is E(cation) - E(neutral), which needs both states"


def check(ctx: Context):
    ws = ctx.workspace
    derives = ion_derives(ws)
    groups: dict[tuple[str, str], list[IonDerive]] = {}
    for d in derives:
        neutral = _needed_by(ws, d)
        if neutral is not None:
            groups.setdefault((neutral.name, d.quantity), []).append(d)
    for (name, quantity), group in groups.items():
        neutral = ws.states[name]
        ion, charge = ION_WORD[quantity], neutral.charge + STEP[quantity]
        first = group[0]
        others = "".join(f", `{d.name}`" for d in group[1:])
        fx = add_ion_fix(ws, neutral, quantity, [d for d in group if d.orbital_term is not None])
        yield ctx.finding(
            first.derive.name.span,
            f"the {first.noun} `{first.name}`{others} needs {_article(ion)} {ion} of `{name}` (charge {charge_text(charge)}, "
            f"geometry `{geometry_name(neutral)}`), and no state has charge {charge_text(charge)} at that "
            f"geometry: {_explain(quantity)}",
            related=(Related(neutral.state.name.span, f"the neutral state `{name}`"),),
            fixes=(fx,) if fx else (),
        )

    # A study goal with no derive of that quantity: every neutral needs its ion.
    study = ws.study
    if study is None or study.goal is None or study.goal.value not in ION_QUANTITIES:
        return
    quantity = study.goal.value
    if any(d.quantity == quantity for d in derives):
        return
    seen_geometries: set[str] = set()
    for rs in ws.states.values():
        geo = geometry_name(rs)
        if rs.charge != 0 or geo is None or geo in seen_geometries:
            continue
        seen_geometries.add(geo)
        if partner(ws, rs, STEP[quantity]) is not None or (quantity == EA and anion_is_unbound(rs)):
            continue
        charge = STEP[quantity]
        fx = add_ion_fix(ws, rs, quantity)
        yield ctx.finding(
            rs.state.name.span,
            f"the study's goal is the {NOUN[quantity]}, but `{rs.name}` (charge 0, geometry `{geo}`) has no "
            f"{ION_WORD[quantity]} (charge {charge_text(charge)}) at that geometry: {_explain(quantity)}",
            related=(Related(study.goal.span, "the goal is set here"),),
            fixes=(fx,) if fx else (),
        )
