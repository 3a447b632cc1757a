"""Ionization energies and electron affinities in a deck.

Several rules ask the same questions: which derives report an ionization
energy (IE) or an electron affinity (EA), whether a derive is an energy
difference or an orbital-energy estimate, which states form a neutral/ion
pair, what level of theory a state is really computed at, and how to rewrite
an orbital-energy estimate as an energy difference (adding the ion state when
the deck lacks it).  The answers live here so that the rules agree.

Conventions (Rienstra-Kiracofe et al., Chem. Rev. 102, 231 (2002); NIST
Chemistry WebBook, gas-phase ion energetics): IE = E(cation) - E(neutral) and
EA = E(neutral) - E(anion), both positive when the electron is bound.  In
both, the state written first has the charge that is higher by one.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Iterable, Optional

from deckward.grammar import model as m
from deckward.grammar.findings import Fix, Span, TextEdit
from deckward.grammar.resolve import ResolvedState, Workspace

from deckward.rules.knowledge.deck_facts import (
    EnergyDifference,
    LinearForm,
    energy_difference,
    linear_form,
    lowest_multiplicity,
    nuclear_charge,
)
from deckward.rules.fixes.edits import fix, replace
from deckward.rules.fixes.state_text import insert_state_after, render_state, settings_of, style_of

IE = "ionization_energy"
EA = "electron_affinity"
ION_QUANTITIES = (IE, EA)
STEP = {IE: +1, EA: -1}  # charge of the ion relative to the neutral
ION_WORD = {IE: "cation", EA: "anion"}
NOUN = {IE: "ionization energy", EA: "electron affinity"}
# Quantities whose states a study's ``kind`` (vertical | adiabatic) governs.
KIND_QUANTITIES = (IE, EA, "fundamental_gap", "excitation_energy")
QUANTITY_NOUN = dict(NOUN, fundamental_gap="fundamental gap", excitation_energy="excitation energy")


def charge_text(charge: int) -> str:
    """'0', '+1', '-2'."""
    return "0" if charge == 0 else f"{charge:+d}"


# --- what a derive computes -------------------------------------------------


@dataclass(frozen=True)
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


def orbital_phrase(coefficient: float, orbital: m.OrbitalOf) -> str:
    """'the negative LUMO energy', 'the alpha HOMO-1 energy', ..."""
    name = orbital.orbital.value.upper() + (f"{orbital.offset:+d}" if orbital.offset else "")
    spin = f"{orbital.spin.value} " if orbital.spin else ""
    return f"the {'negative ' if coefficient < 0 else ''}{spin}{name} energy"


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


def swap_edits(ws: Workspace, diff: EnergyDifference) -> tuple[TextEdit, TextEdit]:
    """Exchange the texts of the two ``energy(...)`` operands."""
    a, b = diff.plus_node.span, diff.minus_node.span
    return replace(a, span_text(ws, b)), replace(b, span_text(ws, a))


def difference_span(ws: Workspace, diff: EnergyDifference) -> Span:
    """From the first to the last of the two ``energy(...)`` operands."""
    a, b = diff.plus_node.span, diff.minus_node.span
    pf = ws.file(a.path)
    return pf.index.span(min(a.start, b.start), max(a.end, b.end))


# --- states and pairs ---------------------------------------------------------


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


@dataclass(frozen=True)
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


def difference_text(quantity: str, neutral: str, ion: str) -> str:
    """The conventional energy difference, as deck text."""
    if quantity == IE:
        return f"energy({ion}) - energy({neutral})"
    return f"energy({neutral}) - energy({ion})"


# --- levels of theory -----------------------------------------------------------


@dataclass(frozen=True)
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


def _symbols(*states: ResolvedState) -> set[str]:
    out: set[str] = set()
    for rs in states:
        if rs.geometry is not None:
            out.update(a.symbol.value.lower() for a in rs.geometry.atoms)
    return out


def level_key(ws: Workspace, rs: ResolvedState, symbols: Optional[set[str]] = None) -> LevelKey:
    s = rs.settings
    return LevelKey(
        _method_key(s.method),
        _basis_key(s.basis, _symbols(rs) if symbols is None else symbols),
        bool(s.frozen_core.value) if s.frozen_core is not None else False,
    )


def level_differences(ws: Workspace, a: ResolvedState, b: ResolvedState) -> list[tuple[str, str]]:
    """What differs between two states' levels: (key, words) pairs such as
    ('basis', 'basis cc-pvdz vs aug-cc-pvdz'), ``b`` first; empty when
    they are computed alike."""
    symbols = _symbols(a, b)
    ka, kb = level_key(ws, a, symbols), level_key(ws, b, symbols)
    out = []
    if ka.method != kb.method:
        out.append(("method", f"method {method_text(ws, b)} vs {method_text(ws, a)}"))
    if ka.basis != kb.basis:
        out.append(("basis", f"basis {basis_text(ws, b)} vs {basis_text(ws, a)}"))
    if ka.frozen_core != kb.frozen_core:
        out.append(("frozen_core", f"frozen_core {str(kb.frozen_core).lower()} vs {str(ka.frozen_core).lower()}"))
    return out


def span_text(ws: Workspace, span: Span) -> str:
    pf = ws.file(span.path)
    return pf.index.text[span.start : span.end] if pf is not None else ""


def method_text(ws: Workspace, rs: ResolvedState) -> str:
    method = rs.settings.method
    return method.value if method is not None else "(no method)"


def basis_text(ws: Workspace, rs: ResolvedState) -> str:
    spec = rs.settings.basis
    if spec is None:
        return "(no basis)"
    if not spec.per_element and spec.default is not None:
        return spec.default.value
    return " ".join(span_text(ws, spec.span).split())


def level_label(ws: Workspace, rs: ResolvedState) -> str:
    """'hf/aug-cc-pvdz' as written in the deck (' with frozen core' when set)."""
    label = f"{method_text(ws, rs)}/{basis_text(ws, rs)}"
    fc = rs.settings.frozen_core
    return label + (" with frozen core" if fc is not None and fc.value else "")


# --- edits ---------------------------------------------------------------------


def rewrite_edit(d: IonDerive, neutral: str, ion: str) -> Optional[TextEdit]:
    """Replace the orbital-energy estimate in ``d`` by the energy difference:
    the whole expression when it is +-1 times the orbital energy, else the
    ``-orbital(...)`` part (in parentheses, so that factors around it keep
    applying).  None when the expression has another shape."""
    term = d.orbital_term
    if term is None:
        return None
    coefficient, orbital = term
    text = difference_text(d.quantity, neutral, ion)
    if abs(abs(coefficient) - 1.0) < 1e-12 and d.form.constant == 0:
        return replace(d.derive.expr.span, text)
    for node in m.walk(d.derive.expr):
        if isinstance(node, m.Unary) and node.op == "-" and node.operand is orbital:
            return replace(node.span, f"({text})")
    return None


def free_name(ws: Workspace, base: str, neutral: str, taken: Iterable[str] = ()) -> str:
    """``cation``/``anion``, else ``<neutral>_cation``, else with a number."""
    used = set(ws.definitions) | set(taken)
    for candidate in (base, f"{neutral}_{base}"):
        if candidate not in used:
            return candidate
    n = 2
    while f"{neutral}_{base}{n}" in used:
        n += 1
    return f"{neutral}_{base}{n}"


@dataclass(frozen=True)
class IonState:
    """A state to add: its name, charge, multiplicity and the insertion."""

    name: str
    charge: int
    multiplicity: int
    reference: Optional[str]
    edit: TextEdit


def _ion_reference(neutral: ResolvedState, multiplicity: int) -> Optional[str]:
    """The reference the new ion state must write, if any.

    An open-shell state must not end up restricted (see
    restricted-open-shell): with a level that says restricted it gets
    unrestricted; a non-restricted override of the neutral is kept so that
    both states are treated alike.  A closed-shell ion writes nothing."""
    if multiplicity <= 1:
        return None
    own = neutral.state.overrides.reference
    if own is not None and own.value != "restricted":
        return own.value
    level_ref = neutral.level.settings.reference if neutral.level is not None else None
    if level_ref is not None and level_ref.value == "restricted":
        return "unrestricted"
    return None


def ion_state(ws: Workspace, neutral: ResolvedState, quantity: str, taken: Iterable[str] = ()) -> Optional[IonState]:
    """The ion of ``neutral`` as a complete state block, inserted after it:
    same geometry (``optimize(...)`` included), level, overrides and
    frequencies; charge +-1; the lowest multiplicity the new electron count
    allows; a reference an open shell can use; the neutral's layout.
    None when the electron count is unknown (unknown element, no geometry)."""
    pf = ws.file(neutral.path)
    if pf is None or neutral.geometry is None or not neutral.geometry.atoms:
        return None
    z = nuclear_charge(neutral.geometry)
    charge = neutral.charge + STEP[quantity]
    if z is None or z - charge < 0:
        return None
    multiplicity = lowest_multiplicity(z - charge)
    reference = _ion_reference(neutral, multiplicity)
    name = free_name(ws, ION_WORD[quantity], neutral.name, taken)
    text = pf.index.text
    settings: list[list[str]] = []
    for s in settings_of(text, neutral.state):
        settings.append([s.key, text[s.value.start : s.value.end]])
    keys = [k for k, _ in settings]

    def put(key: str, value: Optional[str], after: tuple[str, ...] = ()) -> None:
        if key in keys:
            i = keys.index(key)
            if value is None:
                del settings[i]
                del keys[i]
            else:
                settings[i][1] = value
            return
        if value is None:
            return
        at = len(settings)
        for k in after:
            if k in keys:
                at = keys.index(k) + 1
        settings.insert(at, [key, value])
        keys.insert(at, key)

    put("charge", str(charge), after=("geometry", "level"))
    put("multiplicity", str(multiplicity), after=("charge",))
    put("reference", reference)
    style = style_of(pf.index, neutral.state)
    block = render_state(style, name, [(k, v) for k, v in settings])
    edit = insert_state_after(pf.index, neutral.state, block, style.one_line)
    return IonState(name, charge, multiplicity, reference, edit)


def _same_file(path: str, edits: Iterable[TextEdit]) -> bool:
    return all(e.span.path == path for e in edits)


def add_ion_fix(ws: Workspace, neutral: ResolvedState, quantity: str, derives: Iterable[IonDerive] = ()) -> Optional[Fix]:
    """One fix: add the ion state of ``neutral`` and rewrite each orbital
    estimate in ``derives`` as the energy difference.  None when the state
    cannot be built or the edits would touch another file than the first
    derive's (or the neutral's)."""
    derives = list(derives)
    new = ion_state(ws, neutral, quantity)
    if new is None:
        return None
    edits = [new.edit]
    names = []
    for d in derives:
        e = rewrite_edit(d, neutral.name, new.name)
        if e is not None:
            edits.append(e)
            names.append(d.name)
    path = derives[0].derive.span.path if derives else neutral.path
    if not _same_file(path, edits):
        return None
    title = f"Add {ION_WORD[quantity]} state `{new.name}` (charge {new.charge:+d}, multiplicity {new.multiplicity})"
    if names:
        title += " and compute " + ", ".join(f"`{n}`" for n in names) + " as " + difference_text(quantity, neutral.name, new.name)
    return fix(title, *edits, risky=True)


def energy_difference_fix(ws: Workspace, d: IonDerive, add_missing: bool = False) -> Optional[Fix]:
    """Rewrite an orbital-energy estimate as the energy difference of its
    neutral/ion pair; with ``add_missing``, add the ion state when the deck
    lacks it (one fix with both edits)."""
    pair = orbital_pair(ws, d)
    if pair is None:
        return None
    if pair.ion is None:
        return add_ion_fix(ws, pair.neutral, d.quantity, [d]) if add_missing else None
    edit = rewrite_edit(d, pair.neutral.name, pair.ion.name)
    if edit is None:
        return None
    text = difference_text(d.quantity, pair.neutral.name, pair.ion.name)
    return fix(f"Compute `{d.name}` as {text}", edit, risky=True)


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
