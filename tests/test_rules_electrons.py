"""Electron bookkeeping rules: unknown-element and charge-multiplicity-mismatch.

Electron counts and the parity verdict are checked against the reference
library: PySCF's own ``gto.Mole`` counts electrons (ghost atoms included,
written ``ghost-O``) and refuses a charge/spin pair that cannot exist.
"""
import pytest

from deckward.rules.catalogue.electrons.charge_multiplicity_mismatch import consistent_multiplicities
from deckward.rules.fixes.edits import apply_edits
from rule_harness import check_text, covered

NO2 = "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"


# --- unknown-element ---------------------------------------------------------


def test_unknown_element_message_position_and_fix():
    text = "geometry cn {\n  C 0 0 0\n  Nx 0 0 1.1718\n}\n"
    findings, _ = check_text(text, select={"unknown-element"})
    [f] = findings
    assert f.rule == "unknown-element"
    assert f.message == "`Nx` (atom 2 of geometry `cn`) is not an element symbol; did you mean `N`?"
    assert (f.span.line, f.span.column, f.span.end_line, f.span.end_column) == (3, 3, 3, 5)
    assert covered(f, text) == "Nx"
    [fx] = f.fixes
    assert fx.applicability.value == "risky"
    assert apply_edits(text, fx.edits) == "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"


def test_symbols_in_any_letter_case_and_ghosts_are_elements():
    text = "geometry w {\n  o 0 0 0\n  H 0 0.7572 0.5859\n  h 0 -0.7572 0.5859\n  CL 0 0 3 ghost\n}\n"
    findings, _ = check_text(text, select={"unknown-element"})
    assert findings == []


def test_label_instead_of_symbol_is_reported_once_per_atom():
    text = "geometry no2 {\n  N 0 0 0\n  O1 0 1.0989 0.4653\n  O2 0 -1.0989 0.4653\n}\n"
    findings, _ = check_text(text, select={"unknown-element"})
    assert [(f.span.line, covered(f, text)) for f in findings] == [(3, "O1"), (4, "O2")]
    assert findings[0].message.startswith("`O1` (atom 2 of geometry `no2`) is not an element symbol")


# --- charge-multiplicity-mismatch --------------------------------------------


def test_anion_of_no2_with_even_multiplicity():
    text = NO2 + "state anion { geometry = no2 charge = -1 multiplicity = 2 }\n"
    findings, _ = check_text(text, select={"charge-multiplicity-mismatch"})
    [f] = findings
    assert f.message == (
        "state `anion` has 24 electrons (23 from the nuclei of `no2`, charge -1), "
        "so its multiplicity must be odd; 2 is even"
    )
    assert (f.span.line, f.span.column) == (6, 57)
    assert covered(f, text) == "2"
    assert [x.title for x in f.fixes] == ["Set multiplicity = 1", "Set multiplicity = 3"]
    assert all(x.applicability.value == "risky" for x in f.fixes)
    fixed = apply_edits(text, f.fixes[0].edits)
    assert fixed == NO2 + "state anion { geometry = no2 charge = -1 multiplicity = 1 }\n"
    after, _ = check_text(fixed, select={"charge-multiplicity-mismatch"})
    assert after == []


def test_neutral_no2_doublet_and_cation_singlet_are_consistent():
    text = (
        NO2
        + "state neutral { geometry = no2 charge = 0 multiplicity = 2 }\n"
        + "state cation { geometry = no2 charge = 1 multiplicity = 1 }\n"
        + "state quartet { geometry = no2 charge = 0 multiplicity = 4 }\n"
    )
    findings, _ = check_text(text, select={"charge-multiplicity-mismatch"})
    assert findings == []


def test_multiplicity_higher_than_electron_count_allows():
    text = "geometry h {\n  H 0 0 0\n}\nstate atom { geometry = h charge = 0 multiplicity = 4 }\n"
    findings, _ = check_text(text, select={"charge-multiplicity-mismatch"})
    [f] = findings
    assert f.message == (
        "state `atom` has 1 electron (1 from the nuclei of `h`, charge 0), so at most 1 can be "
        "unpaired and its multiplicity can be at most 2; 4 is too high"
    )
    assert covered(f, text) == "4"
    assert [x.title for x in f.fixes] == ["Set multiplicity = 2"]


def test_charge_above_nuclear_charge_points_at_the_charge():
    text = "geometry h {\n  H 0 0 0\n}\nstate bare { geometry = h charge = 3 }\n"
    findings, _ = check_text(text, select={"charge-multiplicity-mismatch"})
    [f] = findings
    assert f.message == (
        "state `bare` would have -2 electrons (1 from the nuclei of `h`, charge +3): "
        "the charge exceeds the nuclear charge"
    )
    assert covered(f, text) == "3"
    assert (f.span.line, f.span.column) == (4, 36)
    assert f.fixes == ()


def test_missing_multiplicity_is_not_a_mismatch():
    # The lowest consistent multiplicity is used when none is written.
    text = NO2 + "state neutral { geometry = no2 charge = 0 }\n"
    findings, _ = check_text(text, select={"charge-multiplicity-mismatch"})
    assert findings == []


def test_ghost_atoms_add_no_electrons():
    text = (
        "geometry no2_cp {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n"
        "  O 0 0 3.5 ghost\n  H 0 0.7572 4.0859 ghost\n  H 0 -0.7572 4.0859 ghost\n}\n"
        "state neutral { geometry = no2_cp charge = 0 multiplicity = 1 }\n"
    )
    findings, _ = check_text(text, select={"charge-multiplicity-mismatch"})
    [f] = findings
    assert f.message == (
        "state `neutral` has 23 electrons (23 from the nuclei of `no2_cp`, whose ghost atoms add "
        "none, charge 0), so its multiplicity must be even; 1 is odd"
    )


def test_unknown_element_or_empty_geometry_gives_no_count():
    text = (
        "geometry bad {\n  Qq 0 0 0\n}\ngeometry empty {\n}\n"
        "state a { geometry = bad multiplicity = 2 }\nstate b { geometry = empty multiplicity = 2 }\n"
    )
    findings, _ = check_text(text, select={"charge-multiplicity-mismatch"})
    assert findings == []


@pytest.mark.parametrize(
    "electrons, multiplicity, expected",
    [(24, 2, [1, 3]), (1, 1, [2]), (0, 2, [1]), (1, 4, [2]), (3, 5, [4]), (-1, 1, [])],
)
def test_nearest_consistent_multiplicities(electrons, multiplicity, expected):
    assert consistent_multiplicities(electrons, multiplicity) == expected


# --- check against the reference library (PySCF) ---------------------------

# (atoms as (symbol, x, y, z, ghost), charge, multiplicity)
_W = [("O", 0, 0, 0, False), ("H", 0, 0.7572, 0.5859, False), ("H", 0, -0.7572, 0.5859, False)]
_W_GHOST = [("O", 0, 0, 3.0, True), ("H", 0, 0.7572, 3.5859, True), ("H", 0, -0.7572, 3.5859, True)]
_NO2 = [("N", 0, 0, 0, False), ("O", 0, 1.0989, 0.4653, False), ("O", 0, -1.0989, 0.4653, False)]
_CN = [("C", 0, 0, 0, False), ("N", 0, 0, 1.1718, False)]
_HCO2 = [("C", 0, 0, 0, False), ("H", 0, 0, 1.10, False), ("O", 0, 1.04, -0.70, False), ("O", 0, -1.04, -0.70, False)]
PYSCF_CASES = [
    (_NO2, 0, 2), (_NO2, -1, 1), (_NO2, -1, 2), (_NO2, -1, 3), (_NO2, 1, 1), (_NO2, 0, 1),
    (_CN, 0, 2), (_CN, -1, 1), (_CN, -1, 2), (_CN, 0, 4), (_CN, 0, 3),
    (_HCO2, 0, 2), (_HCO2, -1, 1), (_HCO2, -1, 2),
    (_W, 0, 1), (_W, 0, 2), (_W, 1, 2), (_W, 0, 13), (_W, 11, 1), (_W, 0, 11),
    (_W + _W_GHOST, 0, 1), (_W + _W_GHOST, 0, 2), (_W_GHOST + _CN, -1, 1), (_W_GHOST + _CN, 0, 1),
    ([("H", 0, 0, 0, False)], 0, 4), ([("H", 0, 0, 0, False)], 1, 1), ([("H", 0, 0, 0, False)], 2, 1),
]


def _pyscf_accepts(atoms, charge, multiplicity):
    """(accepted, electron count) from PySCF's own Mole."""
    from pyscf import gto

    mol = gto.Mole()
    mol.atom = [(("ghost-" if g else "") + s, (x, y, z)) for s, x, y, z, g in atoms]
    mol.basis = "sto-3g"
    mol.charge = charge
    mol.spin = multiplicity - 1
    mol.verbose = 0
    try:
        mol.build()
        mol.nelec  # PySCF asserts both spin counts are >= 0 here
    except (RuntimeError, AssertionError):
        return False, mol.nelectron
    return True, mol.nelectron


@pytest.mark.parametrize("atoms, charge, multiplicity", PYSCF_CASES)
def test_reference_library_pyscf_agrees_on_electron_count_and_verdict(atoms, charge, multiplicity):
    from deckward.rules.knowledge import deck_facts

    lines = "".join(f"  {s} {x} {y} {z}{' ghost' if g else ''}\n" for s, x, y, z, g in atoms)
    text = f"geometry g {{\n{lines}}}\nstate s {{ geometry = g charge = {charge} multiplicity = {multiplicity} }}\n"
    findings, ws = check_text(text, select={"charge-multiplicity-mismatch"})
    accepted, nelectron = _pyscf_accepts(atoms, charge, multiplicity)
    assert deck_facts.electron_count(ws.states["s"]) == nelectron
    assert (findings == []) == accepted
