"""What one state needs to be computed, as plain data.

A ``StatePlan`` is the bridge between the deck model and PySCF: it holds
everything that determines a state's numbers (atoms, charge, spin, basis per
element with added shells, method, reference, frozen core, optimisation and
frequencies) and nothing else.  It is picklable (so worker processes receive
it) and turns into canonical JSON (so the cache can hash it).  The state's
name is deliberately not part of the content: renaming a state does not
change what is computed.
"""
from __future__ import annotations

import hashlib
import json
from dataclasses import asdict, dataclass, field
from typing import Optional

# Bump when the runner changes what it stores or how it computes, so that
# old cache entries are not reused.
RUNNER_FORMAT = 1


@dataclass(frozen=True)
class AtomPlan:
    symbol: str  # canonical element symbol (O, Cl)
    xyz: tuple[float, float, float]  # in the plan's unit
    ghost: bool = False


@dataclass(frozen=True)
class ElementBasisPlan:
    """The basis of one element: a library set (normalised word, or None
    when only added shells are used) plus added primitive shells (l, exponent)."""

    library: Optional[str]
    shells: tuple[tuple[int, float], ...] = ()

    @property
    def display(self) -> str:
        extra = "".join(f"+{'spdfghi'[l]}({e:g})" for l, e in self.shells)
        return (self.library or "") + extra


@dataclass(frozen=True)
class StatePlan:
    name: str
    atoms: tuple[AtomPlan, ...]
    unit: str  # 'angstrom' | 'bohr', passed to PySCF unchanged
    charge: int
    spin: int  # 2S = multiplicity - 1
    basis: tuple[tuple[str, ElementBasisPlan], ...]  # (symbol, basis), sorted by symbol
    method: str  # canonical method name from the method table
    kind: str  # MethodInfo.pyscf_kind: scf | dft | dft+mp2 | mp2 | df-mp2 | ccsd | ccsd(t) | cisd
    family: str  # hf | dft | mp2 | cc | ci
    xc: Optional[str]  # libxc functional string for density functionals
    reference: str  # restricted | unrestricted | restricted_open
    frozen_core: bool = False
    optimize: bool = False
    frequencies: bool = False
    basis_label: str = ""  # how the deck names the basis (for tables only)
    extras: tuple[tuple[str, str], ...] = field(default=())  # reserved for future keys

    @property
    def multiplicity(self) -> int:
        return self.spin + 1

    def content(self) -> dict:
        """Everything that determines the numbers (the name excluded)."""
        d = asdict(self)
        d.pop("name")
        d.pop("basis_label")
        return d

    def with_changes(self, **changes) -> "StatePlan":
        from dataclasses import replace

        return replace(self, **changes)


def content_hash(plan: StatePlan, pyscf_version: str) -> str:
    """SHA-256 of the plan's content, the PySCF version and the runner format."""
    payload = {"plan": plan.content(), "pyscf": pyscf_version, "format": RUNNER_FORMAT}
    text = json.dumps(payload, sort_keys=True, separators=(",", ":"), default=list)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def plan_from_dict(d: dict) -> StatePlan:
    """Rebuild a plan from ``asdict`` output (worker processes get dicts)."""
    atoms = tuple(AtomPlan(a["symbol"], tuple(a["xyz"]), a["ghost"]) for a in d["atoms"])
    basis = tuple((sym, ElementBasisPlan(b["library"], tuple(tuple(s) for s in b["shells"]))) for sym, b in d["basis"])
    rest = {k: v for k, v in d.items() if k not in ("atoms", "basis", "extras")}
    return StatePlan(atoms=atoms, basis=basis, extras=tuple(tuple(x) for x in d.get("extras", ())), **rest)
