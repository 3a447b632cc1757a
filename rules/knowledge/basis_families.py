"""Counterparts within a basis-set family, for fixes.

Two questions the fixes ask:

- ``augmented_counterpart``: the same family with diffuse functions added,
  for an anion described by a set too tight to hold a weakly bound electron
  (cc-pVXZ -> aug-cc-pVXZ, Kendall, Dunning, Harrison, J. Chem. Phys. 96,
  6796 (1992); 6-31G* -> 6-31+G*, Clark et al., J. Comput. Chem. 4, 294
  (1983); def2-XXX -> def2-XXXD, Rappoport and Furche, J. Chem. Phys. 133,
  134105 (2010); pcseg-n -> aug-pcseg-n, Jensen, J. Chem. Theory Comput. 10,
  1074 (2014)).
- ``triple_zeta_counterpart``: the triple-zeta member of the same family,
  for a correlated method run in a double-zeta set.

The tables below name pairs; the test suite checks that both members of
every pair are in the basis library and that every augmented counterpart is
more diffuse on O and Cl.  A pair whose member is missing from the
installed library is dropped at lookup time rather than offered.
Minimal sets (sto-3g, sto-6g) have no augmented counterpart in the library,
and answer None; so do cc-pCVXZ (PySCF ships no aug-cc-pCVXZ; aug-cc-pwCVXZ
is there).  A counterpart may still cover fewer elements than the original;
a fix should check ``basis_library.lookup(counterpart).elements``.

Names are returned in the library's canonical spelling (lower case); the fix
decides how to present them.
"""

from __future__ import annotations

from . import basis_library

_ZETAS = ("d", "t", "q", "5")

AUGMENTED: dict[str, str] = {}
for _x in _ZETAS:
    AUGMENTED[f"cc-pv{_x}z"] = f"aug-cc-pv{_x}z"
    if _x != "d":
        # PySCF's cc-pwCVDZ has only Ga-Kr and its aug-cc-pwCVDZ only B-Ar:
        # no element in common, so no pair.
        AUGMENTED[f"cc-pwcv{_x}z"] = f"aug-cc-pwcv{_x}z"
    AUGMENTED[f"cc-pv{_x}z-dk"] = f"aug-cc-pv{_x}z-dk"
    AUGMENTED[f"cc-pv{_x}z-pp"] = f"aug-cc-pv{_x}z-pp"
for _n in range(5):
    AUGMENTED[f"pcseg-{_n}"] = f"aug-pcseg-{_n}"
    AUGMENTED[f"pc-{_n}"] = f"aug-pc-{_n}"
AUGMENTED.update(
    {
        # Pople: "+" adds diffuse s and p on heavy atoms, where an anion's
        # extra electron sits; "++" adds an H s function too (check-values
        # section 5: "+" leaves H unchanged).
        "3-21g": "3-21++g",
        "3-21g*": "3-21++g*",
        "6-31g": "6-31+g",
        "6-31g*": "6-31+g*",
        "6-31g**": "6-31+g**",
        "6-311g": "6-311+g",
        "6-311g*": "6-311+g*",
        "6-311g**": "6-311+g**",
        "def2-svp": "def2-svpd",
        "def2-tzvp": "def2-tzvpd",
        "def2-tzvpp": "def2-tzvppd",
        "def2-qzvp": "def2-qzvpd",
        "def2-qzvpp": "def2-qzvppd",
        "dzp": "adzp",
        "tzp": "atzp",
        "qzp": "aqzp",
    }
)

TRIPLE_ZETA: dict[str, str] = {
    "cc-pvdz": "cc-pvtz",
    "aug-cc-pvdz": "aug-cc-pvtz",
    "cc-pcvdz": "cc-pcvtz",
    "cc-pwcvdz": "cc-pwcvtz",
    "aug-cc-pwcvdz": "aug-cc-pwcvtz",
    "cc-pvdz-dk": "cc-pvtz-dk",
    "aug-cc-pvdz-dk": "aug-cc-pvtz-dk",
    "cc-pvdz-pp": "cc-pvtz-pp",
    "aug-cc-pvdz-pp": "aug-cc-pvtz-pp",
    "def2-svp": "def2-tzvp",
    "def2-svpd": "def2-tzvpd",
    "ma-def2-svp": "ma-def2-tzvp",
    "pcseg-0": "pcseg-2",
    "pcseg-1": "pcseg-2",
    "aug-pcseg-0": "aug-pcseg-2",
    "aug-pcseg-1": "aug-pcseg-2",
    "pc-0": "pc-2",
    "pc-1": "pc-2",
    "aug-pc-0": "aug-pc-2",
    "aug-pc-1": "aug-pc-2",
    "3-21g": "6-311g",
    "6-31g": "6-311g",
    "6-31g*": "6-311g*",
    "6-31g**": "6-311g**",
    "6-31+g": "6-311+g",
    "6-31+g*": "6-311+g*",
    "6-31+g**": "6-311+g**",
    "6-31++g": "6-311++g",
    "6-31++g*": "6-311++g*",
    "6-31++g**": "6-311++g**",
    "dzp": "tzp",
    "adzp": "atzp",
    "roos-dz": "roos-tz",
}


def _counterpart(table: dict[str, str], word: str) -> str | None:
    info = basis_library.lookup(word)
    if info is None:
        return None
    target = table.get(info.name)
    if target is None or basis_library.lookup(target) is None:
        return None
    return basis_library.lookup(target).name


def augmented_counterpart(word: str) -> str | None:
    """The diffuse-augmented set of the same family, or None if there is none."""
    return _counterpart(AUGMENTED, word)


def triple_zeta_counterpart(word: str) -> str | None:
    """The triple-zeta set of the same family, or None if there is none."""
    return _counterpart(TRIPLE_ZETA, word)
