"""deckward: checks, runs and probes calculation decks.

The top-level package holds only the version and ``python -m deckward``; the
work is done in ``deckward.grammar`` (text in, model out), ``deckward.rules``
(model in, findings out) and ``deckward.server`` (findings in, bytes out).
"""

__version__ = "0.1.0"
