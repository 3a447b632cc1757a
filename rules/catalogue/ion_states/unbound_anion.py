"""unbound-anion: an electron affinity of a species that has no bound anion."""
from __future__ import annotations

from deckward.grammar.findings import Related, RuleInfo, Severity

from deckward.rules.engine.context import Context
from .derives import EA, geometry_name, ion_derives
from .species import anion_is_unbound, species_of, unbound_anion_in
from .._examples import CN_RADICAL

_N2 = (
    "geometry n2 {\n  N 0 0 0\n  N 0 0 1.0977\n}\n"
    "level hf_adz { method = hf basis = aug-cc-pvdz }\n"
    "state neutral { geometry = n2 level = hf_adz charge = 0 multiplicity = 1 }\n"
    "state anion { geometry = n2 level = hf_adz charge = -1 multiplicity = 2 }\n"
)
_CN = CN_RADICAL + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"

INFO = RuleInfo(
    id="unbound-anion",
    severity=Severity.WARNING,
    category="ion-states",
    title="Electron affinity of a species without a bound anion",
    why=(
        "Some molecules and atoms bind no extra electron in the gas phase: N2, CO, CO2, H2O, NH3, CH4, "
        "ethylene, benzene, the noble gases, Be, Mg and the N atom. Their anions exist only as temporary "
        "states (resonances) that decay by losing the electron. A bound-state calculation in a finite "
        "basis still returns a number, because the basis confines the electron; that number belongs to "
        "the basis and tends towards zero, the energy of a free electron at rest, as diffuse functions "
        "are added. Report such an electron affinity as negative (no bound anion), or compute the "
        "resonance with a method made for temporary anions (stabilisation, complex absorbing "
        "potentials, scattering calculations). Species are recognised from the geometry's atoms and "
        "bonds and looked up in a table of measured data."
    ),
    references=(
        "K. D. Jordan, P. D. Burrow, Acc. Chem. Res. 11, 341 (1978) (temporary anions measured by "
        "electron transmission spectroscopy)",  # from memory
        "J. Simons, J. Phys. Chem. A 112, 6401 (2008) (molecular anions, bound and metastable)",  # from memory
        "J. C. Rienstra-Kiracofe, G. S. Tschumper, H. F. Schaefer III, S. Nandi, G. B. Ellison, Chem. "
        "Rev. 102, 231-282 (2002)",
        "F. Jensen, J. Chem. Theory Comput. 6, 2726 (2010) (unbound anions and diffuse functions)",
    ),
    bad_example=_N2 + "derive ea = energy(neutral) - energy(anion) in ev\n",
    fires_at="ea",
    good_example=_CN + "derive ea = energy(radical) - energy(anion) in ev\n",
)


def _about(sp) -> str:
    note = f"; {sp.anion_note}" if sp.anion_note else ""
    return f"{sp.name} ({sp.key}) has no bound gas-phase anion ({sp.anion_source}{note})"


_ADVICE = (
    "a finite basis confines the extra electron, so the number belongs to the basis and tends towards "
    "zero as diffuse functions are added; report the anion as unbound, or compute the resonance with a "
    "method for temporary anions"
)


def check(ctx: Context):
    ws = ctx.workspace
    derives = [d for d in ion_derives(ws) if d.quantity == EA]
    reported = False
    for d in derives:
        hit = unbound_anion_in(ws, d)
        if hit is None:
            continue
        reported = True
        yield ctx.finding(
            d.derive.name.span,
            f"`{d.name}` is the electron affinity of `{geometry_name(hit.state)}`, but {_about(hit.species)}: "
            + _ADVICE,
            related=(Related(hit.state.state.name.span, f"state `{hit.state.name}`"),),
        )
    study = ws.study
    if reported or derives or study is None or study.goal is None or study.goal.value != EA:
        return
    # The goal alone asks for electron affinities: report each species once.
    seen: set[str] = set()
    for rs in ws.states.values():
        geo = geometry_name(rs)
        if geo is None or geo in seen or not anion_is_unbound(rs):
            continue
        seen.add(geo)
        yield ctx.finding(
            rs.state.name.span,
            f"the study's goal is the electron affinity, but {_about(species_of(rs))}: " + _ADVICE,
            related=(Related(study.goal.span, "the goal is set here"),),
        )
