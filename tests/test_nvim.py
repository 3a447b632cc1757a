"""A real editor: headless Neovim opens a deck with deckward attached, and
the test reads the diagnostics Neovim itself received and stored."""
from __future__ import annotations

import json
import os
import shutil
import subprocess
from importlib import resources

import pytest

from lsp_support import SERVER_COMMAND, write_workspace

pytestmark = pytest.mark.editor  # drives an installed program headless

NVIM = shutil.which("nvim")

DECK = """\
# Electron affinity of the cyano radical: first screening pass (é, 😀)
geometry cn {
  C  0.0  0.0  0.0
  N  0.0  0.0  1.1718
}
level hf_adz { method = hf  basis = aug-cc-pvdz  reference = restricted }
state radical { geometry = cn  level = hf_adz  charge = 0  multiplicity = 2 }
state anion { geometry = cn  level = hf_adzz  charge = -1  multiplicity = 1 }  # é 😀
"""


@pytest.mark.skipif(NVIM is None, reason="nvim is not installed (apt-get install neovim); CI installs it")
def test_neovim_receives_the_diagnostics(tmp_path):
    work = tmp_path / "work"
    write_workspace(work, {"cn.deck": DECK})
    home = tmp_path / "home"
    env = dict(os.environ, DECKWARD_LSP_CMD=json.dumps(SERVER_COMMAND))
    for var in ("XDG_CONFIG_HOME", "XDG_DATA_HOME", "XDG_STATE_HOME", "XDG_CACHE_HOME"):
        env[var] = str(home / var.lower())
    init = resources.files("deckward.server.lsp").joinpath("nvim_test_init.lua")
    proc = subprocess.run(
        [NVIM, "--headless", "-n", "-i", "NONE", "-u", str(init), "-c", "lua Dump()", "-c", "cquit 3", "cn.deck"],
        cwd=work, env=env, stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=60)
    assert proc.returncode == 0, proc.stderr
    result = json.loads(proc.stdout.strip().splitlines()[-1])
    assert result["ok"] is True
    got = sorted((d["code"], d["lnum"], d["col"], d["end_col"], d["severity"], d["source"], d["message"])
                 for d in result["diagnostics"])
    # Neovim stores byte columns; these lines are ASCII before the findings.
    assert got == [
        ("restricted-open-shell", 5, 61, 71, 1, "deckward",
         "state `radical` has multiplicity 2 (open shell) but level `hf_adz` sets reference = restricted"),
        ("undefined-name", 7, 37, 44, 1, "deckward", "no level is named `hf_adzz`; did you mean `hf_adz`?"),
    ]
