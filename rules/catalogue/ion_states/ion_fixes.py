"""The fixes of the ion-state rules: rewriting an orbital-energy estimate as
an energy difference, swapping the operands of a reversed one, and adding a
missing ion state as a complete block in the neutral's own layout."""
from __future__ import annotations

from typing import Iterable, Optional

from deckward.grammar import model as m
from deckward.grammar.findings import Fix, Span, TextEdit
from deckward.grammar.records import record
from deckward.grammar.resolve import ResolvedState, Workspace

from deckward.rules.knowledge.deck_facts import EnergyDifference, lowest_multiplicity, nuclear_charge
from deckward.rules.fixes.edits import fix, replace
from deckward.rules.fixes.state_text import insert_state_after, render_state, settings_of, style_of

from .derives import ION_WORD, IonDerive, STEP, orbital_pair
from .wording import difference_text, span_text


def swap_edits(ws: Workspace, diff: EnergyDifference) -> tuple[TextEdit, TextEdit]:
    """Exchange the texts of the two ``energy(...)`` operands."""
    a, b = diff.plus_node.span, diff.minus_node.span
    return replace(a, span_text(ws, b)), replace(b, span_text(ws, a))


def difference_span(ws: Workspace, diff: EnergyDifference) -> Span:
    """From the first to the last of the two ``energy(...)`` operands."""
    a, b = diff.plus_node.span, diff.minus_node.span
    pf = ws.file(a.path)
    return pf.index.span(min(a.start, b.start), max(a.end, b.end))


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


@record(frozen=True)
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
