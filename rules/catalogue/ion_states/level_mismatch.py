"""level-mismatch: an energy difference of states computed at different levels."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, Related, RuleInfo, Severity

from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix
from .derives import energy_states
from .wording import level_differences, level_label, span_text
from deckward.rules.fixes.state_text import StateEditor
from .._examples import CN_RADICAL

_HEAD = CN_RADICAL
_DERIVE = "derive ea = energy(radical) - energy(anion) in ev\n"

INFO = RuleInfo(
    id="level-mismatch",
    severity=Severity.WARNING,
    category="ion-states",
    title="Energy difference across different levels of theory",
    why=(
        "A total energy carries an error of hundreds of kJ/mol that depends on the method, the basis "
        "set and whether core electrons are correlated; an energy difference is only meaningful "
        "because that error is nearly the same for both states and cancels. Two states at different "
        "methods, basis sets or frozen-core settings do not share the error, and the difference "
        "measures mostly the change of level (common practice, no threshold involved). The "
        "reference (restricted or unrestricted) may differ: open- and closed-shell states of one "
        "calculation need different ones."
    ),
    references=(
        "F. Jensen, Introduction to Computational Chemistry, 3rd ed. (Wiley 2017), on error "
        "cancellation in energy differences",  # from memory
        "J. C. Rienstra-Kiracofe et al., Chem. Rev. 102, 231-282 (2002) (electron affinities as "
        "differences of energies at one level of theory)",
    ),
    bad_example=_HEAD
    + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 basis = cc-pvdz }\n"
    + _DERIVE,
    fires_at="cc-pvdz",
    good_example=_HEAD
    + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 reference = restricted }\n"
    + _DERIVE,
    fix=Applicability.RISKY,
    fix_note=(
        "Points the second state at the first state's level and makes its method, basis and "
        "frozen_core overrides match the first's (removing the ones the first does not write). "
        "Risky: the cost and the number change."
    ),
    fixed_example=_HEAD
    + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
    + _DERIVE,
)

_KEYS = ("method", "basis", "frozen_core")


def _unresolved(rs) -> bool:
    return rs.state.level is not None and rs.level is None


def _token(rs, keys):
    """The text a user would change in ``rs``: a differing override, else
    its level word, else its name."""
    for key in keys:
        value = getattr(rs.state.overrides, key)
        if value is not None:
            return value.span
    return rs.state.level.span if rs.state.level is not None else rs.state.name.span


def _fix(ws, first, other):
    pf = ws.file(other.path)
    if pf is None:
        return None
    editor = StateEditor(pf.index, other.state)
    if first.state.level is not None:
        editor.set("level", first.state.level.value)
    else:
        editor.remove("level")
    for key in _KEYS:
        source = getattr(first.state.overrides, key)
        if source is not None:
            editor.set(key, span_text(ws, source.span))
        else:
            editor.remove(key)
    edits = editor.edits()
    if not edits:
        return None
    return fix(f"Compute `{other.name}` at the level of `{first.name}`", *edits, risky=True)


def check(ctx: Context):
    ws = ctx.workspace
    seen = set()
    for derive in ws.derives:
        states = energy_states(ws, derive)
        if len(states) < 2 or _unresolved(states[0]):
            continue
        first = states[0]
        for other in states[1:]:
            if _unresolved(other) or (first.name, other.name) in seen:
                continue
            differences = level_differences(ws, first, other)
            if not differences:
                continue
            seen.add((first.name, other.name))
            fx = _fix(ws, first, other)
            yield ctx.finding(
                _token(other, [k for k, _ in differences]),
                f"the energy difference `{derive.name.value}` combines `{other.name}` at {level_label(ws, other)} "
                f"and `{first.name}` at {level_label(ws, first)} ({'; '.join(w for _, w in differences)}): "
                f"errors cancel in a difference only when both states are computed the same way",
                related=(Related(first.state.name.span, f"`{first.name}` is computed at {level_label(ws, first)}"),),
                fixes=(fx,) if fx else (),
            )
