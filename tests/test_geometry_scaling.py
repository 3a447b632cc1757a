"""Geometry rules on pathological and very large geometries: few findings,
and searches that agree with the all-pairs definitions they replace.

Finding counts only: the benchmarks in bench/ measure the time."""
import math
import random

import pytest

from deckward.grammar.resolve import Loader, resolve
from deckward.rules.knowledge import geometry as geo
from rule_harness import check_text

GEOMETRY_RULES = {"atoms-too-close", "units-suspect", "disconnected-fragments", "empty-geometry"}


def _geometry(text):
    return resolve("/nonexistent/g.deck", Loader(), "/nonexistent", text=text).root.deck.geometries[0]


def _pile(n, symbol="H"):
    return "geometry pile {\n" + f"  {symbol} 0.0 0.0 0.0\n" * n + "}\n"


def test_two_thousand_atoms_on_one_point_give_one_finding():
    text = _pile(2000)
    findings, _ = check_text(text, select=GEOMETRY_RULES)
    [f] = findings
    assert f.rule == "atoms-too-close"
    assert (f.span.line, f.span.column) == (3, 3)  # the second atom: the first copy to delete
    assert f.message == (
        "1999 atoms of geometry `pile` (H2, H3, H4, H5, H6, H7, H8, H9 and 1991 more) sit at the same "
        "position as H1, each closer than half the sum of the covalent radii"
    )
    assert [(r.span.line, r.message) for r in f.related] == [(2, "H1 is here")]


def test_a_small_group_keeps_one_finding_per_atom():
    # three copies of one hydrogen: two findings, each naming the first copy
    findings, _ = check_text(_pile(3), select={"atoms-too-close"})
    assert [f.message for f in findings] == [
        f"H{i} of geometry `pile` sits at the same position as H1, closer than 0.310 angstrom, "
        "half the sum of their covalent radii" for i in (2, 3)
    ]


def test_findings_per_geometry_are_capped_with_a_summary():
    # 30 pairs of coincident carbon atoms, 3 angstrom apart from the next pair
    body = "".join(f"  C {3.0 * i} 0 0\n  C {3.0 * i} 0 0\n" for i in range(30))
    findings, _ = check_text("geometry pairs {\n" + body + "}\n", select={"atoms-too-close"})
    assert len(findings) == 21
    summary = findings[0]  # on the geometry's name, first in the file
    assert (summary.span.line, summary.span.column) == (1, 10)
    assert summary.message == (
        "geometry `pairs` has 10 more atoms too close to another atom, not reported one by one "
        "(only the first 20 findings are)"
    )
    assert findings[1].message.startswith("C2 of geometry `pairs` sits at the same position as C1,")


def test_a_chain_of_close_atoms_reports_every_later_atom_once():
    # H1-H2 and H2-H3 are too close (0.2 A), H1-H3 (0.4 A) is not
    text = "geometry chain {\n  H 0 0 0\n  H 0 0 0.2\n  H 0 0 0.4\n}\n"
    findings, _ = check_text(text, select={"atoms-too-close"})
    assert [(f.span.line, f.message.split(",")[0]) for f in findings] == [
        (3, "H2 of geometry `chain` is 0.200 angstrom from H1"),
        (4, "H3 of geometry `chain` is 0.200 angstrom from H2"),
    ]


def _random_geometry(rng, n, box):
    symbols = ("H", "C", "N", "O", "Cl")
    lines = "".join(
        f"  {rng.choice(symbols)} {rng.uniform(0, box):.3f} {rng.uniform(0, box):.3f} {rng.uniform(0, box):.3f}\n"
        for _ in range(n)
    )
    return _geometry("geometry r {\n" + lines + "}\n")


@pytest.mark.parametrize("seed", range(12))
def test_groups_report_exactly_the_atoms_of_the_all_pairs_search(seed):
    rng = random.Random(seed)
    g = _random_geometry(rng, 60, rng.choice((2.0, 4.0, 8.0)))
    items = geo.sites(g)
    slow = {
        b.index
        for i, a in enumerate(items)
        for b in items[i + 1 :]
        if geo.distance(a, b) / (a.radius + b.radius) < geo.TOO_CLOSE_RATIO
    }
    reported = [p.b.index for group in geo.too_close_groups(g) for p in group.pairs]
    assert sorted(reported) == sorted(slow)  # each offending atom once
    for group in geo.too_close_groups(g):
        for p in group.pairs:
            assert p.a is group.anchor and p.ratio < geo.TOO_CLOSE_RATIO and p.a.index < p.b.index


@pytest.mark.parametrize("seed", range(12))
def test_fragments_match_the_all_pairs_bond_graph(seed):
    rng = random.Random(100 + seed)
    g = _random_geometry(rng, 50, rng.choice((3.0, 6.0, 12.0)))
    items = geo.sites(g)
    parent = list(range(len(items)))

    def root(i):
        while parent[i] != i:
            i = parent[i]
        return i

    for i, a in enumerate(items):
        for j in range(i + 1, len(items)):
            b = items[j]
            if geo.distance(a, b) <= geo.BOND_TOLERANCE * (a.radius + b.radius):
                parent[max(root(i), root(j))] = min(root(i), root(j))
    slow = {}
    for i, s in enumerate(items):
        slow.setdefault(root(i), []).append(s.index)
    assert [[s.index for s in f] for f in geo.fragments(items)] == sorted(slow.values())


def _slow_verdict(g):
    """units_verdict as defined: every atom's nearest neighbour ratio, all pairs."""
    items = [s for s in geo.sites(g) if s.symbol not in geo.NOBLE_GASES]
    if len(items) < 2:
        return None
    other = "angstrom" if g.unit == "bohr" else "bohr"
    factor = geo.scale_to_angstrom(other) / geo.scale_to_angstrom(g.unit)
    nearest = [min(geo.distance(a, b) / (a.radius + b.radius) for b in items if b is not a) for a in items]
    if any(geo.plausible_bond(r) for r in nearest) or not all(geo.plausible_bond(r * factor) for r in nearest):
        return None
    return (min(nearest), max(nearest))


@pytest.mark.parametrize("unit", ["angstrom", "bohr"])
@pytest.mark.parametrize("seed", range(8))
def test_units_verdict_matches_the_all_pairs_definition(unit, seed):
    rng = random.Random(200 + seed)
    # a chain whose steps are all bonds in one unit or the other, plus noise
    scale = rng.choice((1.0, 1 / geo.BOHR_IN_ANGSTROM, geo.BOHR_IN_ANGSTROM))
    lines = "".join(f"  C {1.4 * i * scale + rng.uniform(-0.05, 0.05):.4f} {0.5 * (i % 2) * scale:.4f} 0\n"
                    for i in range(rng.randint(2, 12)))
    g = _geometry(f"geometry c {{\n  units = {unit}\n" + lines + "}\n")
    fast = geo.units_verdict(g)
    slow = _slow_verdict(g)
    assert (fast.declared_range if fast else None) == (pytest.approx(slow) if slow else None)


def test_non_finite_coordinates_are_left_to_other_rules():
    # The builder rejects the number at its token; no geometry rule sees or reports the atom.
    findings, _ = check_text("geometry bad {\n  H 0 0 0\n  H 0 0 1e309\n}\n")
    assert [(f.rule, f.span.line, f.span.column) for f in findings] == [("invalid-value", 3, 9)]
