"""The rule catalogue: one rule a module, discovered by the registry."""
