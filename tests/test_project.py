"""The project around a deck (``deckward.rules.engine.project``): which
deckward.yaml applies and where the workspace ends, the same for the command
line and the language server, including workspaces nested in each other."""
from __future__ import annotations

import io
import json
import os
import time
from contextlib import redirect_stdout

import pytest
from lsprotocol import types as t

from deckward.grammar.findings import Severity
from deckward.rules.engine.project import Projects, find_config_file
from deckward.rules.engine.registry import all_rules
from deckward.server.cli import main
from lsp_support import open_document, session, uri_of, wait_for_diagnostics

LANGUAGE = {"syntax-error", "unknown-key", "duplicate-key", "invalid-value", "undefined-name",
            "duplicate-name", "use-outside-workspace", "internal-error"}


def config_keeping(rule_id: str, severity: str, extra: str = "") -> str:
    """A deckward.yaml that sets ``rule_id`` to ``severity`` and turns every
    other catalogue rule off (new rules must not change these tests)."""
    lines = ["rules:", f"  {rule_id}: {severity}"]
    lines += [f"  {rid}: off" for rid in sorted(all_rules()) if rid != rule_id and rid not in LANGUAGE]
    return "\n".join(lines) + "\n" + extra


GEOMETRY = "geometry cn {\n  C  0.0  0.0  0.0\n  N  0.0  0.0  1.1718\n}\n"  # demo geometry
SHARED = "level hf_r { method = hf  basis = aug-cc-pvdz  reference = restricted }\n"
RADICAL = "state radical { geometry = cn  level = hf_r  charge = 0  multiplicity = 2 }\n"


@pytest.fixture
def nested(tmp_path):
    """outer/ (restricted-open-shell an error) holding inner/ (the same rule
    as info, and drafts excluded); inner/a.deck uses a file just outside its
    own workspace, which outer's decks may use."""
    outer = tmp_path / "outer"
    files = {
        "deckward.yaml": config_keeping("restricted-open-shell", "error"),
        "shared.deck": SHARED,
        "b.deck": 'use "shared.deck"\n' + GEOMETRY + RADICAL,
        "inner/deckward.yaml": config_keeping("restricted-open-shell", "info", 'exclude:\n  - "drafts/**"\n'),
        "inner/a.deck": 'use "../shared.deck"\n' + GEOMETRY + RADICAL,
        "inner/c.deck": GEOMETRY + SHARED + RADICAL,
        "inner/drafts/half.deck": "state half {\n",
    }
    for rel, text in files.items():
        path = outer / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")
    return outer


def cli_findings(*argv) -> dict[str, list[tuple]]:
    """``deckward check --format json ARGV``: per absolute path, (rule,
    severity, 0-based start line and column, end line and column, message)."""
    buf = io.StringIO()
    with redirect_stdout(buf):
        main(["check", "--format", "json", *argv])
    out: dict[str, list[tuple]] = {}
    for f in json.loads(buf.getvalue())["findings"]:
        out.setdefault(os.path.abspath(f["path"]), []).append(
            (f["rule"], f["severity"], f["line"] - 1, f["column"] - 1, f["end_line"] - 1, f["end_column"] - 1,
             f["message"]))
    return {k: sorted(v) for k, v in out.items()}


LSP_SEVERITY = {t.DiagnosticSeverity.Error: "error", t.DiagnosticSeverity.Warning: "warning",
                t.DiagnosticSeverity.Information: "info", t.DiagnosticSeverity.Hint: "info"}


def lsp_brief(diagnostics) -> list[tuple]:
    return sorted((d.code, LSP_SEVERITY[d.severity], d.range.start.line, d.range.start.character,
                   d.range.end.line, d.range.end.character, d.message) for d in diagnostics)


def test_each_deck_belongs_to_its_nearest_configuration(nested):
    found = cli_findings(str(nested))
    a, c, shared = (str(nested / p) for p in ("inner/a.deck", "inner/c.deck", "shared.deck"))
    # inner/a.deck may not reach ../shared.deck: its workspace is inner/, so
    # the level it names is undefined there (checking outer/ does not change that)
    assert found[a] == [
        ("undefined-name", "error", 5, 39, 5, 43, "no level is named `hf_r`"),
        ("use-outside-workspace", "error", 0, 4, 0, 20, "`../shared.deck` is outside the workspace root inner/"),
    ]
    # the same mistake is an error under outer's configuration (b.deck's,
    # reported where the reference is set) and info under inner's (c.deck)
    why = "state `radical` has multiplicity 2 (open shell) but level `hf_r` sets reference = restricted"
    assert found[shared] == [("restricted-open-shell", "error", 0, 59, 0, 69, why)]
    assert found[c] == [("restricted-open-shell", "info", 4, 59, 4, 69, why)]
    # inner's exclude pattern applies to inner's decks when outer/ is checked
    assert set(found) == {a, c, shared}


def test_checking_one_deck_alone_gives_the_same_findings(nested):
    whole = cli_findings(str(nested))
    for rel in ("inner/a.deck", "inner/c.deck", "b.deck"):
        alone = cli_findings(str(nested / rel))
        assert alone == {path: whole[path] for path in alone}, rel
    assert cli_findings(str(nested / "b.deck")) == {str(nested / "shared.deck"): whole[str(nested / "shared.deck")]}


async def test_editor_and_command_line_agree_in_nested_workspaces(nested):
    expected = cli_findings(str(nested))
    async with session(nested) as client:  # the editor's workspace folder is outer/
        for rel in ("inner/a.deck", "inner/c.deck", "b.deck", "shared.deck"):
            uri = uri_of(nested, rel)
            open_document(client, uri, (nested / rel).read_text(encoding="utf-8"))
            diagnostics = await wait_for_diagnostics(client, uri, 1)
            # shared.deck opened on its own has no state: nothing to say about it
            cli = [] if rel == "shared.deck" else expected.get(str(nested / rel), [])
            assert lsp_brief(diagnostics) == cli, rel


def test_root_is_the_nearest_configuration_else_the_anchor(tmp_path):
    (tmp_path / "ws" / "sub").mkdir(parents=True)
    (tmp_path / "ws" / "deckward.yaml").write_text("rules: {}\n", encoding="utf-8")
    (tmp_path / "bare" / "sub").mkdir(parents=True)
    deck = str(tmp_path / "ws" / "sub" / "x.deck")
    bare = str(tmp_path / "bare" / "sub" / "y.deck")
    projects = Projects()
    assert projects.for_path(deck).root == os.path.realpath(tmp_path / "ws")
    assert projects.for_path(deck).config_path == find_config_file(deck)
    # no deckward.yaml above: the folder named on the command line ...
    assert projects.for_path(bare, str(tmp_path / "bare")).root == os.path.realpath(tmp_path / "bare")
    # ... else the editor's workspace folder holding the deck ...
    assert Projects(folders=[str(tmp_path / "bare")]).for_path(bare).root == os.path.realpath(tmp_path / "bare")
    # ... else the deck's own folder
    assert projects.for_path(bare).root == os.path.realpath(tmp_path / "bare" / "sub")
    # one project per root, sharing one loader
    assert projects.for_path(deck) is projects.for_path(str(tmp_path / "ws" / "z.deck"))
    assert projects.for_path(deck).loader is projects.for_path(bare).loader


def test_an_explicit_configuration_applies_to_every_deck(tmp_path):
    (tmp_path / "a").mkdir()
    (tmp_path / "a" / "deckward.yaml").write_text("rules: {}\n", encoding="utf-8")
    given = tmp_path / "mine.yaml"
    given.write_text("rules:\n  restricted-open-shell: error\n", encoding="utf-8")
    project = Projects(str(given)).for_path(str(tmp_path / "a" / "x.deck"))
    assert project.root == os.path.realpath(tmp_path)
    assert project.config.severity_for("restricted-open-shell", Severity.WARNING) is Severity.ERROR


def test_live_projects_reread_a_changed_configuration(tmp_path):
    config = tmp_path / "deckward.yaml"
    config.write_text("rules:\n  restricted-open-shell: error\n", encoding="utf-8")
    deck = str(tmp_path / "x.deck")
    live, once = Projects(live=True), Projects()
    assert live.config_for(deck).severity_for("restricted-open-shell", Severity.WARNING) is Severity.ERROR
    assert once.config_for(deck).severity_for("restricted-open-shell", Severity.WARNING) is Severity.ERROR
    time.sleep(0.01)
    config.write_text("rules:\n  restricted-open-shell: off\n", encoding="utf-8")
    os.utime(config, ns=(time.time_ns(), time.time_ns() + 10_000_000))
    assert live.config_for(deck).severity_for("restricted-open-shell", Severity.WARNING) is None
    assert once.config_for(deck).severity_for("restricted-open-shell", Severity.WARNING) is Severity.ERROR


def test_a_broken_configuration_is_reported_once_for_all_its_decks(tmp_path):
    (tmp_path / "deckward.yaml").write_text("rules:\n  restricted-open-shell: eror\n", encoding="utf-8")
    for name in ("a", "b", "c"):
        (tmp_path / f"{name}.deck").write_text(GEOMETRY, encoding="utf-8")
    found = cli_findings(str(tmp_path))
    assert [x[:2] for x in found[os.path.abspath(tmp_path / "deckward.yaml")]] == [("invalid-config", "error")]
