"""What a stored run result must look like before it is served.

The run cache is a folder anyone can write to; an entry with a string where
an energy belongs, a NaN energy or a missing orbital list would crash
``deckward run`` or, worse, be printed as a result ("nan eV").  An entry that
does not have the exact shape ``compute_state`` produces, with finite
numbers, is treated as absent and computed again.
"""
from __future__ import annotations

import math
from typing import Any


def _number(v: Any) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v)


def _optional_number(v: Any) -> bool:
    return v is None or _number(v)


def _numbers(v: Any) -> bool:
    return isinstance(v, list) and all(_number(x) for x in v)


def _orbitals(v: Any) -> bool:
    if not isinstance(v, dict) or set(v) != {"alpha", "beta", "any"}:
        return False
    return all(isinstance(c, dict) and _numbers(c.get("occupied")) and _numbers(c.get("virtual")) for c in v.values())


def _geometry(v: Any) -> bool:
    if v is None:
        return True
    return isinstance(v, list) and all(
        isinstance(a, list) and len(a) == 5 and isinstance(a[0], str) and all(_number(x) for x in a[1:4])
        and isinstance(a[4], bool) for a in v)


CHECKS = {
    "status": lambda v: v == "ok",
    "method": lambda v: isinstance(v, str),
    "basis": lambda v: isinstance(v, str),
    "reference": lambda v: isinstance(v, str),
    "charge": lambda v: isinstance(v, int) and not isinstance(v, bool),
    "multiplicity": lambda v: isinstance(v, int) and not isinstance(v, bool) and v >= 1,
    "frozen_core": lambda v: isinstance(v, bool),
    "n_basis": lambda v: isinstance(v, int) and not isinstance(v, bool) and v >= 1,
    "energy": _number,
    "electronic_energy": _number,
    "scf_energy": _number,
    "correlation_energy": _optional_number,
    "scf_converged": lambda v: v is True,
    "s2": _optional_number,
    "s2_expected": _optional_number,
    "zpe": _optional_number,
    "frequencies_cm1": lambda v: v is None or _numbers(v),
    "optimized_geometry": _geometry,
    "overlap_min_eigenvalue": _optional_number,
    "orbitals": _orbitals,
    "notes": lambda v: isinstance(v, list) and all(isinstance(n, str) for n in v),
    "wall_time_s": _number,
}


def problem(entry: Any) -> str | None:
    """Why ``entry`` cannot be served (None: it can)."""
    if not isinstance(entry, dict):
        return "not a mapping"
    for key, ok in CHECKS.items():
        if key not in entry:
            return f"`{key}` is missing"
        if not ok(entry[key]):
            return f"`{key}` has an impossible value"
    return None


def finite_result(result: dict) -> bool:
    """A finished result whose energies are all finite numbers."""
    return all(_optional_number(result.get(k)) for k in ("energy", "electronic_energy", "scf_energy",
                                                          "correlation_energy"))
