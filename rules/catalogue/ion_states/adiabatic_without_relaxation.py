"""adiabatic-without-relaxation: an adiabatic difference with a state not relaxed."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace
from .derives import QUANTITY_NOUN, energy_states, kind_derives

_HEAD = (
    'study "cn-screening" { goal = electron_affinity kind = adiabatic }\n'
    "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
    "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    "state radical { geometry = optimize(cn) level = hf_adz charge = 0 multiplicity = 2 }\n"
)
_DERIVE = "derive ea = energy(radical) - energy(anion) in ev\n"

INFO = RuleInfo(
    id="adiabatic-without-relaxation",
    severity=Severity.WARNING,
    category="ion-states",
    title="Adiabatic energy difference with a state that is not relaxed",
    why=(
        "An adiabatic ionization energy or electron affinity compares each state at its own "
        "equilibrium structure. A state left at a fixed input geometry is not at its minimum (the ion "
        "rarely shares the neutral's bond lengths), so the difference mixes vertical and adiabatic "
        "parts. A single atom has nothing to relax and is not reported. If a fixed geometry was "
        "already relaxed elsewhere at this level, suppress the finding with that reason."
    ),
    references=(
        "J. C. Rienstra-Kiracofe, G. S. Tschumper, H. F. Schaefer III, S. Nandi, G. B. Ellison, "
        "Chem. Rev. 102, 231-282 (2002) (adiabatic electron affinity: both species at their own "
        "equilibrium geometries)",
    ),
    bad_example=_HEAD
    + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
    + _DERIVE,
    fires_at="cn",
    good_example=_HEAD
    + "state anion { geometry = optimize(cn) level = hf_adz charge = -1 multiplicity = 1 }\n"
    + _DERIVE,
    fix=Applicability.RISKY,
    fix_note="Wraps the geometry in optimize(...). Risky: it adds a geometry optimisation.",
    fixed_example=_HEAD
    + "state anion { geometry = optimize(cn) level = hf_adz charge = -1 multiplicity = 1 }\n"
    + _DERIVE,
)


def _atoms(geometry) -> int:
    return sum(1 for a in geometry.atoms if not a.ghost)


def check(ctx: Context):
    ws = ctx.workspace
    seen = set()
    for derive, quantity in kind_derives(ws, "adiabatic"):
        for rs in energy_states(ws, derive):
            ref = rs.state.geometry
            if ref is None or ref.optimize or rs.name in seen:
                continue
            if rs.geometry is None or _atoms(rs.geometry) <= 1:
                continue  # an atom has no structure to relax
            seen.add(rs.name)
            name = ref.name.value
            yield ctx.finding(
                ref.span,
                f"the study asks for adiabatic energies, but `{rs.name}` stays at the fixed geometry `{name}` "
                f"in `{derive.name.value}`: an adiabatic {QUANTITY_NOUN[quantity]} takes each state at its own "
                f"relaxed structure",
                fixes=(fix(f"Relax `{rs.name}`: optimize({name})", replace(ref.span, f"optimize({name})"), risky=True),),
            )
