"""The language server (pygls 2)."""
