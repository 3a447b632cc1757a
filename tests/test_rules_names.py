"""Name rules: unknown-basis, basis-missing-element, unknown-method and
unused-definition.

Which elements a basis covers is a fact of the basis library the decks run
with (PySCF's bundled sets): cc-pVDZ stops before iodine, which needs a set
with an effective core potential such as cc-pVDZ-PP or def2-SVP (Weigend and
Ahlrichs, Phys. Chem. Chem. Phys. 7, 3297 (2005): def2 covers H-Rn).
"""
import pytest

from deckward.rules.catalogue.basis.unknown_basis import as_deck_word
from deckward.rules.fixes.edits import apply_edits
from rule_harness import check_text, covered

CN = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
# ICN: r(I-C) 1.995, r(C-N) 1.159 angstrom (demo geometry, from memory)
ICN = "geometry icn {\n  I 0 0 0\n  C 0 0 1.995\n  N 0 0 3.154\n}\n"


# --- unknown-basis -----------------------------------------------------------


def test_misspelt_basis_in_a_level():
    text = CN + "level hf_tz { method = hf basis = aug-cc-pvdzz }\n"
    findings, _ = check_text(text, select={"unknown-basis"})
    [f] = findings
    assert f.message == (
        "`aug-cc-pvdzz` in level `hf_tz` is neither a basis set of the library nor a basis_set of this "
        "deck; did you mean `aug-cc-pvdz`, `aug-cc-pCVDZ` or `d-aug-cc-pVDZ`?"  # both libraries' names
    )
    assert (f.span.line, f.span.column, f.span.end_column) == (5, 35, 47)
    fx = f.fixes[0]  # one fix per suggestion, the nearest first
    assert [x.title for x in f.fixes] == ["Use `aug-cc-pvdz`", "Use `aug-cc-pCVDZ`", "Use `d-aug-cc-pVDZ`"]
    assert fx.applicability.value == "risky"
    assert apply_edits(text, fx.edits) == CN + "level hf_tz { method = hf basis = aug-cc-pvdz }\n"


def test_basis_words_in_state_overrides_and_basis_set_sources():
    text = (
        CN
        + "basis_set mine {\n  from = { default: cc-pvdz, N: aug-cc-pvdx }\n  add N s 0.05\n}\n"
        + "level hf { method = hf basis = mine }\n"
        + "state anion { geometry = cn level = hf charge = -1 multiplicity = 1 basis = def2-svpdd }\n"
    )
    findings, _ = check_text(text, select={"unknown-basis"})
    assert [(f.span.line, covered(f, text)) for f in findings] == [(6, "aug-cc-pvdx"), (10, "def2-svpdd")]
    assert findings[0].message.startswith("`aug-cc-pvdx` in basis_set `mine` is neither")
    assert findings[1].message.startswith("`def2-svpdd` in state `anion` is neither")


def test_library_words_in_any_spelling_and_deck_basis_sets_are_known():
    text = (
        CN
        + "basis_set inner {\n  from = 6-31+G*\n}\n"
        + "basis_set outer {\n  from = { default: inner, N: AUG_CC_PVDZ }\n}\n"
        + 'level a { method = hf basis = outer }\nlevel b { method = hf basis = "6-311++g(2d,p)" }\n'
    )
    findings, _ = check_text(text, select={"unknown-basis"})
    assert findings == []


def test_deck_word_quoting_for_replacements():
    assert as_deck_word("cc-pvtz") == "cc-pvtz"
    assert as_deck_word("6-31+g*") == "6-31+g*"
    assert as_deck_word("6-311++g(2d,p)") == '"6-311++g(2d,p)"'


# --- basis-missing-element ---------------------------------------------------


def test_library_set_without_iodine():
    text = (
        ICN
        + "level hf_dz { method = hf basis = cc-pvdz }\n"
        + "state neutral { geometry = icn level = hf_dz charge = 0 multiplicity = 1 }\n"
        + "state anion { geometry = icn level = hf_dz charge = -1 multiplicity = 2 }\n"
    )
    findings, _ = check_text(text, select={"basis-missing-element"})
    [f] = findings
    assert f.message == "`cc-pvdz` has no functions for I, an atom of geometry `icn` in states `neutral` and `anion`"
    assert (f.span.line, f.span.column, covered(f, text)) == (6, 35, "cc-pvdz")
    assert f.fixes == ()


@pytest.mark.parametrize(
    "basis",
    ["def2-svp", "{ default: cc-pvdz, I: cc-pvdz-pp }", "mine"],
)
def test_sets_that_cover_iodine_are_silent(basis):
    text = (
        ICN
        + "basis_set mine {\n  from = { default: cc-pvdz }\n  add I s 0.1\n  add I p 0.1\n}\n"
        + f"level hf_dz {{ method = hf basis = {basis} }}\n"
        + "state neutral { geometry = icn level = hf_dz charge = 0 multiplicity = 1 }\n"
    )
    findings, _ = check_text(text, select={"basis-missing-element"})
    assert findings == []


def test_ghost_atoms_need_basis_functions_too():
    text = (
        "geometry cn_cp {\n  C 0 0 0\n  N 0 0 1.1718\n  I 0 0 5 ghost\n}\n"
        + "level hf_dz { method = hf basis = aug-cc-pvdz }\n"
        + "state neutral { geometry = cn_cp level = hf_dz charge = 0 multiplicity = 2 }\n"
    )
    findings, _ = check_text(text, select={"basis-missing-element"})
    [f] = findings
    assert f.message == "`aug-cc-pvdz` has no functions for I, a ghost atom of geometry `cn_cp` in state `neutral`"


def test_map_without_default_and_basis_set_without_source():
    text = (
        CN
        + "basis_set bare {\n  add N s 0.05\n}\n"
        + "level by_map { method = hf basis = { N: cc-pvdz } }\n"
        + "state a { geometry = cn level = by_map charge = 0 multiplicity = 2 }\n"
        + "state b { geometry = cn level = by_map charge = 0 multiplicity = 2 basis = bare }\n"
    )
    findings, _ = check_text(text, select={"basis-missing-element"})
    assert [(f.span.line, covered(f, text), f.message) for f in findings] == [
        (8, "{ N: cc-pvdz }", "the basis map has no entry for C and no `default`, an atom of geometry `cn` in state `a`"),
        (10, "bare", "basis_set `bare` gives C no library set and no `add` shells, an atom of geometry `cn` in state `b`"),
    ]
    assert findings[1].related[0].message == "basis_set `bare` is defined here"


def test_unknown_basis_words_are_left_to_unknown_basis():
    text = CN + "level hf { method = hf basis = cc-pvdzz }\nstate a { geometry = cn level = hf multiplicity = 2 }\n"
    findings, _ = check_text(text, select={"basis-missing-element", "unknown-basis"})
    assert [f.rule for f in findings] == ["unknown-basis"]


# --- unknown-method ----------------------------------------------------------


def test_unknown_method_in_a_state_override():
    text = (
        CN
        + "level dz { method = hf basis = aug-cc-pvdz }\n"
        + "state a { geometry = cn level = dz charge = 0 multiplicity = 2 method = ccsd(t \n}\n"
    )
    findings, _ = check_text(text, select={"unknown-method"})
    [f] = findings
    assert f.message == "`ccsd(t` in state `a` is not in the method table; did you mean `ccsd(t)`, `ccsd` or `cisd`?"
    assert (f.span.line, f.span.column, covered(f, text)) == (6, 73, "ccsd(t")
    assert f.severity.value == "warning"
    assert apply_edits(text, f.fixes[0].edits).endswith("method = ccsd(t) \n}\n")


def test_method_words_are_matched_ignoring_case_and_dashes():
    text = CN + "level a { method = PBE-0 basis = cc-pvdz }\nlevel b { method = CCSD(T) basis = cc-pvdz }\n"
    findings, _ = check_text(text, select={"unknown-method"})
    assert findings == []


# --- unused-definition -------------------------------------------------------

USED = "state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }\n"


def test_unused_level_and_geometry_and_basis_set():
    text = (
        CN
        + "geometry spare {\n  O 0 0 0\n}\n"
        + "basis_set extra {\n  from = cc-pvdz\n}\n"
        + "level hf_dz { method = hf basis = aug-cc-pvdz }\n"
        + USED
    )
    findings, _ = check_text(text, select={"unused-definition"})
    assert [(f.span.line, f.message) for f in findings] == [
        (5, "geometry `spare` is defined but never used"),
        (8, "basis_set `extra` is defined but never used"),
    ]
    assert apply_edits(text, findings[0].fixes[0].edits) == (
        CN + "basis_set extra {\n  from = cc-pvdz\n}\n" + "level hf_dz { method = hf basis = aug-cc-pvdz }\n" + USED
    )


def test_removal_keeps_neighbours_on_the_same_line_and_crlf_endings():
    text = CN + "level hf_dz { method = hf basis = aug-cc-pvdz } level spare { method = hf }\n" + USED
    [f] = check_text(text, select={"unused-definition"})[0]
    assert apply_edits(text, f.fixes[0].edits) == CN + "level hf_dz { method = hf basis = aug-cc-pvdz } \n" + USED
    crlf = (CN + "level spare { method = hf }  # old\n" + "level hf_dz { method = hf basis = aug-cc-pvdz }\n" + USED).replace("\n", "\r\n")
    [g] = check_text(crlf, select={"unused-definition"})[0]
    assert apply_edits(crlf, g.fixes[0].edits) == (
        CN + "level hf_dz { method = hf basis = aug-cc-pvdz }\n" + USED
    ).replace("\n", "\r\n")


def test_last_statement_without_final_newline_is_removed():
    text = CN + "level hf_dz { method = hf basis = aug-cc-pvdz }\n" + USED + "level spare { method = hf }"
    [f] = check_text(text, select={"unused-definition"})[0]
    assert apply_edits(text, f.fixes[0].edits) == CN + "level hf_dz { method = hf basis = aug-cc-pvdz }\n" + USED


def test_only_the_root_file_is_reported_and_uses_from_any_file_count():
    shared = CN + "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n" + USED
    text = 'use "shared.deck"\nlevel hf_dz { method = hf basis = aug-cc-pvdz }\nlevel spare { method = hf }\n'
    findings, _ = check_text(text, select={"unused-definition"}, files={"shared.deck": shared})
    # no2 in the shared file is unused by this deck but not reported; hf_dz is
    # used by the shared file's state.
    assert [f.message for f in findings] == ["level `spare` is defined but never used"]


def test_nothing_is_reported_while_a_file_does_not_parse():
    text = CN + "level hf_dz { method = hf basis = aug-cc-pvdz }\nstate radical { geometry = cn level = hf_dz charge = \n"
    findings, _ = check_text(text, select={"unused-definition"})
    assert findings == []


def test_unused_definition_is_silent_in_a_library_file():
    from rule_harness import check_text as _check
    library = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\nlevel hf_dz { method = hf basis = cc-pvdz }\n"
    findings, _ = _check(library, select={"unused-definition"})
    assert findings == []
