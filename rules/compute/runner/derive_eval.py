"""Evaluate a derive from state results, in its unit.

``energy(S)`` is the state's energy (electronic, plus the zero-point energy
when frequencies were computed); ``orbital(S, homo-N|lumo+N[, spin])`` is
an orbital energy of the state's reference determinant.  Without a spin,
restricted and restricted-open references use their spatial orbitals and
unrestricted ones both spins together (HOMO = the highest occupied spin
orbital).  Everything is in hartree until the end, where the CODATA 2018
conversion of ``rules/knowledge/units.py`` applies.  A derive whose state did not
finish is not available, with the reason.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Optional

from deckward.grammar import model as m

from deckward.rules.knowledge import deck_facts, units


class NotAvailable(Exception):
    pass


@dataclass
class DerivedValue:
    name: str
    quantity: Optional[str]
    unit: str
    value: Optional[float]  # in ``unit``
    value_hartree: Optional[float]
    states: list[str] = field(default_factory=list)
    reason: Optional[str] = None
    experiment: Optional[dict] = None  # the measured value beside it (rules/compute/comparison.py)

    @property
    def available(self) -> bool:
        return self.value is not None

    def to_dict(self) -> dict:
        return {
            "name": self.name,
            "quantity": self.quantity,
            "unit": self.unit,
            "value": self.value,
            "value_hartree": self.value_hartree,
            "available": self.available,
            "states": self.states,
            "reason": self.reason,
            "experiment": self.experiment,
        }


def _state(results: dict, name: str) -> dict:
    r = results.get(name)
    if r is None:
        raise NotAvailable(f"state `{name}` was not run")
    if r.get("status") != "ok":
        raise NotAvailable(f"state `{name}` {r.get('status')}: {r.get('reason')}")
    return r


def orbital_energy(result: dict, node: m.OrbitalOf) -> float:
    channel = node.spin.value.lower() if node.spin is not None else "any"
    orbitals = (result.get("orbitals") or {}).get(channel)
    if orbitals is None:
        raise NotAvailable(f"state `{node.state.value}` has no orbital energies")
    which = node.orbital.value.lower()
    index = abs(node.offset)
    pool = orbitals["occupied"] if which == "homo" else orbitals["virtual"]
    label = which + (f"{'-' if which == 'homo' else '+'}{index}" if index else "")
    if index >= len(pool):
        kind = "occupied" if which == "homo" else "virtual"
        raise NotAvailable(f"state `{node.state.value}` has only {len(pool)} {kind} "
                           f"{channel if channel != 'any' else ''} orbitals, so {label} does not exist".replace("  ", " "))
    return float(pool[index])


def _value(expr: m.Expr, results: dict) -> float:
    if isinstance(expr, m.Number):
        return float(expr.value)
    if isinstance(expr, m.EnergyOf):
        return float(_state(results, expr.state.value)["energy"])
    if isinstance(expr, m.OrbitalOf):
        return orbital_energy(_state(results, expr.state.value), expr)
    if isinstance(expr, m.Unary):
        v = _value(expr.operand, results)
        return -v if expr.op == "-" else v
    if isinstance(expr, m.Binary):
        a, b = _value(expr.left, results), _value(expr.right, results)
        if expr.op == "+":
            return a + b
        if expr.op == "-":
            return a - b
        if expr.op == "*":
            return a * b
        if b == 0:
            raise NotAvailable("division by zero")
        return a / b
    raise NotAvailable(f"cannot evaluate {type(expr).__name__}")


def evaluate(derive: m.Derive, results: dict, quantity: Optional[str] = None) -> DerivedValue:
    unit = derive.unit_name.lower()
    out = DerivedValue(derive.name.value, quantity, unit, None, None, deck_facts.states_of(derive))
    try:
        hartree = _value(derive.expr, results)
    except NotAvailable as e:
        out.reason = str(e)
        return out
    out.value_hartree = hartree
    out.value = units.from_hartree(hartree, unit)
    return out
