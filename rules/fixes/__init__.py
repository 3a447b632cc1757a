"""Fixes as text edits: building edits, rendering and inserting state
blocks, applying fixes in rounds, and the first deck ``deckward new``
writes.  Uses ``deckward.rules.knowledge`` only."""
