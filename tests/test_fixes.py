"""The fix loop (deckward.rules.fixes.apply): which fixes it picks, in what order,
what it refuses, and that layout survives.  Pure: texts in, texts out."""
import os
import random

from deckward.grammar.findings import Applicability, Finding, Fix, Severity, Span, TextEdit
from deckward.grammar.resolve import Loader, resolve
from deckward.grammar.text_index import LineIndex
from deckward.rules.engine.checker import check_workspace
from deckward.rules.fixes.apply import candidates, fix_is_applicable, fix_text

PATH = os.path.abspath("toy.deck")
OTHER = os.path.abspath("other.deck")


# -- a toy rule set: findings computed from the text by plain search ----------

def word_findings(text, word, rule, new, risky=False, path=PATH, fix_path=None):
    index = LineIndex(text, path)
    out = []
    start = text.find(word)
    while start != -1:
        span = index.span(start, start + len(word))
        edit_span = span if fix_path is None else LineIndex(text, fix_path).span(start, start + len(word))
        fix = Fix(f"write {new}", (TextEdit(edit_span, new),),
                  Applicability.RISKY if risky else Applicability.SAFE)
        out.append(Finding(rule, Severity.WARNING, f"{word} found", span, fixes=(fix,)))
        start = text.find(word, start + 1)
    return out


def toy_recheck(*rules):
    """A re-check callback from (word, rule, new, risky) tuples; returns the
    findings shuffled, so that order of discovery cannot decide the outcome."""
    calls = []

    def recheck(text):
        calls.append(text)
        found = []
        for word, rule, new, risky in rules:
            found.extend(word_findings(text, word, rule, new, risky))
        random.Random(len(calls)).shuffle(found)
        return found

    recheck.calls = calls
    return recheck


def test_safe_fixes_only_unless_risky_allowed():
    recheck = toy_recheck(("TODO", "toy-todo", "DONE", False), ("RISK", "toy-risk", "CALM", True))
    safe = fix_text("a TODO b RISK c TODO\n", PATH, recheck)
    assert safe.text == "a DONE b RISK c DONE\n"
    assert [a.rule for a in safe.applied] == ["toy-todo", "toy-todo"]
    assert [f.rule for f in safe.findings] == ["toy-risk"]
    risky = fix_text("a TODO b RISK c TODO\n", PATH, recheck, include_risky=True)
    assert risky.text == "a DONE b CALM c DONE\n"
    assert [a.applicability for a in risky.applied] == [Applicability.SAFE, Applicability.RISKY, Applicability.SAFE]
    assert risky.findings == ()


def test_overlapping_fixes_of_different_findings_resolve_by_position():
    # "abc" draws two findings whose edits overlap: replace "abc" (starts first)
    # and replace "bc".  The earlier one wins, then the re-check sees no "bc".
    recheck = toy_recheck(("bc", "toy-bc", "Y", False), ("abc", "toy-abc", "X", False))
    for _ in range(3):
        out = fix_text("abc abc\n", PATH, recheck)
        assert out.text == "X X\n"
        assert [a.rule for a in out.applied] == ["toy-abc", "toy-abc"]


def test_one_fix_per_recheck():
    recheck = toy_recheck(("TODO", "toy-todo", "DONE", False))
    out = fix_text("TODO TODO TODO", PATH, recheck)
    assert out.text == "DONE DONE DONE"
    # first check, then one re-check after each of the three fixes
    assert recheck.calls == ["TODO TODO TODO", "DONE TODO TODO", "DONE DONE TODO", "DONE DONE DONE"]


def test_fixes_that_undo_each_other_stop_and_are_reported():
    recheck = toy_recheck(("ping", "toy-ping", "pong", False), ("pong", "toy-pong", "ping", False))
    out = fix_text("ping\n", PATH, recheck)
    assert out.text == "pong\n"
    assert [a.rule for a in out.applied] == ["toy-ping"]
    assert [(s.rule, s.reason) for s in out.skipped] == [
        ("toy-pong", "it would undo an earlier fix (the fixes of two findings disagree)")]
    assert out.settled


def test_the_loop_is_bounded():
    recheck = toy_recheck(("x", "toy-grow", "xy", False))
    out = fix_text("x", PATH, recheck, max_fixes=5)
    assert out.text == "xyyyyy"
    assert out.count == 5 and not out.settled


def test_fixes_outside_the_file_or_suppressed_are_not_applied():
    text = "TODO\n"
    in_other_file = word_findings(text, "TODO", "toy-todo", "DONE", path=OTHER)
    edits_other_file = word_findings(text, "TODO", "toy-todo", "DONE", fix_path=OTHER)
    suppressed = [Finding(f.rule, f.severity, f.message, f.span, fixes=f.fixes, suppressed="reviewed")
                  for f in word_findings(text, "TODO", "toy-todo", "DONE")]
    for findings in (in_other_file, edits_other_file, suppressed):
        out = fix_text(text, PATH, lambda t, fs=findings: fs)
        assert out.text == text and out.applied == ()


def test_malformed_fixes_are_not_applicable():
    text = "abcdef"
    index = LineIndex(text, PATH)
    beyond = Fix("t", (TextEdit(Span(PATH, 4, 99, 1, 5, 1, 99), "z"),))
    overlapping = Fix("t", (TextEdit(index.span(0, 3), "x"), TextEdit(index.span(2, 4), "y")))
    empty = Fix("t", ())
    adjacent = Fix("t", (TextEdit(index.span(0, 2), "x"), TextEdit(index.span(2, 4), "y")))
    assert not fix_is_applicable(beyond, PATH, text)
    assert not fix_is_applicable(overlapping, PATH, text)
    assert not fix_is_applicable(empty, PATH, text)
    assert fix_is_applicable(adjacent, PATH, text)


def test_first_allowed_fix_of_a_finding_is_chosen():
    text = "word\n"
    span = LineIndex(text, PATH).span(0, 4)
    risky_first = Finding("toy", Severity.WARNING, "m", span, fixes=(
        Fix("risky", (TextEdit(span, "R"),), Applicability.RISKY),
        Fix("safe", (TextEdit(span, "S"),), Applicability.SAFE),
    ))
    assert [fx.title for _, fx in candidates([risky_first], PATH, text, include_risky=False)] == ["safe"]
    assert [fx.title for _, fx in candidates([risky_first], PATH, text, include_risky=True)] == ["risky"]


# -- with the real parser and rules -------------------------------------------

OPEN_SHELL = (
    "# NO₂ screening — Säure fragment, left as written\n"
    "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718     # C≡N\n}\n"
    "\n"
    "level hf_adz {\n  method    = hf\n  basis     = aug-cc-pvdz\n  reference = restricted   # aligned\n}\n"
    "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
)
OPEN_SHELL_FIXED = OPEN_SHELL.replace("reference = restricted   #", "reference = unrestricted   #")


def real_recheck(path, folder):
    loader = Loader()

    def recheck(text):
        loader.overlay[os.path.abspath(path)] = text
        return check_workspace(resolve(path, loader, folder))

    return recheck


def test_layout_comments_and_non_ascii_survive(tmp_path):
    path = str(tmp_path / "cn.deck")
    out = fix_text(OPEN_SHELL, path, real_recheck(path, str(tmp_path)))
    assert out.text == OPEN_SHELL_FIXED
    assert [(a.rule, a.title, a.line) for a in out.applied] == [
        ("restricted-open-shell", "Use an unrestricted reference", 10)]


def test_crlf_and_missing_final_newline_survive(tmp_path):
    path = str(tmp_path / "cn.deck")
    crlf = OPEN_SHELL.replace("\n", "\r\n")
    assert fix_text(crlf, path, real_recheck(path, str(tmp_path))).text == OPEN_SHELL_FIXED.replace("\n", "\r\n")
    bare = OPEN_SHELL.rstrip("\n")
    assert fix_text(bare, path, real_recheck(path, str(tmp_path))).text == OPEN_SHELL_FIXED.rstrip("\n")


def test_a_fix_that_would_break_parsing_is_skipped(tmp_path):
    path = str(tmp_path / "cn.deck")
    real = real_recheck(path, str(tmp_path))

    def recheck(text):
        # the real findings plus a defective fix that deletes the closing brace
        # of the geometry block
        found = list(real(text))
        brace = text.find("}")
        if brace != -1 and text.startswith("# NO"):
            span = LineIndex(text, path).span(brace, brace + 1)
            found.append(Finding("toy-brace", Severity.INFO, "m", span, fixes=(Fix("drop brace", (TextEdit(span, ""),)),)))
        return found

    out = fix_text(OPEN_SHELL, path, recheck)
    assert out.text == OPEN_SHELL_FIXED
    assert [(s.rule, s.reason) for s in out.skipped] == [("toy-brace", "the result would not parse")]


def test_a_fix_that_would_break_another_file_is_skipped():
    # the re-check also covers a deck that uses this file: removing "KEEP"
    # would leave a name there undefined
    other = LineIndex("state s { level = KEEP }\n", OTHER)

    def recheck(text):
        found = word_findings(text, "KEEP", "toy-unused", "", risky=True)
        found += word_findings(text, "TODO", "toy-todo", "DONE")
        if "KEEP" not in text:
            found.append(Finding("undefined-name", Severity.ERROR, "no level KEEP", other.span(17, 21)))
        return found

    out = fix_text("KEEP TODO\n", PATH, recheck, include_risky=True)
    assert out.text == "KEEP DONE\n"
    assert [(s.rule, s.reason) for s in out.skipped] == [
        ("toy-unused", "it would cause undefined-name in other.deck")]
    assert out.skipped[0].describe() == (
        'line 1: fix "write " of toy-unused was not applied: it would cause undefined-name in other.deck')
