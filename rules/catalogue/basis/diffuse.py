"""Whether a basis set's functions reach far enough for an anion's extra electron.

Second version of the criterion (docs/diffuse-criterion.md).  Three things
decide the reach an anion needs:

- **its binding energy** E_b.  The extra electron's orbital decays as
  exp(-kappa_b r), kappa_b = sqrt(2 E_b) (atomic units): a weakly bound anion
  reaches farther.  E_b is the tabulated electron affinity when the species
  is known (rules/knowledge/reference_data.py), else unknown;
- **the angular momentum l it occupies**: s for H- and alkali anions (and
  the other s-block and d-block atoms), p for halides and the p-block;
- **the method**: correlated methods also need diffuse polarisation
  functions (l + 1) for the extra electron's correlation.

The matching argument of the first version stays.  Inside the atom the
extra electron's orbital resembles the neutral atom's outermost orbital,
decaying with kappa_X = sqrt(2 I_X) (I_X the first ionization energy); its
own tail begins where that density has died out, at r_n = n / (2 kappa_X).
A Gaussian r^l exp(-alpha r^2) decays locally at the rate 2 alpha r - l / r;
it can follow the tail there only if 2 alpha r_n - l / r_n <= kappa_b:

    alpha_max(X, l, E_b) = kappa_X (kappa_b + 2 l kappa_X / n_l) / n_l

One factor n_l per angular momentum is calibrated against computed
electron affinities (bench/diffuse_calibration.py): Hartree-Fock delta-SCF
for the extra electron's own l, MP2 for the polarisation functions.

Verdicts are decided from exponents only, never from a basis name, so a
hand-augmented set passes and a set merely named like a diffuse one fails.
Pure Python: imported on the editor path, so no pyscf and no numpy.
"""
from __future__ import annotations

import functools
import math
from typing import Optional, Sequence

from deckward.grammar.records import record

__all__ = [
    "CRITERION_REFERENCES",
    "DEFAULT_BINDING_EV",
    "MAX_BINDING_EV",
    "DiffuseVerdict",
    "IONIZATION_ENERGY_EV",
    "diffuse_layers",
    "extra_electron_l",
    "carrier_symbols",
    "hydrogen_can_hold_electron",
    "layer_threshold",
    "threshold",
    "verdict",
]

HARTREE_EV = 27.211386245988  # CODATA 2018

# n_l, calibrated (docs/diffuse-criterion.md): s from H- (Hartree-Fock), p
# from the p-block atoms and radicals (Hartree-Fock), d (the polarisation
# functions of p-block anions, correlated methods only) and p on H- (MP2).
EFOLDS = {0: 4.0, 1: 6.7, 2: 6.7}
POLARISATION_EFOLDS = {1: 3.2, 2: 3.2}  # l + 1 for correlated methods, keyed by that l

# A binding energy the rule cannot know.  DEFAULT is conservative: about the
# binding of H- (0.754 eV) and NH2- (0.772 eV), below most tabulated molecular
# anions.  MAX is the upper end met in practice: CN- 3.862 eV, Cl- 3.613 eV
# (rules/knowledge/reference_data.py); superhalogens bind more and are outside the
# calibration.  Both are common practice, no source.
DEFAULT_BINDING_EV = 0.75
MAX_BINDING_EV = 4.0
# The strongest binding of an s-type extra electron in practice: Au- 2.31 eV
# (the largest atomic s-type electron affinity; H- 0.754, Li- 0.618 eV),
# from memory (Hotop and Lineberger, J. Phys. Chem. Ref. Data 14, 731 (1985)).
MAX_BINDING_BY_L = {0: 2.4, 1: MAX_BINDING_EV, 2: MAX_BINDING_EV}

# The first version's fixed scale, kept for counting diffuse layers (the
# near-linear-dependence rule): an exponent below it is a diffuse function.
_LAYER_BINDING_EV = 1.0
_LAYER_EFOLDS = 2.6
_ANGULAR = "spdfghi"

CRITERION_REFERENCES: tuple[str, ...] = (
    "R. A. Kendall, T. H. Dunning Jr., R. J. Harrison, J. Chem. Phys. 96, 6796 (1992)",
    "T. Clark, J. Chandrasekhar, G. W. Spitznagel, P. v. R. Schleyer, J. Comput. Chem. 4, 294 (1983)",
    "D. Rappoport, F. Furche, J. Chem. Phys. 133, 134105 (2010)",
    "F. Jensen, J. Chem. Theory Comput. 10, 1074 (2014)",
)

# First ionization energies in eV, NIST Atomic Spectra Database values.
# H, He, C, N, O, F, Ne, Cl: as tabulated in check-values.md section 3.
# All others: from memory (NIST ASD), not re-checked against a stored copy.
IONIZATION_ENERGY_EV: dict[str, float] = {
    "H": 13.59844, "He": 24.587387,
    "Li": 5.3917, "Be": 9.3227, "B": 8.2980, "C": 11.2603, "N": 14.5341,
    "O": 13.61805, "F": 17.4228, "Ne": 21.56454,
    "Na": 5.1391, "Mg": 7.6462, "Al": 5.9858, "Si": 8.1517, "P": 10.4867,
    "S": 10.3600, "Cl": 12.96764, "Ar": 15.7596,
    "K": 4.3407, "Ca": 6.1132, "Sc": 6.5615, "Ti": 6.8281, "V": 6.7462,
    "Cr": 6.7665, "Mn": 7.4340, "Fe": 7.9025, "Co": 7.8810, "Ni": 7.6399,
    "Cu": 7.7264, "Zn": 9.3942, "Ga": 5.9993, "Ge": 7.8994, "As": 9.7886,
    "Se": 9.7524, "Br": 11.8138, "Kr": 13.9996,
    "Rb": 4.1771, "Sr": 5.6949, "Y": 6.2173, "Zr": 6.6339, "Nb": 6.7589,
    "Mo": 7.0924, "Tc": 7.28, "Ru": 7.3605, "Rh": 7.4589, "Pd": 8.3369,
    "Ag": 7.5762, "Cd": 8.9938, "In": 5.7864, "Sn": 7.3439, "Sb": 8.6084,
    "Te": 9.0096, "I": 10.4513, "Xe": 12.1298,
    "Cs": 3.8939, "Ba": 5.2117, "Pt": 8.9588, "Au": 9.2255, "Hg": 10.4375,
    "Tl": 6.1083, "Pb": 7.4167, "Bi": 7.2855, "Rn": 10.7485,
}

# Atomic numbers of the noble gases close the periods of the periodic table.
_PERIOD_ENDS = (2, 10, 18, 36, 54, 86, 118)


@record(frozen=True)
class DiffuseVerdict:
    """Outcome of the diffuse test for one element of one basis set.

    ``limiting_l`` is the angular momentum that fails (the extra electron's
    own l, or its polarisation l + 1 for a correlated method), None when the
    element passes.  ``threshold`` is the largest exponent acceptable for
    that l at the binding energy judged (``binding_ev``; ``binding_known``
    False when the rule had to assume one).  ``ratio`` is the failing
    exponent over the threshold (how far off).  ``passes_at_max_binding``
    says whether the set would do for the most strongly bound anions met in
    practice (MAX_BINDING_EV): the difference between an error and a
    warning when the binding energy is unknown.  ``layers`` counts diffuse
    layers for the near-linear-dependence rule, against ``layer_threshold``.
    """

    symbol: str
    smallest_s: float | None
    smallest_p: float | None
    threshold: float
    is_diffuse: bool
    layers: int
    limiting_l: int | None
    explanation: str
    electron_l: int = 1
    binding_ev: float = DEFAULT_BINDING_EV
    binding_known: bool = False
    correlated: bool = False
    smallest: float | None = None  # the smallest exponent of limiting_l (or of electron_l)
    ratio: float = 0.0
    passes_at_max_binding: bool = True
    layer_threshold: float = 0.0
    ratio_at_max_binding: float = 0.0  # the worst exponent / threshold at the strongest binding in practice


def _canonical(symbol: str) -> str:
    text = symbol.strip()
    canon = text[:1].upper() + text[1:].lower()
    if canon not in IONIZATION_ENERGY_EV:
        raise ValueError(
            f"no ionization energy tabulated for element {symbol!r}: "
            "the diffuse threshold cannot be computed"
        )
    return canon


def _group(z: int) -> int:
    """Periodic-table group 1-18 (3 for the lanthanides and actinides)."""
    start = 0
    for end in _PERIOD_ENDS:
        if z <= end:
            position = z - start
            length = end - start
            if length == 2:
                return 1 if position == 1 else 18
            if length == 8:
                return position if position <= 2 else position + 10
            if length == 18:
                return position
            # 32-long periods: 2 s-block, 14 f-block, then groups 3-18
            if position <= 2:
                return position
            if position <= 16:
                return 3
            return position - 14
        start = end
    raise ValueError(f"atomic number {z} is beyond the periodic table")


def _z(symbol: str) -> int:
    from deckward.rules.knowledge import elements

    element = elements.lookup(symbol)
    if element is None:
        raise ValueError(f"unknown element {symbol!r}")
    return element.z


def extra_electron_l(symbol: str) -> int:
    """The angular momentum an extra electron on this element occupies:
    1 (p) for the p-block and group 2 (Ca- binds its electron in 4p),
    0 (s) for H, the alkali metals and the d- and f-block (Cu-, Ag-, Au- add
    an s electron)."""
    canon = _canonical(symbol)
    if canon == "H":
        return 0
    group = _group(_z(canon))
    return 1 if group == 2 or group >= 13 else 0


def hydrogen_can_hold_electron(symbols: Sequence[str]) -> bool:
    """Whether an anion of these atoms can put its extra electron on
    hydrogen: H- and H2-, and hydrides whose other atoms are all
    electropositive (groups 1, 2, 13: LiH-, BeH-, BH4-, AlH4-).  Elsewhere
    the electron sits on the more electronegative heavy atoms (common
    practice, no source)."""
    others = {s.strip().capitalize() for s in symbols} - {"H"}
    if not any(s.strip().capitalize() == "H" for s in symbols):
        return False
    for s in others:
        try:
            if _group(_z(s)) not in (1, 2, 13):
                return False
        except ValueError:
            return False
    return True


CARRIER_WINDOW_EV = 0.2  # Mulliken electronegativities this close count as equal (common practice, no source)


def mulliken_electronegativity(symbol: str) -> float:
    """(I + A) / 2 in eV: the first ionization energy (IONIZATION_ENERGY_EV)
    and the measured atomic electron affinity of rules/knowledge/reference_data.py
    (0 where the atom has no bound anion or none is tabulated)."""
    from deckward.rules.knowledge import reference_data

    canon = _canonical(symbol)
    species = reference_data.identify([canon])
    affinity = 0.0
    if species is not None and species.anion_bound is not False and species.electron_affinity is not None:
        affinity = max(species.electron_affinity.value_ev, 0.0)
    return (IONIZATION_ENERGY_EV[canon] + affinity) / 2.0


def carrier_symbols(symbols: Sequence[str]) -> list[str]:
    """The elements of an anion that carry its extra electron, in the
    order given: hydrogen in H-, H2- and hydrides of electropositive atoms
    (hydrogen_can_hold_electron); otherwise the heavy atoms of highest
    Mulliken electronegativity (within CARRIER_WINDOW_EV of the highest).
    The electron of methoxide, formate or nitrite sits on its O atoms, of
    cyanide on N (the grid: def2-SVPD, diffuse s only on C and N,
    is adequate for CH3O-, HCO2- and NO2-)."""
    canon = []
    for s in symbols:
        c = _canonical(s)
        if c not in canon:
            canon.append(c)
    if hydrogen_can_hold_electron(canon):
        return canon
    heavy = [s for s in canon if s != "H"]
    if len(heavy) <= 1:
        return heavy
    scale = {s: mulliken_electronegativity(s) for s in heavy}
    top = max(scale.values())
    return [s for s in heavy if scale[s] >= top - CARRIER_WINDOW_EV]


def threshold(symbol: str, binding_ev: Optional[float] = None, l: Optional[int] = None,
              *, polarisation: bool = False) -> float:
    """Largest exponent (bohr^-2) of angular momentum ``l`` that still
    follows an extra electron bound by ``binding_ev`` (default: the
    conservative DEFAULT_BINDING_EV) on this element.

    ``l`` defaults to the extra electron's own l.  ``polarisation`` selects
    the factor of the polarisation functions (l = electron l + 1) that
    correlated methods need."""
    canon = _canonical(symbol)
    if l is None:
        l = extra_electron_l(canon) + (1 if polarisation else 0)
    energy = DEFAULT_BINDING_EV if binding_ev is None else max(float(binding_ev), 0.01)
    kappa_b = math.sqrt(2.0 * energy / HARTREE_EV)
    kappa_x = math.sqrt(2.0 * IONIZATION_ENERGY_EV[canon] / HARTREE_EV)
    n = (POLARISATION_EFOLDS if polarisation else EFOLDS)[l]
    return kappa_x * (kappa_b + 2.0 * l * kappa_x / n) / n


def layer_threshold(symbol: str) -> float:
    """Exponent below which an s or p function counts as a diffuse layer:
    the first version's scale (an electron bound by 1 eV, n = 2.6), kept for
    counting layers (aug = 1, d-aug = 2)."""
    ionization = IONIZATION_ENERGY_EV[_canonical(symbol)] / HARTREE_EV
    kappa_b = math.sqrt(2.0 * _LAYER_BINDING_EV / HARTREE_EV)
    return kappa_b * math.sqrt(2.0 * ionization) / _LAYER_EFOLDS


def _smallest(exponents: Sequence[float]) -> float | None:
    values = [float(a) for a in exponents if a > 0]
    return min(values) if values else None


# Sets whose smallest exponents mark an element's valence floor: a diffuse
# layer is an exponent well below what a standard triple-zeta set needs for
# the neutral atom.  Electropositive atoms (B, Si, alkali metals) have valence
# exponents below the layer scale already; counting against the floor keeps
# them from looking doubly augmented in an ordinary aug set.
_FLOOR_SETS = ("cc-pvtz", "def2-tzvp")
_LAYER_FACTOR = 0.5  # an exponent below half the floor is an added layer (common practice, no source)


def valence_floor(symbol: str) -> Optional[tuple[Optional[float], Optional[float]]]:
    """Smallest s and p exponents of the element in a standard
    non-augmented triple-zeta set (None when no such set covers it)."""
    from deckward.rules.knowledge import basis_library

    for name in _FLOOR_SETS:
        data = basis_library.element_data(name, symbol)
        if data is not None:
            exps = data.smallest_exponents
            return (exps[0][0] if exps and exps[0] else None,
                    exps[1][0] if len(exps) > 1 and exps[1] else None)
    return None


def diffuse_layers(symbol: str, smallest_exponents: Sequence[Sequence[float]]) -> int:
    """Number of diffuse s or p layers (aug = 1, d-aug = 2): exponents below
    both the layer threshold and half the element's valence floor."""
    limit = layer_threshold(symbol)
    floor = valence_floor(symbol)
    counts = []
    for l in (0, 1):
        if l >= len(smallest_exponents):
            continue
        cut = limit
        if floor is not None and floor[l] is not None:
            cut = min(limit, _LAYER_FACTOR * floor[l])
        counts.append(sum(1 for a in smallest_exponents[l] if 0 < a < cut))
    return max(counts, default=0)


def verdict(symbol: str, smallest_exponents: Sequence[Sequence[float]],
            binding_ev: Optional[float] = None, correlated: bool = False) -> DiffuseVerdict:
    """Decide whether the element's functions reach far enough.

    smallest_exponents[l] holds the smallest primitive exponents for angular
    momentum l, ascending (as in the basis library index).  Judged: the
    extra electron's own l (extra_electron_l) at ``binding_ev`` (None: not
    known, DEFAULT_BINDING_EV assumed), and for a ``correlated`` method also
    l + 1.  Raises ValueError for a symbol without a tabulated ionization
    energy.

    The verdict depends on these four values only, and a repository asks
    about the same few element/basis pairs over and over: verdicts are
    remembered (they are immutable).
    """
    return _verdict_of(symbol, tuple(tuple(x) for x in smallest_exponents),
                       None if binding_ev is None else float(binding_ev), bool(correlated))


@functools.lru_cache(maxsize=4096)
def _verdict_of(symbol: str, smallest_exponents: tuple, binding_ev: Optional[float],
                correlated: bool) -> DiffuseVerdict:
    canon = _canonical(symbol)
    per_l = [list(x) for x in smallest_exponents] + [[]] * max(0, 3 - len(smallest_exponents))
    smallest = [_smallest(x) for x in per_l]
    l_e = extra_electron_l(canon)
    checks = [(l_e, False)] + ([(l_e + 1, True)] if correlated else [])
    known = binding_ev is not None
    energy = float(binding_ev) if known else DEFAULT_BINDING_EV

    worst = None  # (ratio, l, limit, value, polarisation)
    ratio_max = 0.0
    for l, pol in checks:
        limit = threshold(canon, energy, l, polarisation=pol)
        value = smallest[l] if l < len(smallest) else None
        ratio = math.inf if value is None else value / limit
        if ratio > 1.0 and (worst is None or ratio > worst[0]):
            worst = (ratio, l, limit, value, pol)
        loosest = threshold(canon, max(energy, MAX_BINDING_BY_L[extra_electron_l(canon)]), l, polarisation=pol)
        ratio_max = max(ratio_max, math.inf if value is None else value / loosest)
    at_max_ok = ratio_max <= 1.0
    if worst is None:
        l, pol = checks[0]
        limit = threshold(canon, energy, l, polarisation=pol)
        value = smallest[l] if l < len(smallest) else None
        ratio, limiting = (0.0 if value is None else value / limit), None
    else:
        ratio, l, limit, value, pol = worst
        limiting = l
    explanation = _explain(canon, l, value, limit, limiting is None, energy, known, pol)
    return DiffuseVerdict(
        symbol=canon,
        smallest_s=smallest[0],
        smallest_p=smallest[1],
        threshold=limit,
        is_diffuse=limiting is None,
        layers=diffuse_layers(canon, per_l),
        limiting_l=limiting,
        explanation=explanation,
        electron_l=l_e,
        binding_ev=energy,
        binding_known=known,
        correlated=correlated,
        smallest=value,
        ratio=ratio,
        passes_at_max_binding=at_max_ok,
        layer_threshold=layer_threshold(canon),
        ratio_at_max_binding=ratio_max,
    )


def binding_phrase(energy: float, known: bool) -> str:
    """'an electron bound by 3.61 eV' or 'an electron bound by as little as 0.75 eV'."""
    if known:
        return f"an electron bound by {energy:.2f} eV"
    return f"an electron bound by as little as {energy:.2f} eV"


def _explain(symbol, l, value, limit, passes, energy, known, polarisation) -> str:
    letter = _ANGULAR[l]
    role = "diffuse polarisation" if polarisation else "diffuse"
    need = f"the {limit:.3f} that {binding_phrase(energy, known)} needs"
    if value is None:
        return (f"{symbol} has no {letter} functions, and {binding_phrase(energy, known)} needs one with "
                f"exponent below {limit:.3f}")
    relation = "below" if passes else "above"
    return f"the most {role} {letter} function on {symbol} has exponent {value:.3f}, {relation} {need}"
