"""docs/editors.md shows the editor set-ups that editors/ ships and the
editor tests run, so the two cannot drift apart."""
from __future__ import annotations

import json
import os
import re
import tomllib

ROOT = os.path.join(os.path.dirname(__file__), "..")


def read(rel):
    with open(os.path.join(ROOT, rel), encoding="utf-8") as f:
        return f.read()


def blocks(lang):
    return re.findall(rf"```{lang}\n(.*?)```", read("docs/editors.md"), re.DOTALL)


def code_lines(text, comment):
    return [ln.strip() for ln in text.splitlines() if ln.strip() and not ln.strip().startswith(comment)]


def test_the_neovim_08_snippet_is_the_shipped_file():
    snippet = next(b for b in blocks("lua") if "vim.lsp.start(" in b)
    shipped = [ln.split(" --")[0].strip() for ln in code_lines(read("editors/neovim/deckward.lua"), "--")]
    assert [ln.split(" --")[0].strip() for ln in code_lines(snippet, "--")] == [
        ln for ln in shipped if not ln.startswith(("local group", "group = group"))]


def test_the_neovim_07_snippet_loads_the_shipped_file():
    assert any('dofile("/path/to/deckward/editors/neovim/deckward-0.7.lua")' in b for b in blocks("lua"))


def test_the_emacs_snippet_loads_deckward_el_and_eglot():
    (snippet,) = blocks("elisp")
    assert "(require 'deckward)" in snippet and "(add-hook 'deck-mode-hook #'eglot-ensure)" in snippet
    el = read("editors/emacs/deckward.el")
    assert "(provide 'deckward)" in el and "(defcustom deckward-server-command" in el


def test_the_helix_languages_toml_is_valid_and_starts_the_server():
    (snippet,) = blocks("toml")
    config = tomllib.loads(snippet)
    assert config["language-server"]["deckward"] == {"command": "deckward", "args": ["serve"]}
    (language,) = config["language"]
    assert (language["name"], language["file-types"], language["language-servers"]) == ("deck", ["deck"], ["deckward"])
    assert language["roots"] == ["deckward.yaml", ".git"]


def test_the_vscode_setting_named_in_the_docs_exists():
    manifest = json.loads(read("editors/vscode/package.json"))
    settings = manifest["contributes"]["configuration"]["properties"]
    assert '"deckward.server.command"' in read("docs/editors.md") and "deckward.server.command" in settings
    assert settings["deckward.server.command"]["default"] == ["deckward", "serve"]
