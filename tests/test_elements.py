"""Element table: covalent radii, symbols, electron counting."""

import json

import pytest

from build_data_script import build_data
from deckward.rules.knowledge import elements

# Cordero et al., "Covalent radii revisited", Dalton Trans. 2008, 2832
# (check-values.md section 4), angstrom.  For carbon PySCF stores the sp2
# radius, 0.73 (sp3 is 0.76, sp 0.69).
CORDERO_2008 = {
    "H": 0.31, "He": 0.28, "Li": 1.28, "Be": 0.96, "B": 0.84, "C": 0.73,
    "N": 0.71, "O": 0.66, "F": 0.57, "Ne": 0.58, "Na": 1.66, "Mg": 1.41,
    "Al": 1.21, "Si": 1.11, "P": 1.07, "S": 1.05, "Cl": 1.02, "Ar": 1.06,
    "Br": 1.20, "I": 1.39,
}


@pytest.mark.parametrize("symbol,radius", sorted(CORDERO_2008.items()))
def test_covalent_radii_are_cordero_2008(symbol, radius):
    assert elements.lookup(symbol).covalent_radius == pytest.approx(radius, abs=1e-9)


def test_h2_bond_is_near_twice_the_h_radius():
    # r(H-H) in H2 = 0.7414 A (check-values.md section 4): within 0.2 A of 2 r(H)
    assert abs(2 * elements.lookup("H").covalent_radius - 0.7414) < 0.2


@pytest.mark.parametrize("text", ["cl", "Cl", "CL", " cl "])
def test_lookup_ignores_case(text):
    element = elements.lookup(text)
    assert (element.symbol, element.z, element.name) == ("Cl", 17, "Chlorine")


@pytest.mark.parametrize("text", ["X", "Gh", "Xx", "", "ghost", "C1"])
def test_non_elements_are_none(text):
    assert elements.lookup(text) is None


def test_table_runs_from_hydrogen_to_oganesson():
    symbols = elements.all_symbols()
    assert symbols[0] == "H" and symbols[-1] == "Og" and len(symbols) == 118
    assert elements.by_number(8).symbol == "O"
    # Cordero 2008 stops at curium (Z = 96)
    assert elements.lookup("Cm").covalent_radius is not None
    assert elements.lookup("Bk").covalent_radius is None


def test_closest_symbols():
    assert elements.closest_symbols("cl") == ["Cl"]
    assert "Cl" in elements.closest_symbols("Cll")
    assert elements.closest_symbols("Qq") == []
    assert len(elements.closest_symbols("Cx", n=3)) == 3
    assert all(s.startswith("C") for s in elements.closest_symbols("Cx", n=3))


def test_electron_count():
    # NO2 neutral: 7 + 8 + 8 = 23 electrons; anion 24
    no2 = [("N", False), ("O", False), ("o", False)]
    assert elements.electron_count(no2, 0) == 23
    assert elements.electron_count(no2, -1) == 24
    # ghost atoms bring no electrons
    assert elements.electron_count(no2 + [("Cl", True)], 0) == 23
    assert elements.electron_count([("Zz", False)], 0) is None
    assert elements.electron_count([("Zz", True), ("H", False)], 0) == 1


def test_json_is_what_build_data_makes_from_installed_pyscf():
    stored = json.loads(build_data.ELEMENTS_FILE.read_text())
    fresh = build_data.build_elements()
    assert stored == fresh, (
        f"rules/knowledge/data/elements.json was built with PySCF {stored.get('pyscf_version')}, "
        f"installed is {fresh['pyscf_version']}: run python bench/build_data.py"
    )
