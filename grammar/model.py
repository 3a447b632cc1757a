"""The deck model: frozen dataclasses built from the parse tree.

Every node carries the span of the text it came from, so that every finding
can point at the exact token a user would change.  ``Deck`` is one file as
written; ``deckward.grammar.resolve`` links decks into a ``Workspace`` where
states know their geometry, level and effective settings.
"""
from __future__ import annotations

from dataclasses import field
from typing import Generic, Optional, TypeVar, Union

from .findings import Span
from .records import record

T = TypeVar("T")

# Enumerated values of the language (lower case; keywords are case-insensitive).
GOALS = ("ionization_energy", "electron_affinity", "fundamental_gap", "excitation_energy", "energy")
KINDS = ("vertical", "adiabatic")
COMPARES = ("experiment", "theory", "none")
UNITS_LENGTH = ("angstrom", "bohr")
REFERENCES = ("restricted", "unrestricted", "restricted_open")
QUANTITIES = (
    "ionization_energy",
    "electron_affinity",
    "fundamental_gap",
    "excitation_energy",
    "reaction_energy",
    "energy",
)
ENERGY_UNITS = ("hartree", "ev", "kcal/mol", "kj/mol")
SHELL_LETTERS = "spdfghi"
SPINS = ("alpha", "beta")


@record(frozen=True)
class Located(Generic[T]):
    """A value and the span of the text that gave it."""

    value: T
    span: Span


@record(frozen=True)
class BasisSpec:
    """A basis as written: one word for every element (``default``), and/or a
    map from element symbol to a word.  A word may name a library set or a
    ``basis_set`` of the deck; resolution decides which."""

    default: Optional[Located[str]]
    per_element: tuple[tuple[Located[str], Located[str]], ...]  # (symbol, word)
    span: Span

    def word_for(self, symbol: str) -> Optional[Located[str]]:
        """The word that applies to ``symbol`` (case-insensitive)."""
        for sym, word in self.per_element:
            if sym.value.lower() == symbol.lower():
                return word
        return self.default

    def words(self) -> tuple[Located[str], ...]:
        out = [w for _, w in self.per_element]
        if self.default is not None:
            out.insert(0, self.default)
        return tuple(out)


@record(frozen=True)
class Use:
    """A ``use "file.deck"`` statement."""

    path: Located[str]
    span: Span


@record(frozen=True)
class Study:
    """The ``study`` statement: what the deck computes and how it is compared."""

    span: Span
    keyword_span: Span
    title: Optional[Located[str]] = None
    goal: Optional[Located[str]] = None
    kind: Optional[Located[str]] = None
    compare: Optional[Located[str]] = None
    note: Optional[Located[str]] = None


@record(frozen=True)
class Atom:
    """One atom line of a geometry (a symbol, three coordinates, maybe ``ghost``)."""

    symbol: Located[str]
    xyz: tuple[float, float, float]  # in the geometry's own units
    xyz_spans: tuple[Span, Span, Span]
    ghost: bool
    span: Span


@record(frozen=True)
class Geometry:
    """A ``geometry`` statement: atoms written inline or read from an .xyz file."""

    name: Located[str]
    span: Span
    units: Optional[Located[str]]  # None: angstrom by default
    atoms: tuple[Atom, ...]
    body_span: Span  # the text between the braces
    file: Optional[Located[str]] = None  # ``file = "x.xyz"``: atoms read from it at resolution (angstrom)
    file_path: Optional[str] = None  # the .xyz file's path once resolution has read it

    @property
    def unit(self) -> str:
        return self.units.value if self.units else "angstrom"


@record(frozen=True)
class Shell:
    """An ``add`` line of a basis_set: one primitive shell."""

    element: Located[str]
    letter: Located[str]
    exponent: Located[float]
    span: Span

    @property
    def l(self) -> int:
        return SHELL_LETTERS.index(self.letter.value.lower())


@record(frozen=True)
class BasisSet:
    """A ``basis_set`` statement: a library set with ``add`` shells on top."""

    name: Located[str]
    span: Span
    source: Optional[BasisSpec]  # ``from``
    shells: tuple[Shell, ...]


@record(frozen=True)
class LevelSettings:
    """The keys a level sets and a state may override."""

    method: Optional[Located[str]] = None
    basis: Optional[BasisSpec] = None
    reference: Optional[Located[str]] = None
    frozen_core: Optional[Located[bool]] = None

    def merged_over(self, base: "LevelSettings") -> "LevelSettings":
        """These settings, falling back to ``base`` for keys not set here."""
        return LevelSettings(
            method=self.method or base.method,
            basis=self.basis or base.basis,
            reference=self.reference or base.reference,
            frozen_core=self.frozen_core or base.frozen_core,
        )


@record(frozen=True)
class Level:
    """A ``level`` statement: method, basis and the other level settings."""

    name: Located[str]
    span: Span
    settings: LevelSettings


@record(frozen=True)
class GeometryRef:
    """A state's geometry: a name, or ``optimize(name)``."""

    name: Located[str]
    optimize: bool
    span: Span  # the whole value, ``optimize(x)`` included


@record(frozen=True)
class State:
    """A ``state`` statement: a geometry, a level, charge and multiplicity."""

    name: Located[str]
    span: Span
    geometry: Optional[GeometryRef]
    level: Optional[Located[str]]
    charge: Optional[Located[int]]
    multiplicity: Optional[Located[int]]
    frequencies: Optional[Located[bool]]
    overrides: LevelSettings
    last_setting_end: int  # offset just past the last setting (for insertions)


# --- expressions ---------------------------------------------------------


@record(frozen=True)
class Number:
    """A number in a derive's expression."""

    value: float
    span: Span


@record(frozen=True)
class EnergyOf:
    """``energy(state)`` in a derive's expression."""

    state: Located[str]
    span: Span


@record(frozen=True)
class OrbitalOf:
    """``orbital(state, homo)`` and its kin in a derive's expression."""

    state: Located[str]
    orbital: Located[str]  # "homo" or "lumo"
    offset: int  # homo-N -> -N, lumo+N -> +N
    spin: Optional[Located[str]]
    span: Span


@record(frozen=True)
class Unary:
    """A sign before an operand of a derive's expression."""

    op: str  # "-" or "+"
    operand: "Expr"
    span: Span


@record(frozen=True)
class Binary:
    """Two operands of a derive's expression and the operator between them."""

    op: str  # + - * /
    left: "Expr"
    right: "Expr"
    span: Span


Expr = Union[Number, EnergyOf, OrbitalOf, Unary, Binary]


def walk(expr: Expr):
    """Every node of an expression, depth first, left to right."""
    yield expr
    if isinstance(expr, Unary):
        yield from walk(expr.operand)
    elif isinstance(expr, Binary):
        yield from walk(expr.left)
        yield from walk(expr.right)


@record(frozen=True)
class MeasuredReference:
    """``reference 3.401 +- 0.001 ev "source"`` after a derive: the value
    the deck compares with, in its own unit (it overrides the reference table)."""

    value: float
    uncertainty: Optional[float]
    unit: Located[str]
    source: Located[str]
    span: Span


@record(frozen=True)
class Derive:
    """A ``derive`` statement: a named quantity computed from state energies."""

    name: Located[str]
    span: Span
    quantity: Optional[Located[str]]  # ``as QUANTITY``
    expr: Expr
    unit: Optional[Located[str]]  # ``in UNIT``; None means hartree
    reference: Optional[MeasuredReference] = None

    @property
    def unit_name(self) -> str:
        return self.unit.value if self.unit else "hartree"


@record(frozen=True)
class Comment:
    """A ``#`` comment and where it stands."""

    text: str  # without the leading '#'
    span: Span
    own_line: bool  # nothing but white space before it on its line


@record(frozen=True)
class Deck:
    """One deck file as written (before ``use`` files are loaded)."""

    path: str
    text: str
    uses: tuple[Use, ...] = ()
    study: Optional[Study] = None
    geometries: tuple[Geometry, ...] = ()
    basis_sets: tuple[BasisSet, ...] = ()
    levels: tuple[Level, ...] = ()
    states: tuple[State, ...] = ()
    derives: tuple[Derive, ...] = ()
    comments: tuple[Comment, ...] = ()
    # Spans of statements, in order (for suppressions that apply to the
    # next statement and for outlines).
    statement_spans: tuple[Span, ...] = ()
    # Names of definitions whose statement did not parse: references to
    # them are not reported as undefined (the syntax error already is).
    broken_names: frozenset[str] = field(default_factory=frozenset)

    def definitions(self):
        """(kind, name, node) of every named definition, in source order."""
        items = []
        for kind, nodes in (
            ("geometry", self.geometries),
            ("basis_set", self.basis_sets),
            ("level", self.levels),
            ("state", self.states),
            ("derive", self.derives),
        ):
            for n in nodes:
                items.append((kind, n.name, n))
        items.sort(key=lambda t: t[1].span.start)
        return items
