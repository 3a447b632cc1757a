"""`deckward check` as a user runs it: output lines, JSON, exit status."""
import json
import os
import subprocess
import sys

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def run(*args, cwd=ROOT):
    return subprocess.run([sys.executable, "-m", "deckward", *args], capture_output=True, text=True, cwd=cwd)


def test_examples_have_findings_and_exit_1():
    proc = run("check", "examples/")
    assert proc.returncode == 1
    lines = proc.stdout.splitlines()
    assert lines[-1].endswith("in 8 files (1 suppressed)")
    assert "examples/no2_typos.deck:5:14: error: syntax-error: the level block opened on line 5 is not closed: " \
           "expected `}` before `state` on line 10" in lines
    # sorted by file, then position
    keyed = [(ln.split(":")[0], int(ln.split(":")[1]), int(ln.split(":")[2])) for ln in lines[:-1]]
    assert keyed == sorted(keyed)
    # the clean examples have no findings
    for clean in ("cn_ea_hf.deck", "no2_ea_mp2.deck", "hco2_ie_hf.deck"):
        assert not [ln for ln in lines if ln.startswith(f"examples/{clean}:")], clean


def test_missing_path_exits_2_with_one_line():
    proc = run("check", "missing/")
    assert proc.returncode == 2
    assert proc.stdout == ""
    assert proc.stderr == "deckward: error: missing/: no such file or folder\n"


def test_bad_option_exits_2_with_one_line():
    proc = run("check", "examples/", "--fail-on", "sometimes")
    assert proc.returncode == 2
    assert len(proc.stderr.strip().splitlines()) == 1


def test_json_output(tmp_path):
    deck = tmp_path / "oh.deck"
    deck.write_text("geometry oh {\n  O 0 0 0\n  H 0 0 0.9697\n}\n"
                    "state radical { geometry = oh method = hf basis = aug-cc-pvdz charge = 0 multiplicity = 2 "
                    "reference = restricted }\n")
    proc = run("check", str(deck), "--format", "json")
    assert proc.returncode == 1
    doc = json.loads(proc.stdout)
    assert doc["version"] == 1
    assert doc["summary"] == {"files": 1, "errors": 1, "warnings": 0, "infos": 0, "suppressed": 0,
                              "fixes_applied": 0}
    (f,) = doc["findings"]
    assert {k: f[k] for k in ("rule", "severity", "line", "column", "end_line", "end_column")} == {
        "rule": "restricted-open-shell", "severity": "error", "line": 5, "column": 103, "end_line": 5,
        "end_column": 113}
    assert f["path"] == str(deck)
    assert [x["title"] for x in f["fixes"]] == ["Use an unrestricted reference",
                                                "Use a restricted open-shell reference"]
    assert f["fixes"][0]["edits"][0]["new_text"] == "unrestricted"
    assert [x["safety"] for x in f["fixes"]] == ["safe", "safe"]


def test_fail_on_levels(tmp_path):
    deck = tmp_path / "x.deck"
    # an info-only deck: a geometry nobody uses
    deck.write_text("geometry spare {\n  O 0 0 0\n}\nstate s { geometry = spare method = hf basis = cc-pvdz "
                    "charge = -2 multiplicity = 1 }\ngeometry unused {\n  O 0 0 0\n}\n")
    (tmp_path / "deckward.yaml").write_text("rules:\n  anion-lacks-diffuse: off\n")
    assert run("check", str(deck)).returncode == 0
    assert run("check", str(deck), "--fail-on", "info").returncode == 1
    assert run("check", str(deck), "--fail-on", "never").returncode == 0


def test_config_severity_and_validation(tmp_path):
    (tmp_path / "d.deck").write_text("geometry g {\n  O 0 0 0\n}\nstate s { geometry = g method = hf basis = cc-pvdz "
                                     "charge = 0 multiplicity = 3 reference = restricted }\n")
    (tmp_path / "deckward.yaml").write_text("rules:\n  restricted-open-shell: warning\n  koopmans-ea: error\n"
                                            "  unused-definition: sometimes\nexclud: []\n")
    proc = run("check", str(tmp_path), "--fail-on", "error")
    out = proc.stdout.splitlines()
    cfg = str(tmp_path / "deckward.yaml")
    assert [ln for ln in out if "invalid-config" in ln] == [
        f"{cfg}:3:3: error: invalid-config: unknown rule `koopmans-ea`; did you mean `koopmans-ip`?",
        f"{cfg}:4:22: error: invalid-config: `sometimes` is not a severity (error | warning | info | off)",
        f"{cfg}:5:1: error: invalid-config: unknown key `exclud` (keys: rules, exclude, probe, run); "
        "did you mean `exclude`?",
    ]
    assert any(": warning: restricted-open-shell:" in ln for ln in out)
    assert proc.returncode == 1  # the configuration errors


def test_exclude_from_config(tmp_path):
    (tmp_path / "scratch").mkdir()
    (tmp_path / "scratch" / "bad.deck").write_text("geometry {\n")
    (tmp_path / "ok.deck").write_text("# nothing yet\n")
    (tmp_path / "deckward.yaml").write_text('exclude:\n  - "scratch/**"\n')
    proc = run("check", str(tmp_path))
    assert proc.returncode == 0, proc.stdout
    assert proc.stdout.splitlines()[-1] == "0 errors, 0 warnings, 0 info in 1 file"


def test_version_and_module_entry_point():
    assert run("--version").stdout.strip().startswith("deckward ")
    proc = subprocess.run(["deckward", "--version"], capture_output=True, text=True)
    assert proc.returncode == 0 and proc.stdout.startswith("deckward ")


def test_check_reads_a_deck_from_standard_input(tmp_path):
    text = ("geometry h { H 0 0 0 }\n"
            "level l { method = hf basis = cc-pvdz reference = restricted }\n"
            "state s { geometry = h level = l charge = 0 multiplicity = 2 }\n")
    proc = subprocess.run([sys.executable, "-m", "deckward", "check", "-", "--stdin-name", "probe/h.deck"],
                          input=text, capture_output=True, text=True, cwd=tmp_path)
    assert (proc.returncode, proc.stdout.splitlines()) == (1, [
        "probe/h.deck:2:51: error: restricted-open-shell: state `s` has multiplicity 2 (open shell) but level "
        "`l` sets reference = restricted",
        "1 error, 0 warnings, 0 info in 1 file"])
    assert not (tmp_path / "probe").exists()  # nothing is written
    refused = subprocess.run([sys.executable, "-m", "deckward", "check", "-", "--fix"],
                             input=text, capture_output=True, text=True, cwd=tmp_path)
    assert (refused.returncode, refused.stderr) == (
        2, "deckward: error: --fix, --fix-risky and --diff need files: standard input cannot be written back\n")


def test_explain_takes_several_rules_and_names_every_unknown_one():
    both = run("explain", "koopmans-ip", "restricted-open-shell")
    assert both.returncode == 0
    heads = [ln for ln in both.stdout.splitlines() if ln.startswith(("koopmans-ip (", "restricted-open-shell ("))]
    assert heads == ["koopmans-ip (info): Ionization energy from the Hartree-Fock HOMO energy (Koopmans' theorem)",
                     "restricted-open-shell (error): Restricted reference for an open-shell state"]
    wrong = run("explain", "koopmans-ipp", "restricted-open-shell", "nothing-like-it")
    assert (wrong.returncode, wrong.stdout) == (2, "")
    assert wrong.stderr == ("deckward: error: no rules are named `koopmans-ipp` (did you mean `koopmans-ip`?), "
                            "`nothing-like-it` (`deckward rules` lists them)\n")


def test_rules_listing_says_when_a_rule_escalates():
    line = [ln for ln in run("rules").stdout.splitlines() if ln.strip().startswith("anion-lacks-diffuse ")][0]
    assert line.split()[1] == "warning"
    assert line.endswith("(error when an electron affinity depends on the anion)")
