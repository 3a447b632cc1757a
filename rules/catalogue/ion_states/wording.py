"""How the ion-state rules word what they find: charges, orbital energies,
energy differences and levels of theory as a deck writes them.  Kept apart
from the facts (``derives``) so that a message can be reworded without
touching what the rules decide."""
from __future__ import annotations

from deckward.grammar import model as m
from deckward.grammar.findings import Span
from deckward.grammar.resolve import ResolvedState, Workspace

from .derives import IE, element_symbols, level_key


def charge_text(charge: int) -> str:
    """'0', '+1', '-2'."""
    return "0" if charge == 0 else f"{charge:+d}"


def orbital_phrase(coefficient: float, orbital: m.OrbitalOf) -> str:
    """'the negative LUMO energy', 'the alpha HOMO-1 energy', ..."""
    name = orbital.orbital.value.upper() + (f"{orbital.offset:+d}" if orbital.offset else "")
    spin = f"{orbital.spin.value} " if orbital.spin else ""
    return f"the {'negative ' if coefficient < 0 else ''}{spin}{name} energy"


def difference_text(quantity: str, neutral: str, ion: str) -> str:
    """The conventional energy difference, as deck text."""
    if quantity == IE:
        return f"energy({ion}) - energy({neutral})"
    return f"energy({neutral}) - energy({ion})"


def level_differences(ws: Workspace, a: ResolvedState, b: ResolvedState) -> list[tuple[str, str]]:
    """What differs between two states' levels: (key, words) pairs such as
    ('basis', 'basis cc-pvdz vs aug-cc-pvdz'), ``b`` first; empty when
    they are computed alike."""
    symbols = element_symbols(a, b)
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
