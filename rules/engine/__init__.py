"""The engine: the rule registry, the checker that runs the catalogue on a
workspace, suppressions, configuration and the project around a deck.
The checker is ``deckward.rules.engine.checker``; this package imports
nothing at start."""
