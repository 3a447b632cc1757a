"""basis-missing-element: the basis has no functions for an atom of the state."""
from __future__ import annotations

from deckward.grammar.findings import Related, RuleInfo, Severity

from deckward.rules.knowledge import basis_library, deck_facts, elements
from deckward.rules.engine.context import Context

INFO = RuleInfo(
    id="basis-missing-element",
    severity=Severity.ERROR,
    category="basis",
    title="The basis set has no functions for an element of the geometry",
    why=(
        "A basis set is defined element by element, and many sets stop somewhere in the periodic "
        "table (cc-pVDZ in the library has no iodine; heavy elements need sets with an effective "
        "core potential such as cc-pVDZ-PP or def2). A state whose basis lacks one of its elements "
        "cannot be run. Ghost atoms count: they exist to carry basis functions. Decided from the "
        "library data for each element plus the `add` shells of a deck basis_set."
    ),
    references=(
        "B. P. Pritchard, D. Altarawy, B. Didier, T. D. Gibson, T. L. Windus, J. Chem. Inf. Model. "
        "59, 4814-4820 (2019): element coverage of published basis sets",
        "F. Weigend, R. Ahlrichs, Phys. Chem. Chem. Phys. 7, 3297 (2005): def2 sets covering H-Rn",
    ),
    bad_example=(
        "geometry icn {\n  I 0 0 0\n  C 0 0 1.995\n  N 0 0 3.154\n}\n"
        "level hf_dz { method = hf basis = cc-pvdz }\n"
        "state neutral { geometry = icn level = hf_dz charge = 0 multiplicity = 1 }\n"
    ),
    fires_at="cc-pvdz",
    good_example=(
        "geometry icn {\n  I 0 0 0\n  C 0 0 1.995\n  N 0 0 3.154\n}\n"
        "level hf_dz { method = hf basis = { default: cc-pvdz, I: cc-pvdz-pp } }\n"
        "state neutral { geometry = icn level = hf_dz charge = 0 multiplicity = 1 }\n"
    ),
)


def _names(states: list[str]) -> str:
    quoted = [f"`{s}`" for s in states]
    if len(quoted) == 1:
        return "state " + quoted[0]
    return "states " + ", ".join(quoted[:-1]) + " and " + quoted[-1]


def _gap(ws, spec, symbol):
    """(span to point at, description, related) when ``spec`` gives
    ``symbol`` no basis functions; None when it does or when another rule
    owns the problem (an unknown basis word, a cycle of basis_sets)."""
    eb = deck_facts.element_basis(ws, spec, symbol)
    if eb is None:
        return spec.span, f"the basis map has no entry for {symbol} and no `default`", ()
    if eb.shells:
        return None  # added shells are functions for the element
    related = ()
    if eb.basis_set is not None:
        related = (Related(eb.basis_set.name.span, f"basis_set `{eb.basis_set.name.value}` is defined here"),)
    if eb.library_word is None:
        return eb.origin.span, (
            f"basis_set `{eb.basis_set.name.value}` gives {symbol} no library set and no `add` shells"
        ), related
    word = eb.library_word.value
    if ws.basis_set(word) is not None or basis_library.lookup(word) is None:
        return None
    if basis_library.element_data(word, symbol) is not None:
        return None
    if eb.basis_set is None:
        return eb.origin.span, f"`{word}` has no functions for {symbol}", related
    return eb.origin.span, f"basis_set `{eb.basis_set.name.value}` (from `{word}`) has no functions for {symbol}", related


def check(ctx: Context):
    ws = ctx.workspace
    groups: dict[tuple, dict] = {}
    for rs in ws.states.values():
        spec = rs.settings.basis
        geometry = rs.geometry
        if spec is None or geometry is None:
            continue
        seen: dict[str, bool] = {}  # symbol -> only ghost atoms of it
        for atom in geometry.atoms:
            el = elements.lookup(atom.symbol.value)
            if el is None:
                continue
            seen[el.symbol] = seen.get(el.symbol, True) and atom.ghost
        for symbol, ghost_only in seen.items():
            gap = _gap(ws, spec, symbol)
            if gap is None:
                continue
            span, what, related = gap
            key = (span, what, geometry.name.value, ghost_only)
            entry = groups.setdefault(key, {"states": [], "related": related})
            entry["states"].append(rs.name)
    for (span, what, geometry_name, ghost_only), entry in groups.items():
        atom_kind = "a ghost atom" if ghost_only else "an atom"
        yield ctx.finding(
            span,
            f"{what}, {atom_kind} of geometry `{geometry_name}` in {_names(entry['states'])}",
            related=entry["related"],
        )
