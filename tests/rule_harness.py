"""Helpers for tests: check a deck text with some or all rules."""
from __future__ import annotations

import os
import tempfile

from deckward.grammar.resolve import Loader, resolve
from deckward.rules.engine.checker import check_workspace


def check_text(text: str, select=None, name: str = "deck.deck", files: dict | None = None):
    """Findings for ``text`` written as ``name`` in a fresh workspace (with
    ``files`` beside it); returns (findings, workspace)."""
    # The loader keeps every text it read, so the folder can go once the deck is checked.
    with tempfile.TemporaryDirectory(prefix="deckward-test-") as folder:
        for rel, content in (files or {}).items():
            full = os.path.join(folder, rel)
            os.makedirs(os.path.dirname(full), exist_ok=True)
            with open(full, "w", encoding="utf-8") as f:
                f.write(content)
        path = os.path.join(folder, name)
        with open(path, "w", encoding="utf-8", newline="") as f:
            f.write(text)
        ws = resolve(path, Loader(), folder)
        return check_workspace(ws, select=select), ws


def covered(finding, text: str) -> str:
    return text[finding.span.start : finding.span.end]
