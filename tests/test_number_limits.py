"""Numbers that overflow a float (``1e309``, hundreds of digits) or are too
large to be a coordinate are reported at their token, and the statement
holding them is left out like one that does not parse: no geometry rule
sees an infinite coordinate and no exponent reaches PySCF."""
import pytest

from rule_harness import check_text, covered

STATES = ("state s { geometry = g  method = hf  basis = sto-3g  multiplicity = 2 }\n"
          "state t { geometry = g  method = hf  basis = sto-3g  charge = 1  multiplicity = 1 }\n")
HUGE = "1" * 400


def report(text):
    findings, ws = check_text(text)
    return [(f.rule, covered(f, text), f.message) for f in findings], ws


@pytest.mark.parametrize("number, reason", [
    ("1e309", "is too large to be a number deckward can use"),
    ("-1e309", "is too large to be a number deckward can use"),
    (HUGE, "has 400 digits; write it with an exponent (e.g. `1.5e-3`)"),
    ("2e6", "is too large (more than 1e+06 in size)"),
])
def test_a_coordinate_that_is_not_finite_is_reported_and_no_rule_crashes(number, reason):
    text = "geometry g {\n  N 0 0 0\n  O 0 0 " + number + "\n}\n" + STATES
    found, ws = report(text)
    shown = number if len(number) <= 24 else number[:20] + "..."
    assert found == [("invalid-value", number, f"`{shown}` {reason} as a coordinate")]
    assert ws.geometry("g") is None and "g" in ws.broken_names


def test_an_exponent_that_is_not_finite_is_reported_and_left_out():
    text = ("geometry g {\n  N 0 0 0\n  O 0 0 1.2\n}\n"
            "basis_set b {\n  from = sto-3g\n  add O s 1e400\n  add O p 0.05\n}\n"
            "state s { geometry = g  method = hf  basis = b  multiplicity = 2 }\n")
    found, ws = report(text)
    assert ("invalid-value", "1e400", "`1e400` is too large to be a number deckward can use as an exponent") in found
    assert [s.exponent.value for s in ws.basis_set("b").shells] == [0.05]


def test_a_derive_constant_that_is_not_finite_is_reported():
    text = "geometry g {\n  N 0 0 0\n  O 0 0 1.2\n}\n" + STATES + f"derive ie = energy(t) - energy(s) + {HUGE}\n"
    found, ws = report(text)
    assert [f for f in found if f[0] == "invalid-value"] == [
        ("invalid-value", HUGE, "`11111111111111111111...` has 400 digits; write it with an exponent (e.g. `1.5e-3`) "
                                "as a number")]
    assert ws.derives == []


def test_an_orbital_offset_with_thousands_of_digits_is_reported():
    text = "geometry g {\n  N 0 0 0\n  O 0 0 1.2\n}\n" + STATES + "derive ea = orbital(s, lumo+" + "1" * 5000 + ")\n"
    found, ws = report(text)
    assert [(r, m) for r, _, m in found if r == "invalid-value"] == [
        ("invalid-value", "`lumo+111111...` (5000 digits) is too far from the HOMO or LUMO to be an orbital")]


def test_whole_numbers_that_overflow_are_reported():
    text = ("geometry g {\n  N 0 0 0\n  O 0 0 1.2\n}\n"
            "state s { geometry = g  method = hf  basis = sto-3g  multiplicity = 1e309 }\n")
    found, _ = report(text)
    assert ("invalid-value", "1e309", "`multiplicity` must be a whole number, not `1e309`") in found
