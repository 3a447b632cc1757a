"""unused-definition: a geometry, level or basis_set that nothing uses."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity, Span
from deckward.grammar.text_index import LineIndex

from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace

INFO = RuleInfo(
    id="unused-definition",
    severity=Severity.INFO,
    category="electrons",
    title="A definition that nothing uses",
    why=(
        "A geometry, level or basis_set that no state (or basis_set) refers to is computed never. "
        "Often it is a leftover, or a sign that a state refers to the wrong one: a deck with an "
        "unused `cc_atz` level and states on `cc_dz` may not be what the author meant to run. Only "
        "definitions of the checked deck itself are reported, and a library file (one whose workspace "
        "has no state and no derive, meant to be brought in with `use`) is not expected to use its own "
        "definitions. Nothing is reported while a "
        "file of the workspace has a syntax error, since the statement that uses a name may be the "
        "one that did not parse."
    ),
    references=("The deck language, version 1 (docs/deck-language.md), sections `use` and `state`.",),
    bad_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_dz { method = hf basis = aug-cc-pvdz }\n"
        "level hf_tz { method = hf basis = aug-cc-pvtz }\n"
        "state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }\n"
    ),
    fires_at="hf_tz",
    good_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_dz { method = hf basis = aug-cc-pvdz }\n"
        "state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }\n"
    ),
    fix=Applicability.RISKY,
    fix_note=(
        "Deletes the definition: its whole lines when it stands on lines of its own (a comment "
        "after it on its last line goes with it), else just the statement. Risky: the definition "
        "may be meant for a state still to be written."
    ),
    fixed_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_dz { method = hf basis = aug-cc-pvdz }\n"
        "state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }\n"
    ),
)

KINDS = ("geometry", "level", "basis_set")


def removal_span(index: LineIndex, span: Span) -> Span:
    """The text to delete to remove the statement at ``span``: its whole
    lines (line endings included) when nothing else but white space and a
    trailing comment shares them, else the statement and the blanks after it."""
    text = index.text
    start_line = index.line_start(span.line)
    after = text[span.end : index.line_end(span.end_line)]
    alone = not text[start_line : span.start].strip() and (not after.strip() or after.strip().startswith("#"))
    if alone:
        if span.end_line < index.line_count:
            return index.span(start_line, index.line_start(span.end_line + 1))
        return index.span(start_line, len(text))
    end = span.end
    while end < len(text) and text[end] in " \t":
        end += 1
    return index.span(span.start, end)


def check(ctx: Context):
    ws = ctx.workspace
    if any(f.rule == "syntax-error" for f in ws.findings):
        return
    if not ws.states and not ws.derives:
        return  # a library file (shared geometries, levels): its definitions are for the decks that use it
    used = {id(r.target.node) for r in ws.references if r.target is not None}
    index = ws.root.index
    for kind, name, node in ws.root.deck.definitions():
        if kind not in KINDS:
            continue
        winner = ws.definitions.get(name.value)
        if winner is None or winner.node is not node:
            continue  # a duplicate: duplicate-name reports it
        if id(node) in used:
            continue
        yield ctx.finding(
            name.span,
            f"{kind} `{name.value}` is defined but never used",
            fixes=(fix(f"Remove {kind} `{name.value}`", replace(removal_span(index, node.span), ""), risky=True),),
        )
