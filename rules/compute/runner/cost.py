"""How large a calculation is, known before PySCF starts it.

A deck can ask for CCSD(T) with 756 basis functions, or for a geometry of
10,000 atoms: started without a word, such a run takes days or asks the
machine for hundreds of GB.  The estimate here needs no PySCF: the number
of basis functions comes from the basis index (contracted shells per
angular momentum, spherical functions 2l+1 each, as PySCF builds them by
default) plus the deck's added shells; the memory is the largest set of
arrays the method holds at once; the work is the method's formal scaling.
``deckward run`` refuses a state above the bounds unless ``--force``; the
probes skip one above ``probe.max_basis_functions``.
"""
from __future__ import annotations

import os
from dataclasses import dataclass
from typing import Optional

from .plan import StatePlan

# Bound on basis functions per state for `deckward run` unless raised in
# deckward.yaml (run.max_basis_functions) or overridden with --force: a
# workstation handles Hartree-Fock with a few hundred functions in minutes
# (common practice, no source).
DEFAULT_MAX_BASIS_FUNCTIONS = 500

# Formal scaling of the work with the number of basis functions N
# (standard textbook orders: SCF N^4, MP2 N^5, CCSD and CISD N^6,
# CCSD(T) N^7; T. Helgaker, P. Jorgensen, J. Olsen, Molecular
# Electronic-Structure Theory, Wiley 2000, from memory).
SCALING = {"scf": 4, "dft": 4, "dft+mp2": 5, "mp2": 5, "df-mp2": 5, "ccsd": 6, "cisd": 6, "ccsd(t)": 7}

BYTES_PER_NUMBER = 8


@dataclass(frozen=True)
class Cost:
    n_basis: int
    occupied: int
    scaling: int
    memory_mb: float

    def describe(self, method: str) -> str:
        return (f"{self.n_basis} basis functions, {method} scaling as N^{self.scaling}, "
                f"about {_size(self.memory_mb)} of memory")


def _size(mb: float) -> str:
    return f"{mb / 1000:.1f} GB" if mb >= 1000 else f"{mb:.0f} MB"


def n_basis(plan: StatePlan) -> Optional[int]:
    """Spherical basis functions of the plan, from the basis index; None
    when an element's basis is not in the index (build the molecule then)."""
    from deckward.rules.knowledge import basis_library

    per_element: dict[str, int] = {}
    for symbol, eb in plan.basis:
        count = sum(2 * l + 1 for l, _ in eb.shells)
        if eb.library:
            data = basis_library.element_data(eb.library, symbol)
            if data is None:
                return None
            count += sum(n * (2 * l + 1) for l, n in enumerate(data.functions_per_l))
        per_element[symbol.lower()] = count
    total = 0
    for atom in plan.atoms:
        count = per_element.get(atom.symbol.lower())
        if count is None:
            return None
        total += count
    return total


def _electrons(plan: StatePlan) -> int:
    from deckward.rules.knowledge import elements

    total = 0
    for atom in plan.atoms:
        if atom.ghost:
            continue
        element = elements.lookup(atom.symbol)
        total += element.z if element is not None else 0
    return max(0, total - plan.charge)


def estimate(plan: StatePlan, n: Optional[int] = None) -> Optional[Cost]:
    """The plan's cost (None when the basis size cannot be known)."""
    n = n if n is not None else n_basis(plan)
    if n is None:
        return None
    occ = min(n, (_electrons(plan) + plan.spin + 1) // 2)
    vir = max(0, n - occ)
    scaling = SCALING.get(plan.kind, 4)
    numbers = 10 * n * n  # Fock, density, overlap, orbitals, DIIS: a few N x N matrices
    if scaling >= 5:
        numbers += 2 * occ * vir * n  # half-transformed integrals (ov|N)
    if scaling >= 6:
        numbers += 4 * occ * occ * vir * vir + occ * vir ** 3  # amplitudes, residuals and (ov|vv)
    return Cost(n, occ, scaling, numbers * BYTES_PER_NUMBER / 1e6)


def machine_memory_mb() -> Optional[float]:
    try:
        return os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES") / 1e6
    except (AttributeError, ValueError, OSError):
        return None


def refusals(plans: list[StatePlan], max_basis_functions: Optional[float] = None,
             max_memory_mb: Optional[float] = None) -> list[str]:
    """One message per plan above the bounds (basis functions; memory:
    ``max_memory_mb`` when given, else the machine's memory)."""
    limit = int(max_basis_functions or DEFAULT_MAX_BASIS_FUNCTIONS)
    memory = max_memory_mb or machine_memory_mb()
    out = []
    for plan in plans:
        cost = estimate(plan)
        if cost is None:
            continue
        over = []
        if cost.n_basis > limit:
            over.append(f"run.max_basis_functions = {limit}")
        if memory and cost.memory_mb > memory:
            over.append(f"{_size(memory)} of memory" + (" (--max-memory)" if max_memory_mb else " on this machine"))
        if over:
            out.append(f"state `{plan.name}` is too large to run: {cost.describe(plan.method)} "
                       f"({plan.basis_label}); above " + " and ".join(over))
    return out
