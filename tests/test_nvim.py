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


NVIM_VERSION = None
if NVIM:
    _out = subprocess.run([NVIM, "--version"], capture_output=True, text=True).stdout.split()
    NVIM_VERSION = tuple(int(p) for p in _out[1].lstrip("v").split(".")[:2]) if len(_out) > 1 else None
EDITORS = os.path.join(os.path.dirname(__file__), "..", "editors", "neovim")
SHARED = """\
geometry cn {
  C  0.0  0.0  0.0
  N  0.0  0.0  1.1718
}
level hf_adz { method = hf  basis = aug-cc-pvdz  reference = restricted }
"""
MAIN = """\
# The anion at a level the shared file does not define yet.
use "shared.deck"
state anion { geometry = cn  level = hf_atz  charge = -1  multiplicity = 1 }
"""
ADDED = "level hf_atz { method = hf  basis = aug-cc-pvtz  reference = restricted }"


def run_workspace_config(tmp_path, config):
    """Open sub/main.deck of a git-like workspace with ``config``, then add
    ``ADDED`` to sub/shared.deck without saving it."""
    work = tmp_path / "work"
    write_workspace(work, {"sub/main.deck": MAIN, "sub/shared.deck": SHARED})
    (work / ".git").mkdir()
    home = tmp_path / "home"
    env = dict(os.environ, DECKWARD_LSP_CMD=json.dumps(SERVER_COMMAND), DECKWARD_ADDED_LINE=ADDED,
               DECKWARD_NVIM_CONFIG=os.path.join(EDITORS, config))
    for var in ("XDG_CONFIG_HOME", "XDG_DATA_HOME", "XDG_STATE_HOME", "XDG_CACHE_HOME"):
        env[var] = str(home / var.lower())
    driver = os.path.join(os.path.dirname(__file__), "nvim_workspace.lua")
    proc = subprocess.run(
        [NVIM, "--headless", "-n", "-i", "NONE", "-u", driver, "-c", "lua Run()", "-c", "cquit 3", "main.deck"],
        cwd=work / "sub", env=env, stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=90)
    assert proc.returncode == 0, proc.stderr
    return json.loads(proc.stdout.strip().splitlines()[-1])


def assert_one_client_sees_the_unsaved_edit(result):
    assert result["ok"] is True
    # .deck is the deck file type (Debian's 0.7 would guess `conf`).
    assert result["filetypes"] == ["deck", "deck"]
    # One server for the workspace: both buffers attached to the same client.
    assert result["clients"] == 1
    assert result["main_clients"] == result["shared_clients"] and len(result["main_clients"]) == 1
    assert [(d["code"], d["lnum"], d["col"], d["end_col"], d["message"]) for d in result["before"]] == [
        ("undefined-name", 2, 37, 43, "no level is named `hf_atz`; did you mean `hf_adz`?"),
    ]
    # The used file is changed but not saved, and the deck that uses it knows.
    assert result["shared_modified"] is True
    assert result["after"] == []


@pytest.mark.skipif(NVIM is None, reason="nvim is not installed (apt-get install neovim); CI installs it")
def test_neovim_07_config_one_client_per_workspace(tmp_path):
    assert_one_client_sees_the_unsaved_edit(run_workspace_config(tmp_path, "deckward-0.7.lua"))


@pytest.mark.skipif(NVIM is None or NVIM_VERSION is None or NVIM_VERSION < (0, 8),
                    reason=f"the 0.8+ config needs Neovim 0.8 or later (installed: {NVIM_VERSION})")
def test_neovim_08_config_one_client_per_workspace(tmp_path):
    assert_one_client_sees_the_unsaved_edit(run_workspace_config(tmp_path, "deckward.lua"))


@pytest.mark.skipif(NVIM is None, reason="nvim is not installed (apt-get install neovim); CI installs it")
@pytest.mark.parametrize("config", ["deckward.lua", "deckward-0.7.lua"])
def test_neovim_configs_compile(config, tmp_path):
    """Both files are valid Lua for Neovim's LuaJIT, whichever version runs."""
    path = os.path.join(EDITORS, config)
    proc = subprocess.run(
        [NVIM, "--headless", "-n", "-i", "NONE", "-u", "NONE",
         "-c", f"lua local f, err = loadfile({json.dumps(path)}); if not f then io.stderr:write(err); vim.cmd('cquit 1') end",
         "-c", "qa!"],
        env=dict(os.environ, XDG_STATE_HOME=str(tmp_path), XDG_CACHE_HOME=str(tmp_path), XDG_DATA_HOME=str(tmp_path)),
        stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=30)
    assert proc.returncode == 0, proc.stderr
