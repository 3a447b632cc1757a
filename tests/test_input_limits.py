"""Limits on what a deck can make deckward do: each one passed gives a
located finding or message and an exit status, never a RecursionError, a
hang or unbounded memory."""
from __future__ import annotations

import random

import pytest

from deckward.grammar import build, resolve as resolution
from deckward.grammar.suggest import edit_distance
from deckward.grammar.formatter import format_text
from deckward.grammar.text_index import LineIndex
from deckward.server.cli import main
from rule_harness import check_text

NEGATED = "derive x = " + "-" * 1000 + "1 in ev\n"


def test_a_thousand_unary_minus_signs_are_a_located_finding(tmp_path, capsys):
    findings, _ = check_text(NEGATED)
    assert [(f.rule, f.span.line, f.span.column, f.message) for f in findings] == [
        ("syntax-error", 1, 12, "the expression is nested more than 200 levels deep")]
    assert format_text(NEGATED) is None
    deck = tmp_path / "neg.deck"
    deck.write_text(NEGATED)
    assert main(["format", str(deck)]) == 1
    out = capsys.readouterr()
    assert out.err == (f"{deck}:1:12: the expression is nested more than 200 levels deep "
                       "(not formatted: fix the syntax error first)\n")
    assert out.out == "0 files laid out anew, 0 already canonical, 1 left as they were (see above)\n"
    assert deck.read_text() == NEGATED


def test_an_expression_at_the_depth_limit_is_still_formatted():
    text = "derive x = " + "-" * 198 + "1 in ev\n"
    findings, _ = check_text(text, select={"syntax-error"})
    assert findings == []
    assert format_text(text) == text


def test_a_chain_of_1200_used_files_stops_at_the_depth_limit(tmp_path):
    files = {f"f{i}.deck": f'use "f{i + 1}.deck"\n' for i in range(1199)}
    files["f1199.deck"] = "geometry g {\n  H 0 0 0\n}\n"
    findings, ws = check_text(files.pop("f0.deck"), name="f0.deck", files=files)
    assert [(f.rule, f.span.path.rsplit("/", 1)[1], f.span.line, f.span.column, f.message) for f in findings] == [
        ("use-outside-workspace", "f64.deck", 1, 5,
         "`f65.deck` is not loaded: `use` is nested more than 64 files deep here")]
    assert len(ws.files) == 65


def test_more_used_files_than_the_limit_are_not_loaded(tmp_path, monkeypatch):
    monkeypatch.setattr(resolution, "MAX_USE_FILES", 3)
    files = {f"u{i}.deck": f"geometry g{i} {{\n  H 0 0 0\n}}\n" for i in range(6)}
    text = "".join(f'use "u{i}.deck"\n' for i in range(6))
    findings, ws = check_text(text, select={"use-outside-workspace"}, files=files)
    assert [(f.span.line, f.message) for f in findings] == [
        (line, f"`u{line - 1}.deck` is not loaded: the deck already uses 3 files") for line in (4, 5, 6)]
    assert len(ws.files) == 4  # the deck and three it uses


def test_names_past_the_limit_are_reported_once_and_not_read(monkeypatch):
    monkeypatch.setattr(resolution, "MAX_NAMES_PER_FILE", 3)
    text = "".join(f"geometry g{i} {{\n  H 0 0 0\n}}\n" for i in range(5))
    text += "state s { geometry = g4 method = hf basis = sto-3g }\n"
    findings, ws = check_text(text, select={"syntax-error", "undefined-name", "duplicate-name"})
    assert [(f.rule, f.span.line, f.message) for f in findings] == [
        ("syntax-error", 10, "the file defines more than 3 names; this one and the rest are not read")]
    assert sorted(ws.definitions) == ["g0", "g1", "g2"]


def test_atoms_past_the_limit_are_reported_once_and_not_read(monkeypatch):
    monkeypatch.setattr(build, "MAX_ATOMS_PER_GEOMETRY", 4)
    text = "geometry big {\n" + "".join(f"  H 0 0 {1.5 * i}\n" for i in range(7)) + "}\n"
    findings, ws = check_text(text, select={"syntax-error"})
    assert [(f.span.line, f.span.column, f.message) for f in findings] == [
        (6, 3, "geometry `big` has more than 4 atoms; this one and the rest are not read")]
    assert len(ws.root.deck.geometries[0].atoms) == 4


def test_a_file_past_the_size_limit_is_read_only_to_it(monkeypatch):
    monkeypatch.setattr(resolution, "MAX_FILE_BYTES", 64)
    text = "geometry g {\n  H 0 0 0\n  H 0 0 0.74\n}\n" + "# padding\n" * 20
    findings, _ = check_text(text, select={"syntax-error"})
    assert [(f.span.line, f.span.column, f.message) for f in findings] == [
        (1, 1, "the file is larger than 0 MB; only the start was read")]


def test_did_you_mean_is_offered_for_the_first_hundred_undefined_names_only():
    text = "".join(f"geometry g{i:03d} {{\n  H 0 0 0\n}}\n" for i in range(150))
    text += "".join(f"state s{i} {{ geometry = h{i:03d} method = hf basis = sto-3g }}\n" for i in range(150))
    findings, _ = check_text(text, select={"undefined-name"})
    assert len(findings) == 150
    assert findings[0].message == "no geometry is named `h000`; did you mean `g000`?"
    assert sum("did you mean" in f.message for f in findings) == 100
    assert findings[149].message == "no geometry is named `h149`"


def test_deeply_nested_configuration_is_a_located_message(tmp_path, capsys):
    (tmp_path / "deckward.yaml").write_text("rules: " + "[" * 5000 + "]" * 5000 + "\n")
    (tmp_path / "a.deck").write_text("geometry g {\n  H 0 0 0\n}\n")
    assert main(["check", str(tmp_path / "a.deck"), "--fail-on", "error"]) == 1
    out = capsys.readouterr().out
    assert out.splitlines()[0].endswith(
        "deckward.yaml:1:39: error: invalid-config: not valid YAML: collections nested more than 32 levels deep")


def test_deeply_indented_configuration_is_a_located_message(tmp_path):
    from deckward.rules.engine.config import load_config

    text = "rules:\n" + "".join("  " * i + f"k{i}:\n" for i in range(1, 3000))
    (tmp_path / "deckward.yaml").write_text(text)
    cfg = load_config(str(tmp_path / "deckward.yaml"), set())
    [f] = cfg.findings
    assert (f.rule, f.span.line, f.message) == (
        "invalid-config", 32, "not valid YAML: collections nested more than 32 levels deep")


@pytest.mark.parametrize("seed", range(5))
def test_bounded_edit_distance_agrees_with_the_full_one(seed):
    rng = random.Random(seed)
    for _ in range(300):
        a = "".join(rng.choice("abc") for _ in range(rng.randint(0, 7)))
        b = "".join(rng.choice("abc") for _ in range(rng.randint(0, 7)))
        full = edit_distance(a, b)
        for limit in (1, 2, 3):
            assert edit_distance(a, b, limit) == min(full, limit + 1), (a, b, limit)


def test_spans_agree_with_positions():
    text = "ab\r\ncd\n\nefg\nh"
    index = LineIndex(text, "p")
    for start in range(-2, len(text) + 3):
        for end in range(start - 1, len(text) + 3):
            s = index.span(start, end)
            lo = max(0, min(start, len(text)))
            hi = max(lo, min(end, len(text)))
            assert (s.start, s.end) == (lo, hi)
            assert (s.line, s.column) == index.position(lo)
            assert (s.end_line, s.end_column) == index.position(hi)
