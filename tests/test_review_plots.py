"""The review's probe plot: one row per quantity, labels from one derive,
no non-EA number on an EA row, an axis per row that shows the change, and
the experimental value when the evidence carries one.  The evidence tuples
have the layout the probes emit; the numbers are for layout only (invented,
demo)."""
from __future__ import annotations

from deckward.grammar.findings import Finding, Severity, Span
from deckward.server.review_plots import axis_limits, describe, plot_rows, rows_from

SPAN = Span("d.deck", 0, 2, 1, 1, 1, 3)


def _finding(rule, evidence, name="ie"):
    return Finding(rule, Severity.INFO, "m", SPAN, evidence=tuple(evidence.items())), name


def _rows(*pairs):
    names = {id(f): n for f, n in pairs}
    return rows_from([f for f, _ in pairs], lambda f: names[id(f)])


SENS_IE = {"quantity": "ionization_energy", "basis": "cc-pvdz", "augmented_basis": "aug-cc-pvdz",
           "delta_scf_ev": 13.02, "delta_scf_augmented_ev": 13.2, "orbital_estimate_ev": 15.71,
           "orbital_estimate_augmented_ev": 15.8}
KOOP = {"basis": "cc-pvdz", "orbital_ie_ev": 15.71, "delta_scf_ie_ev": 13.02, "relaxation_ev": 2.69}


def test_one_row_per_quantity_labelled_by_one_derive():
    rows = _rows(_finding("probe-basis-sensitivity", SENS_IE, "ie"), _finding("probe-koopmans-relaxation", KOOP, "ie2"))
    assert [(r.label, r.deck_value, r.augmented_value) for r in rows] == [
        ("ie: IE, delta-SCF", 13.02, 13.2), ("ie: IE, -e(HOMO)", 15.71, 15.8)]


def test_anion_homo_is_not_plotted_on_an_ea_row():
    unbound = {"basis": "cc-pvdz", "anion_homo_ev": 1.9, "delta_scf_ev": -0.4}
    rows = _rows(_finding("probe-unbound-anion", unbound, "ea"))
    assert [(r.label, r.deck_value) for r in rows] == [("ea: EA, delta-SCF", -0.4)]


def test_each_row_has_an_axis_that_shows_a_small_shift():
    (row, _) = _rows(_finding("probe-basis-sensitivity", SENS_IE))
    # 0.18 eV shift: a margin of 0.05 eV (more than a quarter of it), no zero.
    assert axis_limits(row) == (12.97, 13.25)
    (unbound,) = _rows(_finding("probe-unbound-anion", {"basis": "b", "delta_scf_ev": -0.4, "anion_homo_ev": 1.0}))
    assert axis_limits(unbound) == (-0.45, -0.35)


def test_experiment_is_marked_when_known():
    ev = dict(SENS_IE, experimental_ev=13.0)
    rows = _rows(_finding("probe-basis-sensitivity", ev))
    assert rows[0].experiment == 13.0
    assert axis_limits(rows[0]) == (12.95, 13.25)
    assert describe(rows[:1]) == ("ie: IE, delta-SCF: +13.02 eV with cc-pvdz, +13.20 eV with aug-cc-pvdz "
                                  "(experiment +13.00 eV).")
    plot = plot_rows(rows, "", "t")
    assert "experiment" in plot.svg and "augmented counterpart" in plot.svg
    assert plot.svg.count("eV (each row on its own scale)") == 1
