"""empty-geometry: a geometry block with no atoms."""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from deckward.rules.engine.context import Context

INFO = RuleInfo(
    id="empty-geometry",
    severity=Severity.ERROR,
    category="geometry",
    title="A geometry with no atoms",
    why=(
        "A molecule needs at least one nucleus: a state on an empty geometry has no electrons to "
        "count and nothing to compute, and a program would stop. Usually the atom lines were lost "
        "while editing, or were put in another block."
    ),
    references=("The deck language, version 1 (docs/deck-language.md), section `geometry`.",),
    bad_example="geometry cn {\n  units = angstrom\n}\n",
    fires_at="cn",
    good_example="geometry cn {\n  units = angstrom\n  C 0 0 0\n  N 0 0 1.1718\n}\n",
)


def check(ctx: Context):
    for pf in ctx.workspace.files:
        for geometry in pf.deck.geometries:
            if geometry.file is not None and geometry.file_path is None:
                continue  # the .xyz file could not be read: reported where `file` names it
            if not geometry.atoms:
                yield ctx.finding(geometry.name.span, f"geometry `{geometry.name.value}` has no atoms")
