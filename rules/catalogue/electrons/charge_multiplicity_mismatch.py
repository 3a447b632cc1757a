"""charge-multiplicity-mismatch: electron count and multiplicity disagree."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.knowledge import deck_facts
from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace

INFO = RuleInfo(
    id="charge-multiplicity-mismatch",
    severity=Severity.ERROR,
    category="electrons",
    title="Charge and multiplicity do not fit the electron count",
    why=(
        "A state has N = (sum of the nuclear charges) - charge electrons; ghost atoms carry basis "
        "functions but no nucleus, so they add none. The multiplicity M = 2S + 1 counts unpaired "
        "electrons: M - 1 of them. So M - 1 must have the same parity as N (an even electron count "
        "gives an odd multiplicity: singlet, triplet; an odd count gives doublet, quartet) and can "
        "be at most N. A wrong pair cannot be built: programs stop, or the charge was meant "
        "differently (the anion of NO2 has 24 electrons, so it is a singlet or a triplet, never a "
        "doublet)."
    ),
    references=(
        "IUPAC Compendium of Chemical Terminology (Gold Book), entry 'multiplicity' "
        "(spin multiplicity 2S + 1)",  # from memory
        "A. Szabo, N. S. Ostlund, Modern Quantum Chemistry (Dover 1996), section 2.4 "
        "(spin-adapted configurations)",  # from memory
    ),
    bad_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
        "state anion { geometry = no2 charge = -1 multiplicity = 2 }\n"
    ),
    fires_at="2",
    good_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
        "state anion { geometry = no2 charge = -1 multiplicity = 1 }\n"
    ),
    fix=Applicability.RISKY,
    fix_note=(
        "Sets the nearest multiplicity that fits the electron count (the lower one when two are "
        "equally near). Risky: the charge may be what is wrong, and a different multiplicity is a "
        "different state."
    ),
    fixed_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
        "state anion { geometry = no2 charge = -1 multiplicity = 1 }\n"
    ),
)


def _electrons(n: int) -> str:
    return f"{n} electron" if abs(n) == 1 else f"{n} electrons"


def _charge(q: int) -> str:
    return f"{q:+d}" if q else "0"


def consistent_multiplicities(electrons: int, multiplicity: int) -> list[int]:
    """Multiplicities that fit ``electrons``, nearest to ``multiplicity``
    first (the lower one first on a tie); empty when N < 0."""
    if electrons < 0:
        return []
    if multiplicity - 1 > electrons:
        return [electrons + 1]
    out = [c for c in (multiplicity - 1, multiplicity + 1) if c >= 1 and c - 1 <= electrons]
    return out


def check(ctx: Context):
    for rs in ctx.workspace.states.values():
        geometry = rs.geometry
        if geometry is None or not geometry.atoms:
            continue
        nuclei = deck_facts.nuclear_charge(geometry)
        if nuclei is None:  # an unknown element: unknown-element reports it
            continue
        n = nuclei - rs.charge
        mult = rs.state.multiplicity
        ghosts = ", whose ghost atoms add none" if any(a.ghost for a in geometry.atoms) else ""
        origin = (
            f"{nuclei} from the nuclei of `{geometry.name.value}`{ghosts}, charge {_charge(rs.charge)}"
        )
        if n < 0:
            where = rs.state.charge.span if rs.state.charge is not None else rs.state.name.span
            yield ctx.finding(
                where,
                f"state `{rs.name}` would have {_electrons(n)} ({origin}): "
                f"the charge exceeds the nuclear charge",
            )
            continue
        if mult is None:
            continue  # the lowest consistent multiplicity is used
        m_value = mult.value
        if m_value < 1:
            continue  # invalid-value already
        if m_value - 1 > n:
            message = (
                f"state `{rs.name}` has {_electrons(n)} ({origin}), so at most {n} can be unpaired "
                f"and its multiplicity can be at most {n + 1}; {m_value} is too high"
            )
        elif (m_value - 1) % 2 != n % 2:
            need, have = ("odd", "even") if n % 2 == 0 else ("even", "odd")
            message = (
                f"state `{rs.name}` has {_electrons(n)} ({origin}), so its multiplicity must be "
                f"{need}; {m_value} is {have}"
            )
        else:
            continue
        yield ctx.finding(
            mult.span,
            message,
            fixes=tuple(
                fix(f"Set multiplicity = {c}", replace(mult.span, str(c)), risky=True)
                for c in consistent_multiplicities(n, m_value)
            ),
        )
