"""Helpers for runner and probe tests: write a deck, resolve it, run it
with a private cache folder."""
from __future__ import annotations

import os

from deckward.grammar.resolve import Loader, resolve


def write_deck(folder, text: str, name: str = "deck.deck") -> str:
    path = os.path.join(str(folder), name)
    with open(path, "w", encoding="utf-8") as f:
        f.write(text)
    return path


def workspace(folder, text: str, name: str = "deck.deck"):
    path = write_deck(folder, text, name)
    ws = resolve(path, Loader(), str(folder))
    assert not [f for f in ws.findings if f.severity.value == "error"], ws.findings
    return ws


def run_text(folder, text: str, all_states: bool = False, options=None, cache_dir=None):
    from deckward.rules.compute.runner.cache import RunCache
    from deckward.rules.compute.runner.run import run_workspace

    ws = workspace(folder, text)
    cache = RunCache(str(cache_dir or os.path.join(str(folder), "cache")))
    return run_workspace(ws, cache, options, all_states=all_states)
