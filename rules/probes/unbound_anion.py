"""probe-unbound-anion: is the anion's extra electron bound at all?

Computes, at Hartree-Fock with the deck's own basis, the anion's HOMO
energy and the delta-SCF EA.  A positive HOMO energy, or a negative
delta-SCF EA, says the extra electron is not bound at this level: a bound
number from the deck's method then rests on the basis holding the electron
artificially close, or on correlation alone (check with larger, diffuse sets).
"""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from .. import units
from .common import ProbeContext, ProbeSkipped, finding, signed, skipped

INFO = RuleInfo(
    id="probe-unbound-anion",
    severity=Severity.WARNING,
    category="probe",
    title="The anion is not bound at Hartree-Fock with the deck's basis",
    why=(
        "When the anion's highest occupied orbital lies above zero, or the anion is higher in energy than "
        "the neutral, the extra electron is not bound at this level. A finite basis then confines it "
        "artificially, and the number a deck reports is a property of the basis (it drifts towards zero "
        "as diffuse functions are added). Some anions are bound only with correlation, which Hartree-Fock "
        "lacks; the probe says where the deck should look harder."
    ),
    references=(
        "F. Jensen, J. Chem. Theory Comput. 6, 2726 (2010)",
        "M. J. G. Peach, F. De Proft, D. J. Tozer, J. Phys. Chem. Lett. 1, 2826 (2010)",
    ),
    bad_example=(
        "geometry n2 {\n  N 0 0 0\n  N 0 0 1.0977\n}\n"
        "level hf_dz { method = hf basis = cc-pvdz }\n"
        "state neutral { geometry = n2 level = hf_dz charge = 0 multiplicity = 1 }\n"
        "state anion { geometry = n2 level = hf_dz charge = -1 multiplicity = 2 }\n"
        "derive ea = energy(neutral) - energy(anion) in ev\n"
    ),
    fires_at="ea",
    good_example=(
        "geometry f { F 0 0 0 }\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz }\n"
        "state neutral { geometry = f level = hf_adz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = f level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea = energy(neutral) - energy(anion) in ev\n"
    ),
    threshold_note="HOMO > 0 or delta-SCF EA < 0 (the definition of an unbound electron)",
)


def probe(ctx: ProbeContext):
    for pair in ctx.ion_pairs(quantities=("electron_affinity",), construct=False):
        span = pair.derive.name.span
        try:
            delta, _ = ctx.delta_and_orbital_ev(pair, pair.low, pair.high)
            homo = units.from_hartree(ctx.hf(pair.high)["orbitals"]["any"]["occupied"][0], "ev")
        except ProbeSkipped as e:
            yield skipped(INFO, span, str(e))
            continue
        if homo <= 0 and delta >= 0:
            continue
        reasons = []
        if homo > 0:
            reasons.append(f"its HOMO energy is {signed(homo)} eV (above zero)")
        if delta < 0:
            reasons.append(f"the delta-SCF EA is {signed(delta)} eV (the anion lies higher)")
        message = (f"at HF/{pair.high.basis_label}{pair.also_note()} the extra electron of `{pair.high.name}` is not bound: "
                   + " and ".join(reasons)
                   + "; a bound-looking EA from this set-up may be a basis-set artefact")
        yield finding(INFO, span, message, {
            "basis": pair.high.basis_label,
            "anion_homo_ev": round(homo, 6),
            "delta_scf_ev": round(delta, 6),
        })
