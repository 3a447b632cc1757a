"""probe-overlap-conditioning: is the basis nearly linearly dependent?

Builds each distinct molecule-and-basis of the deck's states and reports
when the smallest eigenvalue of the atomic-orbital overlap matrix is below
1e-6: the SCF then works with a nearly singular metric and loses digits,
or the program silently drops functions.
"""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from .common import ProbeContext, finding

THRESHOLD = 1e-6  # catalogue: "below about 1e-6" (common practice, no source)

INFO = RuleInfo(
    id="probe-overlap-conditioning",
    severity=Severity.WARNING,
    category="probe",
    title="Near-linear dependence in the basis",
    why=(
        "Very diffuse functions, or atoms (and ghost atoms) close together, make some combinations of "
        "basis functions almost identical. The overlap matrix then has eigenvalues near zero, and the "
        "SCF either loses precision or the program removes functions without saying so, so two runs of "
        "the same deck may differ."
    ),
    references=("Catalogue threshold: smallest overlap eigenvalue below about 1e-6 (common practice, no source)",),
    bad_example=(
        "geometry he2 {\n  He 0 0 0\n  He 0 0 0.01 ghost\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz }\n"
        "state atom { geometry = he2 level = hf_adz charge = 0 multiplicity = 1 }\n"
    ),
    fires_at="atom",
    threshold_note="smallest eigenvalue below 1e-6 (catalogue, common practice)",
)


def probe(ctx: ProbeContext):
    import numpy as np

    from ..runner.pyscf_build import build_mole

    seen: set[str] = set()
    for name in ctx.ws.states:
        plan = ctx.plan(name)
        if plan is None:
            continue
        key = ctx.cache.key(plan.with_changes(charge=0, spin=0, reference="restricted"))
        if key in seen:
            continue
        seen.add(key)
        mol = build_mole(plan)
        eigenvalues = np.linalg.eigvalsh(mol.intor_symmetric("int1e_ovlp"))
        smallest = float(eigenvalues[0])
        if smallest >= THRESHOLD:
            continue
        below = int((eigenvalues < THRESHOLD).sum())
        yield finding(INFO, ctx.state_span(name), (
            f"smallest overlap eigenvalue {smallest:.1e} with {plan.basis_label} ({below} of {mol.nao} below "
            f"{THRESHOLD:g}): the basis is nearly linearly dependent for `{name}`"), {
            "basis": plan.basis_label,
            "smallest_overlap_eigenvalue": smallest,
            "below_threshold": below,
            "n_basis": int(mol.nao),
        })
