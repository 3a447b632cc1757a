"""Geometry facts shared by the geometry rules: distances, bonds, fragments.

Every judgement here compares an interatomic distance with the sum of the
two atoms' covalent radii (B. Cordero et al., "Covalent radii revisited",
Dalton Trans. 2008, 2832-2838, read through ``rules/elements.py``).  Working
with the ratio d / (r_A + r_B) makes one set of cut-offs serve every pair of
elements:

- ``TOO_CLOSE_RATIO`` (0.5): closer than half the radius sum is no chemical
  bond at all; two nuclei that close are a typing mistake.
- ``BOND_TOLERANCE`` (1.25): a pair is bonded when d <= 1.25 (r_A + r_B).
  Cut-offs of 1.2-1.3 are common practice in bond perception, with no
  published source for one value.
- ``SHORTEST_BOND_RATIO`` (0.7): real bonds stay above it (N2, the shortest
  bond relative to its radii among common molecules, sits near 0.77); a
  whole geometry below it reads better in the other length unit.  Common
  practice, no source.

Coordinates are converted to angstrom once (CODATA 2018 bohr radius), so
rules never deal with the deck's own units except in their messages.
Importing this module imports no PySCF.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Iterable, Optional

from deckward.grammar import model as m

from . import elements
from .units import BOHR_IN_ANGSTROM

TOO_CLOSE_RATIO = 0.5
BOND_TOLERANCE = 1.25
SHORTEST_BOND_RATIO = 0.7

# Noble gases form no covalent bonds: their distances say nothing about units.
NOBLE_GASES = frozenset({"He", "Ne", "Ar", "Kr", "Xe", "Rn", "Og"})


@dataclass(frozen=True)
class Site:
    """One atom of a geometry whose element and covalent radius are known."""

    index: int  # 1-based position in the geometry
    atom: m.Atom
    symbol: str  # canonical spelling (Cl, not CL)
    radius: float  # covalent radius, angstrom
    xyz: tuple[float, float, float]  # angstrom

    @property
    def label(self) -> str:
        """``O3``: element and 1-based atom number, ``ghost`` noted."""
        return f"{self.symbol}{self.index}" + (" (ghost)" if self.atom.ghost else "")


@dataclass(frozen=True)
class Pair:
    """Two sites, their distance (angstrom) and d / (r_A + r_B)."""

    a: Site
    b: Site
    distance: float
    ratio: float

    @property
    def radius_sum(self) -> float:
        return self.a.radius + self.b.radius


def scale_to_angstrom(unit: str) -> float:
    """Angstrom per unit of the deck's length unit."""
    return BOHR_IN_ANGSTROM if unit == "bohr" else 1.0


def to_unit(angstrom: float, unit: str) -> float:
    """A length in angstrom, expressed in ``unit`` (angstrom or bohr)."""
    return angstrom / scale_to_angstrom(unit)


def sites(geometry: m.Geometry, include_ghosts: bool = True) -> list[Site]:
    """Atoms with a known element and radius, coordinates in angstrom.
    Atoms with an unknown symbol are left out (unknown-element reports them)."""
    scale = scale_to_angstrom(geometry.unit)
    out = []
    for i, atom in enumerate(geometry.atoms, start=1):
        if atom.ghost and not include_ghosts:
            continue
        el = elements.lookup(atom.symbol.value)
        if el is None or el.covalent_radius is None:
            continue
        x, y, z = atom.xyz
        out.append(Site(i, atom, el.symbol, el.covalent_radius, (x * scale, y * scale, z * scale)))
    return out


def distance(a: Site, b: Site) -> float:
    return math.dist(a.xyz, b.xyz)


def pairs_within(items: list[Site], ratio: float) -> list[Pair]:
    """Every pair with d <= ratio * (r_A + r_B), in atom order.

    Atoms are sorted into cubic cells as wide as the largest possible
    cut-off, so only neighbouring cells are compared: large geometries cost
    time in proportion to their atom count, not its square."""
    if len(items) < 2:
        return []
    cell = max(ratio * 2 * max(s.radius for s in items), 1e-6)
    grid: dict[tuple[int, int, int], list[int]] = {}
    keys = []
    for i, s in enumerate(items):
        key = tuple(math.floor(c / cell) for c in s.xyz)
        keys.append(key)
        grid.setdefault(key, []).append(i)
    out = []
    for i, s in enumerate(items):
        kx, ky, kz = keys[i]
        for dx in (-1, 0, 1):
            for dy in (-1, 0, 1):
                for dz in (-1, 0, 1):
                    for j in grid.get((kx + dx, ky + dy, kz + dz), ()):
                        if j <= i:
                            continue
                        t = items[j]
                        d = distance(s, t)
                        r = d / (s.radius + t.radius)
                        if r <= ratio:
                            out.append(Pair(s, t, d, r))
    out.sort(key=lambda p: (p.a.index, p.b.index))
    return out


def too_close_pairs(geometry: m.Geometry) -> list[Pair]:
    """Pairs closer than half the sum of their covalent radii (ghosts too:
    a ghost centre on top of an atom duplicates its basis functions)."""
    return [p for p in pairs_within(sites(geometry), TOO_CLOSE_RATIO) if p.ratio < TOO_CLOSE_RATIO]


def bonds(items: list[Site], tolerance: float = BOND_TOLERANCE) -> list[Pair]:
    """Bonded pairs: d <= tolerance * (r_A + r_B)."""
    return pairs_within(items, tolerance)


def fragments(items: list[Site], tolerance: float = BOND_TOLERANCE) -> list[list[Site]]:
    """Connected components of the bond graph, each in atom order, ordered
    by their first atom.  A single atom is one fragment."""
    parent = list(range(len(items)))
    position = {id(s): i for i, s in enumerate(items)}

    def root(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for p in bonds(items, tolerance):
        a, b = root(position[id(p.a)]), root(position[id(p.b)])
        if a != b:
            parent[max(a, b)] = min(a, b)
    groups: dict[int, list[Site]] = {}
    for i, s in enumerate(items):
        groups.setdefault(root(i), []).append(s)
    return sorted(groups.values(), key=lambda g: g[0].index)


def nearest_ratios(items: list[Site], limit: float) -> list[float]:
    """For each site, the smallest d / (r_A + r_B) to any other site
    (``math.inf`` when none is within ``limit``)."""
    best = {id(s): math.inf for s in items}
    for p in pairs_within(items, limit):
        best[id(p.a)] = min(best[id(p.a)], p.ratio)
        best[id(p.b)] = min(best[id(p.b)], p.ratio)
    return [best[id(s)] for s in items]


def plausible_bond(ratio: float) -> bool:
    return SHORTEST_BOND_RATIO <= ratio <= BOND_TOLERANCE


@dataclass(frozen=True)
class UnitsVerdict:
    """The geometry's numbers read as a bonded molecule only in ``likely``."""

    declared: str  # the unit the deck says (angstrom by default)
    likely: str  # the unit under which every atom has a plausible bond
    # Nearest-neighbour ratio range as declared and as re-read (min, max).
    declared_range: tuple[float, float]
    likely_range: tuple[float, float]


def units_verdict(geometry: m.Geometry) -> Optional[UnitsVerdict]:
    """A ``UnitsVerdict`` when the declared length unit is probably wrong.

    As declared, no atom has a neighbour at a plausible bond length (all too
    short for bohr read as angstrom values, all too long for angstrom read
    as bohr values); read in the other unit, every atom has one.  Noble-gas
    atoms are left out (their van der Waals contacts are no bonds) and so
    are atoms of unknown element; fewer than two atoms left: no verdict."""
    items = [s for s in sites(geometry) if s.symbol not in NOBLE_GASES]
    if len(items) < 2:
        return None
    declared = geometry.unit
    other = "angstrom" if declared == "bohr" else "bohr"
    # Re-reading the numbers in the other unit scales every distance by this.
    factor = scale_to_angstrom(other) / scale_to_angstrom(declared)
    limit = BOND_TOLERANCE * max(1.0, 1.0 / factor)
    ratios = nearest_ratios(items, limit)
    if any(plausible_bond(r) for r in ratios):
        return None
    if not all(plausible_bond(r * factor) for r in ratios):
        return None
    return UnitsVerdict(
        declared,
        other,
        (min(ratios), max(ratios)),
        (min(ratios) * factor, max(ratios) * factor),
    )


def format_length(angstrom: float, unit: str) -> str:
    """``1.247 bohr (0.660 angstrom)`` or ``0.660 angstrom``."""
    if unit == "bohr":
        return f"{to_unit(angstrom, 'bohr'):.3f} bohr ({angstrom:.3f} angstrom)"
    return f"{angstrom:.3f} angstrom"


def labels(items: Iterable[Site], limit: int = 8) -> str:
    """``C1, N2, O3``; long lists end with ``and N more``."""
    items = list(items)
    shown = ", ".join(s.label for s in items[:limit])
    if len(items) > limit:
        shown += f" and {len(items) - limit} more"
    return shown
