"""atoms-too-close: two atoms closer than half the sum of their covalent radii."""
from __future__ import annotations

from deckward.grammar.findings import Related, RuleInfo, Severity

from deckward.rules.knowledge import geometry as geo
from deckward.rules.engine.context import Context

INFO = RuleInfo(
    id="atoms-too-close",
    severity=Severity.ERROR,
    category="geometry",
    title="Two atoms closer than any chemical bond",
    why=(
        "Bonded atoms sit at roughly the sum of their covalent radii; no bond is shorter than "
        "about 0.7 of it. Two nuclei closer than half that sum are a typing mistake: a wrong sign or "
        "digit, an atom entered twice, or angstrom coordinates under units = bohr. "
        "The calculation would run into huge nuclear repulsion or fail to converge. Ghost "
        "atoms count too: a ghost centre on top of a real atom doubles its basis functions and makes "
        "them linearly dependent."
    ),
    references=(
        "B. Cordero, V. Gomez, A. E. Platero-Prats, M. Reves, J. Echeverria, E. Cremades, "
        "F. Barragan, S. Alvarez, 'Covalent radii revisited', Dalton Trans. 2008, 2832-2838, "
        "doi:10.1039/b801115j (the radii)",
    ),
    threshold_note=(
        "Half the sum of the covalent radii: common practice, no source; it sits well below the "
        "shortest real bonds (N2 at about 0.77 of its radius sum)."
    ),
    bad_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 0.1989 0.4653\n}\n"
    ),
    fires_at="O 0 0.1989 0.4653",
    good_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
    ),
)


# A pile of atoms gets one finding, not one per atom; and a geometry gets at
# most MAX_FINDINGS findings plus a summary: a pasted block of coordinates
# must not bury everything else (common practice, no source).
GROUP_LISTED = 3  # a group with more atoms than this is one finding
MAX_FINDINGS = 20  # per geometry, before the summary


def check(ctx: Context):
    for pf in ctx.workspace.files:
        for geometry in pf.deck.geometries:
            groups = geo.too_close_groups(geometry)
            if not groups:
                continue
            verdict = geo.units_verdict(geometry)
            hint = (
                f"; the whole geometry reads as ordinary bond lengths in {verdict.likely} (see units-suspect)"
                if verdict is not None
                else ""
            )
            reported = unreported = 0
            for group in groups:
                pairs = group.pairs
                if len(pairs) > GROUP_LISTED:
                    if reported < MAX_FINDINGS:
                        reported += 1
                        yield _pile(ctx, geometry, group, hint)
                    else:
                        unreported += len(pairs)
                    continue
                for p in pairs:
                    if reported < MAX_FINDINGS:
                        reported += 1
                        yield _pair(ctx, geometry, p, hint)
                    else:
                        unreported += 1
            if unreported:
                yield ctx.finding(
                    geometry.name.span,
                    f"geometry `{geometry.name.value}` has {unreported} more atom{'s' * (unreported != 1)} too "
                    f"close to another atom, not reported one by one (only the first {MAX_FINDINGS} findings are)",
                )


def _pair(ctx: Context, geometry, p, hint: str):
    a, b = p.a, p.b
    unit = geometry.unit
    limit = geo.TOO_CLOSE_RATIO * p.radius_sum
    if p.distance < 1e-6:
        where = f"sits at the same position as {a.label}"
    else:
        where = f"is {geo.format_length(p.distance, unit)} from {a.label}"
    return ctx.finding(
        b.atom.span,
        f"{b.label} of geometry `{geometry.name.value}` {where}, closer than "
        f"{geo.format_length(limit, unit)}, half the sum of their covalent radii{hint}",
        related=(Related(a.atom.span, f"{a.label} is here"),),
    )


def _pile(ctx: Context, geometry, group, hint: str):
    """One finding for many atoms too close to one atom."""
    anchor, pairs = group.anchor, group.pairs
    farthest = max(p.distance for p in pairs)
    if farthest < 1e-6:
        where = f"sit at the same position as {anchor.label}"
    else:
        where = f"are within {geo.format_length(farthest, geometry.unit)} of {anchor.label}"
    return ctx.finding(
        pairs[0].b.atom.span,
        f"{len(pairs)} atoms of geometry `{geometry.name.value}` ({geo.labels(p.b for p in pairs)}) {where}, "
        f"each closer than half the sum of the covalent radii{hint}",
        related=(Related(anchor.atom.span, f"{anchor.label} is here"),),
    )
