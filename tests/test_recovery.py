"""A half-typed word reports one finding in its own statement.

A key that is also a statement keyword (`geometry`, `level`) typed inside a
block is a key being typed, not a new statement; a key typed without its
`= value` is forgotten, so the settings after it keep their meaning; a word
typed after a finished statement is a statement of its own.  A block that
really lacks its `}` is still reported where it was opened."""
from rule_harness import check_text

RULES = ["syntax-error", "unknown-key", "duplicate-key", "invalid-value", "undefined-name", "empty-geometry",
         "missing-setting"]
HEAD = (
    "geometry cn {\n"                                            # 1
    "  C 0 0 0\n"                                                # 2
    "  N 0 0 1.1718\n"                                           # 3
    "}\n"                                                        # 4
    "level hf { method = hf  basis = aug-cc-pvdz }\n"            # 5
)
RADICAL = "state radical { geometry = cn  level = hf  charge = 0  multiplicity = 2 }\n"
TAIL = (
    "state anion { geometry = cn  level = hf  charge = -1  multiplicity = 1 }\n"
    "derive ea = energy(radical) - energy(anion) in ev\n"
)


def found(text):
    findings, _ = check_text(text, select=RULES)
    return [(f.rule, f.span.line, f.span.column, f.message) for f in findings]


def test_the_deck_itself_is_clean():
    assert found(HEAD + RADICAL + TAIL) == []


def test_level_typed_at_the_end_of_an_unclosed_state():
    text = HEAD + RADICAL + "state cation { geometry = cn  level\n" + TAIL   # line 7
    assert found(text) == [
        ("syntax-error", 7, 14, "the state block opened on line 7 is not closed: expected `}` before `state` on line 8"),
        ("syntax-error", 7, 31, "expected `=` and a value after `level`"),
    ]


def test_geometry_typed_on_a_new_line_of_an_unclosed_state():
    text = HEAD + "state cation {\n  geometry\n" + RADICAL + TAIL   # lines 6-7
    assert found(text) == [
        ("syntax-error", 6, 14, "the state block opened on line 6 is not closed: expected `}` before `state` on line 8"),
        ("syntax-error", 7, 3, "expected `=` and a value after `geometry`"),
    ]


def test_geometry_typed_before_the_settings_of_a_closed_state():
    text = HEAD + "state radical {\n  geometry\n  level = hf\n  charge = 0\n  multiplicity = 2\n}\n" + TAIL
    # Not "`hf` is a level, not a geometry" nor "`level` is set twice".
    assert found(text) == [("syntax-error", 7, 3, "expected `=` and a value after `geometry`")]


def test_level_typed_just_before_the_closing_brace():
    text = HEAD + "state radical {\n  geometry = cn\n  charge = 0\n  multiplicity = 2\n  level\n}\n" + TAIL
    assert found(text) == [("syntax-error", 10, 3, "expected `=` and a value after `level`")]


def test_geometry_typed_between_statements_does_not_take_the_next_one():
    text = HEAD + "geometry\n" + RADICAL + TAIL
    # Not "geometry `state` has no atoms", unknown keys or `radical` undefined.
    assert found(text) == [("syntax-error", 6, 8, "unexpected end of the statement: expected a name")]


def test_a_word_on_its_way_to_a_keyword_is_a_statement_of_its_own():
    text = HEAD + RADICAL + "le\n" + TAIL
    assert found(text) == [
        ("syntax-error", 7, 1, "expected a statement (use, study, geometry, basis_set, level, state, derive) "
                               "but found `le`"),
    ]


def test_an_unfinished_expression_does_not_take_the_next_statement():
    text = HEAD + RADICAL + "derive x = energy(radical) -\n" + TAIL
    assert found(text) == [
        ("syntax-error", 7, 28, "unexpected end of the statement: expected a number, `(`, `+`, `-`, `energy` or "
                                "`orbital`"),
    ]


def test_a_missing_equals_sign_is_still_reported_at_the_value():
    text = HEAD + "level hf2 { method hf  basis = cc-pvdz }\n"
    assert found(text) == [("syntax-error", 6, 20, "expected `=` but found `hf`")]


def test_a_real_missing_brace_before_a_statement_head_is_still_reported():
    text = "state s {\n  charge = 0\nderive ea = energy(s) in ev\n"
    assert [f for f in found(text) if f[0] == "syntax-error"] == [
        ("syntax-error", 1, 9, "the state block opened on line 1 is not closed: expected `}` before `derive` on line 3"),
    ]
    text = HEAD.replace("}\n", "\n", 1) + "state s { geometry = cn  level = hf  charge = 0  multiplicity = 2 }\n"
    assert found(text) == [
        ("syntax-error", 1, 13, "the geometry block opened on line 1 is not closed: expected `}` before `level` on line 5"),
    ]


def test_equals_sign_typed_before_the_next_setting():
    text = HEAD + "state radical {\n  geometry =\n  level = hf\n  charge = 0\n  multiplicity = 2\n}\n" + TAIL
    # Not "no geometry is named `level`" nor a missing level.
    assert found(text) == [("syntax-error", 7, 3, "expected a value after `geometry =`")]


def test_equals_sign_typed_before_the_next_key_on_the_same_line():
    text = HEAD + "state radical { geometry = cn  level =  charge = 0  multiplicity = 2 }\n" + TAIL
    assert found(text) == [("syntax-error", 6, 32, "expected a value after `level =`")]


def test_equals_sign_typed_before_the_closing_brace():
    text = HEAD + "state radical { geometry = cn  level = hf  charge = 0  multiplicity = }\n" + TAIL
    assert found(text) == [("syntax-error", 6, 56, "expected a value after `multiplicity =`")]


def test_equals_sign_typed_at_the_end_of_an_unclosed_state():
    text = HEAD + "state radical { geometry = cn  level = hf  charge = 0  multiplicity =\n" + TAIL
    assert found(text) == [
        ("syntax-error", 6, 15, "the state block opened on line 6 is not closed: expected `}` before `state` on line 7"),
        ("syntax-error", 6, 56, "expected a value after `multiplicity =`"),
    ]
