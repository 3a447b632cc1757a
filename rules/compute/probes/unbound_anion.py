"""probe-unbound-anion: is the anion's extra electron bound at all?

Computes, at Hartree-Fock with the deck's own basis, the anion's HOMO
energy and the delta-SCF EA.  A positive HOMO energy says the extra electron
is not bound even in the anion's own field; a negative delta-SCF EA with a
negative HOMO says the anion lies above the neutral at this level although
its orbital is bound.  What that means depends on the species: for one with
no bound gas-phase anion any bound-looking number belongs to the basis; for
one whose anion is bound (O-, OH-) Hartree-Fock's missing correlation is
the likelier cause once the basis has diffuse functions.  Species and
measured electron affinities come from ``rules/knowledge/reference_data.py``.
"""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from deckward.rules.knowledge import basis_families, reference_data, units
from deckward.rules.knowledge.reference_data import Species
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
        "as diffuse functions are added). Many anions that do exist are underbound by Hartree-Fock, "
        "which lacks correlation: for O- and OH- in a diffuse basis that, not the basis, is the likelier "
        "cause. The probe names the species when it knows it and says which explanation fits."
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


def _cause(species: Species | None, diffuse_basis: bool) -> str:
    """Which explanation fits: the basis, the missing correlation, or either."""
    if species is not None and species.anion_bound is False:
        return (f"{species.name} ({species.key}) has no bound gas-phase anion ({species.anion_source}), so a "
                f"bound-looking EA from this set-up belongs to the basis")
    if species is not None and species.anion_bound is True:
        measured = species.electron_affinity
        ea = f"measured EA {reference_data.format_value(measured)}, {measured.source}" if measured else species.anion_source
        if diffuse_basis:
            return (f"{species.name} ({species.key}) has a bound anion ({ea}) and this basis already has diffuse "
                    f"functions, so the likelier cause is Hartree-Fock's missing correlation, which underbinds "
                    f"anions (O- and OH- are the classic cases): the deck's correlated method may well bind it")
        return (f"{species.name} ({species.key}) has a bound anion ({ea}): at Hartree-Fock both the missing "
                f"correlation and this basis's missing diffuse functions underbind it (probe-basis-sensitivity "
                f"shows the basis's share)")
    return ("either the anion is not bound, and a bound-looking EA from this set-up belongs to the basis, or it is "
            "bound only with correlation, which Hartree-Fock lacks; check with larger diffuse sets and a correlated "
            "method")


def verdict(anion: str, basis: str, homo_ev: float, delta_ev: float,
            species: Species | None, diffuse_basis: bool) -> str | None:
    """The message for an anion with this HOMO energy and delta-SCF EA (eV)
    at HF, or None when the extra electron is bound on both counts."""
    if homo_ev <= 0 and delta_ev >= 0:
        return None
    if homo_ev > 0:
        head = f"at HF/{basis} the extra electron of `{anion}` is not bound: its HOMO energy is {signed(homo_ev)} eV (above zero)"
        if delta_ev < 0:
            head += f" and the delta-SCF EA is {signed(delta_ev)} eV (the anion lies higher)"
    else:
        head = (f"at HF/{basis} `{anion}` lies above the neutral: the delta-SCF EA is {signed(delta_ev)} eV (the anion "
                f"lies higher), although its HOMO energy, {signed(homo_ev)} eV, is below zero")
    return f"{head}; {_cause(species, diffuse_basis)}"


def _species(plan) -> Species | None:
    from deckward.rules.knowledge.geometry import scale_to_angstrom

    scale = scale_to_angstrom(plan.unit)
    real = [a for a in plan.atoms if not a.ghost]
    return reference_data.identify([a.symbol for a in real], [tuple(c * scale for c in a.xyz) for a in real])


def _diffuse_basis(plan) -> bool:
    """Every element gets a diffuse-augmented library set (the augmented
    members of ``basis_families``) or shells of its own added."""
    augmented = set(basis_families.AUGMENTED.values())
    return all(eb.shells or eb.library in augmented for _, eb in plan.basis)


def probe(ctx: ProbeContext):
    for pair in ctx.ion_pairs(quantities=("electron_affinity",), construct=False):
        span = pair.derive.name.span
        try:
            delta, _ = ctx.delta_and_orbital_ev(pair, pair.low, pair.high)
            homo = units.from_hartree(ctx.hf(pair.high)["orbitals"]["any"]["occupied"][0], "ev")
        except ProbeSkipped as e:
            yield skipped(INFO, span, str(e))
            continue
        message = verdict(pair.high.name, pair.high.basis_label, homo, delta, _species(pair.high),
                          diffuse_basis=_diffuse_basis(pair.high))
        if message is None:
            continue
        if pair.also:
            message = message.replace(f"at HF/{pair.high.basis_label}", f"at HF/{pair.high.basis_label}"
                                      f"{pair.also_note()}", 1)
        yield finding(INFO, span, message, {
            "basis": pair.high.basis_label,
            "anion_homo_ev": round(homo, 6),
            "delta_scf_ev": round(delta, 6),
        })
