"""Energy and length units, from CODATA 2018.

Values: E. Tiesinga, P. J. Mohr, D. B. Newell, B. N. Taylor, "CODATA
recommended values of the fundamental physical constants: 2018",
Rev. Mod. Phys. 93, 025010 (2021).  Since the 2019 SI revision the
Avogadro constant and the elementary charge are exact, so the per-mole and
electronvolt conversions follow from the hartree energy in joules alone.
The kilocalorie is the thermochemical one (1 cal = 4.184 J exactly).

Deck energies are in hartree; a ``derive ... in UNIT`` converts with
``from_hartree``.
"""

from __future__ import annotations

# CODATA 2018 (Tiesinga et al. 2021)
HARTREE_IN_JOULE = 4.3597447222071e-18  # E_h, J
ELEMENTARY_CHARGE = 1.602176634e-19  # e, C (exact)
AVOGADRO = 6.02214076e23  # N_A, 1/mol (exact)
BOHR_IN_ANGSTROM = 0.529177210903  # a_0, angstrom
THERMOCHEMICAL_CALORIE_IN_JOULE = 4.184  # exact by definition

ANGSTROM_IN_BOHR = 1.0 / BOHR_IN_ANGSTROM

HARTREE_IN_EV = HARTREE_IN_JOULE / ELEMENTARY_CHARGE
HARTREE_IN_KJ_PER_MOL = HARTREE_IN_JOULE * AVOGADRO / 1000.0
HARTREE_IN_KCAL_PER_MOL = HARTREE_IN_KJ_PER_MOL / THERMOCHEMICAL_CALORIE_IN_JOULE

# Unit words of the deck language (`in UNIT`), lower case, and how many of
# each make one hartree.
ENERGY_UNITS: dict[str, float] = {
    "hartree": 1.0,
    "ev": HARTREE_IN_EV,
    "kcal/mol": HARTREE_IN_KCAL_PER_MOL,
    "kj/mol": HARTREE_IN_KJ_PER_MOL,
}


# How each unit word is written for a reader (SI symbols: eV, kJ/mol).
UNIT_SYMBOLS: dict[str, str] = {"hartree": "hartree", "ev": "eV", "kcal/mol": "kcal/mol", "kj/mol": "kJ/mol"}


def unit_symbol(unit: str) -> str:
    """``ev`` -> ``eV``: the unit as printed in tables and messages."""
    return UNIT_SYMBOLS.get(unit.strip().lower(), unit)


def _per_hartree(unit: str) -> float:
    try:
        return ENERGY_UNITS[unit.strip().lower()]
    except KeyError:
        known = ", ".join(ENERGY_UNITS)
        raise ValueError(f"unknown energy unit {unit!r}; known units: {known}") from None


def from_hartree(value: float, unit: str) -> float:
    """An energy given in hartree, expressed in ``unit`` (case-insensitive)."""
    return value * _per_hartree(unit)


def to_hartree(value: float, unit: str) -> float:
    """An energy given in ``unit`` (case-insensitive), expressed in hartree."""
    return value / _per_hartree(unit)
