"""Rules about electrons, charge, multiplicity, references, methods and
names (category `electrons`)."""
