"""Chemistry knowledge: elements, units, methods, basis-set data, measured
reference values, geometry searches and the facts of a deck several rules
need.  Computed from libraries and published tables, never typed into a
rule.  Imports nothing else of ``deckward.rules``."""
