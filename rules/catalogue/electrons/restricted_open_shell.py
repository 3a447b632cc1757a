"""restricted-open-shell: a restricted reference on an open-shell state."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace

INFO = RuleInfo(
    id="restricted-open-shell",
    severity=Severity.ERROR,
    category="electrons",
    title="Restricted reference for an open-shell state",
    why=(
        "A restricted (closed-shell) reference puts electrons in pairs; a state with multiplicity "
        "above 1 has unpaired electrons and cannot be described that way. Programs either stop or "
        "silently compute a different state. Use an unrestricted reference (or restricted_open, "
        "which keeps doubly occupied orbitals spatially identical)."
    ),
    references=(
        "A. Szabo, N. S. Ostlund, Modern Quantum Chemistry (Dover 1996), sections 3.8 "
        "(unrestricted open-shell Hartree-Fock)",  # from memory
    ),
    bad_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }\n"
        "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
    ),
    fires_at="restricted",
    good_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
        "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
    ),
    fix=Applicability.SAFE,
    fix_note="Sets the reference to unrestricted where it is written (state or level).",
    fixed_example=(
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
        "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
    ),
)


def check(ctx: Context):
    for rs in ctx.workspace.states.values():
        ref = rs.settings.reference
        mult = rs.multiplicity
        if ref is None or ref.value != "restricted" or mult is None or mult <= 1:
            continue
        where = "the state" if rs.state.overrides.reference is ref else f"level `{rs.level.name.value}`"
        yield ctx.finding(
            ref.span,
            f"state `{rs.name}` has multiplicity {mult} (open shell) but {where} sets reference = restricted",
            fixes=(
                fix("Use an unrestricted reference", replace(ref.span, "unrestricted")),
                fix("Use a restricted open-shell reference", replace(ref.span, "restricted_open")),
            ),
        )
