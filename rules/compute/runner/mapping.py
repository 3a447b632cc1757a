"""From a resolved deck state to a ``StatePlan`` (no PySCF here).

Every reason a state cannot be mapped (no geometry, a method word without a
PySCF mapping, a basis missing an element, an impossible multiplicity) is a
``MappingError`` carrying the span of the text to change, so the command
line can print a located message instead of a PySCF traceback.
"""
from __future__ import annotations

from typing import Optional

from deckward.grammar import model as m
from deckward.grammar.findings import Span
from deckward.grammar.resolve import ResolvedState, Workspace

from deckward.rules.knowledge import basis_library, deck_facts, elements, methods
from .plan import AtomPlan, ElementBasisPlan, StatePlan


class MappingError(Exception):
    """A state that cannot be turned into a PySCF calculation."""

    def __init__(self, message: str, span: Optional[Span] = None) -> None:
        super().__init__(message)
        self.message = message
        self.span = span

    def located(self) -> str:
        if self.span is None:
            return self.message
        return f"{self.span.path}:{self.span.line}:{self.span.column}: {self.message}"


def _suggest(options: list[str]) -> str:
    return f" (did you mean {', '.join(f'`{o}`' for o in options)}?)" if options else ""


def method_plan(word: m.Located[str]) -> methods.MethodInfo:
    """The method table entry for a word, or a MappingError saying why not."""
    info = methods.lookup(word.value)
    if info is None:
        raise MappingError(f"method `{word.value}` is not in the method table" + _suggest(methods.closest(word.value)),
                           word.span)
    if info.family == "dft" and not info.pyscf_xc:
        raise MappingError(f"method `{word.value}` has no PySCF/libxc functional name, so it cannot be run", word.span)
    return info


def _library_word(word: m.Located[str], symbol: str) -> str:
    info = basis_library.lookup(word.value)
    if info is None:
        raise MappingError(f"basis `{word.value}` is neither a basis_set of the deck nor a library basis set"
                           + _suggest(basis_library.closest(word.value)), word.span)
    if basis_library.element_data(word.value, symbol) is None:
        raise MappingError(f"basis `{word.value}` has no functions for {symbol}", word.span)
    return basis_library.normalize(word.value)


def element_basis_plan(ws: Workspace, spec: m.BasisSpec, symbol: str, where: Span) -> ElementBasisPlan:
    eb = deck_facts.element_basis(ws, spec, symbol)
    if eb is None:
        raise MappingError(f"the basis gives nothing for {symbol} (add `{symbol}: ...` or `default: ...`)", spec.span)
    shells = tuple(sorted((s.l, float(s.exponent.value)) for s in eb.shells))
    for s in eb.shells:
        if not s.exponent.value > 0:
            raise MappingError(f"exponent {s.exponent.value:g} must be positive", s.exponent.span)
    if eb.library_word is None:
        if not shells:
            where_bs = eb.basis_set.span if eb.basis_set else spec.span
            raise MappingError(f"basis_set `{eb.origin.value}` gives no library set and no shells for {symbol}", where_bs)
        return ElementBasisPlan(None, shells)
    return ElementBasisPlan(_library_word(eb.library_word, symbol), shells)


def basis_label(spec: m.BasisSpec) -> str:
    parts = []
    if spec.default is not None:
        parts.append(spec.default.value)
    parts += [f"{s.value}:{w.value}" for s, w in spec.per_element]
    return ", ".join(parts)


def plan_state(ws: Workspace, name: str) -> StatePlan:
    """The plan of state ``name``; MappingError when it cannot be run."""
    rs: ResolvedState = ws.states[name]
    st = rs.state
    if rs.geometry is None:
        raise MappingError(f"state `{name}` has no geometry", st.name.span)
    if not rs.geometry.atoms:
        raise MappingError(f"geometry `{rs.geometry.name.value}` has no atoms", rs.geometry.name.span)
    settings = rs.settings
    if settings.method is None:
        raise MappingError(f"state `{name}` has no method (set it in its level or the state)", st.name.span)
    if settings.basis is None:
        raise MappingError(f"state `{name}` has no basis (set it in its level or the state)", st.name.span)
    info = method_plan(settings.method)

    atoms = []
    for atom in rs.geometry.atoms:
        el = elements.lookup(atom.symbol.value)
        if el is None:
            raise MappingError(f"`{atom.symbol.value}` is not an element symbol", atom.symbol.span)
        atoms.append(AtomPlan(el.symbol, tuple(float(x) for x in atom.xyz), atom.ghost))
    if all(a.ghost for a in atoms):
        raise MappingError(f"geometry `{rs.geometry.name.value}` has only ghost atoms", rs.geometry.name.span)

    symbols = sorted({a.symbol for a in atoms})
    basis = tuple((sym, element_basis_plan(ws, settings.basis, sym, st.name.span)) for sym in symbols)

    electrons = deck_facts.electron_count(rs)
    if electrons is None or electrons < 0:
        raise MappingError(f"state `{name}` has a negative number of electrons", (st.charge or st.name).span)
    mult = rs.multiplicity or deck_facts.lowest_multiplicity(electrons)
    mult_span = st.multiplicity.span if st.multiplicity else st.name.span
    if mult < 1 or (mult - 1) % 2 != electrons % 2 or mult - 1 > electrons:
        raise MappingError(f"multiplicity {mult} is impossible with {electrons} electrons", mult_span)
    reference = rs.reference
    if reference == "restricted" and mult > 1:
        ref_span = settings.reference.span if settings.reference else mult_span
        raise MappingError(f"a restricted reference cannot describe multiplicity {mult}; use unrestricted or "
                           "restricted_open", ref_span)

    frozen = bool(settings.frozen_core.value) if settings.frozen_core is not None else False
    return StatePlan(
        name=name,
        atoms=tuple(atoms),
        unit=rs.geometry.unit,
        charge=rs.charge,
        spin=mult - 1,
        basis=basis,
        method=info.name,
        kind=info.pyscf_kind,
        family=info.family,
        xc=info.pyscf_xc,
        reference=reference,
        frozen_core=frozen,
        optimize=rs.optimize,
        frequencies=bool(st.frequencies.value) if st.frequencies is not None else False,
        basis_label=basis_label(settings.basis),
    )


def needed_states(ws: Workspace, all_states: bool = False) -> list[str]:
    """States the derives need, in order of first use; every state when
    ``all_states`` or when the deck has no derive that names a state."""
    names: list[str] = []
    if not all_states:
        for d in ws.derives:
            for s in deck_facts.states_of(d):
                if s in ws.states and s not in names:
                    names.append(s)
    if all_states or not names:
        names = list(ws.states)
    return names
