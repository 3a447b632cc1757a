"""Suppression comments: `# allow: ID -- reason`, on the line, on the line
before, or for the whole file; reasonless and unused ones are reported."""
from rule_harness import check_text

HEAD = ("geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"                      # lines 1-4
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n")  # line 5


def active(findings):
    return [(f.rule, f.span.line, f.message) for f in findings if f.suppressed is None]


def test_trailing_comment_suppresses_its_line_and_keeps_the_reason():
    text = HEAD + ("state s { geometry = cn level = hf_adz charge = 0 multiplicity = 2 reference = restricted }"
                   "  # allow: restricted-open-shell -- comparing with a closed-shell reference on purpose\n")
    findings, _ = check_text(text, select={"restricted-open-shell", "suppression-without-reason",
                                           "unused-suppression"})
    assert active(findings) == []
    (f,) = [f for f in findings if f.rule == "restricted-open-shell"]
    assert f.suppressed == "comparing with a closed-shell reference on purpose"


def test_own_line_comment_applies_to_the_next_statement_line():
    text = HEAD + ("# allow: restricted-open-shell -- on purpose\n"
                   "\n"
                   "state s { geometry = cn level = hf_adz charge = 0 multiplicity = 2 reference = restricted }\n"
                   "state t { geometry = cn level = hf_adz charge = 0 multiplicity = 2 reference = restricted }\n")
    findings, _ = check_text(text, select={"restricted-open-shell", "unused-suppression"})
    assert active(findings) == [
        ("restricted-open-shell", 9, "state `t` has multiplicity 2 (open shell) but the state sets reference = "
         "restricted")]


def test_allow_file_applies_everywhere():
    text = "# allow-file: restricted-open-shell -- a teaching deck about this mistake\n" + HEAD + (
        "state s { geometry = cn level = hf_adz charge = 0 multiplicity = 2 reference = restricted }\n"
        "state t { geometry = cn level = hf_adz charge = 0 multiplicity = 4 reference = restricted }\n")
    findings, _ = check_text(text, select={"restricted-open-shell", "unused-suppression"})
    assert active(findings) == []
    assert len([f for f in findings if f.rule == "restricted-open-shell"]) == 2


def test_suppression_without_reason_is_reported_but_still_suppresses():
    text = HEAD + ("state s { geometry = cn level = hf_adz charge = 0 multiplicity = 2 reference = restricted }"
                   "  # allow: restricted-open-shell\n")
    findings, _ = check_text(text, select={"restricted-open-shell", "suppression-without-reason",
                                           "unused-suppression"})
    assert [(r, ln, m) for r, ln, m in active(findings)] == [
        ("suppression-without-reason", 6, "this suppression gives no reason: add `-- why` after the rule ids")]
    rows = [(f.span.line, f.span.column) for f in findings if f.rule == "suppression-without-reason"]
    assert rows == [(6, 94)]


def test_unused_and_unknown_ids_are_reported():
    text = HEAD + ("state s { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }"
                   "  # allow: restricted-open-shell, no-such-rule -- leftover\n")
    findings, _ = check_text(text, select={"restricted-open-shell", "unused-suppression"})
    assert active(findings) == [
        ("unused-suppression", 6, "`no-such-rule` is not a rule id (see `deckward rules`)"),
        ("unused-suppression", 6, "the suppression of `restricted-open-shell` suppresses nothing"),
    ]


def test_suppression_of_a_rule_that_did_not_run_is_not_called_unused():
    # probes run only on request: allowing one in a deck is not "unused" in a plain check
    text = HEAD + "# allow: probe-spin-contamination -- CN is known to be contaminated at UHF\n" + (
        "state s { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n")
    findings, _ = check_text(text)
    assert [f for f in findings if f.rule == "unused-suppression"] == []


def test_comment_inside_a_string_is_not_a_suppression():
    text = 'study "x # allow: restricted-open-shell -- no" { goal = energy }\n' + HEAD + (
        "state s { geometry = cn level = hf_adz charge = 0 multiplicity = 2 reference = restricted }\n")
    findings, _ = check_text(text, select={"restricted-open-shell"})
    assert [r for r, _, _ in active(findings)] == ["restricted-open-shell"]
