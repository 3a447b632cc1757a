"""unknown-method: a method word that is not in the method table."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.knowledge import methods
from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace

INFO = RuleInfo(
    id="unknown-method",
    severity=Severity.WARNING,
    category="electrons",
    title="A method that is not in the method table",
    why=(
        "deckward knows what a method is (Hartree-Fock, a density functional and its rung, a "
        "correlated wavefunction method) from its method table, and the rules about orbital "
        "energies, correlation and basis size depend on that. A word outside the table is either "
        "misspelt or a method deckward cannot judge or run; those rules then stay silent about it. "
        "Methods of the trade that deckward recognises without handling them (CASSCF, CASPT2, "
        "NEVPT2, EOM-CCSD, GW, ...) are reported for information, with no suggestion."
    ),
    references=(
        "Q. Sun et al., J. Chem. Phys. 153, 024109 (2020): the PySCF methods the runner builds",  # from memory
    ),
    bad_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level dft_dz { method = b3lpy basis = aug-cc-pvdz }\n"
    ),
    fires_at="b3lpy",
    good_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level dft_dz { method = b3lyp basis = aug-cc-pvdz }\n"
    ),
    fix=Applicability.RISKY,
    fix_note=(
        "Replaces the word with the closest method name. Risky: a similar spelling can be a "
        "different method (ccsdt is not ccsd)."
    ),
    fixed_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level dft_dz { method = b3lyp basis = aug-cc-pvdz }\n"
    ),
)


def _method_words(deck):
    for level in deck.levels:
        if level.settings.method is not None:
            yield level.settings.method, f"level `{level.name.value}`"
    for state in deck.states:
        if state.overrides.method is not None:
            yield state.overrides.method, f"state `{state.name.value}`"


def _or_list(names: list[str]) -> str:
    quoted = [f"`{n}`" for n in names]
    return quoted[0] if len(quoted) == 1 else ", ".join(quoted[:-1]) + " or " + quoted[-1]


def check(ctx: Context):
    for pf in ctx.workspace.files:
        for word, where in _method_words(pf.deck):
            if methods.lookup(word.value) is not None:
                continue
            what = methods.recognised_only(word.value)
            if what is not None:
                yield ctx.finding(
                    word.span,
                    f"`{word.value}` in {where} is {what}, which deckward recognises but cannot judge or run: the "
                    f"rules about orbital energies, correlation and basis size stay silent about it, and `deckward "
                    f"run` cannot compute it",
                    severity=Severity.INFO,
                )
                continue
            close = methods.closest(word.value, n=3)
            hint = f"; did you mean {_or_list(close)}?" if close else ""
            yield ctx.finding(
                word.span,
                f"`{word.value}` in {where} is not in the method table{hint}",
                fixes=tuple(fix(f"Use `{c}`", replace(word.span, c), risky=True) for c in close),
            )
