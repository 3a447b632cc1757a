"""Probes: cheap PySCF calculations that back findings with numbers.

Imported only on request (never on the typing path)."""
