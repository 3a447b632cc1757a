"""Unit conversions against CODATA 2018 (check-values.md section 1).

Source of every check value: E. Tiesinga, P. J. Mohr, D. B. Newell,
B. N. Taylor, "CODATA recommended values of the fundamental physical
constants: 2018", Rev. Mod. Phys. 93, 025010 (2021).
"""

import math

import pytest

from deckward.rules.knowledge import units

# CODATA 2018: E_h = 27.211386245988 eV
HARTREE_EV = 27.211386245988
# CODATA 2018: E_h * N_A = 2625.4996395 kJ/mol (N_A exact)
HARTREE_KJ_PER_MOL = 2625.4996395
# CODATA 2018 / 4.184 J per thermochemical calorie: 627.509474 kcal/mol
HARTREE_KCAL_PER_MOL = 627.509474
# CODATA 2018: a_0 = 0.529177210903 angstrom
BOHR_ANGSTROM = 0.529177210903
# exact SI: 1 eV = 96.485332 kJ/mol (to the digits given) = 23.060548 kcal/mol
EV_KJ_PER_MOL = 96.485332
EV_KCAL_PER_MOL = 23.060548


def test_hartree_in_ev():
    assert units.from_hartree(1.0, "ev") == pytest.approx(HARTREE_EV, rel=1e-9)


def test_hartree_in_kj_per_mol():
    assert units.from_hartree(1.0, "kj/mol") == pytest.approx(HARTREE_KJ_PER_MOL, rel=1e-9)


def test_hartree_in_kcal_per_mol():
    assert units.from_hartree(1.0, "kcal/mol") == pytest.approx(HARTREE_KCAL_PER_MOL, rel=1e-6)


def test_bohr_and_angstrom():
    assert units.BOHR_IN_ANGSTROM == pytest.approx(BOHR_ANGSTROM, rel=1e-9)
    assert units.ANGSTROM_IN_BOHR * BOHR_ANGSTROM == pytest.approx(1.0, rel=1e-9)


def test_electronvolt_per_mole():
    one_ev = units.to_hartree(1.0, "ev")
    assert units.from_hartree(one_ev, "kj/mol") == pytest.approx(EV_KJ_PER_MOL, rel=1e-8)
    assert units.from_hartree(one_ev, "kcal/mol") == pytest.approx(EV_KCAL_PER_MOL, rel=1e-7)


@pytest.mark.parametrize("unit", ["hartree", "ev", "kcal/mol", "kj/mol", "EV", "Kcal/Mol"])
def test_round_trip(unit):
    assert units.to_hartree(units.from_hartree(-0.0835, unit), unit) == pytest.approx(-0.0835)


def test_energy_units_are_the_deck_words():
    # deck-language.md: `in UNIT` takes hartree, ev, kcal/mol, kj/mol
    assert set(units.ENERGY_UNITS) == {"hartree", "ev", "kcal/mol", "kj/mol"}
    assert units.from_hartree(0.5, "hartree") == 0.5


def test_unknown_unit_is_a_clear_error():
    with pytest.raises(ValueError, match="unknown energy unit 'kelvin'"):
        units.from_hartree(1.0, "kelvin")
    assert math.isfinite(units.to_hartree(1.0, "kj/mol"))


def test_unit_symbols_are_written_as_a_reader_expects():
    # SI symbols (BIPM, The International System of Units, 9th edition, 2019): eV, kJ/mol.
    assert [units.unit_symbol(u) for u in ("ev", "EV", "kj/mol", "kcal/mol", "hartree")] == [
        "eV", "eV", "kJ/mol", "kcal/mol", "hartree"]
