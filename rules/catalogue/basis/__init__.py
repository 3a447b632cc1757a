"""Rules about basis sets (category `basis`), with the facts they share:
which basis each element really gets (`targets`) and the diffuse-function
criterion (`diffuse`)."""
