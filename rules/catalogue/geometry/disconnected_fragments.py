"""disconnected-fragments: a geometry made of pieces with no bond between them."""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from deckward.rules.knowledge import geometry as geo
from deckward.rules.engine.context import Context

INFO = RuleInfo(
    id="disconnected-fragments",
    severity=Severity.INFO,
    category="geometry",
    title="A geometry in several pieces without ghost atoms",
    why=(
        "When the atoms of a geometry fall into groups with no bond between them, it is either a "
        "complex (then the energy of binding needs a counterpoise set-up with ghost atoms, or the "
        "basis-set superposition error enters the number) or an atom was put in the wrong place. "
        "Bonds are read from covalent radii. A single atom is one fragment, and a geometry that "
        "already has ghost atoms is taken to be a counterpoise set-up; so is a complex whose atoms "
        "other geometries of the deck carry as ghost atoms (the fragments in the complex's basis)."
    ),
    references=(
        "S. F. Boys, F. Bernardi, Mol. Phys. 19, 553-566 (1970): the counterpoise correction",  # from memory
        "B. Cordero et al., 'Covalent radii revisited', Dalton Trans. 2008, 2832-2838, "
        "doi:10.1039/b801115j (the radii)",
    ),
    threshold_note=(
        "Two atoms are bonded within 1.25 times the sum of their covalent radii: common practice "
        "(1.2-1.3 is usual), no source."
    ),
    bad_example=(
        "geometry cn_water {\n  C 0 0 0\n  N 0 0 1.1718\n"
        "  O 0 0 4.5\n  H 0 0.7572 5.0859\n  H 0 -0.7572 5.0859\n}\n"
    ),
    fires_at="cn_water",
    good_example=(
        "geometry cn_water {\n  C 0 0 0\n  N 0 0 1.1718\n"
        "  O 0 0 4.5 ghost\n  H 0 0.7572 5.0859 ghost\n  H 0 -0.7572 5.0859 ghost\n}\n"
    ),
)

_SHOWN = 4

# Two centres coincide within this distance (angstrom): coordinates copied
# between the geometries of one counterpoise set-up.  Common practice, no source.
_SAME_CENTRE = 1e-3


def _ghost_centres(ws) -> list[tuple[str, tuple[float, float, float]]]:
    """(element, angstrom coordinates) of every ghost atom of the workspace."""
    out = []
    for pf in ws.files:
        for geometry in pf.deck.geometries:
            for site in geo.sites(geometry):
                if site.atom.ghost:
                    out.append((site.symbol, site.xyz))
    return out


def _ghosted_elsewhere(sites, ghosts) -> bool:
    """Some atom of the complex is a ghost atom of another geometry."""
    return any(
        s.symbol == symbol and max(abs(a - b) for a, b in zip(s.xyz, xyz)) <= _SAME_CENTRE
        for s in sites
        for symbol, xyz in ghosts
    )


def check(ctx: Context):
    ghosts = None
    for pf in ctx.workspace.files:
        for geometry in pf.deck.geometries:
            atoms = geometry.atoms
            if len(atoms) < 2 or any(a.ghost for a in atoms):
                continue
            sites = geo.sites(geometry)
            if len(sites) < len(atoms):
                continue  # an unknown element (unknown-element reports it) or one without a radius
            if geo.units_verdict(geometry) is not None:
                continue  # units-suspect explains it
            parts = geo.fragments(sites)
            if len(parts) < 2:
                continue
            if ghosts is None:
                ghosts = _ghost_centres(ctx.workspace)
            if ghosts and _ghosted_elsewhere(sites, ghosts):
                continue  # the complex of a counterpoise set-up
            shown = ["{" + geo.labels(p) + "}" for p in parts[:_SHOWN]]
            listed = ", ".join(shown[:-1]) + " and " + shown[-1] if len(shown) > 1 else shown[0]
            if len(parts) > _SHOWN:
                listed = ", ".join(shown) + f" and {len(parts) - _SHOWN} more"
            yield ctx.finding(
                geometry.name.span,
                f"geometry `{geometry.name.value}` falls into {len(parts)} fragments with no bond between "
                f"them: {listed}; a complex needs a counterpoise set-up with ghost atoms, otherwise check "
                f"the coordinates",
            )
