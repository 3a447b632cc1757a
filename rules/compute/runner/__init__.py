"""The runner: computes decks with PySCF.

Imported only by `deckward run` (never on the typing path)."""
