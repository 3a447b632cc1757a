"""``deckward check --fix / --fix-risky / --diff`` end to end: every rule's
fix on its own bad example, the write path's refusals, and diffs that the
standard ``patch`` tool applies."""
import json
import os
import shutil
import stat
import subprocess
import sys

import pytest

from deckward.grammar.build import build_deck
from deckward.grammar.findings import Applicability
from deckward.rules.engine.project import Project
from deckward.rules.engine.registry import all_rules
from deckward.server import fixing
from deckward.server.cli import main
from rule_harness import check_text

CATALOGUE = [r for r in all_rules().values() if r.check is not None]
FIXABLE = [r for r in CATALOGUE if r.info.fix is not None]

# Layout variants every fix must keep: (name, transform of a deck text).
NOTE = "# NO₂ and HCO₂ screening — Säure fragments, µ-level notes\n\n"
VARIANTS = {
    "as-written": lambda t: t,
    "crlf": lambda t: t.replace("\n", "\r\n"),
    "no-final-newline": lambda t: t[:-1] if t.endswith("\n") else t,
    "non-ascii-comment": lambda t: NOTE + t,
}
# Characters that str.splitlines() would treat as line breaks, in a comment.
ODD_BREAKS = "# page\x0cbreak and a line\u2028separator\n"


def cli(*argv):
    """Run ``deckward ARGV`` in this process; return (status, stdout)."""
    import io
    from contextlib import redirect_stdout

    buf = io.StringIO()
    with redirect_stdout(buf):
        status = main(list(argv))
    return status, buf.getvalue()


def only_rule(folder, rule_id):
    """A deckward.yaml in ``folder`` that turns every other catalogue rule
    off, so the rule's fix is the only one that can apply."""
    lines = ["rules:"] + [f"  {r.id}: off" for r in CATALOGUE if r.id != rule_id]
    (folder / "deckward.yaml").write_text("\n".join(lines) + "\n", encoding="utf-8")


def write(path, text):
    path.write_bytes(text.encode("utf-8"))


def summary(path, *flags):
    status, out = cli("check", *flags, "--format", "json", str(path))
    return status, json.loads(out)


def parse_errors(text):
    return [f for f in build_deck("x.deck", text)[1] if f.rule == "syntax-error"]


@pytest.mark.parametrize("variant", sorted(VARIANTS))
@pytest.mark.parametrize("rule", FIXABLE, ids=lambda r: r.id)
def test_fix_turns_the_bad_example_into_the_fixed_example(rule, variant, tmp_path):
    info = rule.info
    shape = VARIANTS[variant]
    only_rule(tmp_path, rule.id)
    deck = tmp_path / "example.deck"
    write(deck, shape(info.bad_example))
    flag = "--fix" if info.fix is Applicability.SAFE else "--fix-risky"

    if info.fix is Applicability.RISKY:
        # plain --fix never applies a risky fix: unchanged unless the finding
        # also offers a safe one
        found, _ = check_text(info.bad_example, select={rule.id})
        if not any(fx.is_safe for f in found if f.rule == rule.id for fx in f.fixes):
            summary(deck, "--fix")
            assert deck.read_bytes() == shape(info.bad_example).encode("utf-8")

    _, report = summary(deck, flag)
    fixed = deck.read_bytes().decode("utf-8")
    assert fixed == shape(info.fixed_example)
    assert report["summary"]["fixes_applied"] == 1
    assert [f for f in report["findings"] if f["rule"] == rule.id] == []
    assert parse_errors(fixed) == []

    _, again = summary(deck, flag)
    assert deck.read_bytes().decode("utf-8") == fixed
    assert again["summary"]["fixes_applied"] == 0


def test_summary_counts_fixes_and_remaining_findings(tmp_path):
    info = all_rules()["restricted-open-shell"].info
    only_rule(tmp_path, "restricted-open-shell")
    for name in ("a.deck", "b.deck"):
        write(tmp_path / name, info.bad_example)
    status, out = cli("check", "--fix", str(tmp_path))
    assert out.splitlines()[-1] == "0 errors, 0 warnings, 0 info in 2 files; 2 fixes applied"
    assert status == 0


def test_exit_status_follows_the_findings_that_remain(tmp_path):
    # a finding without a fix (an undefined level) stays and decides the status
    info = all_rules()["restricted-open-shell"].info
    only_rule(tmp_path, "restricted-open-shell")
    write(tmp_path / "x.deck", info.bad_example + "state other { geometry = cn level = nowhere }\n")
    status, out = cli("check", "--fix", str(tmp_path / "x.deck"))
    assert status == 1
    assert out.splitlines()[-1] == "1 error, 0 warnings, 0 info in 1 file; 1 fix applied"


# -- --diff --------------------------------------------------------------------

def test_diff_writes_nothing_and_reports_the_files_as_they_are(tmp_path):
    info = all_rules()["restricted-open-shell"].info
    only_rule(tmp_path, "restricted-open-shell")
    deck = tmp_path / "x.deck"
    write(deck, info.bad_example)
    before = deck.read_bytes()
    status, out = cli("check", "--diff", str(deck))
    assert deck.read_bytes() == before
    assert status == 1
    path = str(deck)
    assert out.startswith(
        f"--- {path}\n+++ {path}\n@@ -2,5 +2,5 @@\n"
        "   C 0 0 0\n   N 0 0 1.1718\n }\n"
        "-level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }\n"
        "+level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
        " state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
        f"{path}:5:60: error: restricted-open-shell: "
    )
    assert f"deckward: --diff: 1 fix would be applied to 1 file; nothing was written\n" in out


@pytest.mark.skipif(shutil.which("patch") is None, reason="the `patch` program is not installed")
@pytest.mark.parametrize("variant", sorted(VARIANTS))
def test_diff_applies_with_patch(variant, tmp_path):
    shape = VARIANTS[variant]
    info = all_rules()["restricted-open-shell"].info
    only_rule(tmp_path, "restricted-open-shell")
    write(tmp_path / "one.deck", shape(info.bad_example))
    sub = tmp_path / "sub"
    sub.mkdir()
    write(sub / "two.deck", shape(ODD_BREAKS + info.bad_example + "# trailing comment\n"))
    # the command's whole standard output goes to patch, as a user would pipe it
    env = dict(os.environ, PYTHONIOENCODING="utf-8")
    diff = subprocess.run([sys.executable, "-m", "deckward", "check", "--diff", "."], cwd=tmp_path,
                          capture_output=True, env=env).stdout
    assert b"+++ one.deck" in diff and os.path.join("sub", "two.deck").encode() in diff
    applied = subprocess.run(["patch", "-p0", "--batch"], cwd=tmp_path, input=diff, capture_output=True)
    assert applied.returncode == 0, applied.stdout + applied.stderr
    assert (tmp_path / "one.deck").read_bytes() == shape(info.fixed_example).encode("utf-8")
    assert (sub / "two.deck").read_bytes() == shape(ODD_BREAKS + info.fixed_example + "# trailing comment\n").encode("utf-8")


# -- the write path ------------------------------------------------------------

def fixable_deck(tmp_path, text=None, name="x.deck"):
    info = all_rules()["restricted-open-shell"].info
    only_rule(tmp_path, "restricted-open-shell")
    deck = tmp_path / name
    deck.write_bytes((text if text is not None else info.bad_example).encode("utf-8"))
    return deck, info


def test_crlf_file_stays_crlf_and_keeps_its_permissions(tmp_path):
    deck, info = fixable_deck(tmp_path, text=None)
    deck.write_bytes(info.bad_example.replace("\n", "\r\n").encode())
    os.chmod(deck, 0o640)
    cli("check", "--fix", str(deck))
    assert deck.read_bytes() == info.fixed_example.replace("\n", "\r\n").encode()
    assert stat.S_IMODE(os.stat(deck).st_mode) == 0o640
    assert [p.name for p in tmp_path.iterdir() if p.name.endswith(".tmp")] == []


def test_read_only_file_is_refused_and_untouched(tmp_path):
    deck, info = fixable_deck(tmp_path)
    os.chmod(deck, 0o444)
    before = deck.read_bytes()
    status, out = cli("check", "--fix", str(deck))
    assert deck.read_bytes() == before
    assert f"deckward: refused to write {deck}: it is read-only" in out.splitlines()
    assert out.splitlines()[-1] == "1 error, 0 warnings, 0 info in 1 file"
    assert status == 1


def test_file_changed_during_the_run_is_refused_and_untouched(tmp_path, monkeypatch):
    deck, info = fixable_deck(tmp_path)
    edited = info.bad_example + "# saved by an editor meanwhile\n"
    real = Project.analyse
    calls = []

    def check_and_meddle(self, *a, **k):
        calls.append(1)
        if len(calls) == 1:  # another program saves the file while deckward works
            deck.write_bytes(edited.encode())
        return real(self, *a, **k)

    monkeypatch.setattr(Project, "analyse", check_and_meddle)
    status, out = cli("check", "--fix", str(deck))
    assert deck.read_bytes() == edited.encode()
    assert f"deckward: refused to write {deck}: it changed on disk while being fixed" in out.splitlines()
    assert status == 1


def test_invalid_utf8_is_refused_and_untouched(tmp_path):
    deck, info = fixable_deck(tmp_path)
    data = b"# caf\xe9 (latin-1)\n" + info.bad_example.encode()
    deck.write_bytes(data)
    status, out = cli("check", "--fix", str(deck))
    assert deck.read_bytes() == data
    assert f"deckward: refused to fix {deck}: it is not valid UTF-8 (byte 0xe9 at offset 5)" in out.splitlines()
    assert status == 1


def test_result_that_would_not_parse_is_refused(tmp_path, monkeypatch):
    # the loop already skips such fixes; this is the last guard before writing
    deck, info = fixable_deck(tmp_path)
    before = deck.read_bytes()
    real = fixing.fix_text

    def broken(*a, **k):
        out = real(*a, **k)
        return type(out)(out.text.replace("}", "", 1), out.applied, out.findings, out.skipped, out.settled)

    monkeypatch.setattr(fixing, "fix_text", broken)
    status, out = cli("check", "--fix", str(deck))
    assert deck.read_bytes() == before
    assert f"deckward: refused to write {deck}: the fixed text would not parse" in out.splitlines()


def test_refusal_reaches_standard_error_with_json_output(tmp_path, capsys):
    deck, info = fixable_deck(tmp_path)
    os.chmod(deck, 0o444)
    status, out = cli("check", "--fix", "--format", "json", str(deck))
    assert json.loads(out)["summary"]["fixes_applied"] == 0
    assert capsys.readouterr().err == f"deckward: refused to write {deck}: it is read-only\n"


# -- use files -----------------------------------------------------------------

SHARED_LEVEL = "level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }\n"
USER_DECK = (
    'use "shared.deck"\n'
    "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
    "level own { method = hf basis = aug-cc-pvdz reference = restricted }\n"
    "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
    "state own_radical { geometry = cn level = own charge = 0 multiplicity = 2 }\n"
)


def test_fix_edits_only_the_file_of_its_finding(tmp_path):
    only_rule(tmp_path, "restricted-open-shell")
    write(tmp_path / "shared.deck", SHARED_LEVEL)
    write(tmp_path / "user.deck", USER_DECK)
    status, out = cli("check", "--fix", str(tmp_path / "user.deck"))
    # the finding in user.deck is fixed there; the one in the used file is
    # reported against that file and the file is left alone
    assert (tmp_path / "user.deck").read_text(encoding="utf-8") == USER_DECK.replace(
        "level own { method = hf basis = aug-cc-pvdz reference = restricted }",
        "level own { method = hf basis = aug-cc-pvdz reference = unrestricted }")
    assert (tmp_path / "shared.deck").read_text(encoding="utf-8") == SHARED_LEVEL
    lines = out.splitlines()
    assert lines[0].startswith(f"{tmp_path / 'shared.deck'}:1:60: error: restricted-open-shell: ")
    assert lines[-1] == "1 error, 0 warnings, 0 info in 1 file; 1 fix applied"


def test_diff_goes_to_standard_output_when_the_report_goes_to_a_file(tmp_path):
    deck, info = fixable_deck(tmp_path)
    report = tmp_path / "report.txt"
    status, out = cli("check", "--diff", "-o", str(report), str(deck))
    assert out.startswith(f"--- {deck}\n+++ {deck}\n@@ -2,5 +2,5 @@\n")
    assert report.read_text(encoding="utf-8").splitlines()[-1] == "1 error, 0 warnings, 0 info in 1 file"
    assert deck.read_text(encoding="utf-8") == info.bad_example


def test_fixing_through_a_symbolic_link_keeps_the_link(tmp_path):
    deck, info = fixable_deck(tmp_path, name="real.deck")
    link = tmp_path / "link.deck"
    link.symlink_to(deck.name)
    cli("check", "--fix", str(link))
    assert link.is_symlink()
    assert deck.read_text(encoding="utf-8") == info.fixed_example


def test_fix_never_breaks_a_deck_that_uses_the_file(tmp_path):
    # checked alone, shared.deck's level looks unused; removing it (a risky
    # fix) would leave user.deck's reference undefined, so it is skipped,
    # while the method's spelling is still corrected
    # (shared.deck has a state of its own, so it is a deck, not a library file)
    shared_rest = ("level atom_lv { method = hf basis = sto-3g }\ngeometry h { H 0 0 0 }\n"
                   "state h_atom { geometry = h level = atom_lv charge = 0 multiplicity = 2 }\n")
    write(tmp_path / "shared.deck", "level hf_adz { method = hff basis = aug-cc-pvdz reference = unrestricted }\n"
          + shared_rest)
    write(tmp_path / "user.deck", 'use "shared.deck"\ngeometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n'
          "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n")
    lines = ["rules:"] + [f"  {r.id}: off" for r in CATALOGUE if r.id not in ("unused-definition", "unknown-method")]
    (tmp_path / "deckward.yaml").write_text("\n".join(lines) + "\n", encoding="utf-8")
    status, out = cli("check", "--fix-risky", str(tmp_path))
    assert (tmp_path / "shared.deck").read_text(encoding="utf-8") == (
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n" + shared_rest)
    shared = tmp_path / "shared.deck"
    note, last = out.splitlines()[1:]
    assert note.startswith(f'deckward: {shared}: line 1: fix "')
    assert note.endswith('" of unused-definition was not applied: it would cause undefined-name in user.deck')
    assert last == "0 errors, 0 warnings, 1 info in 2 files; 1 fix applied"
