"""Geometry rules and helpers: atoms-too-close, units-suspect,
disconnected-fragments, empty-geometry, and rules/knowledge/geometry.py.

Real molecules are built from experimental structures; each value carries its
source in a comment.  The same numbers are then written under the right and
the wrong length unit.
"""
import math

import pytest

from deckward.grammar.resolve import Loader, resolve
from deckward.rules.knowledge import geometry as geo
from deckward.rules.fixes.edits import apply_edits
from rule_harness import check_text, covered

GEOMETRY_RULES = {"atoms-too-close", "units-suspect", "disconnected-fragments", "empty-geometry"}

# Bohr radius in angstrom, CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)).
BOHR = 0.529177210903


# --- covalent radii ----------------------------------------------------------

# Cordero et al., "Covalent radii revisited", Dalton Trans. 2008, 2832-2838
# (check-values.md section 4).  Carbon: the sp2 value, the one the data
# source (PySCF's radii table) stores.
CORDERO_2008 = {
    "H": 0.31, "He": 0.28, "Li": 1.28, "Be": 0.96, "B": 0.84, "C": 0.73, "N": 0.71, "O": 0.66,
    "F": 0.57, "Ne": 0.58, "Na": 1.66, "Mg": 1.41, "Al": 1.21, "Si": 1.11, "P": 1.07, "S": 1.05,
    "Cl": 1.02, "Ar": 1.06, "Br": 1.20, "I": 1.39,
}


def _geometry(text):
    """The first geometry of a deck text (parsed in memory, nothing on disk)."""
    ws = resolve("/nonexistent/g.deck", Loader(), "/nonexistent", text=text)
    return ws.root.deck.geometries[0]


def test_radii_used_by_the_rules_are_cordero_2008():
    symbols = list(CORDERO_2008)
    lines = "".join(f"  {s} {3 * i} 0 0\n" for i, s in enumerate(symbols))
    sites = geo.sites(_geometry("geometry all {\n" + lines + "}\n"))
    assert {s.symbol: s.radius for s in sites} == CORDERO_2008


def test_h2_anchor_is_a_plausible_bond():
    # r(H-H) in H2 = 0.7414 angstrom (check-values.md section 4, conf. yes)
    sites = geo.sites(_geometry("geometry h2 {\n  H 0 0 0\n  H 0 0 0.7414\n}\n"))
    [pair] = geo.bonds(sites)
    assert pair.distance == pytest.approx(0.7414)
    assert pair.ratio == pytest.approx(0.7414 / 0.62)
    assert geo.plausible_bond(pair.ratio)


def test_bohr_coordinates_are_converted_to_angstrom():
    sites = geo.sites(_geometry("geometry h2 {\n  units = bohr\n  H 0 0 0\n  H 0 0 1.4\n}\n"))
    assert geo.distance(*sites) == pytest.approx(1.4 * BOHR, rel=1e-12)
    assert geo.format_length(0.66, "bohr") == f"{0.66 / BOHR:.3f} bohr (0.660 angstrom)"


def test_fragments_of_a_water_dimer_and_a_single_atom():
    dimer = geo.sites(_geometry(
        "geometry w2 {\n  O 0 0 0\n  H 0 0.7572 0.5859\n  H 0 -0.7572 0.5859\n"
        "  O 0 0 2.9\n  H 0 0.7572 3.4859\n  H 0 -0.7572 3.4859\n}\n"
    ))
    assert [[s.label for s in f] for f in geo.fragments(dimer)] == [["O1", "H2", "H3"], ["O4", "H5", "H6"]]
    single = geo.sites(_geometry("geometry o {\n  O 0 0 0\n}\n"))
    assert [[s.label for s in f] for f in geo.fragments(single)] == [["O1"]]


def test_cell_search_finds_the_same_pairs_as_all_pairs():
    # a chain of 40 carbon atoms, 1.40 angstrom apart, zig-zag
    lines = "".join(f"  C {1.2 * i:.4f} {0.7 * (i % 2):.4f} 0\n" for i in range(40))
    sites = geo.sites(_geometry("geometry chain {\n" + lines + "}\n"))
    fast = [(p.a.index, p.b.index) for p in geo.pairs_within(sites, 2.0)]
    slow = [
        (a.index, b.index)
        for i, a in enumerate(sites)
        for b in sites[i + 1 :]
        if geo.distance(a, b) <= 2.0 * (a.radius + b.radius)
    ]
    assert fast == slow and len(fast) > 39


# --- experimental geometries -------------------------------------------------


def _bent(central, outer, r, angle_deg):
    half = math.radians(angle_deg) / 2
    y, z = r * math.sin(half), r * math.cos(half)
    return [(central, 0.0, 0.0, 0.0), (outer, 0.0, y, z), (outer, 0.0, -y, z)]


def _hco2(r_ch, r_co, angle_oco):
    half = math.radians(angle_oco) / 2
    return [("C", 0.0, 0.0, 0.0), ("H", 0.0, 0.0, r_ch),
            ("O", 0.0, r_co * math.sin(half), -r_co * math.cos(half)),
            ("O", 0.0, -r_co * math.sin(half), -r_co * math.cos(half))]


MOLECULES = {
    # NO2: r(N-O) 1.197 A, angle 134.3 deg (NIST CCCBDB experimental geometry; from memory)
    "no2": _bent("N", "O", 1.197, 134.3),
    # CN radical: r 1.1718 A (Huber and Herzberg, Constants of Diatomic Molecules, 1979; from memory)
    "cn": [("C", 0.0, 0.0, 0.0), ("N", 0.0, 0.0, 1.1718)],
    # H2O: r(O-H) 0.9572 A, angle 104.52 deg (NIST CCCBDB experimental geometry; from memory)
    "h2o": _bent("O", "H", 0.9572, 104.52),
    # CO2: r(C=O) 1.1600 A, linear (NIST CCCBDB experimental geometry; from memory)
    "co2": [("O", 0.0, 0.0, -1.16), ("C", 0.0, 0.0, 0.0), ("O", 0.0, 0.0, 1.16)],
    # H2: 0.7414 A (check-values.md section 4, conf. yes)
    "h2": [("H", 0.0, 0.0, 0.0), ("H", 0.0, 0.0, 0.7414)],
    # Formyloxyl HCO2: r(C-H) 1.10, r(C-O) 1.26 A, angle OCO 112 deg: an approximate
    # structure from memory, not an experimental one (the radical's ground state is debated)
    "hco2": _hco2(1.10, 1.26, 112.0),
}


def _deck(name, atoms, unit_line, scale=1.0):
    head = f"  units = {unit_line}\n" if unit_line else ""
    body = "".join(f"  {s} {x * scale:.6f} {y * scale:.6f} {z * scale:.6f}\n" for s, x, y, z in atoms)
    return f"geometry {name} {{\n{head}{body}}}\n"


@pytest.mark.parametrize("name", MOLECULES)
@pytest.mark.parametrize("unit_line, scale", [("angstrom", 1.0), (None, 1.0), ("bohr", 1 / BOHR)])
def test_correct_units_are_silent(name, unit_line, scale):
    text = _deck(name, MOLECULES[name], unit_line, scale)
    findings, _ = check_text(text, select=GEOMETRY_RULES)
    assert findings == []


@pytest.mark.parametrize("name", MOLECULES)
def test_angstrom_numbers_under_units_bohr_fire(name):
    text = _deck(name, MOLECULES[name], "bohr")
    findings, _ = check_text(text, select={"units-suspect"})
    [f] = findings
    assert covered(f, text) == "bohr"
    assert (f.span.line, f.span.column) == (2, 11)
    assert f.message.startswith(f"geometry `{name}` with units = bohr: every atom is closer to its nearest neighbour")
    assert f.message.endswith("the coordinates look like angstrom values")
    [fx] = f.fixes
    assert fx.applicability.value == "risky"
    fixed = apply_edits(text, fx.edits)
    assert fixed == _deck(name, MOLECULES[name], "angstrom")
    after, _ = check_text(fixed, select=GEOMETRY_RULES)
    assert after == []


@pytest.mark.parametrize("name", MOLECULES)
def test_bohr_numbers_under_units_angstrom_fire(name):
    text = _deck(name, MOLECULES[name], "angstrom", 1 / BOHR)
    findings, _ = check_text(text, select=GEOMETRY_RULES)
    [f] = findings  # disconnected-fragments stays silent: units-suspect explains it
    assert f.rule == "units-suspect"
    assert f.message.startswith(f"geometry `{name}` with units = angstrom: no atom has a neighbour at bonding distance")
    assert apply_edits(text, f.fixes[0].edits) == _deck(name, MOLECULES[name], "bohr", 1 / BOHR)


def test_bohr_numbers_without_units_line_get_one_inserted():
    text = _deck("cn", MOLECULES["cn"], None, 1 / BOHR)
    findings, _ = check_text(text, select={"units-suspect"})
    [f] = findings
    assert covered(f, text) == "cn"
    assert f.message == (
        "geometry `cn` with no units line (angstrom by default): no atom has a neighbour at bonding "
        "distance (nearest at 1.54 times the sum of the covalent radii; bonds end near 1.25); read in bohr "
        "the same numbers give ordinary bond lengths (0.81 times the sum): the coordinates look like bohr values"
    )
    assert apply_edits(text, f.fixes[0].edits) == _deck("cn", MOLECULES["cn"], "bohr", 1 / BOHR)


def test_units_line_inserted_on_a_one_line_geometry():
    text = "geometry cn { C 0 0 0 N 0 0 2.2144 }\n"
    findings, _ = check_text(text, select={"units-suspect"})
    [f] = findings
    assert apply_edits(text, f.fixes[0].edits) == "geometry cn { units = bohr C 0 0 0 N 0 0 2.2144 }\n"


def test_units_suspect_leaves_single_atoms_and_noble_gas_contacts_alone():
    # Ar2 at its van der Waals minimum, about 3.76 A (from memory): no bond, no units verdict
    text = "geometry ar2 {\n  Ar 0 0 0\n  Ar 0 0 3.76\n}\ngeometry o {\n  units = bohr\n  O 0 0 0\n}\n"
    findings, _ = check_text(text, select={"units-suspect"})
    assert findings == []


def test_no2_in_angstrom_numbers_under_bohr_is_also_too_close():
    # N-O becomes 1.197 bohr = 0.633 A, below half the radius sum (0.685 A)
    text = _deck("no2", MOLECULES["no2"], "bohr")
    findings, _ = check_text(text, select={"atoms-too-close"})
    assert [f.span.line for f in findings] == [4, 5]
    assert findings[0].message == (
        "O2 of geometry `no2` is 1.197 bohr (0.633 angstrom) from N1, closer than 1.294 bohr "
        "(0.685 angstrom), half the sum of their covalent radii; the whole geometry reads as "
        "ordinary bond lengths in angstrom (see units-suspect)"
    )


def test_water_atom_placed_too_close_fires_once():
    text = "geometry h2o {\n  O 0 0 0\n  H 0 0.7572 0.5859\n  H 0 -0.2 0.2\n}\n"
    findings, _ = check_text(text, select=GEOMETRY_RULES)
    [f] = findings
    assert f.rule == "atoms-too-close"
    assert covered(f, text) == "H 0 -0.2 0.2"
    assert (f.span.line, f.span.column, f.span.end_column) == (4, 3, 15)
    assert f.message == (
        "H3 of geometry `h2o` is 0.283 angstrom from O1, closer than 0.485 angstrom, "
        "half the sum of their covalent radii"
    )
    assert [(r.span.line, r.message) for r in f.related] == [(2, "O1 is here")]


def test_ghost_on_top_of_an_atom_is_too_close_but_a_partner_fragment_is_not():
    text = (
        "geometry cp {\n  O 0 0 0\n  H 0 0.7572 0.5859\n  H 0 -0.7572 0.5859\n"
        "  O 0 0 2.9 ghost\n  H 0 0.7572 3.4859 ghost\n  H 0 -0.7572 3.4859 ghost\n"
        "  O 0 0 0 ghost\n}\n"
    )
    findings, _ = check_text(text, select=GEOMETRY_RULES)
    [f] = findings
    assert f.rule == "atoms-too-close"
    assert f.message == (
        "O7 (ghost) of geometry `cp` sits at the same position as O1, closer than 0.660 angstrom, "
        "half the sum of their covalent radii"
    )


# --- disconnected-fragments --------------------------------------------------


def test_complex_without_ghost_atoms_is_reported():
    text = (
        "geometry w2 {\n  O 0 0 0\n  H 0 0.7572 0.5859\n  H 0 -0.7572 0.5859\n"
        "  O 0 0 2.9\n  H 0 0.7572 3.4859\n  H 0 -0.7572 3.4859\n}\n"
    )
    findings, _ = check_text(text, select=GEOMETRY_RULES)
    [f] = findings
    assert f.rule == "disconnected-fragments"
    assert (f.span.line, f.span.column) == (1, 10)
    assert f.message == (
        "geometry `w2` falls into 2 fragments with no bond between them: {O1, H2, H3} and {O4, H5, H6}; "
        "a complex needs a counterpoise set-up with ghost atoms, otherwise check the coordinates"
    )


def test_single_atom_and_counterpoise_setups_are_not_disconnected():
    text = (
        "geometry o {\n  O 0 0 0\n}\n"
        "geometry cp {\n  O 0 0 0\n  H 0 0.7572 0.5859\n  H 0 -0.7572 0.5859\n"
        "  O 0 0 2.9 ghost\n  H 0 0.7572 3.4859 ghost\n  H 0 -0.7572 3.4859 ghost\n}\n"
    )
    findings, _ = check_text(text, select={"disconnected-fragments"})
    assert findings == []


def test_many_fragments_are_listed_briefly():
    lines = "".join(f"  He {5 * i} 0 0\n" for i in range(6))
    text = "geometry gas {\n" + lines + "}\n"
    findings, _ = check_text(text, select={"disconnected-fragments"})
    [f] = findings
    assert "falls into 6 fragments with no bond between them: {He1}, {He2}, {He3}, {He4} and 2 more;" in f.message


# --- empty-geometry ----------------------------------------------------------


def test_empty_geometry_points_at_its_name():
    text = "geometry no2 {\n  units = bohr\n}\ngeometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
    findings, _ = check_text(text, select=GEOMETRY_RULES)
    [f] = findings
    assert (f.rule, f.message) == ("empty-geometry", "geometry `no2` has no atoms")
    assert (f.span.line, f.span.column, f.span.end_column) == (1, 10, 13)


def test_geometry_rules_report_in_used_files_at_their_own_path():
    shared = "geometry broken {\n}\n"
    text = 'use "shared.deck"\ngeometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n'
    findings, _ = check_text(text, select=GEOMETRY_RULES, files={"shared.deck": shared})
    [f] = findings
    assert f.rule == "empty-geometry" and f.path.endswith("shared.deck")
