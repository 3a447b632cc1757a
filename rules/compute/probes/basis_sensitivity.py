"""probe-basis-sensitivity: does adding diffuse functions change the answer?

Computes the delta-SCF EA (or IE) and its orbital-energy estimate at
Hartree-Fock with the deck's basis and with the augmented counterpart of
every library set in it (rules/knowledge/basis_families.py), making up the missing
ion when the deck only has an orbital-energy estimate; reports when the
delta-SCF value moves by more than ``probe.threshold_ev`` (default 0.1 eV).
"""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from .common import (
    ProbeContext,
    ProbeSkipped,
    augmented_plan,
    experiment_evidence,
    finding,
    signed,
    skipped,
)

INFO = RuleInfo(
    id="probe-basis-sensitivity",
    severity=Severity.WARNING,
    category="probe",
    title="The EA or IE changes when diffuse functions are added",
    why=(
        "An anion's extra electron, and the tail of any weakly bound electron, need diffuse functions. If "
        "the delta-SCF number moves when the basis gains them, the deck's value is set by the basis, not "
        "by the molecule. The probe shows both numbers at Hartree-Fock, where the calculation is cheap; "
        "the sensitivity carries over to correlated methods, which need the diffuse functions even more."
    ),
    references=(
        "R. A. Kendall, T. H. Dunning Jr., R. J. Harrison, J. Chem. Phys. 96, 6796 (1992)",
        "F. Jensen, J. Chem. Theory Comput. 6, 2726 (2010)",
    ),
    bad_example=(
        "geometry c { C 0 0 0 }\n"
        "level hf_dz { method = hf basis = 6-31g* }\n"
        "state neutral { geometry = c level = hf_dz charge = 0 multiplicity = 3 }\n"
        "state anion { geometry = c level = hf_dz charge = -1 multiplicity = 4 }\n"
        "derive ea = energy(neutral) - energy(anion) in ev\n"
    ),
    fires_at="ea",
    good_example=(
        "geometry c { C 0 0 0 }\n"
        "level hf_adz { method = hf basis = aug-cc-pvtz }\n"
        "state neutral { geometry = c level = hf_adz charge = 0 multiplicity = 3 }\n"
        "state anion { geometry = c level = hf_adz charge = -1 multiplicity = 4 }\n"
        "derive ea = energy(neutral) - energy(anion) in ev\n"
    ),
    threshold_note="0.1 eV (catalogue default, common practice, no source); probe.threshold_ev in deckward.yaml",
)

_NAMES = {"electron_affinity": "EA", "ionization_energy": "IE"}


def probe(ctx: ProbeContext):
    for pair in ctx.ion_pairs(construct=True):
        span = pair.derive.name.span
        low_aug, high_aug = augmented_plan(pair.low), augmented_plan(pair.high)
        if low_aug is None or high_aug is None:
            continue  # already augmented (or no counterpart): nothing to compare
        try:
            d0, o0 = ctx.delta_and_orbital_ev(pair, pair.low, pair.high)
            d1, o1 = ctx.delta_and_orbital_ev(pair, low_aug, high_aug)
        except ProbeSkipped as e:
            yield skipped(INFO, span, str(e))
            continue
        shift = d1 - d0
        threshold = ctx.settings.threshold_ev
        if abs(shift) <= threshold:
            continue
        q = _NAMES[pair.quantity]
        b0, b1 = pair.low.basis_label, low_aug.basis_label
        orbital = "-e(LUMO)" if q == "EA" else "-e(HOMO)"
        verdict = ("the basis decides the sign" if (d0 < 0) != (d1 < 0)
                   else f"it moves by {abs(shift):.2f} eV (threshold {threshold:g} eV)")
        message = (f"delta-SCF {q} at HF{pair.also_note()}: {signed(d0)} eV with {b0}, {signed(d1)} eV with {b1}: {verdict}; "
                   f"orbital estimate {orbital}: {signed(o0)} eV -> {signed(o1)} eV")
        if pair.constructed:
            ion = "anion" if q == "EA" else "cation"
            made = pair.high if pair.constructed == "high" else pair.low
            message += (f" (the deck has no {ion}: the probe computed one at the same geometry, multiplicity "
                        f"{made.spin + 1}, the lower in energy of the two next to the neutral's)")
        yield finding(INFO, span, message, {
            "quantity": pair.quantity,
            "basis": b0,
            "augmented_basis": b1,
            "delta_scf_ev": round(d0, 6),
            "delta_scf_augmented_ev": round(d1, 6),
            "orbital_estimate_ev": round(o0, 6),
            "orbital_estimate_augmented_ev": round(o1, 6),
            "shift_ev": round(shift, 6),
            "threshold_ev": threshold,
            **experiment_evidence(ctx, pair.derive, d0),
        })
