"""The PySCF layer above the static rules: the runner, the probes, basis
ladders and the comparison of computed values with measured ones.  PySCF
is imported inside functions only; nothing on the typing path imports this
package at module level."""
