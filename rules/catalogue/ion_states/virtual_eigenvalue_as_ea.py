"""virtual-eigenvalue-as-ea: an electron affinity read off a virtual orbital energy."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.engine.context import Context
from .derives import EA, ion_derives, orbital_method, orbital_pair
from .wording import level_label, method_text, orbital_phrase
from .ion_fixes import energy_difference_fix
from .species import unbound_anion_in
from .._examples import NO2_GEOMETRY

_HEAD = (
    NO2_GEOMETRY
    + "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    "state neutral { geometry = no2 level = hf_adz charge = 0 multiplicity = 2 }\n"
    "state anion { geometry = no2 level = hf_adz charge = -1 multiplicity = 1 }\n"
)

INFO = RuleInfo(
    id="virtual-eigenvalue-as-ea",
    severity=Severity.WARNING,
    category="ion-states",
    title="Electron affinity from a virtual orbital energy",
    why=(
        "Minus the LUMO energy of the neutral is not the energy of a bound extra electron, and what is "
        "wrong with it depends on the method. At Hartree-Fock (and at correlated levels, which report "
        "the orbital energies of their Hartree-Fock reference) it is Koopmans' estimate: the extra "
        "electron sits in an orbital shaped by the neutral's frozen field, with no relaxation and no "
        "correlation; unlike the ionization case the two neglected effects add, so the estimate is too "
        "small. With a density functional it is a Kohn-Sham virtual energy: even the exact functional "
        "puts -e(LUMO) above the electron affinity by the derivative discontinuity, and common "
        "functionals make it typically too large, the opposite of the Hartree-Fock error, by an amount "
        "that depends on the functional. Either way virtual energies drift with the basis set (towards "
        "zero for an unbound anion as diffuse functions are added). Compute E(neutral) - E(anion) "
        "instead."
    ),
    references=(
        "T. Koopmans, Physica 1, 104-113 (1934), doi:10.1016/S0031-8914(34)90011-2",
        "A. Szabo, N. S. Ostlund, Modern Quantum Chemistry (Dover 1996), section 3.3 (Koopmans' "
        "electron affinities: relaxation and correlation errors add)",  # from memory
        "F. Jensen, J. Chem. Theory Comput. 6, 2726 (2010) (anions and diffuse functions; virtual "
        "orbital energies depend on the basis)",
        "J. C. Rienstra-Kiracofe et al., Chem. Rev. 102, 231-282 (2002)",
        "J. P. Perdew, M. Levy, Phys. Rev. Lett. 51, 1884 (1983) (the derivative discontinuity "
        "separates -e(LUMO) from the electron affinity)",  # from memory
        "D. J. Tozer, F. De Proft, J. Phys. Chem. A 109, 8923 (2005) (Kohn-Sham LUMO energies and "
        "electron affinities)",  # from memory
    ),
    bad_example=_HEAD + "derive ea = -orbital(neutral, lumo) in ev\n",
    fires_at="orbital(neutral, lumo)",
    good_example=_HEAD + "derive ea = energy(neutral) - energy(anion) in ev\n",
    fix=Applicability.RISKY,
    fix_note=(
        "Rewrites the derive as energy(neutral) - energy(anion) with the anion of the same geometry; "
        "when the deck has no anion, the same fix adds one (see missing-ion-state). Risky: the "
        "number changes meaning and an anion calculation is added."
    ),
    fixed_example=_HEAD + "derive ea = energy(neutral) - energy(anion) in ev\n",
)


def _reason(ws, orbital) -> str:
    """Why the number is not an electron affinity, for the method family behind it."""
    found = orbital_method(ws, orbital)
    drift = "and it drifts with the basis set"
    if found is None:
        return f"a virtual orbital energy is not the energy of a bound extra electron, {drift}"
    rs, info = found
    if info.family == "dft":
        return (
            f"a Kohn-Sham virtual energy of {method_text(ws, rs)} is not an electron affinity: even the exact "
            f"functional puts -e(LUMO) above the EA by the derivative discontinuity, common functionals make it "
            f"typically too large by an amount that depends on the functional, {drift}"
        )
    koopmans = (
        "Koopmans' estimate with the neutral's frozen orbitals: no relaxation and no correlation, which here "
        f"add up instead of cancelling (both make it too small), {drift}"
    )
    if info.family == "hf":
        return f"this is {koopmans}"
    return (
        f"{method_text(ws, rs)} reports the orbital energies of its Hartree-Fock reference, so this is "
        f"{koopmans}; the {method_text(ws, rs)} correlation never enters it"
    )


def check(ctx: Context):
    ws = ctx.workspace
    for d in ion_derives(ws):
        if d.quantity != EA or unbound_anion_in(ws, d) is not None:
            continue  # unbound-anion explains what is wrong with any such number
        single = d.orbital_term
        for coefficient, orbital in d.form.orbitals:
            if orbital.orbital.value != "lumo":
                continue
            rs = ws.states.get(orbital.state.value)
            if rs is None:
                continue
            note = ""
            fixes = ()
            if single is not None and single[1] is orbital:
                pair = orbital_pair(ws, d)
                if pair is not None and pair.ion is None:
                    note = f" (the deck has no anion of `{rs.name}` yet)"
                fx = energy_difference_fix(ws, d, add_missing=True)
                fixes = (fx,) if fx else ()
            yield ctx.finding(
                orbital.span,
                f"the electron affinity `{d.name}` is {orbital_phrase(coefficient, orbital)} of `{rs.name}` at "
                f"{level_label(ws, rs)}: {_reason(ws, orbital)}; compute E(neutral) - E(anion){note}",
                fixes=fixes,
            )
