"""probe-koopmans-relaxation: orbital-energy IE against delta-SCF IE.

For every ionization-energy derive, computes at Hartree-Fock with the
deck's basis -e(HOMO) of the neutral (Koopmans' theorem) and the delta-SCF
IE (the cation is made up when the deck has none: of the two spin states next to
the neutral's, the one lower in energy), and
reports both as information: the difference is the orbital relaxation that
Koopmans' theorem leaves out.
"""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from .common import (
    ProbeContext,
    ProbeSkipped,
    experiment_evidence,
    finding,
    signed,
    skipped,
)

INFO = RuleInfo(
    id="probe-koopmans-relaxation",
    severity=Severity.INFO,
    category="probe",
    title="How much orbital relaxation Koopmans' theorem leaves out",
    why=(
        "-e(HOMO) at Hartree-Fock is the ionization energy with frozen orbitals; letting the cation's "
        "orbitals relax lowers it. Seeing both numbers for the deck's own molecule shows how much of an "
        "orbital-energy IE is relaxation (and correlation, which the probe does not include, partly "
        "cancels it)."
    ),
    references=(
        "T. Koopmans, Physica 1, 104-113 (1934), doi:10.1016/S0031-8914(34)90011-2",
        "A. Szabo, N. S. Ostlund, Modern Quantum Chemistry (Dover 1996), section 3.3",  # from memory
    ),
    bad_example=(
        "geometry hf {\n  H 0 0 0\n  F 0 0 0.917\n}\n"
        "level hf_dz { method = hf basis = cc-pvdz }\n"
        "state neutral { geometry = hf level = hf_dz charge = 0 multiplicity = 1 }\n"
        "derive ie = -orbital(neutral, homo) in ev\n"
    ),
    fires_at="ie",
    threshold_note="always reported (information)",
)


def probe(ctx: ProbeContext):
    for pair in ctx.ion_pairs(quantities=("ionization_energy",), construct=True):
        span = pair.derive.name.span
        try:
            delta, orbital = ctx.delta_and_orbital_ev(pair, pair.low, pair.high)
        except ProbeSkipped as e:
            yield skipped(INFO, span, str(e))
            continue
        relaxation = orbital - delta  # the same number, with the same sign, in the message and the evidence
        made_up = (f" (cation made up by the probe: multiplicity {pair.low.spin + 1}, the lower in energy of the "
                   "two next to the neutral's)" if pair.constructed else "")
        yield finding(INFO, span, (
            f"IE at HF/{pair.high.basis_label}{pair.also_note()}: orbital energy -e(HOMO) {orbital:.2f} eV, "
            f"delta-SCF {delta:.2f} eV{made_up}: relaxation (orbital minus delta-SCF) {signed(relaxation)} eV"), {
            "basis": pair.high.basis_label,
            "orbital_ie_ev": round(orbital, 6),
            "delta_scf_ie_ev": round(delta, 6),
            "relaxation_ev": round(relaxation, 6),
            "cation_constructed": bool(pair.constructed),
            **experiment_evidence(ctx, pair.derive, delta),
        })
