"""Ionization energies and electron affinities in a deck.

Several rules ask the same questions: which derives report an ionization
energy (IE) or an electron affinity (EA), whether a derive is an energy
difference or an orbital-energy estimate, which states form a neutral/ion
pair, and what level of theory a state is really computed at.  The answers
live here so that the rules agree; how the rules word them is in
``wording``, and the fixes they offer (an orbital-energy estimate rewritten
as an energy difference, a missing ion state added) in ``ion_fixes``.

Conventions (Rienstra-Kiracofe et al., Chem. Rev. 102, 231 (2002); NIST
Chemistry WebBook, gas-phase ion energetics): IE = E(cation) - E(neutral) and
EA = E(neutral) - E(anion), both positive when the electron is bound.  In
both, the state written first has the charge that is higher by one.
"""
from __future__ import annotations

from typing import Iterable, Optional

from deckward.grammar import model as m
from deckward.grammar.records import record
from deckward.grammar.resolve import ResolvedState, Workspace

from deckward.rules.knowledge.deck_facts import (
    EnergyDifference,
    LinearForm,
    energy_difference,
    linear_form,
)

IE = "ionization_energy"
EA = "electron_affinity"
ION_QUANTITIES = (IE, EA)
STEP = {IE: +1, EA: -1}  # charge of the ion relative to the neutral
ION_WORD = {IE: "cation", EA: "anion"}
NOUN = {IE: "ionization energy", EA: "electron affinity"}
# Quantities whose states a study's ``kind`` (vertical | adiabatic) governs.
KIND_QUANTITIES = (IE, EA, "fundamental_gap", "excitation_energy")
QUANTITY_NOUN = dict(NOUN, fundamental_gap="fundamental gap", excitation_energy="excitation energy")


@record(frozen=True)
class IonDerive:
    """A derive that reports an IE or an EA, with what its expression is."""

    derive: m.Derive
    quantity: str  # IE or EA
    form: LinearForm
    difference: Optional[EnergyDifference]  # E(plus) - E(minus), if it is one

    @property
    def name(self) -> str:
        return self.derive.name.value

    @property
    def noun(self) -> str:
        return NOUN[self.quantity]

    @property
    def orbital_term(self) -> Optional[tuple[float, m.OrbitalOf]]:
        """(coefficient, orbital) when the number is one orbital energy
        (possibly scaled), with no state energy in it."""
        form = self.form
        if not form.linear or len(form.orbitals) != 1:
            return None
        if any(abs(c) > 1e-12 for c in form.energies.values()):
            return None
        return form.orbitals[0]


def classify(ws: Workspace, derive: m.Derive) -> Optional[IonDerive]:
    """The derive as an IE/EA, or None when it reports something else
    (a derive named ``gap`` is a gap even in a study of electron affinities)."""
    quantity = ws.quantity_of(derive)
    if quantity not in ION_QUANTITIES:
        return None
    return IonDerive(derive, quantity, linear_form(derive.expr), energy_difference(derive))
_LAST_IONS: tuple = (None, ())  # (workspace, its ion derives): seven rules ask in turn


def ion_derives(ws: Workspace) -> list[IonDerive]:
    """Every IE/EA derive of the workspace, in definition order.  The answer
    for the last workspace asked about is remembered (the model is
    immutable; the rules of one check ask one after the other)."""
    global _LAST_IONS
    last_ws, last = _LAST_IONS
    if last_ws is ws:
        return list(last)
    out = []
    for derive in ws.derives:
        d = classify(ws, derive)
        if d is not None:
            out.append(d)
    _LAST_IONS = (ws, tuple(out))
    return out


def energy_states(ws: Workspace, derive: m.Derive) -> list[ResolvedState]:
    """The resolved states whose energies enter ``derive`` (non-zero
    coefficient), in order of appearance, each once."""
    form = linear_form(derive.expr)
    out: list[ResolvedState] = []
    for node in m.walk(derive.expr):
        if isinstance(node, m.EnergyOf) and abs(form.energies.get(node.state.value, 0.0)) > 1e-12:
            rs = ws.states.get(node.state.value)
            if rs is not None and all(o.name != rs.name for o in out):
                out.append(rs)
    return out


def difference_states(ws: Workspace, d: IonDerive) -> Optional[tuple[ResolvedState, ResolvedState]]:
    """(plus, minus) states of an energy-difference derive, both resolved."""
    if d.difference is None:
        return None
    plus, minus = ws.states.get(d.difference.plus), ws.states.get(d.difference.minus)
    if plus is None or minus is None:
        return None
    return plus, minus


def geometry_name(rs: ResolvedState) -> Optional[str]:
    g = rs.state.geometry
    return g.name.value if g is not None else None


def partner(ws: Workspace, rs: ResolvedState, step: int) -> Optional[ResolvedState]:
    """A state at the same geometry whose charge is ``rs.charge + step``;
    states relaxed the same way and at the same level come first."""
    geo = geometry_name(rs)
    if geo is None:
        return None
    candidates = [
        o for o in ws.states.values()
        if o is not rs and geometry_name(o) == geo and o.charge == rs.charge + step
    ]
    if not candidates:
        return None
    mine = level_key(ws, rs)
    return min(candidates, key=lambda o: (o.optimize != rs.optimize, level_key(ws, o) != mine))


@record(frozen=True)
class Pair:
    """The neutral and ion state an IE/EA needs (``ion`` None: missing)."""

    neutral: ResolvedState
    ion: Optional[ResolvedState]
    quantity: str


def orbital_pair(ws: Workspace, d: IonDerive) -> Optional[Pair]:
    """The neutral/ion pair behind an orbital-energy estimate.

    -e(HOMO) of S as an IE and -e(LUMO) of S as an EA treat S as the
    neutral.  -e(HOMO) of S as an EA treats S as the anion (its neutral must
    then exist: None otherwise)."""
    term = d.orbital_term
    if term is None:
        return None
    orbital = term[1]
    s = ws.states.get(orbital.state.value)
    if s is None:
        return None
    if d.quantity == EA and orbital.orbital.value == "homo":
        up = partner(ws, s, +1)
        if up is not None:
            return Pair(up, s, EA)
        if s.charge < 0:
            return None
    return Pair(s, partner(ws, s, STEP[d.quantity]), d.quantity)


@record(frozen=True)
class LevelKey:
    """What a state is computed at, normalised for comparison: method name
    from the method table (words as written, lower case, when unknown),
    the basis word per element (``basis_library.normalize``), frozen core
    (unset = false).  The reference is not part of it: open- and closed-shell
    states of one calculation legitimately differ there."""

    method: Optional[str]
    basis: tuple[tuple[str, Optional[str]], ...]
    frozen_core: bool


def _method_key(word: Optional[m.Located[str]]) -> Optional[str]:
    if word is None:
        return None
    from deckward.rules.knowledge import methods

    info = methods.lookup(word.value)
    return info.name if info is not None else word.value.strip().lower()


def _basis_key(spec: Optional[m.BasisSpec], symbols: Iterable[str]) -> tuple:
    from deckward.rules.knowledge.basis_library import normalize

    if spec is None:
        return ()
    symbols = sorted({s.lower() for s in symbols})
    if not symbols:  # no geometry to read elements from: compare as written
        entries = [("default", spec.default)] + [(k.value.lower(), w) for k, w in spec.per_element]
        return tuple(sorted((k, normalize(w.value) if w else None) for k, w in entries))
    out = []
    for sym in symbols:
        word = spec.word_for(sym)
        out.append((sym, normalize(word.value) if word is not None else None))
    return tuple(out)


def element_symbols(*states: ResolvedState) -> set[str]:
    """The element symbols (lower case) of the states' geometries."""
    out: set[str] = set()
    for rs in states:
        if rs.geometry is not None:
            out.update(a.symbol.value.lower() for a in rs.geometry.atoms)
    return out


def level_key(ws: Workspace, rs: ResolvedState, symbols: Optional[set[str]] = None) -> LevelKey:
    s = rs.settings
    return LevelKey(
        _method_key(s.method),
        _basis_key(s.basis, element_symbols(rs) if symbols is None else symbols),
        bool(s.frozen_core.value) if s.frozen_core is not None else False,
    )


def reversed_differences(ws: Workspace, quantity: str):
    """(derive, first state, second state) of each IE/EA of ``quantity``
    written with its operands the wrong way round: for both quantities the
    state with more electrons must come second, so a charge step of -1 from
    the first operand to the second means the sign is flipped."""
    for d in ion_derives(ws):
        states = difference_states(ws, d)
        if d.quantity != quantity or states is None:
            continue
        plus, minus = states
        if plus.charge - minus.charge == -1:
            yield d, plus, minus


def kind_derives(ws: Workspace, kind: str):
    """(derive, quantity) of each derive whose meaning depends on the study's
    ``kind`` (vertical or adiabatic), when the study asks for that kind."""
    study = ws.study
    if study is None or study.kind is None or study.kind.value != kind:
        return
    for derive in ws.derives:
        quantity = ws.quantity_of(derive)
        if quantity in KIND_QUANTITIES:
            yield derive, quantity


def orbital_method(ws: Workspace, orbital: m.OrbitalOf):
    """(state, method table entry) behind an orbital energy; None when the
    state or its method is unknown (other rules report that)."""
    from deckward.rules.knowledge import methods

    rs = ws.states.get(orbital.state.value)
    if rs is None or rs.settings.method is None:
        return None
    info = methods.lookup(rs.settings.method.value)
    return None if info is None else (rs, info)
