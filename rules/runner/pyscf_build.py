"""Build PySCF objects from a ``StatePlan`` (imports PySCF; runner only).

The mapping is literal: the geometry goes to PySCF in its own unit, library
basis words go to PySCF's loader unchanged, added shells are appended as
uncontracted primitives, ghost atoms become ``ghost-X`` atoms carrying X's
basis, and the reference picks RHF/UHF/ROHF (RKS/UKS/ROKS for functionals).
Nothing is tuned: PySCF's own defaults (convergence thresholds, grids)
apply, so a deck's numbers equal those of PySCF called directly.
"""
from __future__ import annotations

from typing import Optional

from .plan import StatePlan


def basis_dict(plan: StatePlan) -> dict:
    from pyscf import gto

    out = {}
    for symbol, eb in plan.basis:
        if eb.shells:
            shells = list(gto.basis.load(eb.library, symbol)) if eb.library else []
            shells += [[l, [exp, 1.0]] for l, exp in eb.shells]
            value = shells
        else:
            value = eb.library
        out[symbol] = value
        out["GHOST-" + symbol] = value
    return out


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
