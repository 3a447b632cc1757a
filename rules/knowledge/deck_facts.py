"""Facts about a resolved deck that several rules need.

Kept in one place so that rules agree: how many electrons a state has, what
an expression computes as a linear combination of state energies and orbital
energies, and which basis functions an element of a state really gets
(library set plus ``add`` shells).
"""
from __future__ import annotations

from dataclasses import field
from typing import Optional

from deckward.grammar import model as m
from deckward.grammar.records import record
from deckward.grammar.resolve import ResolvedState, Workspace


# --- electrons -------------------------------------------------------------


def nuclear_charge(geometry: m.Geometry) -> Optional[int]:
    """Sum of Z over real (non-ghost) atoms; None if an element is unknown."""
    from . import elements

    return elements.electron_count(((a.symbol.value, a.ghost) for a in geometry.atoms), 0)


def electron_count(rs: ResolvedState) -> Optional[int]:
    """N = sum(Z) - charge, ghost atoms counting nothing; None when unknown."""
    if rs.geometry is None or not rs.geometry.atoms:
        return None
    z = nuclear_charge(rs.geometry)
    return None if z is None else z - rs.charge


def lowest_multiplicity(electrons: int) -> int:
    return 1 if electrons % 2 == 0 else 2


# --- expressions -----------------------------------------------------------


@record
class LinearForm:
    """An expression as sum(c_s * E(s)) + sum(c_o * eps(o)) + constant."""

    energies: dict[str, float] = field(default_factory=dict)
    energy_nodes: dict[str, list] = field(default_factory=dict)  # state -> EnergyOf nodes
    orbitals: list[tuple[float, m.OrbitalOf]] = field(default_factory=list)
    constant: float = 0.0
    linear: bool = True

    def scaled(self, k: float) -> "LinearForm":
        return LinearForm(
            {s: c * k for s, c in self.energies.items()},
            self.energy_nodes,
            [(c * k, o) for c, o in self.orbitals],
            self.constant * k,
            self.linear,
        )

    def plus(self, other: "LinearForm", sign: float = 1.0) -> "LinearForm":
        energies = dict(self.energies)
        for s, c in other.energies.items():
            energies[s] = energies.get(s, 0.0) + sign * c
        nodes = {k: list(v) for k, v in self.energy_nodes.items()}
        for s, ns in other.energy_nodes.items():
            nodes.setdefault(s, []).extend(ns)
        return LinearForm(
            energies,
            nodes,
            self.orbitals + [(sign * c, o) for c, o in other.orbitals],
            self.constant + sign * other.constant,
            self.linear and other.linear,
        )

    @property
    def is_constant(self) -> bool:
        return not any(self.energies.values()) and not self.orbitals


def linear_form(expr: m.Expr) -> LinearForm:
    if isinstance(expr, m.Number):
        return LinearForm(constant=expr.value)
    if isinstance(expr, m.EnergyOf):
        s = expr.state.value
        return LinearForm({s: 1.0}, {s: [expr]})
    if isinstance(expr, m.OrbitalOf):
        return LinearForm(orbitals=[(1.0, expr)])
    if isinstance(expr, m.Unary):
        inner = linear_form(expr.operand)
        return inner.scaled(-1.0) if expr.op == "-" else inner
    if isinstance(expr, m.Binary):
        left, right = linear_form(expr.left), linear_form(expr.right)
        if expr.op in "+-":
            return left.plus(right, 1.0 if expr.op == "+" else -1.0)
        if expr.op == "*":
            if left.is_constant:
                return right.scaled(left.constant)
            if right.is_constant:
                return left.scaled(right.constant)
        if expr.op == "/" and right.is_constant and right.constant != 0:
            return left.scaled(1.0 / right.constant)
        out = left.plus(right)
        out.linear = False
        return out
    return LinearForm(linear=False)


@record(frozen=True)
class EnergyDifference:
    """E(plus) - E(minus) (times a positive factor) inside a derive."""

    plus: str
    minus: str
    plus_node: m.EnergyOf
    minus_node: m.EnergyOf


def energy_difference(derive: m.Derive) -> Optional[EnergyDifference]:
    """The derive as a difference of two state energies, if it is one."""
    form = linear_form(derive.expr)
    terms = {s: c for s, c in form.energies.items() if abs(c) > 1e-12}
    if not form.linear or form.orbitals or len(terms) != 2:
        return None
    (s1, c1), (s2, c2) = terms.items()
    if abs(c1 + c2) > 1e-9 * max(abs(c1), abs(c2)):
        return None
    plus, minus = (s1, s2) if c1 > 0 else (s2, s1)
    return EnergyDifference(plus, minus, form.energy_nodes[plus][0], form.energy_nodes[minus][0])


def states_of(derive: m.Derive) -> list[str]:
    """States a derive needs, in order of appearance, each once."""
    out: list[str] = []
    for node in m.walk(derive.expr):
        if isinstance(node, (m.EnergyOf, m.OrbitalOf)) and node.state.value not in out:
            out.append(node.state.value)
    return out


# --- basis functions per element ------------------------------------------


@record(frozen=True)
class ElementBasis:
    """What one element of a state gets: a library word (if any) and the
    ``add`` shells of a deck basis_set."""

    symbol: str
    library_word: Optional[m.Located[str]]
    shells: tuple[m.Shell, ...]
    basis_set: Optional[m.BasisSet]
    origin: m.Located[str]  # the word in the level or state a user would change


def element_basis(ws: Workspace, spec: Optional[m.BasisSpec], symbol: str) -> Optional[ElementBasis]:
    if spec is None:
        return None
    word = spec.word_for(symbol)
    if word is None:
        return None
    bs = ws.basis_set(word.value)
    if bs is None:
        return ElementBasis(symbol, word, (), None, word)
    seen = {bs.name.value}
    library = bs.source.word_for(symbol) if bs.source else None
    shells = [s for s in bs.shells if s.element.value.lower() == symbol.lower()]
    # A basis_set built on another basis_set: follow it (once per name).
    while library is not None and ws.basis_set(library.value) is not None and library.value not in seen:
        inner = ws.basis_set(library.value)
        seen.add(inner.name.value)
        shells += [s for s in inner.shells if s.element.value.lower() == symbol.lower()]
        library = inner.source.word_for(symbol) if inner.source else None
    return ElementBasis(symbol, library, tuple(shells), bs, word)


def smallest_exponents(eb: ElementBasis) -> Optional[list[list[float]]]:
    """Ascending smallest exponents per angular momentum (library data plus
    added shells); None when the library has nothing for the element."""
    from . import basis_library

    per_l: list[list[float]] = []
    if eb.library_word is not None:
        data = basis_library.element_data(eb.library_word.value, eb.symbol)
        if data is None and not eb.shells:
            return None
        if data is not None:
            per_l = [list(x) for x in data.smallest_exponents]
    elif not eb.shells:
        return None
    for shell in eb.shells:
        while len(per_l) <= shell.l:
            per_l.append([])
        per_l[shell.l].append(shell.exponent.value)
    return [sorted(x) for x in per_l]
