"""`deckward check one.deck` imports only what checking one deck needs.

Measured with ``python -X importtime`` (every module a process imports,
whoever imports it); the lists below are the modules that path may load.
Anything else (the formatter, the probes, the parallel checker, the findings
cache, the runner, the language server, YAML without a configuration file)
is paid for by the commands that use it.  Wall time is bench/parse_check.py's
job."""
import importlib.util
import os
import subprocess
import sys
import textwrap

DECK = textwrap.dedent("""\
    study { goal = electron_affinity kind = vertical }
    geometry cn {
      C 0 0 0
      N 0 0 1.1718
    }
    level hf_dz { method = hf basis = cc-pvdz reference = unrestricted }
    state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }
    state anion { geometry = cn level = hf_dz charge = -1 multiplicity = 1 }
    derive ea = energy(radical) - energy(anion) in ev
    """)

# The deckward modules of the single-deck text path.  The rule modules of
# the catalogue are imported by the registry through importlib, which
# -X importtime does not list; they are all allowed.
ALLOWED_DECKWARD = {
    "deckward", "deckward.grammar", "deckward.grammar.build", "deckward.grammar.findings",
    "deckward.grammar.language_rules", "deckward.grammar.model", "deckward.grammar.parser",
    "deckward.grammar.resolve", "deckward.grammar.scanner", "deckward.grammar.text_index",
    "deckward.grammar.derived_cache", "deckward.grammar.deck_parser", "deckward.grammar.records",
    "deckward.grammar.numbers", "deckward.grammar.safe_open", "deckward.grammar.wording",
    "deckward.rules",
    "deckward.rules.knowledge", "deckward.rules.knowledge.basis_families", "deckward.rules.knowledge.basis_library",
    "deckward.rules.knowledge.deck_facts", "deckward.rules.knowledge.elements", "deckward.rules.knowledge.geometry",
    "deckward.rules.knowledge.methods", "deckward.rules.knowledge.reference_data", "deckward.rules.knowledge.units",
    "deckward.rules.engine", "deckward.rules.engine.checker", "deckward.rules.engine.config",
    "deckward.rules.engine.context", "deckward.rules.engine.project", "deckward.rules.engine.registry",
    "deckward.rules.engine.suppressions",
    "deckward.rules.catalogue", "deckward.rules.catalogue._examples", "deckward.rules.catalogue.basis.targets",
    "deckward.rules.catalogue.basis.diffuse", "deckward.rules.catalogue.ion_states.derives",
    "deckward.rules.catalogue.ion_states.species", "deckward.rules.catalogue.ion_states.wording",
    "deckward.rules.catalogue.ion_states.ion_fixes",
    "deckward.rules.fixes", "deckward.rules.fixes.edits", "deckward.rules.fixes.state_text",
    "deckward.server", "deckward.server.checking", "deckward.server.cli", "deckward.server.cmd_check",
    "deckward.server.format_text", "deckward.server.formats", "deckward.server.report_options",
    "deckward.server.scale_options",
}
# Nothing besides the standard library: the parser is Lark's stand-alone
# form of the grammar (grammar/deck_parser.py), so Lark itself (and the
# regular-expression package it tries) is not imported, nor is YAML
# without a configuration file.
ALLOWED_THIRD_PARTY: set = set()
# Standard-library modules that would mean a heavier machinery got in
# (Lark's own package imports tempfile, logging, pickle and threading).
FORBIDDEN_STDLIB = {"concurrent", "multiprocessing", "asyncio", "sqlite3", "importlib.resources", "subprocess",
                    "gzip", "zipfile", "tempfile", "logging", "pickle", "threading", "shutil", "lzma", "bz2",
                    "hashlib"}


def _imported(args, cwd):
    proc = subprocess.run([sys.executable, "-X", "importtime", *args], capture_output=True, text=True, cwd=cwd,
                          env={**os.environ, "DECKWARD_CACHE_DIR": os.path.join(cwd, "cache")})
    names = [ln.split("|")[-1].strip() for ln in proc.stderr.splitlines() if ln.startswith("import time:")]
    return proc, [n for n in names if n and n != "package"]


def test_single_deck_check_imports_only_its_path(tmp_path):
    deck = tmp_path / "cn.deck"
    deck.write_text(DECK)
    _, baseline = _imported(["-c", "pass"], str(tmp_path))
    proc, names = _imported(["-m", "deckward", "check", str(deck)], str(tmp_path))
    assert proc.returncode == 1, proc.stderr  # the deck has findings: the rules ran
    assert "anion-lacks-diffuse" in proc.stdout
    added = set(names) - set(baseline)
    ours = {n for n in added if n.split(".")[0] == "deckward"}
    assert ours <= ALLOWED_DECKWARD, sorted(ours - ALLOWED_DECKWARD)
    for needed in ("deckward.grammar.parser", "deckward.rules.engine.checker", "deckward.server.checking"):
        assert needed in ours
    others = {n.split(".")[0] for n in added if n.split(".")[0] != "deckward"}
    # -X importtime also lists imports that were tried and failed (optional extras)
    third_party = {n for n in others if n not in sys.stdlib_module_names and not n.startswith("_")
                   and importlib.util.find_spec(n) is not None}
    assert third_party <= ALLOWED_THIRD_PARTY, sorted(third_party - ALLOWED_THIRD_PARTY)
    assert not {n for n in added if n in FORBIDDEN_STDLIB or n.split(".")[0] in FORBIDDEN_STDLIB}, sorted(
        n for n in added if n in FORBIDDEN_STDLIB or n.split(".")[0] in FORBIDDEN_STDLIB)
    assert not os.path.exists(tmp_path / "cache" / "findings")  # one deck: no cache opened


def test_the_findings_cache_still_serves_a_folder(tmp_path):
    for name in ("a.deck", "b.deck"):
        (tmp_path / name).write_text(DECK)
    proc, names = _imported(["-m", "deckward", "check", str(tmp_path)], str(tmp_path))
    assert proc.returncode == 1, proc.stderr
    assert "deckward.server.findings_cache" in names
    assert len(list((tmp_path / "cache" / "findings").rglob("*.json"))) == 2
