"""What ``deckward run``, ``probe``, ``check --probe`` and ``review --probe``
say before and while they compute: error findings stop a run (exit 2, each
listed), warnings are printed first, nothing to do is said in one line with
a non-zero exit, and probe calculations show the runner's progress lines."""
from __future__ import annotations

import os
import re

import pytest

from runner_helpers import write_deck

from deckward.server.cli import main

# F atom: 9 electrons, so a singlet is impossible (fact of the trade).
BAD = ("geometry f { F 0 0 0 }\nlevel lv { method = hf basis = cc-pvdzz }\n"
       "state neutral { geometry = f level = lv charge = 0 multiplicity = 1 }\n")


def test_run_refuses_a_deck_with_error_findings_and_lists_them(tmp_path, capsys):
    deck = write_deck(tmp_path, BAD)
    assert main(["run", deck, "--quiet", "--cache-dir", str(tmp_path / "c")]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    lines = captured.err.splitlines()
    assert [re.sub(r":\d+:\d+: ", ": ", ln).split(": ")[1:3] for ln in lines[:2]] == [
        ["error", "unknown-basis"], ["error", "charge-multiplicity-mismatch"]]
    assert lines[0].startswith(f"{deck}:2:32: error: unknown-basis: `cc-pvdzz` in level `lv` is neither")
    assert lines[1] == (f"{deck}:3:67: error: charge-multiplicity-mismatch: state `neutral` has 9 electrons (9 from "
                        "the nuclei of `f`, charge 0), so its multiplicity must be even; 1 is odd")
    assert lines[2:] == ["deckward: the deck has 2 errors and cannot be run (see `deckward check`)"]


@pytest.mark.pyscf
def test_run_prints_the_warnings_check_gives_before_computing(tmp_path, capsys):
    # Water with coordinates in bohr but no units line (O-H 0.9572 A =
    # 1.8088 bohr; geometry from the NIST CCCBDB experimental structure,
    # from memory): units-suspect is a warning, the run still goes on.
    text = ("geometry w {\n  O 0 0 0.2217\n  H 0 1.4309 -0.8867\n  H 0 -1.4309 -0.8867\n}\n"
            "level lv { method = hf basis = sto-3g }\n"
            "state n { geometry = w level = lv charge = 0 multiplicity = 1 }\n")
    deck = write_deck(tmp_path, text)
    assert main(["run", deck, "--quiet", "--cache-dir", str(tmp_path / "c")]) == 0
    captured = capsys.readouterr()
    err = captured.err.splitlines()
    assert err[0].startswith(f"{deck}:1:10: warning: units-suspect: geometry `w` with no units line")
    assert err[-1] == "deckward: 1 warning (see `deckward check`); running anyway"
    assert "converged" in captured.out


def test_nothing_to_run_and_nothing_to_check(tmp_path, capsys):
    deck = write_deck(tmp_path, "geometry f { F 0 0 0 }\n", "lib.deck")
    assert main(["run", deck]) == 2
    assert capsys.readouterr().err == (f"deckward: nothing to run: {deck} has no state "
                                       "(a state block says what to compute)\n")
    assert main(["probe", deck]) == 2
    assert capsys.readouterr().err == f"deckward: error: nothing to probe: no deck in {deck} has a state\n"
    empty = tmp_path / "empty"
    empty.mkdir()
    for command in (["check"], ["probe"], ["review"]):
        assert main(command + [str(empty)]) == 2
        assert capsys.readouterr().err == f"deckward: error: nothing to check: no deck files (*.deck) in {empty}\n"


C_DECK = ("geometry c { C 0 0 0 }\nlevel lv { method = hf basis = 6-31g* }\n"
          "state neutral { geometry = c level = lv charge = 0 multiplicity = 3 }\n"
          "state anion { geometry = c level = lv charge = -1 multiplicity = 4 }\n"
          "derive ea = energy(neutral) - energy(anion) in ev\n")


@pytest.mark.pyscf
def test_probes_show_progress_on_stderr(tmp_path, monkeypatch, capsys):
    # The same lines as `deckward run` prints (standard error is not a
    # terminal here): one when a calculation starts, one when it ends.
    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(tmp_path / "cache"))
    deck = write_deck(tmp_path, C_DECK)
    main(["probe", deck])
    err = capsys.readouterr().err.splitlines()
    assert err[0] == "[0/1 done] deck.deck: HF/6-31g* neutral: running (state 1 of 1)"
    assert re.fullmatch(r"\[1/1\] deck\.deck: HF/6-31g\* neutral: done in \d+\.\d s", err[1])
    assert "[3/4 done] deck.deck: HF/6-31+g* anion: running (state 4 of 4)" in err
    assert main(["probe", deck, "--quiet"]) == 1
    assert capsys.readouterr().err == ""
    # check --probe and review --probe: the same display, from the cache now.
    main(["check", "--probe", deck])
    assert capsys.readouterr().err.splitlines()[:2] == ["[1/1] deck.deck: HF/6-31g* neutral: cached",
                                                        "[2/2] deck.deck: HF/6-31g* anion: cached"]
    main(["review", "--probe", "--no-cache", deck, "--out", os.path.join(str(tmp_path), "r.html")])
    err = capsys.readouterr().err.splitlines()
    assert err[0] == "[1/1] deck.deck: HF/6-31g* neutral: cached"
    assert err[-1] == f"deckward: wrote the review of 1 deck to {os.path.join(str(tmp_path), 'r.html')}"
