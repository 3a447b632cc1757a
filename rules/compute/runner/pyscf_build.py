"""Build PySCF objects from a ``StatePlan`` (imports PySCF; runner only).

The mapping is literal: the geometry goes to PySCF in its own unit, library
basis words become the shells of the library that names them (PySCF's own
copy when it has one, else the Basis Set Exchange's; never a file, see
``library_shells``), added shells are appended as uncontracted primitives, ghost atoms become ``ghost-X`` atoms carrying X's
basis, and the reference picks RHF/UHF/ROHF (RKS/UKS/ROKS for functionals).
Nothing is tuned: PySCF's own defaults (convergence thresholds, grids)
apply, so a deck's numbers equal those of PySCF called directly.
"""
from __future__ import annotations

from typing import Optional

from .plan import StatePlan


class BasisUnavailable(Exception):
    """A library basis word whose data cannot be had (one line, for the user)."""


def _pyscf_library_shells(word: str, symbol: str):
    """The shells PySCF's bundled library holds for ``word`` and ``symbol``,
    or None when PySCF does not ship them.

    PySCF's own ``gto.basis.load`` first asks ``os.path.isfile(word)`` and
    reads any file of that name, so a file called ``sto3g`` in the working
    folder would replace the library set.  Here the word is only ever looked
    up in PySCF's name tables and read from PySCF's own data folders.
    """
    import importlib
    import os

    from pyscf.gto import basis as lib
    from pyscf.gto.basis import parse_cp2k, parse_nwchem

    name = lib._format_basis_name(word)
    folder, reader = lib._BASIS_DIR, parse_nwchem.load
    if name in lib.ALIAS:
        target = lib.ALIAS[name]
    elif name in lib.GTH_ALIAS:
        target, folder, reader = lib.GTH_ALIAS[name], lib._GTH_BASIS_DIR, parse_cp2k.load
    elif lib._is_pople_basis(name):
        try:
            target = lib._parse_pople_basis(name, symbol)
        except KeyError:
            return None
    else:
        return None
    try:
        if isinstance(target, str) and "dat" not in target:
            module = importlib.import_module("." + target, lib.__name__)
            return list(getattr(module, symbol))
        files = (target,) if isinstance(target, str) else tuple(target)
        shells = []
        for f in files:
            shells += reader(os.path.join(folder, f), symbol)
        return shells or None
    except (lib.BasisNotFoundError, AttributeError, KeyError):
        return None


def _bse_shells(word: str, symbol: str):
    """The Basis Set Exchange's shells for ``word`` and ``symbol``, or None."""
    from deckward.rules.knowledge import basis_library

    try:
        import basis_set_exchange
    except ImportError:
        raise BasisUnavailable(
            f"basis `{word}` comes from the Basis Set Exchange, but the basis_set_exchange package "
            "is not installed (pip install basis_set_exchange)"
        ) from None
    from pyscf.gto.basis import bse as convert

    name = basis_library.bse_name(word) or word
    try:
        data = basis_set_exchange.get_basis(name, elements=[symbol])
    except (KeyError, RuntimeError, ValueError):
        return None
    return convert._orbital_basis(data)[0].get(symbol)


def library_shells(word: str, symbol: str) -> list:
    """Shells of library basis ``word`` for element ``symbol``: PySCF's copy
    when it ships one, the Basis Set Exchange's otherwise.  Raises
    BasisUnavailable when neither has it."""
    shells = _pyscf_library_shells(word, symbol)
    if shells is None:
        shells = _bse_shells(word, symbol)
    if not shells:
        raise BasisUnavailable(f"basis `{word}` has no functions for {symbol} in PySCF's library or the Basis Set Exchange")
    return shells


def basis_dict(plan: StatePlan) -> dict:
    """Element -> explicit shells (never a name PySCF would resolve itself)."""
    out = {}
    for symbol, eb in plan.basis:
        shells = list(library_shells(eb.library, symbol)) if eb.library else []
        shells += [[l, [exp, 1.0]] for l, exp in eb.shells]
        out[symbol] = shells
        out["GHOST-" + symbol] = shells
    return out


def basis_digest(plan: StatePlan) -> str:
    """SHA-256 of the exact shells every element gets: the run cache keys on
    it, so a changed library copy can never be answered from an old entry."""
    import hashlib
    import json

    text = json.dumps(sorted((k, v) for k, v in basis_dict(plan).items() if not k.startswith("GHOST-")),
                      separators=(",", ":"), default=float)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def atom_list(plan: StatePlan, coords=None) -> list:
    atoms = []
    for i, a in enumerate(plan.atoms):
        xyz = coords[i] if coords is not None else a.xyz
        atoms.append([("ghost-" + a.symbol) if a.ghost else a.symbol, tuple(float(x) for x in xyz)])
    return atoms


def build_mole(plan: StatePlan, max_memory_mb: Optional[float] = None, stream=None, verbose: int = 4):
    """A built ``Mole``; PySCF's log goes to ``stream`` (an open text file)
    when given, else nowhere."""
    from pyscf import gto

    mol = gto.Mole()
    mol.atom = atom_list(plan)
    mol.unit = "Bohr" if plan.unit == "bohr" else "Angstrom"
    mol.basis = basis_dict(plan)
    mol.charge = plan.charge
    mol.spin = plan.spin
    mol.symmetry = False
    if max_memory_mb:
        mol.max_memory = float(max_memory_mb)
    if stream is not None:
        mol.stdout = stream
        mol.verbose = verbose
    else:
        mol.verbose = 0
    mol.build()
    return mol


def build_scf(mol, plan: StatePlan):
    """The mean-field object of the plan's reference (not yet run)."""
    from pyscf import dft, scf

    if plan.family == "dft":
        cls = {"restricted": dft.RKS, "unrestricted": dft.UKS, "restricted_open": dft.ROKS}[plan.reference]
        mf = cls(mol)
        mf.xc = plan.xc
        return mf
    cls = {"restricted": scf.RHF, "unrestricted": scf.UHF, "restricted_open": scf.ROHF}[plan.reference]
    return cls(mol)


def frozen_core_count(mol) -> int:
    """Core orbitals to freeze: PySCF's chemical core (noble-gas shells,
    ECP electrons accounted for); ghost atoms contribute none."""
    from pyscf.data import elements

    return int(elements.chemcore(mol))


def build_correlated(mf, plan: StatePlan):
    """The post-Hartree-Fock object of the plan (not yet run), or None for
    SCF-level methods.  For a double hybrid it is the MP2 object on the
    Kohn-Sham orbitals."""
    from pyscf import cc, ci, mp

    frozen = frozen_core_count(mf.mol) if plan.frozen_core else None
    kind = plan.kind
    if kind in ("mp2", "dft+mp2"):
        obj = mp.MP2(mf, frozen=frozen)
    elif kind == "df-mp2":
        obj = mp.MP2(mf, frozen=frozen).density_fit()
    elif kind in ("ccsd", "ccsd(t)"):
        obj = cc.CCSD(mf, frozen=frozen)
    elif kind == "cisd":
        obj = ci.CISD(mf, frozen=frozen)
    else:
        return None
    return obj
