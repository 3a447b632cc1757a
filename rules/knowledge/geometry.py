"""Geometry facts shared by the geometry rules: distances, bonds, fragments.

Every judgement here compares an interatomic distance with the sum of the
two atoms' covalent radii (B. Cordero et al., "Covalent radii revisited",
Dalton Trans. 2008, 2832-2838, read through ``rules/knowledge/elements.py``).  Working
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
from typing import Iterable, Optional

from deckward.grammar import model as m
from deckward.grammar.records import record

from . import elements
from .units import BOHR_IN_ANGSTROM

TOO_CLOSE_RATIO = 0.5
BOND_TOLERANCE = 1.25
SHORTEST_BOND_RATIO = 0.7

# Noble gases form no covalent bonds: their distances say nothing about units.
NOBLE_GASES = frozenset({"He", "Ne", "Ar", "Kr", "Xe", "Rn", "Og"})


@record(frozen=True)
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


@record(frozen=True)
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


_SITES: dict = {}  # (id(geometry), include_ghosts) -> (geometry, sites): the last few geometries
_VERDICTS: dict = {}
_REMEMBERED = 16


def _remember(store: dict, key, geometry, value):
    if len(store) >= _REMEMBERED:
        store.pop(next(iter(store)))
    store[key] = (geometry, value)
    return value


def _recalled(store: dict, key, geometry):
    hit = store.get(key)
    return hit if hit is not None and hit[0] is geometry else None


def per_geometry(store: dict, geometry, compute):
    """``compute(geometry)``, remembered in ``store`` for the last few
    geometries (by identity: the model is immutable, and several rules ask
    the same question about the same geometry in turn)."""
    hit = _recalled(store, id(geometry), geometry)
    if hit is not None:
        return hit[1]
    return _remember(store, id(geometry), geometry, compute(geometry))


def sites(geometry: m.Geometry, include_ghosts: bool = True) -> list[Site]:
    """Atoms with a known element and radius, coordinates in angstrom.
    Atoms with an unknown symbol are left out (unknown-element reports them),
    and so are atoms with a coordinate that is not a finite number.

    Several rules look at the same geometry: the sites of the last few
    geometries are remembered (by identity; the model is immutable)."""
    key = (id(geometry), include_ghosts)
    hit = _recalled(_SITES, key, geometry)
    if hit is not None:
        return list(hit[1])
    scale = scale_to_angstrom(geometry.unit)
    out = []
    radii: dict[str, Optional[tuple[str, float]]] = {}
    isfinite = math.isfinite
    for i, atom in enumerate(geometry.atoms, start=1):
        if atom.ghost and not include_ghosts:
            continue
        word = atom.symbol.value
        if word not in radii:
            el = elements.lookup(word)
            radii[word] = None if el is None or el.covalent_radius is None else (el.symbol, el.covalent_radius)
        known = radii[word]
        if known is None:
            continue
        x, y, z = atom.xyz
        if not (isfinite(x) and isfinite(y) and isfinite(z)):
            continue
        out.append(Site(i, atom, known[0], known[1], (x * scale, y * scale, z * scale)))
    return list(_remember(_SITES, key, geometry, tuple(out)))


def distance(a: Site, b: Site) -> float:
    return math.dist(a.xyz, b.xyz)


class _Grid:
    """Sites sorted into cubic cells of side ``cell``: every site within
    ``cell`` of a site lies in one of the 27 cells around it, so a search
    costs the atoms nearby, not the whole geometry."""

    _AROUND = [(dx, dy, dz) for dx in (-1, 0, 1) for dy in (-1, 0, 1) for dz in (-1, 0, 1)]
    # The cell itself and half of its neighbours: visiting these from every
    # cell meets each pair of neighbouring cells once.
    FORWARD = [o for o in _AROUND if o >= (0, 0, 0)]

    def __init__(self, items, cell: float) -> None:
        cell = max(cell, 1e-6)
        self.cells: dict[tuple[int, int, int], list[int]] = {}
        self.keys = []
        floor = math.floor
        for i, s in enumerate(items):
            x, y, z = s.xyz
            key = (floor(x / cell), floor(y / cell), floor(z / cell))
            self.keys.append(key)
            self.cells.setdefault(key, []).append(i)

    def near(self, i: int):
        """Indices of the sites in the 27 cells around site ``i`` (``i`` included)."""
        kx, ky, kz = self.keys[i]
        get = self.cells.get
        for dx, dy, dz in self._AROUND:
            found = get((kx + dx, ky + dy, kz + dz))
            if found:
                yield from found


def pairs_within(items: list[Site], ratio: float) -> list[Pair]:
    """Every pair with d <= ratio * (r_A + r_B), in atom order.

    Atoms are sorted into cubic cells as wide as the largest possible
    cut-off, so only neighbouring cells are compared: large geometries cost
    time in proportion to their atom count, not its square (unless the atoms
    are piled on top of each other: rules that must survive that use the
    searches below instead)."""
    if len(items) < 2:
        return []
    grid = _Grid(items, ratio * 2 * max(s.radius for s in items))
    out = []
    for i, s in enumerate(items):
        for j in grid.near(i):
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
    a ghost centre on top of an atom duplicates its basis functions).
    Every pair: for small geometries and tests; the rule uses
    ``too_close_groups``, which stays fast on atoms piled on one point."""
    return [p for p in pairs_within(sites(geometry), TOO_CLOSE_RATIO) if p.ratio < TOO_CLOSE_RATIO]


@record(frozen=True)
class TooClose:
    """Atoms too close to ``anchor``: each pair has ``anchor`` as ``a``.

    Every offending atom appears in exactly one group: the group of the
    first atom (in atom order) that it is too close to, or, when that atom
    is itself in a group, a group of its own with that partner as anchor."""

    anchor: Site
    pairs: tuple[Pair, ...]  # in atom order of the partners


def too_close_groups(geometry: m.Geometry) -> list[TooClose]:
    """Too-close atoms gathered by the atom they are too close to, in atom
    order of the anchors.

    Each atom that is not yet in a group looks at its neighbourhood once and
    takes every later atom too close to it into its group; atoms in a group
    are not searched from again.  Atoms left searching are never too close
    to each other, so however the atoms are piled up, each search meets a
    bounded crowd: 2,000 atoms on one point cost one search of 2,000."""
    items = sites(geometry)
    if len(items) < 2:
        return []
    grid = _Grid(items, TOO_CLOSE_RATIO * 2 * max(s.radius for s in items))
    taken = bytearray(len(items))
    groups: list[TooClose] = []
    dist = math.dist
    for i, s in enumerate(items):
        if taken[i]:
            continue
        members: list[Pair] = []
        earlier: Optional[Pair] = None
        earlier_at = -1
        for j in grid.near(i):
            if j == i:
                continue
            t = items[j]
            d = dist(s.xyz, t.xyz)
            r = d / (s.radius + t.radius)
            if r >= TOO_CLOSE_RATIO:
                continue
            if j > i:
                if not taken[j]:
                    taken[j] = 1
                    members.append(Pair(s, t, d, r))
            elif earlier is None or (r, j) < (earlier.ratio, earlier_at):
                earlier, earlier_at = Pair(t, s, d, r), j  # t is in a group already: s is reported beside it
        if earlier is not None:
            groups.append(TooClose(earlier.a, (earlier,)))
        if members:
            members.sort(key=lambda p: p.b.index)
            groups.append(TooClose(s, tuple(members)))
    groups.sort(key=lambda g: (g.pairs[0].b.index, g.anchor.index))
    return groups


def fragments(items: list[Site], tolerance: float = BOND_TOLERANCE) -> list[list[Site]]:
    """Connected components of the bond graph, each in atom order, ordered
    by their first atom.  A single atom is one fragment.

    Union-find over a cell grid; a pair already in one fragment is not
    measured again, and atoms at exactly the same point are joined at once
    (only the one with the largest radius, the one with the longest bonds,
    is searched from), so a pile of identical atoms costs its length."""
    n = len(items)
    parent = list(range(n))

    def root(i: int) -> int:
        return union_find_root(parent, i)

    left = [n]  # fragments left: once one is left, nothing more can join

    def join(a: int, b: int) -> None:
        a, b = root(a), root(b)
        if a != b:
            parent[max(a, b)] = min(a, b)
            left[0] -= 1

    at_point: dict[tuple[float, float, float], int] = {}
    for i, s in enumerate(items):
        first = at_point.setdefault(s.xyz, i)
        if first != i:
            join(first, i)
            if s.radius > items[first].radius:
                at_point[s.xyz] = i
    searched = list(at_point.values())

    def one_fragment(cell: list[int]):
        """The fragment every atom of ``cell`` is in, or None if they are in several."""
        first = root(searched[cell[0]])
        return first if all(root(searched[c]) == first for c in cell) else None

    def link() -> None:
        reps = [items[i] for i in searched]
        grid = _Grid(reps, tolerance * 2 * max(s.radius for s in reps))
        dist = math.dist
        for key, here in grid.cells.items():
            kx, ky, kz = key
            for dx, dy, dz in _Grid.FORWARD:
                there = here if dx == dy == dz == 0 else grid.cells.get((kx + dx, ky + dy, kz + dz))
                if not there:
                    continue
                common = one_fragment(there)
                if common is not None and one_fragment(here) == common:
                    continue  # both cells are one fragment already: nothing to measure (a dense pile)
                for pos, a in enumerate(here):
                    s, i = reps[a], searched[a]
                    if common is not None and root(i) == common:
                        continue  # every atom over there is in this atom's fragment already
                    joined = False
                    for b in (here[pos + 1 :] if there is here else there):
                        j = searched[b]
                        if root(i) == root(j):
                            continue
                        t = reps[b]
                        if dist(s.xyz, t.xyz) <= tolerance * (s.radius + t.radius):
                            join(i, j)
                            joined = True
                            if left[0] == 1:
                                return
                    if joined:
                        common = one_fragment(there)

    if len(searched) > 1 and left[0] > 1:
        link()
    groups: dict[int, list[Site]] = {}
    for i, s in enumerate(items):
        groups.setdefault(root(i), []).append(s)
    return sorted(groups.values(), key=lambda g: g[0].index)


def bonds(items: list[Site], tolerance: float = BOND_TOLERANCE) -> list[Pair]:
    """Bonded pairs: d <= tolerance * (r_A + r_B)."""
    return pairs_within(items, tolerance)


def plausible_bond(ratio: float) -> bool:
    return SHORTEST_BOND_RATIO <= ratio <= BOND_TOLERANCE


@record(frozen=True)
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
    are atoms of unknown element; fewer than two atoms left: no verdict.

    The search stops at the first atom that rules the verdict out (an
    ordinary bond as declared, or a neighbour too close even when re-read),
    so an ordinary geometry costs about one atom's neighbourhood.  Verdicts
    of the last few geometries are remembered: three rules ask."""
    return per_geometry(_VERDICTS, geometry, _units_verdict)


def _units_verdict(geometry: m.Geometry) -> Optional[UnitsVerdict]:
    items = [s for s in sites(geometry) if s.symbol not in NOBLE_GASES]
    if len(items) < 2:
        return None
    declared = geometry.unit
    other = "angstrom" if declared == "bohr" else "bohr"
    # Re-reading the numbers in the other unit scales every distance by this.
    factor = scale_to_angstrom(other) / scale_to_angstrom(declared)
    limit = BOND_TOLERANCE * max(1.0, 1.0 / factor)
    grid = _Grid(items, limit * 2 * max(s.radius for s in items))
    low, high = math.inf, 0.0
    dist = math.dist
    for i, s in enumerate(items):
        nearest = math.inf
        for j in grid.near(i):
            if j == i:
                continue
            t = items[j]
            r = dist(s.xyz, t.xyz) / (s.radius + t.radius)
            if r * factor < SHORTEST_BOND_RATIO:
                return None  # the nearest neighbour is too close even in the other unit
            nearest = min(nearest, r)
        if nearest > limit or plausible_bond(nearest) or not plausible_bond(nearest * factor):
            return None
        low, high = min(low, nearest), max(high, nearest)
    return UnitsVerdict(declared, other, (low, high), (low * factor, high * factor))


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


def union_find_root(parent: list[int], i: int) -> int:
    """The representative of ``i`` in a union-find forest, halving paths on the way."""
    while parent[i] != i:
        parent[i] = parent[parent[i]]
        i = parent[i]
    return i
