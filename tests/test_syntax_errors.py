"""Syntax errors: located messages saying what was expected and what was
found; recovery so that each broken statement gives its own finding."""
from rule_harness import check_text


def syntax(text):
    findings, _ = check_text(text)
    return [(f.rule, f.span.line, f.span.column, f.message) for f in findings
            if f.rule in ("syntax-error", "unknown-key", "invalid-value", "duplicate-key")]


def test_two_mistakes_give_two_findings_at_their_lines():
    text = (
        "geometry cn {\n"          # 1
        "  C 0 0 0\n"              # 2
        "  N 0 0 1.1718\n"         # 3
        "}\n"                      # 4
        "level hf { method hf basis = cc-pvdz }\n"   # 5: missing '='
        "state s { geometry = cn level = hf charge = 0 multiplicity = 2 }\n"  # 6
        "derive e = energy(s) * * 2\n"                # 7: doubled operator
    )
    assert syntax(text) == [
        ("syntax-error", 5, 19, "expected `=` but found `hf`"),
        ("syntax-error", 7, 24, "expected a number, `(`, `+`, `-`, `energy` or `orbital` but found `*`"),
    ]


def test_unclosed_block_is_reported_where_it_was_opened():
    text = (
        "geometry cn {\n"
        "  C 0 0 0\n"
        "  N 0 0 1.1718\n"
        "\n"
        "level hf { method = hf basis = cc-pvdz }\n"
    )
    assert syntax(text) == [
        ("syntax-error", 1, 13,
         "the geometry block opened on line 1 is not closed: expected `}` before `level` on line 5"),
    ]


def test_unclosed_block_at_end_of_file_keeps_its_content():
    text = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n"
    findings, ws = check_text(text)
    assert [(f.span.line, f.message) for f in findings if f.rule == "syntax-error"] == [
        (1, "the geometry block opened on line 1 is not closed: expected `}` before the end of the file"),
    ]
    assert len(ws.geometry("cn").atoms) == 2


def test_stray_closing_brace():
    text = "geometry cn { C 0 0 0 }\n}\n"
    assert syntax(text) == [("syntax-error", 2, 1, "unexpected `}`: no block is open here")]


def test_unterminated_string():
    text = 'study "screening { goal = energy }\n'
    rows = syntax(text)
    assert rows[0] == ("syntax-error", 1, 7, 'unterminated string: a `"` opened here is not closed on its line')


def test_garbage_between_statements():
    text = "geometry cn { C 0 0 0 }\nhello world\nlevel l { method = hf basis = sto-3g }\n"
    findings, ws = check_text(text)
    assert [(f.span.line, f.span.column, f.message) for f in findings if f.rule == "syntax-error"] == [
        (2, 1, "expected a statement (use, study, geometry, basis_set, level, state, derive) but found `hello`"),
    ]
    # both statements around the garbage survive
    assert ws.geometry("cn") is not None and ws.level("l") is not None


def test_unexpected_character():
    text = "geometry cn { C 0 0 0 @ }\n"
    assert syntax(text)[0][:3] == ("syntax-error", 1, 23)
    assert syntax(text)[0][3].startswith("unexpected character `@`")


def test_broken_statement_name_is_not_reported_as_undefined():
    text = (
        "geometry g { H 0 0 0 }\n"
        "level l { method = hf basis = sto-3g }\n"
        "state s { geometry = g level = l charge = = 0 }\n"
        "derive e = energy(s)\n"
    )
    findings, _ = check_text(text)
    assert [(f.rule, f.span.line) for f in findings if f.rule in ("syntax-error", "undefined-name")] == [
        ("syntax-error", 3),
    ]


def test_unknown_key_and_values():
    text = (
        "study { goal = electron_afinity kind = vertical compare = none note = \"x\" }\n"
        "geometry g { units = nm H 0 0 0 }\n"
        "level l { method = hf basis = sto-3g reference = unrestriced frozen_core = yes bais = x }\n"
        "state s { geometry = g level = l charge = 0.5 multiplicity = 0 }\n"
        "derive e as affinity = energy(s) in kcal\n"
    )
    assert syntax(text) == [
        ("invalid-value", 1, 16, "`electron_afinity` is not a value of `goal` (values: ionization_energy | "
         "electron_affinity | fundamental_gap | excitation_energy | energy); did you mean `electron_affinity`?"),
        ("invalid-value", 2, 22, "`nm` is not a value of `units` (values: angstrom | bohr)"),
        ("invalid-value", 3, 50, "`unrestriced` is not a value of `reference` (values: restricted | unrestricted | "
         "restricted_open); did you mean `unrestricted`?"),
        ("invalid-value", 3, 76, "`yes` is not a value of `frozen_core` (values: true | false)"),
        ("unknown-key", 3, 80, "`bais` is not a key of a level block (keys: method, basis, reference, frozen_core); "
         "did you mean `basis`?"),
        ("invalid-value", 4, 43, "`charge` must be a whole number, not `0.5`"),
        ("invalid-value", 4, 62, "`multiplicity` must be at least 1, not `0`"),
        ("invalid-value", 5, 13, "`affinity` is not a quantity (quantities: ionization_energy, electron_affinity, "
         "fundamental_gap, excitation_energy, reaction_energy, energy); did you mean `electron_affinity`?"),
        ("invalid-value", 5, 37, "`kcal` is not an energy unit (units: hartree, ev, kcal/mol, kj/mol); did you mean "
         "`kcal/mol`?"),
    ]


def test_duplicate_key():
    text = "level l {\n  method = hf\n  method = mp2\n  basis = sto-3g\n}\n"
    assert syntax(text) == [("duplicate-key", 3, 3, "`method` is set twice in this level block (first on line 2)")]


def test_crlf_positions_match_lf():
    lf = "geometry cn {\n  C 0 0 0\n}\nlevel hf { method hf }\n"
    crlf = lf.replace("\n", "\r\n")
    assert syntax(lf) == syntax(crlf)


def test_a_word_with_an_underscore_is_one_unexpected_word():
    # after `f` the parser wants `=`: the word that follows is reported whole,
    # and its fix then gives `frozen_core`, not `rozenfrozen_core`
    text = "level lv { method = hf  basis = cc-pvdz  f{rozen_core = true }\n"
    assert syntax(text) == [
        ("syntax-error", 1, 10, "the level block opened on line 1 is not closed: expected `}` before the end of "
                                "the file"),
        ("syntax-error", 1, 43, "expected `=` but found `{`"),
        ("unknown-key", 1, 44, "`rozen_core` is not a key of a level block (keys: method, basis, reference, "
                               "frozen_core); did you mean `frozen_core`?"),
    ]
    assert syntax("level lv { x rozen_core = true }\n") == [
        ("syntax-error", 1, 12, "expected `=` and a value after `x`"),
        ("unknown-key", 1, 14, "`rozen_core` is not a key of a level block (keys: method, basis, reference, "
                               "frozen_core); did you mean `frozen_core`?"),
    ]
