"""virtual-eigenvalue-as-ea: an electron affinity read off a virtual orbital energy."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from ..context import Context
from ..ion_states import EA, energy_difference_fix, ion_derives, level_label, orbital_pair, orbital_phrase

_HEAD = (
    "geometry no2 {\n"
    "  N  0.000000  0.000000  0.000000\n"
    "  O  0.000000  1.098900  0.465300\n"
    "  O  0.000000 -1.098900  0.465300\n"
    "}\n"
    "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    "state neutral { geometry = no2 level = hf_adz charge = 0 multiplicity = 2 }\n"
    "state anion { geometry = no2 level = hf_adz charge = -1 multiplicity = 1 }\n"
)

INFO = RuleInfo(
    id="virtual-eigenvalue-as-ea",
    severity=Severity.WARNING,
    category="ion-states",
    title="Electron affinity from a virtual orbital energy",
    why=(
        "Minus the LUMO energy of the neutral is the Koopmans estimate of an electron affinity: the "
        "extra electron sits in an orbital shaped by the neutral's frozen field, with no relaxation "
        "of the other electrons and no correlation. Unlike the ionization case, the two neglected "
        "effects do not cancel but add, so the estimate is too small, and virtual orbital energies "
        "drift with the basis set (towards zero from above for an unbound anion as diffuse "
        "functions are added). Compute E(neutral) - E(anion) instead."
    ),
    references=(
        "T. Koopmans, Physica 1, 104-113 (1934), doi:10.1016/S0031-8914(34)90011-2",
        "A. Szabo, N. S. Ostlund, Modern Quantum Chemistry (Dover 1996), section 3.3 (Koopmans' "
        "electron affinities: relaxation and correlation errors add) [from memory]",
        "F. Jensen, J. Chem. Theory Comput. 6, 2726 (2010) (anions and diffuse functions; virtual "
        "orbital energies depend on the basis)",
        "J. C. Rienstra-Kiracofe et al., Chem. Rev. 102, 231-282 (2002)",
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


def check(ctx: Context):
    ws = ctx.workspace
    for d in ion_derives(ws):
        if d.quantity != EA:
            continue
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
                f"{level_label(ws, rs)}: a virtual orbital energy is not the energy of a bound extra electron; "
                f"it has no relaxation and no correlation (both make it too small) and it drifts with the "
                f"basis set; compute E(neutral) - E(anion){note}",
                fixes=fixes,
            )
