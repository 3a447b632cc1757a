"""frozen-core-with-core-basis: frozen_core = true with a core-valence basis
(cc-pCVXZ, cc-pwCVXZ), which exists only to correlate the core.

Methods known to add no correlation (Hartree-Fock, density functionals)
are skipped: for them frozen_core changes nothing and this advice would be
beside the point.
"""
from __future__ import annotations

from deckward.grammar.findings import Applicability, Related, RuleInfo, Severity

from deckward.rules.knowledge import basis_library, methods
from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace
from .targets import in_case_of, join_words, library_words, span_key

INFO = RuleInfo(
    id="frozen-core-with-core-basis",
    severity=Severity.INFO,
    category="basis",
    title="Frozen core with a core-valence basis",
    why=(
        "Core-valence sets (cc-pCVXZ, cc-pwCVXZ) add tight functions so that a correlated method can "
        "describe how the core electrons correlate. Freezing the core leaves exactly those electrons "
        "uncorrelated, so the calculation pays for the extra functions and gets nothing for them. "
        "Either correlate the core (frozen_core = false) or use the ordinary valence set of the same "
        "size (cc-pVXZ)."
    ),
    references=(
        "D. E. Woon, T. H. Dunning Jr., J. Chem. Phys. 103, 4572 (1995)",
        "K. A. Peterson, T. H. Dunning Jr., J. Chem. Phys. 117, 10548 (2002)",
    ),
    threshold_note="No threshold: a basis is core-valence when the basis library marks it so (cc-pCVXZ, cc-pwCVXZ).",
    bad_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level cc_cv { method = ccsd(t) basis = cc-pwcvtz reference = unrestricted frozen_core = true }\n"
        "state radical { geometry = cn level = cc_cv charge = 0 multiplicity = 2 }\n"
    ),
    fires_at="true",
    good_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level cc_cv { method = ccsd(t) basis = cc-pwcvtz reference = unrestricted frozen_core = false }\n"
        "state radical { geometry = cn level = cc_cv charge = 0 multiplicity = 2 }\n"
    ),
    fix=Applicability.RISKY,
    fix_note=(
        "Sets frozen_core = false where it is written (level or state). Risky: correlating the core "
        "makes the calculation more expensive and changes the energies; the alternative is the valence "
        "set of the same size."
    ),
    fixed_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level cc_cv { method = ccsd(t) basis = cc-pwcvtz reference = unrestricted frozen_core = false }\n"
        "state radical { geometry = cn level = cc_cv charge = 0 multiplicity = 2 }\n"
    ),
)


def check(ctx: Context):
    ws = ctx.workspace
    found: dict[tuple, dict] = {}
    for rs in ws.states.values():
        frozen = rs.settings.frozen_core
        if frozen is None or frozen.value is not True:
            continue
        method = rs.settings.method
        info = methods.lookup(method.value) if method is not None else None
        if info is not None and not info.correlated:
            continue
        for _symbol, word in library_words(ws, rs):
            basis = basis_library.lookup(word.value)
            if basis is None or not basis.core_valence:
                continue
            entry = found.setdefault(span_key(frozen), {"frozen": frozen, "words": {}, "states": []})
            entry["words"].setdefault(span_key(word), word)
            if rs.name not in entry["states"]:
                entry["states"].append(rs.name)
    for entry in found.values():
        frozen = entry["frozen"]
        words = list(entry["words"].values())
        names = join_words([w.value for w in _distinct(words)])
        states = join_words([f"`{n}`" for n in entry["states"]])
        plural = "s" if len(entry["states"]) > 1 else ""
        message = (
            f"frozen_core = true with the core-valence basis {names} (state{plural} {states}): its tight "
            "core functions are paid for, then the core electrons they are meant to correlate are frozen"
        )
        related = [Related(w.span, f"{w.value} is a core-valence basis") for w in words]
        yield ctx.finding(
            frozen.span,
            message,
            related=related,
            fixes=(fix("Correlate the core (frozen_core = false)",
                       replace(frozen.span, in_case_of(_written(ctx, frozen), "false")), risky=True),),
        )


def _distinct(words):
    out, seen = [], set()
    for w in words:
        if w.value.lower() not in seen:
            seen.add(w.value.lower())
            out.append(w)
    return out


def _written(ctx: Context, loc) -> str:
    """The text of ``loc`` as typed (TRUE, True, true), to keep its case."""
    f = ctx.workspace.file(loc.span.path)
    return f.deck.text[loc.span.start:loc.span.end] if f is not None else "true"
