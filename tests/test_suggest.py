"""Did-you-mean ranking and the fixes it gives: keys, values, names, methods,
basis sets and unclosed blocks, through the checker and ``check --fix``."""
import pytest

from deckward.grammar.findings import Applicability
from deckward.grammar.language_rules import LANGUAGE_RULES
from deckward.grammar.suggest import edit_distance, suggest
from deckward.rules.fixes.edits import apply_edits
from deckward.server.cli import main
from rule_harness import check_text, covered

CN = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"


@pytest.mark.parametrize("a, b, distance", [
    ("aug-cc-pdvz", "aug-cc-pvdz", 1),  # one swap of neighbours
    ("aug-cc-pdvz", "aug-cc-pvtz", 2),
    ("multiplicty", "multiplicity", 1),
    ("ca", "abc", 3),  # optimal string alignment: a swapped pair is not edited again
    ("", "hf", 2),
    ("hf", "hf", 0),
])
def test_edit_distance(a, b, distance):
    assert edit_distance(a, b) == distance


def test_ranking_prefers_the_transposition():
    close = suggest("aug-cc-pdvz", ["aug-cc-pvtz", "aug-cc-pvdz", "cc-pvdz"], n=3)
    assert close.names == ("aug-cc-pvdz", "aug-cc-pvtz", "cc-pvdz")
    assert close.clear


def test_ties_go_to_the_more_similar_name_and_true_ties_are_not_clear():
    assert suggest("hf_az", ["hf_tz", "hf_adz"]).names == ("hf_adz",)
    assert suggest("hf_az", ["hf_tz", "hf_adz"]).clear
    tie = suggest("l3", ["l1", "l2"], n=2)
    assert tie.names == ("l1", "l2") and not tie.clear


def test_nothing_close_gives_no_suggestion():
    assert suggest("xyz", ["multiplicity", "charge"]).names == ()
    assert suggest("xyz", ["multiplicity"]).hint() == ""


def fixes_of(text, rule):
    findings, _ = check_text(text, select={rule})
    (f,) = [f for f in findings if f.rule == rule]
    return f, [(fx.title, fx.applicability, apply_edits(text, fx.edits)) for fx in f.fixes]


def test_unknown_key_has_a_safe_fix():
    text = CN + "state s { geometry = cn  method = hf  basis = cc-pvdz  charge = 0  multiplicty = 2 }\n"
    f, fixes = fixes_of(text, "unknown-key")
    assert covered(f, text) == "multiplicty"
    assert f.message.endswith("did you mean `multiplicity`?")
    assert fixes == [("Use `multiplicity`", Applicability.SAFE, text.replace("multiplicty", "multiplicity"))]


def test_invalid_values_have_safe_fixes():
    text = 'study "cn" { goal = electron_afinity }\n'
    f, fixes = fixes_of(text, "invalid-value")
    assert fixes == [("Use `electron_affinity`", Applicability.SAFE, text.replace("afinity", "affinity"))]
    derive = "derive e = orbital(s, homo, alhpa) in evv\n"
    findings, _ = check_text(derive, select={"invalid-value"})
    assert [(covered(f, derive), [(x.title, x.applicability) for x in f.fixes]) for f in findings] == [
        ("alhpa", [("Use `alpha`", Applicability.SAFE)]),
        ("evv", [("Use `ev`", Applicability.SAFE)]),
    ]


def test_name_typo_is_a_safe_fix_and_an_ambiguous_one_is_risky():
    levels = ("level hf_adz { method = hf  basis = aug-cc-pvdz }\n"
              "level hf_tz { method = hf  basis = cc-pvtz }\n")
    text = CN + levels + "state s { geometry = cn  level = hf_az  charge = 0  multiplicity = 1 }\n"
    f, fixes = fixes_of(text, "undefined-name")
    assert fixes == [("Use the level `hf_adz`", Applicability.SAFE, text.replace("hf_az ", "hf_adz "))]
    tie = CN + "level l1 { method = hf  basis = cc-pvdz }\nlevel l2 { method = hf  basis = cc-pvdz }\n" \
        "state s { geometry = cn  level = l3  charge = 0  multiplicity = 1 }\n"
    f, fixes = fixes_of(tie, "undefined-name")
    assert [(t, a) for t, a, _ in fixes] == [("Use the level `l1`", Applicability.RISKY)]


def test_method_and_basis_fixes_for_every_suggestion_best_first():
    text = CN + "level l { method = hf  basis = aug-cc-pdvz }\n"
    f, fixes = fixes_of(text, "unknown-basis")
    assert f.message.endswith("did you mean `aug-cc-pvdz`, `aug-cc-pv5z` or `aug-cc-pV6Z`?")  # candidates of both libraries
    assert [(t, a) for t, a, _ in fixes] == [
        ("Use `aug-cc-pvdz`", Applicability.RISKY), ("Use `aug-cc-pv5z`", Applicability.RISKY),
        ("Use `aug-cc-pV6Z`", Applicability.RISKY)]
    assert fixes[0][2] == text.replace("pdvz", "pvdz")
    text = CN + "level l { method = b3lpy  basis = aug-cc-pvdz }\n"
    f, fixes = fixes_of(text, "unknown-method")
    assert fixes[0] == ("Use `b3lyp`", Applicability.RISKY, text.replace("b3lpy", "b3lyp"))


def test_unclosed_block_gets_a_closing_brace():
    text = CN + "level l {\n  method = hf\n  basis = cc-pvdz\n\n# the radical\nstate s { geometry = cn }\n"
    f, fixes = fixes_of(text, "syntax-error")
    assert covered(f, text) == "{"
    assert fixes == [("Close the block with `}`", Applicability.SAFE,
                      text.replace("cc-pvdz\n\n# the radical", "cc-pvdz\n}\n\n# the radical"))]
    indented = "level l { method = hf\n"
    f, fixes = fixes_of(indented, "syntax-error")
    assert fixes[0][2] == "level l { method = hf\n}\n"


@pytest.mark.parametrize("rule", [r for r in LANGUAGE_RULES if r.fix is not None], ids=lambda r: r.id)
def test_language_rule_fix_gives_its_fixed_example(rule):
    findings, _ = check_text(rule.bad_example, select={rule.id})
    first = next(f for f in findings if f.rule == rule.id and f.fixes).fixes[0]
    assert first.applicability == rule.fix
    assert apply_edits(rule.bad_example, first.edits) == rule.fixed_example
    after, _ = check_text(rule.fixed_example, select={rule.id})
    assert [f for f in after if f.rule == rule.id] == []


def test_check_fix_applies_the_safe_typo_fixes(tmp_path, capsys):
    deck = tmp_path / "cn.deck"
    text = (CN + "level hf_adz { method = hf  basis = aug-cc-pvdz  reference = unrestrcited }\n"
            "state radical { geometry = cn  level = hf_az  charge = 0  multiplicty = 2 }\n")
    deck.write_text(text, encoding="utf-8")
    main(["check", "--fix", str(deck)])
    assert deck.read_text(encoding="utf-8") == (
        CN + "level hf_adz { method = hf  basis = aug-cc-pvdz  reference = unrestricted }\n"
        "state radical { geometry = cn  level = hf_adz  charge = 0  multiplicity = 2 }\n")
