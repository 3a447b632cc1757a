"""frequencies-not-stationary: harmonic frequencies at a geometry not optimised at the state's level."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace
from deckward.rules.catalogue.ion_states.derives import energy_states, kind_derives
from deckward.rules.catalogue.ion_states.wording import level_label
from deckward.rules.fixes.state_text import StateEditor

_CN = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
_LEVEL = "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"


def _radical(geometry: str) -> str:
    return (
        f"state radical {{ geometry = {geometry} level = hf_adz charge = 0 multiplicity = 2 "
        "frequencies = true }\n"
    )


INFO = RuleInfo(
    id="frequencies-not-stationary",
    severity=Severity.WARNING,
    category="geometry",
    title="Harmonic frequencies at a geometry that is not a stationary point of the level",
    why=(
        "The harmonic approximation expands the energy around a stationary point, where the "
        "gradient vanishes. At any other geometry the second derivatives mix with the remaining "
        "gradient: frequencies shift, some become imaginary, and the zero-point energy built from "
        "them is wrong. A stationary point of one level is not one of another, so coordinates taken "
        "from elsewhere (another method, another basis, experiment, the neutral's structure for an "
        "ion) need optimize(...) at the state's own level before frequencies = true means anything."
    ),
    references=(
        "E. B. Wilson, J. C. Decius, P. C. Cross, Molecular Vibrations (McGraw-Hill 1955) (normal "
        "modes about an equilibrium structure)",  # from memory
        "F. Jensen, Introduction to Computational Chemistry, 3rd ed. (Wiley 2017), chapter on "
        "optimisation and vibrational frequencies",  # from memory
    ),
    bad_example=_CN + _LEVEL + _radical("cn"),
    fires_at="cn",
    good_example=_CN + _LEVEL + _radical("optimize(cn)"),
    fix=Applicability.RISKY,
    fix_note=(
        "Wraps the geometry in optimize(...), so the state is relaxed at its own level first; a second "
        "fix drops frequencies = true instead (for a vertical ion, whose fixed geometry is the point). "
        "Risky: both change what is computed."
    ),
    fixed_example=_CN + _LEVEL + _radical("optimize(cn)"),
)


def _adiabatic_states(ws) -> set[str]:
    """States adiabatic-without-relaxation already reports (the same mistake)."""
    out: set[str] = set()
    for derive, _ in kind_derives(ws, "adiabatic"):
        out.update(rs.name for rs in energy_states(ws, derive))
    return out


def check(ctx: Context):
    ws = ctx.workspace
    reported_elsewhere = _adiabatic_states(ws)
    for rs in ws.states.values():
        freq = rs.state.frequencies
        ref = rs.state.geometry
        if freq is None or not freq.value or ref is None or ref.optimize or rs.geometry is None:
            continue
        if sum(1 for a in rs.geometry.atoms if not a.ghost) <= 1:
            continue  # an atom has no vibrations
        if rs.name in reported_elsewhere:
            continue
        name = ref.name.value
        pf = ws.file(rs.path)
        editor = StateEditor(pf.index, rs.state)
        editor.remove("frequencies")
        yield ctx.finding(
            ref.span,
            f"state `{rs.name}` asks for frequencies = true at the fixed geometry `{name}`, which is not "
            f"optimised at {level_label(ws, rs)}: harmonic frequencies and the zero-point energy need a "
            f"stationary point of the state's own level; use optimize({name}) (or, if these coordinates "
            f"were optimised at exactly this level, say so with an allow comment)",
            fixes=(
                fix(f"Relax `{rs.name}` first: optimize({name})", replace(ref.span, f"optimize({name})"), risky=True),
                fix(f"Drop frequencies = true from `{rs.name}`", *editor.edits(), risky=True),
            ),
        )
