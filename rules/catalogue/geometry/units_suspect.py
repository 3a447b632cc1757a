"""units-suspect: the coordinates look like the other length unit."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity, TextEdit

from deckward.rules.knowledge import geometry as geo
from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, indentation_of_line, insert_lines_after, replace

INFO = RuleInfo(
    id="units-suspect",
    severity=Severity.WARNING,
    category="geometry",
    title="Coordinates that look like the other length unit",
    why=(
        "One bohr is 0.529 angstrom, so coordinates written in one unit and read in the other "
        "scale every distance by 0.53 or 1.89. Bonded atoms sit near the sum of their covalent "
        "radii; when, as written, no atom has a neighbour at a bond length (all far too short, or "
        "all too long) but every atom has one when the numbers are read in the other unit, the "
        "units line is almost certainly wrong. The calculation would run on a squeezed or "
        "exploded molecule and give meaningless energies."
    ),
    references=(
        "B. Cordero et al., 'Covalent radii revisited', Dalton Trans. 2008, 2832-2838, "
        "doi:10.1039/b801115j (the radii)",
        "E. Tiesinga, P. J. Mohr, D. B. Newell, B. N. Taylor, CODATA 2018, Rev. Mod. Phys. 93, "
        "025010 (2021): a0 = 0.529177210903 angstrom",
    ),
    threshold_note=(
        "A bond is a distance between 0.7 and 1.25 times the sum of the covalent radii: common "
        "practice (cut-offs of 1.2-1.3 are usual in bond perception), no source. Noble-gas atoms "
        "are left out: their contacts are not bonds."
    ),
    bad_example=(
        "geometry no2 {\n  units = bohr\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
    ),
    fires_at="bohr",
    good_example=(
        "geometry no2 {\n  units = angstrom\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
    ),
    fix=Applicability.RISKY,
    fix_note=(
        "Switches the units line to the other unit, or adds one when there is none. Risky: check "
        "that the numbers really are in that unit."
    ),
    fixed_example=(
        "geometry no2 {\n  units = angstrom\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
    ),
)


def _range(low: float, high: float) -> str:
    a, b = f"{low:.2f}", f"{high:.2f}"
    return a if a == b else f"{a}-{b}"


def _units_edit(index, geometry, unit: str) -> TextEdit:
    if geometry.units is not None:
        return replace(geometry.units.span, unit)
    brace = geometry.body_span.start  # just after '{'
    first = geometry.atoms[0].span
    if first.line > geometry.body_span.line:
        return insert_lines_after(
            index, index.span(brace - 1, brace), indentation_of_line(index, first.line) + f"units = {unit}"
        )
    return TextEdit(index.span(brace, brace), f" units = {unit}")


def check(ctx: Context):
    for pf in ctx.workspace.files:
        for geometry in pf.deck.geometries:
            verdict = geo.units_verdict(geometry)
            if verdict is None:
                continue
            declared = f"units = {verdict.declared}" if geometry.units else "no units line (angstrom by default)"
            if geometry.file_path is not None:
                declared = f"atoms from `{geometry.file.value}` (an .xyz file is in angstrom)"
            if verdict.declared_range[1] < geo.SHORTEST_BOND_RATIO:
                as_written = (
                    f"every atom is closer to its nearest neighbour than any bond "
                    f"({_range(*verdict.declared_range)} times the sum of the covalent radii; bonds start near "
                    f"{geo.SHORTEST_BOND_RATIO})"
                )
            else:
                as_written = (
                    f"no atom has a neighbour at bonding distance (nearest at "
                    f"{_range(*verdict.declared_range)} times the sum of the covalent radii; bonds end near "
                    f"{geo.BOND_TOLERANCE})"
                )
            span = geometry.units.span if geometry.units else geometry.name.span
            fixes = (fix(f"Set units = {verdict.likely}", _units_edit(pf.index, geometry, verdict.likely), risky=True),)
            if geometry.file_path is not None:  # the numbers are in the .xyz file: no units line to set
                span, fixes = geometry.atoms[0].span, ()
            yield ctx.finding(
                span,
                f"geometry `{geometry.name.value}` with {declared}: {as_written}; read in {verdict.likely} "
                f"the same numbers give ordinary bond lengths ({_range(*verdict.likely_range)} times the sum): "
                f"the coordinates look like {verdict.likely} values",
                fixes=fixes,
            )
