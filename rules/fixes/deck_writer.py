"""A first deck for one molecule and one quantity (``deckward new``).

Writes what the catalogue asks of a correct set-up, so that the deck checks
without a warning: every state the quantity needs (neutral and anion for an
electron affinity, neutral and cation for an ionization energy, all three
for a fundamental gap), each ion's multiplicity from the reference table's
ground state when the species is tabulated and otherwise the lowest one its
electron count allows, unrestricted references for open shells, an
augmented basis whenever an anion is involved (Kendall, Dunning, Harrison,
J. Chem. Phys. 96, 6796 (1992)), relaxed geometries (``optimize``) for
adiabatic quantities, and the derive written with the conventional sign
(EA = E(neutral) - E(anion), IE = E(cation) - E(neutral), gap = IE - EA).
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Optional, Sequence

from deckward.rules.knowledge import basis_families, basis_library, elements, methods, reference_data

GOALS = ("electron_affinity", "ionization_energy", "fundamental_gap")
KINDS = ("vertical", "adiabatic")
DEFAULT_METHOD = "hf"  # cheap first pass; the deck says so in its comment
DEFAULT_BASIS = "cc-pvdz"


class DeckRequestError(ValueError):
    """The request cannot give a correct deck (the message says why)."""


@dataclass(frozen=True)
class StateSpec:
    name: str
    charge: int
    multiplicity: int


def lowest_multiplicity(electrons: int) -> int:
    return 1 if electrons % 2 == 0 else 2


def _charge_name(charge: int) -> str:
    return {0: "neutral", -1: "anion", 1: "cation"}.get(charge, f"charge_{'m' if charge < 0 else 'p'}{abs(charge)}")


def _safe_name(text: str, fallback: str) -> str:
    name = re.sub(r"[^A-Za-z0-9_]", "_", text).strip("_").lower()
    if not name or name[0].isdigit():
        name = f"{fallback}_{name}" if name else fallback
    return name


def plan_states(goal: str, charge: int, multiplicity: int, electrons: int,
                species: Optional[reference_data.Species]) -> list[StateSpec]:
    """The states of the quantity, the given one first."""
    if multiplicity < 1 or (multiplicity - 1) % 2 != electrons % 2 or multiplicity - 1 > electrons:
        raise DeckRequestError(f"multiplicity {multiplicity} is impossible with {electrons} electrons "
                               f"(charge {charge:+d}); {lowest_multiplicity(electrons)} is the lowest possible")
    steps = {"electron_affinity": (-1,), "ionization_energy": (+1,), "fundamental_gap": (+1, -1)}[goal]
    out = [StateSpec(_charge_name(charge), charge, multiplicity)]
    for step in steps:
        q = charge + step
        n = electrons - step
        if n < 0 or (step > 0 and n == 0):
            raise DeckRequestError(f"charge {q:+d} leaves {n} electrons: no such ion to compute")
        tabulated = species.multiplicities.get(q) if species is not None else None
        mult = tabulated if tabulated is not None and (tabulated - 1) % 2 == n % 2 else lowest_multiplicity(n)
        out.append(StateSpec(_charge_name(q), q, mult))
    return out


def _basis_for(goal: str, basis: str) -> str:
    if basis_library.lookup(basis) is None:
        raise DeckRequestError(f"basis `{basis}` is not in the basis library")
    if goal in ("electron_affinity", "fundamental_gap"):
        aug = basis_families.augmented_counterpart(basis)
        if aug is not None:
            return aug
    return basis


def write_deck(goal: str, kind: str, charge: int, multiplicity: int, symbols: Sequence[str],
               coordinates: Sequence[tuple[float, float, float]], xyz_path: str, stem: str,
               method: str = DEFAULT_METHOD, basis: str = DEFAULT_BASIS) -> str:
    """The deck text (raises DeckRequestError for an impossible request)."""
    if goal not in GOALS:
        raise DeckRequestError(f"goal `{goal}` is not one of {', '.join(GOALS)}")
    if kind not in KINDS:
        raise DeckRequestError(f"kind `{kind}` is not one of {', '.join(KINDS)}")
    if methods.lookup(method) is None:
        raise DeckRequestError(f"method `{method}` is not in the method table")
    if not symbols:
        raise DeckRequestError("the geometry has no atoms")
    unknown = [s for s in symbols if elements.lookup(s) is None]
    if unknown:
        raise DeckRequestError(f"`{unknown[0]}` is not an element symbol")
    electrons = elements.electron_count(((s, False) for s in symbols), charge)
    if electrons is None or electrons < 0:
        raise DeckRequestError(f"charge {charge:+d} leaves a negative number of electrons")
    species = reference_data.identify(list(symbols), list(coordinates))
    states = plan_states(goal, charge, multiplicity, electrons, species)
    basis_word = _basis_for(goal, basis.lower())
    if basis_library.lookup(basis_word) is not None:
        missing = [s for s in dict.fromkeys(symbols) if basis_library.element_data(basis_word, s) is None]
        if missing:
            raise DeckRequestError(f"basis `{basis_word}` has no functions for {', '.join(missing)}")
    geometry = _safe_name(stem, "mol")
    if geometry in {s.name for s in states}:
        geometry += "_geometry"
    level = _safe_name(f"{method}_{basis_word}", "level")
    where = f"optimize({geometry})" if kind == "adiabatic" else geometry
    what = species.name if species is not None else "".join(symbols)
    lines = [
        f"# {kind.capitalize()} {goal.replace('_', ' ')} of {what}, delta-method: a first deck written by",
        "# `deckward new`. Results depend on the method and the basis set: check against experiment and",
        "# expert judgement before relying on them.",
        f'study "{geometry}-{goal.replace("_", "-")}" {{',
        f"  goal = {goal}",
        f"  kind = {kind}",
        "}",
        "",
        f'geometry {geometry} {{ file = "{xyz_path}" }}',
        "",
        f"level {level} {{",
        f"  method = {method}",
        f"  basis  = {basis_word}",
        "}",
        "",
    ]
    width = max(len(s.name) for s in states)
    for s in states:
        reference = "restricted" if s.multiplicity == 1 else "unrestricted"
        lines.append(f"state {s.name:<{width}} {{ geometry = {where}  level = {level}  charge = {s.charge}  "
                     f"multiplicity = {s.multiplicity}  reference = {reference} }}")
    lines.append("")
    by_step = {s.charge - charge: s.name for s in states}
    base = states[0].name
    if goal == "electron_affinity":
        lines.append(f"derive ea as electron_affinity = energy({base}) - energy({by_step[-1]}) in ev")
    elif goal == "ionization_energy":
        lines.append(f"derive ie as ionization_energy = energy({by_step[1]}) - energy({base}) in ev")
    else:
        lines.append(f"derive gap as fundamental_gap = energy({by_step[1]}) + energy({by_step[-1]}) "
                     f"- 2 * energy({base}) in ev")
    return "\n".join(lines) + "\n"
