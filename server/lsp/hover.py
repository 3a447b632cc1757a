"""Hover: what deckward knows about the thing under the cursor, facts first.

- a basis word: per element of the geometries it is used for, the library's
  functions per angular momentum, the most diffuse s and p exponents and
  whether they count as diffuse (``deckward.rules.catalogue.basis.diffuse``);
- a state: its electron count, charge, multiplicity, reference and level;
- a method word: its family;
- a geometry or level name: a one-line summary;
- then one line per finding under the cursor, linked to the rule's
  documentation (the rationale and references live there, not on screen).

Everything taken from the deck or a message is escaped for Markdown
(``markdown.py``), so `6-31+G*` shows as written.
"""
from __future__ import annotations

from typing import TYPE_CHECKING, Optional

from lsprotocol import types as t

from deckward.grammar import model as m
from deckward.grammar.resolve import Workspace

from .core import DeckServer, rule_url, target_at
from .markdown import code, escape, link

if TYPE_CHECKING:
    from .workspace import Analysis

_L = "spdfghi"


# ---------------------------------------------------------------- findings


def finding_line(finding) -> str:
    """``- **rule** (severity): message (documentation)``, escaped."""
    return (f"- **{escape(finding.rule)}** ({finding.severity.value}): {escape(finding.message)} "
            f"({link('documentation', rule_url(finding.rule))})")


# ------------------------------------------------------------------- basis


def _functions(counts) -> str:
    return "".join(f"{n}{_L[l]}" for l, n in enumerate(counts) if n) or "none"


def _basis_words(deck: m.Deck):
    """(word, owner, symbol restriction or None, spec) of every basis word."""
    def of_spec(spec: Optional[m.BasisSpec], owner):
        if spec is None:
            return
        mapped = {sym.value.lower() for sym, _ in spec.per_element}
        if spec.default is not None:
            yield spec.default, owner, ("except", mapped) if mapped else None, spec
        for sym, word in spec.per_element:
            yield word, owner, ("only", {sym.value.lower()}), spec

    for lv in deck.levels:
        yield from of_spec(lv.settings.basis, lv)
    for st in deck.states:
        yield from of_spec(st.overrides.basis, st)
    for bs in deck.basis_sets:
        yield from of_spec(bs.source, bs)


def _geometries_for(ws: Workspace, owner) -> list[m.Geometry]:
    """Geometries of the states a basis owner applies to (all geometries
    when no state uses it)."""
    found = []
    for rs in ws.states.values():
        uses = False
        if isinstance(owner, m.State):
            uses = rs.state is owner
        elif isinstance(owner, m.Level):
            uses = rs.level is owner and rs.state.overrides.basis is None
        elif isinstance(owner, m.BasisSet) and rs.settings.basis is not None:
            uses = any(w.value == owner.name.value for w in rs.settings.basis.words())
        if uses and rs.geometry is not None and rs.geometry not in found:
            found.append(rs.geometry)
    return found or [d.node for d in ws.of_kind("geometry")]


def _symbols(geometries: list[m.Geometry], restriction) -> list[str]:
    out = []
    for g in geometries:
        for a in g.atoms:
            sym = a.symbol.value[:1].upper() + a.symbol.value[1:].lower()
            if sym not in out:
                out.append(sym)
    if restriction is not None:
        how, syms = restriction
        out = [s for s in out if (s.lower() in syms) == (how == "only")]
    return out


def basis_text(ws: Workspace, word: m.Located, owner, restriction, spec) -> str:
    from deckward.rules.knowledge import basis_library, deck_facts
    from deckward.rules.catalogue.basis import diffuse

    info = basis_library.lookup(word.value)
    deck_set = ws.basis_set(word.value)
    if info is None and deck_set is None:
        close = basis_library.closest(word.value)
        hint = f" Closest library names: {', '.join(code(c) for c in close)}." if close else ""
        return f"{code(word.value)}: not a basis set of the library nor of this deck.{hint}"
    if deck_set is not None:
        head = f"{code(word.value)}: basis\\_set of this deck"
    else:
        head = f"{code(info.name)}: {escape(info.zeta)} zeta, family {escape(info.family)}" + (
            ", core-valence" if info.core_valence else "")
    symbols = _symbols(_geometries_for(ws, owner), restriction)
    if not symbols:
        return head + "\n\nNo geometry uses it yet."
    rows = ["| element | functions | most diffuse s | most diffuse p | diffuse |", "|---|---|---|---|---|"]
    for sym in symbols:
        one = m.BasisSpec(word, (), word.span)
        eb = deck_facts.element_basis(ws, one, sym)
        smallest = deck_facts.smallest_exponents(eb) if eb is not None else None
        counts = None
        if eb is not None and eb.library_word is not None:
            data = basis_library.element_data(eb.library_word.value, sym)
            counts = list(data.functions_per_l) if data is not None else None
        if eb is not None and eb.shells:
            counts = list(counts or [])
            for shell in eb.shells:
                while len(counts) <= shell.l:
                    counts.append(0)
                counts[shell.l] += 1
        if smallest is None:
            rows.append(f"| {escape(sym)} | not in the library | | | |")
            continue
        s = f"{smallest[0][0]:.4g}" if smallest and smallest[0] else "-"
        p = f"{smallest[1][0]:.4g}" if len(smallest) > 1 and smallest[1] else "-"
        try:
            v = diffuse.verdict(sym, smallest)
            verdict = ("yes" if v.is_diffuse else "no") + f" (threshold {v.threshold:.3f})"
        except ValueError:
            verdict = "unknown"
        rows.append(f"| {escape(sym)} | {_functions(counts or [])} | {s} | {p} | {verdict} |")
    return head + "\n\n" + "\n".join(rows) + "\n\nExponents in bohr⁻²; diffuse by deckward's criterion (docs/diffuse-criterion.md)."


# ------------------------------------------------------------ names, methods


def state_text(ws: Workspace, name: str) -> Optional[str]:
    from deckward.rules.knowledge import deck_facts

    rs = ws.states.get(name)
    if rs is None:
        return None
    electrons = deck_facts.electron_count(rs)
    lines = [f"**state** {code(name)}", ""]
    lines.append(f"- electrons: {electrons if electrons is not None else 'unknown'}"
                 + (f" ({'even' if electrons % 2 == 0 else 'odd'})" if electrons is not None else ""))
    lines.append(f"- charge: {rs.charge}")
    lines.append(f"- multiplicity: {rs.multiplicity if rs.multiplicity is not None else 'not set'}")
    ref = rs.reference + ("" if rs.settings.reference is not None else " (default)")
    lines.append(f"- reference: {escape(ref)}")
    if rs.level is not None:
        lines.append(f"- level: {code(rs.level.name.value)}")
    if rs.settings.method is not None:
        lines.append(f"- method: {code(rs.settings.method.value)}")
    if rs.settings.basis is not None and rs.settings.basis.default is not None:
        lines.append(f"- basis: {code(rs.settings.basis.default.value)}")
    if rs.geometry is not None:
        lines.append(f"- geometry: {code(rs.geometry.name.value)}" + (" (optimized)" if rs.optimize else ""))
    return "\n".join(lines)


def method_text(word: str) -> str:
    from deckward.rules.knowledge import methods

    info = methods.lookup(word)
    if info is None:
        close = methods.closest(word)
        return f"{code(word)}: not a method deckward knows." + (
            f" Closest: {', '.join(code(c) for c in close)}." if close else "")
    family = {"hf": "Hartree-Fock", "dft": "density functional theory", "mp2": "second-order perturbation theory",
              "cc": "coupled cluster", "ci": "configuration interaction"}.get(info.family, info.family)
    extra = f", {info.dft_class}" if info.dft_class else ""
    corr = "correlated wavefunction method" if info.correlated else "not a correlated wavefunction method"
    return f"{code(info.name)}: family {escape(info.family)} ({escape(family + extra)}); {corr}"


def definition_text(ws: Workspace, kind: str, node) -> Optional[str]:
    if kind == "geometry":
        counts: dict[str, int] = {}
        for a in node.atoms:
            if not a.ghost:
                sym = a.symbol.value[:1].upper() + a.symbol.value[1:].lower()
                counts[sym] = counts.get(sym, 0) + 1
        formula = "".join(f"{s}{n if n > 1 else ''}" for s, n in counts.items()) or "no atoms"
        ghosts = sum(1 for a in node.atoms if a.ghost)
        return f"**geometry** {code(node.name.value)}: {escape(formula)}, {len(node.atoms)} atoms ({escape(node.unit)})" + (
            f", {ghosts} ghost" if ghosts else "")
    if kind == "level":
        s = node.settings
        parts = [f"method {code(s.method.value)}" if s.method else "no method",
                 f"basis {code(s.basis.default.value)}" if s.basis and s.basis.default else "basis (per element)" if s.basis else "no basis",
                 f"reference {escape(s.reference.value)}" if s.reference else "reference by multiplicity"]
        return f"**level** {code(node.name.value)}: " + ", ".join(parts)
    return None


def facts_text(analysis: "Analysis", offset: int) -> Optional[str]:
    """What deckward knows about the name or word at ``offset``."""
    ws = analysis.workspace
    deck = ws.root.deck
    hit = target_at(ws, analysis.path, offset)
    if hit is not None and hit[1] is not None:
        d = hit[1]
        return state_text(ws, d.name.value) if d.kind == "state" else definition_text(ws, d.kind, d.node)
    for word, owner, restriction, spec in _basis_words(deck):
        if word.span.contains(offset):
            return basis_text(ws, word, owner, restriction, spec)
    for node in list(deck.levels) + list(deck.states):
        settings = node.settings if isinstance(node, m.Level) else node.overrides
        if settings.method is not None and settings.method.span.contains(offset):
            return method_text(settings.method.value)
    return None


def hover_text(analysis: "Analysis", offset: int) -> Optional[str]:
    """The facts first, then one line per finding under the cursor."""
    parts = []
    facts = facts_text(analysis, offset)
    if facts:
        parts.append(facts)
    lines = [finding_line(f) for f in analysis.own_findings if f.span.contains(offset) and f.span.start != f.span.end]
    if lines:
        parts.append("\n".join(lines))
    return "\n\n---\n\n".join(parts) if parts else None


async def hover(ls: DeckServer, params: t.HoverParams):
    analysis = await ls.analysis(params.text_document.uri)
    if analysis is None:
        return None
    text = hover_text(analysis, analysis.positions.offset(params.position))
    if text is None:
        return None
    return t.Hover(contents=t.MarkupContent(kind=t.MarkupKind.Markdown, value=text))


FEATURES = [(t.TEXT_DOCUMENT_HOVER, None, hover)]
