"""Measured reference data of the field: electron affinities, ionization
energies and ground-state multiplicities of atoms and small molecules.

The numbers are transcribed into ``rules/knowledge/data/reference_species.json`` with
the published source beside every value: atomic electron affinities from
H. Hotop and W. C. Lineberger, J. Phys. Chem. Ref. Data 14, 731 (1985) and
its update by T. Andersen, H. K. Haugen and H. Hotop, J. Phys. Chem. Ref.
Data 28, 1511 (1999), and the newer primary measurements; molecular ones
from J. C. Rienstra-Kiracofe et al., Chem. Rev. 102, 231 (2002) and the
primary photoelectron papers; ionization energies from the NIST Chemistry
WebBook and the NIST Atomic Spectra Database; ground terms of atoms from
that database, of molecules from Huber and Herzberg (1979) and Herzberg
(1966).  A value recalled rather than read from a stored copy of its source
carries ``from_memory`` (a separate field: user-facing text shows the
source, never an internal tag).

A species is recognised from a geometry's atoms: composition first, then,
when coordinates are given, its bond graph (element pairs closer than 1.25
times the sum of their covalent radii, as ``rules/knowledge/geometry.py`` perceives
bonds), which separates isomers such as formyloxyl HC(O)O from HOCO,
methoxy CH3O from hydroxymethyl CH2OH, and HCN from HNC.  Atoms that do not
form one connected molecule are no tabulated species.  Unknown species are
simply unknown (``None``).

Importing this module imports neither PySCF nor numpy (the typing path).
"""
from __future__ import annotations

import json
import math
from dataclasses import field
from functools import lru_cache
from pathlib import Path
from typing import Iterator, Mapping, Optional, Sequence

from deckward.grammar.records import record
from . import elements
from .geometry import BOND_TOLERANCE, union_find_root

_DATA_FILE = Path(__file__).resolve().parent / "data" / "reference_species.json"


class FrozenMap(Mapping):
    """A read-only, hashable mapping, so a frozen ``Species`` stays hashable."""

    __slots__ = ("_items",)

    def __init__(self, items: Mapping):
        self._items = dict(items)

    def __getitem__(self, key):
        return self._items[key]

    def __iter__(self) -> Iterator:
        return iter(self._items)

    def __len__(self) -> int:
        return len(self._items)

    def __hash__(self) -> int:
        return hash(frozenset(self._items.items()))

    def __eq__(self, other) -> bool:
        return isinstance(other, Mapping) and dict(self._items) == dict(other)

    def __repr__(self) -> str:
        return repr(self._items)


@record(frozen=True)
class Measured:
    """A measured energy in eV with its uncertainty (None when the source
    gives none) and a short citation.  ``from_memory`` marks a value not yet
    checked against a stored copy of the source; ``note`` says more about
    the value (vertical rather than adiabatic, an estimate, ...)."""

    value_ev: float
    uncertainty_ev: float | None
    source: str
    from_memory: bool = False
    note: str = ""


@record(frozen=True)
class Species:
    """One tabulated neutral species and what is measured about it and its ions.

    ``electron_affinity`` is the adiabatic EA of the neutral (None when not
    tabulated, which includes every species whose anion is unbound);
    ``anion_bound`` is False when no bound gas-phase anion exists, True when
    one does, None when the table does not say.  ``multiplicities`` maps a
    charge (0, +1, -1) to the ground-state multiplicity where it is known.
    The fields after ``multiplicity_source`` say where ``anion_bound`` comes
    from and whether the multiplicities were recalled."""

    key: str
    name: str
    formula: str
    electron_affinity: Measured | None
    anion_bound: bool | None
    ionization_energy: Measured | None
    multiplicities: Mapping[int, int]
    multiplicity_source: str
    anion_source: str = ""
    anion_note: str = ""
    anion_from_memory: bool = False
    multiplicity_from_memory: bool = False
    composition: Mapping[str, int] = field(default_factory=lambda: FrozenMap({}), compare=False, repr=False)
    bonds: Mapping[str, int] = field(default_factory=lambda: FrozenMap({}), compare=False, repr=False)

    def ground_multiplicity(self, charge: int) -> int | None:
        """The tabulated ground-state multiplicity at this charge, or None."""
        return self.multiplicities.get(charge)


def hill_formula(composition: Mapping[str, int]) -> str:
    """Hill order: C first, then H, then the rest alphabetically; without
    carbon every element alphabetically (E. A. Hill, J. Am. Chem. Soc. 22,
    478 (1900))."""
    def part(symbol: str) -> str:
        n = composition[symbol]
        return symbol if n == 1 else f"{symbol}{n}"

    symbols = [s for s, n in composition.items() if n > 0]
    if "C" in symbols:
        head = ["C"] + (["H"] if "H" in symbols else [])
        rest = sorted(s for s in symbols if s not in ("C", "H"))
        order = head + rest
    else:
        order = sorted(symbols)
    return "".join(part(s) for s in order)


def _measured(row: Optional[dict], sources: Mapping[str, str]) -> Measured | None:
    if not row:
        return None
    return Measured(
        value_ev=float(row["value_ev"]),
        uncertainty_ev=None if row.get("uncertainty_ev") is None else float(row["uncertainty_ev"]),
        source=sources[row["source"]],
        from_memory=bool(row.get("from_memory", False)),
        note=row.get("note", ""),
    )


def _species(row: dict, sources: Mapping[str, str]) -> Species:
    anion = row.get("anion") or {}
    mult = row["multiplicities"]
    composition = FrozenMap(dict(row["atoms"]))
    return Species(
        key=row["key"],
        name=row["name"],
        formula=hill_formula(composition),
        electron_affinity=_measured(row.get("electron_affinity"), sources),
        anion_bound=anion.get("bound"),
        ionization_energy=_measured(row.get("ionization_energy"), sources),
        multiplicities=FrozenMap({int(q): int(v) for q, v in mult["by_charge"].items()}),
        multiplicity_source=sources[mult["source"]],
        anion_source=sources[anion["source"]] if anion else "",
        anion_note=anion.get("note", ""),
        anion_from_memory=bool(anion.get("from_memory", False)),
        multiplicity_from_memory=bool(mult.get("from_memory", False)),
        composition=composition,
        bonds=FrozenMap(dict(row.get("bonds", {}))),
    )


@lru_cache(maxsize=1)
def _table() -> tuple[dict[str, Species], dict[str, tuple[Species, ...]]]:
    doc = json.loads(_DATA_FILE.read_text(encoding="utf-8"))
    sources = doc["sources"]
    by_key: dict[str, Species] = {}
    by_formula: dict[str, list[Species]] = {}
    for row in doc["species"]:
        sp = _species(row, sources)
        by_key[sp.key] = sp
        by_formula.setdefault(sp.formula, []).append(sp)
    return by_key, {f: tuple(v) for f, v in by_formula.items()}


def all_species() -> list[Species]:
    """Every tabulated species, in the order of the data file."""
    return list(_table()[0].values())


def by_key(key: str) -> Species | None:
    """The species with this key (``"NO2"``, ``"HCO2"``), or None."""
    return _table()[0].get(key)


def _canonical(symbols: Sequence[str]) -> list[str] | None:
    out = []
    for s in symbols:
        el = elements.lookup(s)
        if el is None:
            return None
        out.append(el.symbol)
    return out


def _pair(a: str, b: str) -> str:
    return "-".join(sorted((a, b)))


def bond_counts(
    symbols: Sequence[str], coordinates_angstrom: Sequence[tuple[float, float, float]]
) -> tuple[dict[str, int], bool] | None:
    """Bonded element pairs (``{"C-O": 2, "C-H": 1}``) and whether the atoms
    form one connected molecule; None when a radius is unknown."""
    radii = []
    for s in symbols:
        el = elements.lookup(s)
        if el is None or el.covalent_radius is None:
            return None
        radii.append(el.covalent_radius)
    n = len(symbols)
    parent = list(range(n))

    def root(i: int) -> int:
        return union_find_root(parent, i)

    counts: dict[str, int] = {}
    for i in range(n):
        for j in range(i + 1, n):
            d = math.dist(coordinates_angstrom[i], coordinates_angstrom[j])
            if d <= BOND_TOLERANCE * (radii[i] + radii[j]):
                key = _pair(symbols[i], symbols[j])
                counts[key] = counts.get(key, 0) + 1
                parent[root(i)] = root(j)
    connected = len({root(i) for i in range(n)}) <= 1
    return counts, connected


# Bond perception is quadratic in the atom count; tabulated species are small.
_MAX_ATOMS = 24


def identify(
    symbols: Sequence[str],
    coordinates_angstrom: Sequence[tuple[float, float, float]] | None = None,
) -> Species | None:
    """The neutral species a geometry's atoms (ghost atoms already removed) make up, or None.
    Composition first; connectivity (covalent radii) separates isomers when coordinates are given.

    With coordinates, the atoms must form one connected molecule whose bonded
    element pairs match the tabulated species exactly (a stretched bond, a
    dissociated pair or another isomer is not that species).  Without
    coordinates, a formula shared by two tabulated isomers gives None."""
    if not symbols or len(symbols) > _MAX_ATOMS:
        return None
    canonical = _canonical(symbols)
    if canonical is None:
        return None
    composition: dict[str, int] = {}
    for s in canonical:
        composition[s] = composition.get(s, 0) + 1
    candidates = _table()[1].get(hill_formula(composition), ())
    if not candidates:
        return None
    if coordinates_angstrom is None:
        return candidates[0] if len(candidates) == 1 else None
    if len(coordinates_angstrom) != len(canonical):
        return None
    if len(canonical) == 1:
        return candidates[0]
    perceived = bond_counts(canonical, coordinates_angstrom)
    if perceived is None:
        return None
    counts, connected = perceived
    if not connected:
        return None
    for sp in candidates:
        if dict(sp.bonds) == counts:
            return sp
    return None


def identify_geometry(geometry) -> Species | None:
    """``identify`` for a deck geometry (a ``grammar.model.Geometry``):
    ghost atoms left out, coordinates converted to angstrom."""
    from .geometry import scale_to_angstrom

    real = [a for a in geometry.atoms if not a.ghost]
    if not real or len(real) > _MAX_ATOMS:
        return None
    scale = scale_to_angstrom(geometry.unit)
    return identify(
        [a.symbol.value for a in real],
        [tuple(c * scale for c in a.xyz) for a in real],
    )


def citation(measured: Measured) -> str:
    """The source of a value as users see it (no internal flags)."""
    return measured.source


def format_value(measured: Measured) -> str:
    """``2.273 +- 0.005 eV`` (or ``13.598 eV`` without an uncertainty)."""
    value = _plain(measured.value_ev)
    if measured.uncertainty_ev is None:
        return f"{value} eV"
    return f"{value} +- {_plain(measured.uncertainty_ev)} eV"


def _plain(x: float) -> str:
    """All the digits the table holds, without exponent notation."""
    text = repr(float(x))
    if "e" in text or "E" in text:
        text = f"{x:.12f}".rstrip("0").rstrip(".")
    return text
