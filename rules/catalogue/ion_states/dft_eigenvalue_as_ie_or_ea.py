"""dft-eigenvalue-as-ie-or-ea: an IE or EA read off a Kohn-Sham orbital energy."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.engine.context import Context
from .derives import EA, IE, ion_derives, orbital_method
from .wording import level_label, method_text, orbital_phrase
from .ion_fixes import energy_difference_fix
from .species import unbound_anion_in
from .._examples import NO2_GEOMETRY

_HEAD = (
    NO2_GEOMETRY
    + "level b3_adz { method = b3lyp basis = aug-cc-pvdz reference = unrestricted }\n"
    "state neutral { geometry = no2 level = b3_adz charge = 0 multiplicity = 2 }\n"
    "state cation { geometry = no2 level = b3_adz charge = 1 multiplicity = 1 }\n"
)

INFO = RuleInfo(
    id="dft-eigenvalue-as-ie-or-ea",
    severity=Severity.WARNING,
    category="ion-states",
    title="Ionization energy or electron affinity from a Kohn-Sham orbital energy",
    why=(
        "Only the exact density functional makes minus the HOMO energy equal to the ionization "
        "energy. Local, semilocal, global-hybrid and untuned range-separated functionals put the "
        "HOMO several eV above -IE, and the HOMO of the anion is no better as an electron affinity "
        "(a LUMO read as an affinity is virtual-eigenvalue-as-ea's finding). "
        "The orbital energy is a number of the functional's potential, not of the ion: compute the "
        "energy difference of the two states, which these functionals describe far better."
    ),
    references=(
        "J. F. Janak, \"Proof that dE/dn_i = e_i in density-functional theory\", Phys. Rev. B 18, "
        "7165 (1978)",  # volume and page from memory
        "U. Salzner, R. Baer, J. Chem. Phys. 131, 231101 (2009) (-e(HOMO) of common functionals is "
        "not the ionization energy)",
        "N. Roesch, S. B. Trickey, J. Chem. Phys. 106, 8940 (1997) (anion HOMO energies of common "
        "functionals above zero)",  # from memory
    ),
    bad_example=_HEAD + "derive ie = -orbital(neutral, homo) in ev\n",
    fires_at="orbital(neutral, homo)",
    good_example=_HEAD + "derive ie = energy(cation) - energy(neutral) in ev\n",
    fix=Applicability.RISKY,
    fix_note=(
        "Rewrites the derive as the energy difference (IE = E(cation) - E(neutral), EA = E(neutral) - "
        "E(anion)) when the ion state of the same geometry exists. Risky: the number changes meaning."
    ),
    fixed_example=_HEAD + "derive ie = energy(cation) - energy(neutral) in ev\n",
)


def check(ctx: Context):
    ws = ctx.workspace
    for d in ion_derives(ws):
        if unbound_anion_in(ws, d) is not None:
            continue  # unbound-anion explains what is wrong with any such number
        for coefficient, orbital in d.form.orbitals:
            if d.quantity == EA and orbital.orbital.value == "lumo":
                continue  # virtual-eigenvalue-as-ea speaks, with the Kohn-Sham reasons
            found = orbital_method(ws, orbital)
            if found is None:
                continue
            rs, info = found
            if info.family != "dft" or info.eigenvalues_approximate_ie:
                continue
            method = method_text(ws, rs)
            if d.quantity == IE:
                why = (
                    f"Kohn-Sham orbital energies of {method} are not tuned to ionization energies; common "
                    f"functionals put the HOMO several eV above -IE"
                )
            else:
                why = (
                    f"with {method} the anion's HOMO lies well above -EA (the self-interaction error of "
                    f"common functionals often leaves it above zero for small anions); the energy difference "
                    f"of the two states does far better"
                )
            fx = energy_difference_fix(ws, d) if d.orbital_term is not None else None
            yield ctx.finding(
                orbital.span,
                f"the {d.noun} `{d.name}` is {orbital_phrase(coefficient, orbital)} of `{rs.name}` at "
                f"{level_label(ws, rs)}: {why}",
                fixes=(fx,) if fx else (),
            )
