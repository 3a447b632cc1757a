"""Whether a basis set's s and p functions reach far enough for an anion.

A weakly bound electron (binding energy E_b) has an orbital that decays as
exp(-kappa_b r) with kappa_b = sqrt(2 E_b) (atomic units).  Inside the atom it
looks like the neutral atom's outermost orbital, which decays much faster,
as exp(-kappa_X r) with kappa_X = sqrt(2 I_X), I_X the first ionization energy.
The extra electron's own tail begins where the neutral valence density has
died out, at r_n = n / (2 kappa_X) (density fallen by e^-n).  A Gaussian
exp(-alpha r^2) decays locally at the rate 2 alpha r; it can follow the slow
tail there only if 2 alpha r_n <= kappa_b, which gives

    alpha_max(X) = kappa_b * kappa_X / n.

E_b is fixed at 1 eV (the scale of a weakly bound electron; a deck's anion
binding energy is not known before the calculation), and the single free
factor n = 2.6 was calibrated against Hartree-Fock delta-SCF electron
affinities (bench/diffuse_calibration.py, docs/diffuse-criterion.md).

The verdict is decided from exponents only, never from a basis name, so a
hand-augmented set passes and a set merely named like a diffuse one fails.
Pure Python: imported on the editor path, so no pyscf and no numpy.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Optional, Sequence

__all__ = [
    "CRITERION_REFERENCES",
    "DiffuseVerdict",
    "IONIZATION_ENERGY_EV",
    "threshold",
    "verdict",
    "diffuse_layers",
]

HARTREE_EV = 27.211386245988  # CODATA 2018
WEAK_BINDING_EV = 1.0  # E_b: binding-energy scale of a weakly bound electron
DENSITY_EFOLDS = 2.6  # n: calibrated free factor (docs/diffuse-criterion.md)
_ANGULAR = ("s", "p")

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

_S_ONLY = frozenset({"H", "He"})  # valence shell has no p: the s function decides


@dataclass(frozen=True)
class DiffuseVerdict:
    """Outcome of the diffuse test for one element of one basis set.

    limiting_l names the angular momentum that fails (0 = s, 1 = p; p when
    both fail), or None when the element passes.  layers counts diffuse functions (exponents
    below the threshold) in the more heavily augmented of s and p.
    """

    symbol: str
    smallest_s: float | None
    smallest_p: float | None
    threshold: float
    is_diffuse: bool
    layers: int
    limiting_l: int | None
    explanation: str


def _canonical(symbol: str) -> str:
    text = symbol.strip()
    canon = text[:1].upper() + text[1:].lower()
    if canon not in IONIZATION_ENERGY_EV:
        raise ValueError(
            f"no ionization energy tabulated for element {symbol!r}: "
            "the diffuse threshold cannot be computed"
        )
    return canon


def threshold(symbol: str) -> float:
    """Largest s/p exponent (bohr^-2) that still serves a weakly bound electron.

    alpha_max = sqrt(2 E_b) * sqrt(2 I_X) / n in atomic units, with E_b = 1 eV,
    I_X the element's first ionization energy and n = 2.6.  It depends on the
    element because the extra electron's tail starts where the neutral
    atom's valence density ends, which is farther out for loosely bound
    atoms (Si, P) than for tightly bound ones (F).
    """
    ionization = IONIZATION_ENERGY_EV[_canonical(symbol)] / HARTREE_EV
    kappa_b = math.sqrt(2.0 * WEAK_BINDING_EV / HARTREE_EV)
    kappa_x = math.sqrt(2.0 * ionization)
    return kappa_b * kappa_x / DENSITY_EFOLDS


def _smallest(exponents: Sequence[float]) -> float | None:
    values = [float(a) for a in exponents if a > 0]
    return min(values) if values else None


# Sets whose smallest exponents mark an element's valence floor: a diffuse
# layer is an exponent well below what a standard triple-zeta set needs for
# the neutral atom.  Electropositive atoms (B, Si, alkali metals) have valence
# exponents below the threshold already; counting against the floor keeps
# them from looking doubly augmented in an ordinary aug set.
_FLOOR_SETS = ("cc-pvtz", "def2-tzvp")
_LAYER_FACTOR = 0.5  # an exponent below half the floor is an added layer (common practice, no source)


def valence_floor(symbol: str) -> Optional[tuple[Optional[float], Optional[float]]]:
    """Smallest s and p exponents of the element in a standard
    non-augmented triple-zeta set (None when no such set covers it)."""
    from . import basis_library

    for name in _FLOOR_SETS:
        data = basis_library.element_data(name, symbol)
        if data is not None:
            exps = data.smallest_exponents
            return (exps[0][0] if exps and exps[0] else None,
                    exps[1][0] if len(exps) > 1 and exps[1] else None)
    return None


def diffuse_layers(symbol: str, smallest_exponents: Sequence[Sequence[float]]) -> int:
    """Number of diffuse s or p layers (aug = 1, d-aug = 2): exponents below
    both the threshold and half the element's valence floor."""
    limit = threshold(symbol)
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


def verdict(symbol: str, smallest_exponents: Sequence[Sequence[float]]) -> DiffuseVerdict:
    """Decide whether the element's s and p functions are diffuse enough.

    smallest_exponents[l] holds the smallest primitive exponents for angular
    momentum l, ascending (as in the basis library index); only s and p are
    read.  Both must be below threshold(symbol); for H and He only s is
    required.  Raises ValueError for a symbol without a tabulated ionization
    energy.
    """
    canon = _canonical(symbol)
    limit = threshold(canon)
    per_l = list(smallest_exponents) + [[]] * max(0, 2 - len(smallest_exponents))
    smallest_s = _smallest(per_l[0])
    smallest_p = _smallest(per_l[1])
    required = (0,) if canon in _S_ONLY else (0, 1)

    # p is reported first when both fail: the calibration shows the p reach
    # decides the electron affinity of p-block anions, the s reach barely.
    failing = [
        l for l in required
        if (value := (smallest_s, smallest_p)[l]) is None or value >= limit
    ]
    limiting_l = max(failing) if failing else None
    layers = diffuse_layers(canon, per_l)
    explanation = _explain(canon, limit, smallest_s, smallest_p, required, limiting_l)
    return DiffuseVerdict(
        symbol=canon,
        smallest_s=smallest_s,
        smallest_p=smallest_p,
        threshold=limit,
        is_diffuse=limiting_l is None,
        layers=layers,
        limiting_l=limiting_l,
        explanation=explanation,
    )


def _explain(symbol, limit, smallest_s, smallest_p, required, limiting_l) -> str:
    need = f"the {limit:.3f} a weakly bound electron needs"
    if limiting_l is not None:
        letter = _ANGULAR[limiting_l]
        value = (smallest_s, smallest_p)[limiting_l]
        if value is None:
            return f"{symbol} has no {letter} functions, and a weakly bound electron needs one with exponent below {limit:.3f}"
        return f"the most diffuse {letter} function on {symbol} has exponent {value:.3f}, above {need}"
    if required == (0,):
        return f"the most diffuse s function on {symbol} has exponent {smallest_s:.3f}, below {need}"
    return (
        f"the most diffuse s and p functions on {symbol} have exponents "
        f"{smallest_s:.3f} and {smallest_p:.3f}, below {need}"
    )
