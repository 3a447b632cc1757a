"""A real editor: headless Emacs (eglot with editors/emacs/deckward.el)
opens a deck, and the test reads the diagnostics flymake received from
deckward's server."""
from __future__ import annotations

import json
import os
import shutil
import subprocess

import pytest

from lsp_support import SERVER_COMMAND, write_workspace

EMACS = shutil.which("emacs")
EL_DIR = os.path.join(os.path.dirname(__file__), "..", "editors", "emacs")
DRIVER = os.path.join(os.path.dirname(__file__), "emacs_eglot.el")


def _has_eglot() -> bool:
    if EMACS is None:
        return False
    probe = subprocess.run([EMACS, "--batch", "-q", "--eval",
                            "(progn (require 'package) (package-initialize) (require 'eglot))"],
                           capture_output=True, text=True, timeout=60)
    return probe.returncode == 0


pytestmark = [pytest.mark.editor, pytest.mark.skipif(not _has_eglot(), reason="emacs with eglot is not installed "
                                "(apt-get install emacs-nox elpa-eglot, or Emacs 29); CI installs them")]

DECK = """\
# The cyano radical and its anion, first pass.
geometry cn {
  C  0.0  0.0  0.0
  N  0.0  0.0  1.1718
}
level hf_adz { method = hf  basis = aug-cc-pvdz  reference = restricted }
state radical { geometry = cn  level = hf_adz  charge = 0  multiplicity = 2 }
state anion { geometry = cn  level = hf_adzz  charge = -1  multiplicity = 1 }
"""


def run_emacs(tmp_path, files, opened, second=None):
    work = tmp_path / "work"
    write_workspace(work, files)
    home = tmp_path / "home"
    home.mkdir()
    env = dict(os.environ, HOME=str(home), DECKWARD_LSP_CMD=json.dumps(SERVER_COMMAND), DECKWARD_EL_DIR=EL_DIR)
    if second:
        env["DECKWARD_SECOND_DECK"] = second
    proc = subprocess.run(
        [EMACS, "--batch", "-q", "-l", DRIVER, "--eval", f'(deck-test-run "{opened}")'],
        cwd=work, env=env, stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr[-3000:]
    return work, json.loads(proc.stdout.strip().splitlines()[-1])


def test_eglot_receives_the_diagnostics(tmp_path):
    work, result = run_emacs(tmp_path, {"decks/cn.deck": DECK, "other/no2.deck": "use \"../decks/cn.deck\"\n"},
                             "decks/cn.deck", second="other/no2.deck")
    assert result["mode"] == "deck-mode"
    assert result["managed"] is True
    # The folder holding deckward.yaml is the project, not decks/.
    assert os.path.realpath(result["root"]) == os.path.realpath(work)
    # A second deck of the workspace joins the same server.
    assert (result["servers"], result["same_server"]) == (1, True)
    got = [(d["line"], d["col"], d["end_col"], d["type"], d["text"]) for d in result["diagnostics"]]
    assert [(line, col, end, kind) for line, col, end, kind, _ in got] == [
        (6, 61, 71, "eglot-error"),
        (8, 37, 44, "eglot-error"),
    ]
    # eglot shows the source and the rule id before the message.
    assert [text for *_, text in got] == [
        "deckward [restricted-open-shell]: state `radical` has multiplicity 2 (open shell) but level `hf_adz` "
        "sets reference = restricted",
        "deckward [undefined-name]: no level is named `hf_adzz`; did you mean `hf_adz`?",
    ]


def test_deck_mode_highlights_keywords_keys_basis_words_numbers_and_comments(tmp_path):
    _, result = run_emacs(tmp_path, {"cn.deck": DECK}, "cn.deck")
    assert result["faces"] == {
        "keyword": "font-lock-keyword-face",
        "comment": "font-lock-comment-delimiter-face",
        "key": "font-lock-variable-name-face",
        "basis": "font-lock-constant-face",
        "number": "font-lock-constant-face",
    }
