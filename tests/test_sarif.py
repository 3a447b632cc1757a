"""SARIF output: valid against the published 2.1.0 schema, with rules,
locations, fixes and suppressions where the spec puts them."""
from __future__ import annotations

import hashlib
import json
import os

import pytest
from jsonschema import Draft4Validator

from deck_batch import write_batch
from deckward.server.cli import main

# The published OASIS schema, vendored unmodified beside the tests (see its README).
SCHEMA = os.path.join(os.path.dirname(os.path.abspath(__file__)), "data", "sarif", "sarif-schema-2.1.0.json")
# sha256 of the OASIS file (tests/data/sarif/README.md): the copy must stay byte-identical.
SCHEMA_SHA256 = "c3b4bb2d6093897483348925aaa73af03b3e3f4bd4ca38cef26dcb4212a2682e"


def load_schema() -> dict:
    with open(SCHEMA, "rb") as f:
        raw = f.read()
    assert hashlib.sha256(raw).hexdigest() == SCHEMA_SHA256, "the vendored SARIF schema was modified"
    return json.loads(raw)


@pytest.fixture()
def sarif(tmp_path, monkeypatch, capsys):
    write_batch(str(tmp_path / "batch"))
    monkeypatch.chdir(tmp_path)
    status = main(["check", "batch", "--format", "sarif", "--no-cache"])
    out = capsys.readouterr().out
    assert status == 1
    return json.loads(out)


def results_by(log: dict) -> dict:
    return {(r["ruleId"], r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]): r
            for r in log["runs"][0]["results"]}


def test_output_validates_against_the_published_schema(sarif):
    schema = load_schema()
    Draft4Validator.check_schema(schema)
    errors = sorted(Draft4Validator(schema, format_checker=Draft4Validator.FORMAT_CHECKER).iter_errors(sarif),
                    key=lambda e: list(e.path))
    assert errors == [], [f"{list(e.path)}: {e.message}" for e in errors[:5]]
    assert sarif["version"] == "2.1.0"


def test_schema_rejects_a_broken_log(sarif):
    """The validation is real: a 0-based line (LSP style) is rejected."""
    broken = json.loads(json.dumps(sarif))
    broken["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["region"]["startLine"] = 0
    assert list(Draft4Validator(load_schema()).iter_errors(broken))


def test_results_have_exact_locations(sarif):
    run = sarif["runs"][0]
    assert run["columnKind"] == "unicodeCodePoints"
    got = sorted((r["ruleId"], r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"],
                  r["locations"][0]["physicalLocation"]["region"]["startLine"],
                  r["locations"][0]["physicalLocation"]["region"]["startColumn"], r["level"])
                 for r in run["results"])
    assert got == [
        ("restricted-open-shell", "batch/cn_restricted.deck", 6, 60, "error"),
        ("restricted-open-shell", "batch/hco2_allowed.deck", 8, 60, "error"),
        ("restricted-open-shell", "batch/o2_restricted.deck", 7, 86, "error"),
        ("syntax-error", "batch/cn_broken.deck", 2, 13, "error"),
        ("undefined-name", "batch/no2_typos.deck", 8, 40, "error"),
        ("unknown-key", "batch/no2_typos.deck", 9, 57, "error"),
    ]
    region = results_by(sarif)[("undefined-name", "batch/no2_typos.deck")]["locations"][0]["physicalLocation"]["region"]
    assert (region["endLine"], region["endColumn"]) == (8, 45)  # `hf_az` is 5 characters


def test_rules_carry_title_rationale_help_and_level(sarif):
    from deckward.rules.engine.registry import get

    driver = sarif["runs"][0]["tool"]["driver"]
    assert driver["name"] == "deckward"
    rules = {r["id"]: r for r in driver["rules"]}
    info = get("restricted-open-shell").info
    r = rules["restricted-open-shell"]
    assert r["shortDescription"]["text"] == info.title
    assert r["fullDescription"]["text"] == info.why
    assert info.why in r["help"]["text"] and info.references[0] in r["help"]["markdown"]
    assert r["helpUri"].endswith("#restricted-open-shell")
    assert r["defaultConfiguration"]["level"] == "error"
    for result in sarif["runs"][0]["results"]:
        assert driver["rules"][result["ruleIndex"]]["id"] == result["ruleId"]


def test_fixes_are_replacements(sarif):
    result = results_by(sarif)[("restricted-open-shell", "batch/cn_restricted.deck")]
    first = result["fixes"][0]
    assert first["description"]["text"] == "Use an unrestricted reference"
    assert first["properties"] == {"safety": "safe"}
    change = first["artifactChanges"][0]
    assert change["artifactLocation"]["uri"] == "batch/cn_restricted.deck"
    (rep,) = change["replacements"]
    assert rep["insertedContent"]["text"] == "unrestricted"
    region = rep["deletedRegion"]
    assert (region["startLine"], region["startColumn"], region["endLine"], region["endColumn"]) == (6, 60, 6, 70)
    with open("batch/cn_restricted.deck", encoding="utf-8") as f:
        line = f.read().split("\n")[5]
    assert line[59:69] == "restricted"


def test_suppressed_finding_is_marked_with_its_reason(sarif):
    result = results_by(sarif)[("restricted-open-shell", "batch/hco2_allowed.deck")]
    assert result["suppressions"] == [
        {"kind": "inSource", "status": "accepted", "justification": "compared with the unrestricted run"}]
    others = [r for r in sarif["runs"][0]["results"] if r is not result]
    assert all("suppressions" not in r for r in others)


def test_paths_are_percent_encoded(tmp_path, monkeypatch, capsys):
    write_batch(str(tmp_path / "my batch"), {"no2 #1.deck": "state s { chrge = 0 }\n"})
    monkeypatch.chdir(tmp_path)
    main(["check", "my batch", "--format", "sarif", "--no-cache", "--fail-on", "never"])
    log = json.loads(capsys.readouterr().out)
    uris = {r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"] for r in log["runs"][0]["results"]}
    assert uris == {"my%20batch/no2%20%231.deck"}
    assert not list(Draft4Validator(load_schema()).iter_errors(log))
