"""Output formats of ``deckward check``, by name."""
from __future__ import annotations

import importlib

FORMATS = {
    "text": "deckward.server.format_text",
    "json": "deckward.server.format_json",
    "sarif": "deckward.server.format_sarif",
    "markdown": "deckward.server.format_markdown",
}


def available() -> list[str]:
    import importlib.util

    return [name for name, mod in FORMATS.items() if importlib.util.find_spec(mod) is not None]


def renderer(name: str):
    return importlib.import_module(FORMATS[name]).render
