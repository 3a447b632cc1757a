"""koopmans-ip: an ionization energy from -e(HOMO) of a Hartree-Fock-based level."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.engine.context import Context
from .derives import IE, ion_derives, orbital_method
from .wording import level_label, method_text, orbital_phrase
from .ion_fixes import energy_difference_fix
from .._examples import NO2_NEUTRAL_AND_CATION

_HEAD = NO2_NEUTRAL_AND_CATION

INFO = RuleInfo(
    id="koopmans-ip",
    severity=Severity.INFO,
    category="ion-states",
    title="Ionization energy from the Hartree-Fock HOMO energy (Koopmans' theorem)",
    why=(
        "Minus the HOMO energy of a Hartree-Fock calculation is the ionization energy with frozen "
        "orbitals: the cation's orbitals are not allowed to relax and electron correlation is "
        "missing. Relaxation would lower the cation's energy, so the value is usually too large; "
        "the missing correlation pulls the other way, and the two errors cancel in part, often but "
        "not always. Correlated wavefunction levels (MP2, coupled cluster) report the orbital "
        "energies of their Hartree-Fock reference, so the same holds there. E(cation) - E(neutral) "
        "includes both effects."
    ),
    references=(
        "T. Koopmans, Physica 1, 104-113 (1934), doi:10.1016/S0031-8914(34)90011-2",
        "IUPAC Gold Book, Koopmans' theorem, K03411 (Pure Appl. Chem. 71, 1919 (1999), p. 1949)",
        "A. Szabo, N. S. Ostlund, Modern Quantum Chemistry (Dover 1996), section 3.3 (Koopmans "
        "ionization energies too large; correlation partly cancels)",  # from memory
    ),
    bad_example=_HEAD + "derive ie = -orbital(neutral, homo) in ev\n",
    fires_at="orbital(neutral, homo)",
    good_example=_HEAD + "derive ie = energy(cation) - energy(neutral) in ev\n",
    fix=Applicability.RISKY,
    fix_note=(
        "Rewrites the derive as energy(cation) - energy(neutral) when a cation of the same geometry "
        "exists (missing-ion-state adds one otherwise). Risky: the number changes meaning."
    ),
    fixed_example=_HEAD + "derive ie = energy(cation) - energy(neutral) in ev\n",
)


def check(ctx: Context):
    ws = ctx.workspace
    for d in ion_derives(ws):
        term = d.orbital_term
        if d.quantity != IE or term is None:
            continue
        coefficient, orbital = term
        if orbital.orbital.value != "homo" or coefficient >= 0:
            continue
        found = orbital_method(ws, orbital)
        if found is None:
            continue
        rs, info = found
        if info.family == "dft" or not info.eigenvalues_approximate_ie:
            continue
        if info.family == "hf":
            where = f"at {level_label(ws, rs)} (Koopmans' theorem)"
        else:
            where = (
                f"at {level_label(ws, rs)}, whose orbital energies are those of its Hartree-Fock reference "
                f"(Koopmans' theorem; the {method_text(ws, rs)} correlation never enters the number)"
            )
        fx = energy_difference_fix(ws, d)
        yield ctx.finding(
            orbital.span,
            f"the ionization energy `{d.name}` is {orbital_phrase(coefficient, orbital)} of `{rs.name}` {where}: "
            f"frozen orbitals, no relaxation of the cation and no correlation; such values are usually too "
            f"large, with errors that cancel only in part",
            fixes=(fx,) if fx else (),
        )
