"""multiplicity-not-ground-state: a state whose multiplicity is not the tabulated ground state's."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, Related, RuleInfo, Severity

from deckward.rules.knowledge import deck_facts
from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace
from deckward.rules.catalogue.ion_states.species import species_of
from deckward.rules.fixes.state_text import StateEditor

_O2 = "geometry o2 {\n  O 0 0 0\n  O 0 0 1.2075\n}\n"
_LEVEL = "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"

INFO = RuleInfo(
    id="multiplicity-not-ground-state",
    severity=Severity.WARNING,
    category="electrons",
    title="A multiplicity that is not the ground state's",
    why=(
        "Several common species do not have the lowest spin their electron count allows: the ground "
        "state of O2, S2, NH and CH2 is a triplet, of the C, O, Si and S atoms a triplet, of C- and N a "
        "quartet, and NO- is a triplet. Computed as singlets (or C- as a doublet), they are excited "
        "states, and an ionization energy or electron affinity built on them is off by the excitation "
        "energy, often one eV or more. Species are recognised from the geometry's atoms and bonds; the "
        "ground states come from the NIST Atomic Spectra Database (atoms) and the spectroscopic tables "
        "of Huber and Herzberg and of Herzberg (molecules). A deck that deliberately computes another "
        "spin state (study goal excitation_energy, an excitation-energy derive, or both spin states of "
        "the species side by side) is not reported."
    ),
    references=(
        "A. Kramida, Yu. Ralchenko, J. Reader and NIST ASD Team, NIST Atomic Spectra Database, "
        "physics.nist.gov/asd (ground terms of atoms and atomic ions)",  # from memory
        "K. P. Huber, G. Herzberg, Molecular Spectra and Molecular Structure IV: Constants of Diatomic "
        "Molecules (Van Nostrand 1979)",  # from memory
        "G. Herzberg, Molecular Spectra and Molecular Structure III: Electronic Spectra of Polyatomic "
        "Molecules (Van Nostrand 1966)",  # from memory
    ),
    bad_example=_O2 + _LEVEL + "state neutral { geometry = o2 level = hf_adz charge = 0 multiplicity = 1 }\n",
    fires_at="1",
    good_example=_O2 + _LEVEL + "state neutral { geometry = o2 level = hf_adz charge = 0 multiplicity = 3 }\n",
    fix=Applicability.RISKY,
    fix_note=(
        "Sets the tabulated ground-state multiplicity. Risky: a different multiplicity is a different "
        "state, and the deck may have meant the excited one."
    ),
    fixed_example=_O2 + _LEVEL + "state neutral { geometry = o2 level = hf_adz charge = 0 multiplicity = 3 }\n",
)

_WORDS = {1: "singlet", 2: "doublet", 3: "triplet", 4: "quartet", 5: "quintet", 6: "sextet", 7: "septet"}


def spin_word(multiplicity: int) -> str:
    """``triplet`` (or ``multiplicity 9`` past the named ones)."""
    return _WORDS.get(multiplicity, f"multiplicity {multiplicity}")


def _targets_excited_states(ws) -> set[str]:
    """States the deck uses in an excitation energy (or all, by the goal)."""
    study = ws.study
    if study is not None and study.goal is not None and study.goal.value == "excitation_energy":
        return set(ws.states)
    out: set[str] = set()
    for derive in ws.derives:
        if ws.quantity_of(derive) == "excitation_energy":
            out.update(deck_facts.states_of(derive))
    return out


def check(ctx: Context):
    ws = ctx.workspace
    excited = _targets_excited_states(ws)
    known = []
    for rs in ws.states.values():
        sp = species_of(rs)
        if sp is None:
            continue
        n = deck_facts.electron_count(rs)
        ground = sp.ground_multiplicity(rs.charge)
        if n is None or ground is None:
            continue
        mult = rs.multiplicity if rs.multiplicity is not None else deck_facts.lowest_multiplicity(n)
        known.append((rs, sp, mult, ground, n))
    # Spin states of one species side by side: the deck compares them on purpose.
    present = {(sp.key, rs.charge, mult) for rs, sp, mult, _, _ in known}
    for rs, sp, mult, ground, n in known:
        if mult == ground or rs.name in excited or mult < 1 or (mult - 1) % 2 != n % 2:
            continue  # charge-multiplicity-mismatch reports an impossible pair
        if (sp.key, rs.charge, ground) in present:
            continue
        written = rs.state.multiplicity
        charge = f"charge {rs.charge:+d}" if rs.charge else "charge 0"
        have = f"a {spin_word(mult)}" + ("" if written is not None else " (the lowest multiplicity, as none is set)")
        message = (
            f"state `{rs.name}` is {sp.name} ({sp.key}, {charge}) computed as {have}, but its ground state is a "
            f"{spin_word(ground)} (multiplicity {ground}; {sp.multiplicity_source}): this is an excited state, "
            f"and energies built on it are off by the excitation energy; set multiplicity = {ground}, or mark "
            f"the excited state as intended (study goal excitation_energy)"
        )
        if written is not None:
            span = written.span
            edits = (replace(span, str(ground)),)
        else:
            span = rs.state.name.span
            pf = ws.file(rs.path)
            editor = StateEditor(pf.index, rs.state)
            editor.set("multiplicity", str(ground))
            edits = tuple(editor.edits())
        yield ctx.finding(
            span,
            message,
            related=(Related(rs.state.name.span, f"state `{rs.name}`"),) if written is not None else (),
            fixes=(fix(f"Set multiplicity = {ground} ({spin_word(ground)})", *edits, risky=True),),
        )
