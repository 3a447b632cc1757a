"""orbital-gap-as-fundamental-gap: a HOMO-LUMO gap reported as the fundamental gap."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity, TextEdit

from deckward.rules.engine.context import Context
from deckward.rules.knowledge.deck_facts import linear_form
from deckward.rules.fixes.edits import fix, replace
from .derives import EA, IE, orbital_method, partner
from .wording import level_label, method_text
from .ion_fixes import ion_state
from .._examples import NO2_GEOMETRY

_HEAD = (
    NO2_GEOMETRY
    + "level b3_adz { method = b3lyp basis = aug-cc-pvdz reference = unrestricted }\n"
    "state neutral { geometry = no2 level = b3_adz charge = 0 multiplicity = 2 }\n"
    "state cation { geometry = no2 level = b3_adz charge = 1 multiplicity = 1 }\n"
    "state anion { geometry = no2 level = b3_adz charge = -1 multiplicity = 1 }\n"
)
_GOOD = _HEAD + "derive gap = energy(cation) + energy(anion) - 2 * energy(neutral) in ev\n"

INFO = RuleInfo(
    id="orbital-gap-as-fundamental-gap",
    severity=Severity.WARNING,
    category="ion-states",
    title="Orbital energy gap reported as the fundamental gap",
    why=(
        "The fundamental gap is IE - EA = E(cation) + E(anion) - 2 E(neutral). The LUMO - HOMO "
        "difference of one calculation is not that number. In Kohn-Sham theory even the exact "
        "functional's orbital gap falls short of it by the derivative discontinuity of the "
        "exchange-correlation potential, and local, semilocal and hybrid functionals underestimate "
        "IE - EA by one to several eV (hybrids by less, through their share of exact exchange). A "
        "Hartree-Fock orbital gap is Koopmans' IE minus Koopmans' EA: no relaxation and no "
        "correlation, with a virtual energy that drifts with the basis, so it is usually far too "
        "large; correlated levels report the orbital energies of their Hartree-Fock reference. "
        "Compute the three states and take the energy differences."
    ),
    references=(
        "J. P. Perdew, M. Levy, Phys. Rev. Lett. 51, 1884 (1983) (the derivative discontinuity)",  # from memory
        "L. J. Sham, M. Schlueter, Phys. Rev. Lett. 51, 1888 (1983)",  # from memory
        "E. J. Baerends, O. V. Gritsenko, R. van Meer, Phys. Chem. Chem. Phys. 15, 16408 (2013) "
        "(Kohn-Sham gap, fundamental gap and optical gap)",  # from memory
        "T. Koopmans, Physica 1, 104-113 (1934), doi:10.1016/S0031-8914(34)90011-2",
    ),
    bad_example=_HEAD + "derive gap = orbital(neutral, lumo) - orbital(neutral, homo) in ev\n",
    fires_at="orbital(neutral, lumo) - orbital(neutral, homo)",
    good_example=_GOOD,
    fix=Applicability.RISKY,
    fix_note=(
        "Rewrites the derive as energy(cation) + energy(anion) - 2 * energy(neutral), with the ion "
        "states of the same geometry; when the deck lacks them, the same fix adds them after the "
        "neutral (charge +1 and -1, the lowest multiplicity each electron count allows). Risky: "
        "the number changes meaning and calculations are added."
    ),
    fixed_example=_GOOD,
)


def _reason(ws, rs, info) -> str:
    method = method_text(ws, rs)
    if info is None:
        return "an orbital energy difference is not the energy of removing one electron and adding another"
    if info.family == "dft":
        return (
            f"a Kohn-Sham gap of {method} misses the derivative discontinuity (even the exact functional's "
            f"orbital gap falls short of IE - EA), and common functionals underestimate the fundamental gap by "
            f"one to several eV"
        )
    if info.family == "hf":
        return (
            "a Hartree-Fock orbital gap is Koopmans' IE minus Koopmans' EA: no relaxation, no correlation and a "
            "virtual energy that drifts with the basis, so it is usually far too large"
        )
    return (
        f"{method} reports the orbital energies of its Hartree-Fock reference, so this is the Koopmans gap "
        f"(no relaxation, no correlation, usually far too large); the {method} correlation never enters it"
    )


def _orbital_gap(form):
    """The state of a ``+e(LUMO) - e(HOMO)`` expression of one state, or None."""
    if not form.linear or any(abs(c) > 1e-12 for c in form.energies.values()) or len(form.orbitals) != 2:
        return None
    (c1, o1), (c2, o2) = form.orbitals
    if o1.state.value != o2.state.value:
        return None
    by_kind = {o1.orbital.value: (c1, o1), o2.orbital.value: (c2, o2)}
    if set(by_kind) != {"homo", "lumo"} or by_kind["lumo"][0] <= 0 or by_kind["homo"][0] >= 0:
        return None
    return o1.state.value, by_kind["lumo"][1]


def _fix(ws, derive, form, neutral):
    exact = len(form.orbitals) == 2 and all(abs(abs(c) - 1.0) < 1e-12 for c, _ in form.orbitals)
    if not exact or form.constant != 0:
        return None
    cation, anion = partner(ws, neutral, +1), partner(ws, neutral, -1)
    insert = []
    taken = []
    for quantity, existing in ((IE, cation), (EA, anion)):
        if existing is not None:
            taken.append(existing.name)
            continue
        new = ion_state(ws, neutral, quantity, taken)
        if new is None:
            return None
        taken.append(new.name)
        insert.append(new)
    cation_name, anion_name = taken
    text = f"energy({cation_name}) + energy({anion_name}) - 2 * energy({neutral.name})"
    edits = [replace(derive.expr.span, text)]
    if insert:
        if any(e.edit.span.path != derive.span.path for e in insert):
            return None
        edits.append(TextEdit(insert[0].edit.span, "".join(e.edit.new_text for e in insert)))
    added = " and ".join(f"`{e.name}`" for e in insert)
    title = f"Compute `{derive.name.value}` as IE - EA: {text}" + (f" (adding {added})" if insert else "")
    return fix(title, *edits, risky=True)


def check(ctx: Context):
    ws = ctx.workspace
    study = ws.study
    goal = study.goal.value if study is not None and study.goal is not None else None
    for derive in ws.derives:
        if ws.quantity_of(derive) != "fundamental_gap":
            continue
        if derive.quantity is None and goal == "excitation_energy":
            continue  # a "gap" of an excitation study is the optical gap, which orbital gaps approximate
        form = linear_form(derive.expr)
        gap = _orbital_gap(form)
        if gap is None:
            continue
        state, lumo = gap
        rs = ws.states.get(state)
        if rs is None:
            continue
        found = orbital_method(ws, lumo)
        info = found[1] if found is not None else None
        fx = _fix(ws, derive, form, rs)
        yield ctx.finding(
            derive.expr.span,
            f"the fundamental gap `{derive.name.value}` is the orbital gap LUMO - HOMO of `{rs.name}` at "
            f"{level_label(ws, rs)}: {_reason(ws, rs, info)}; compute IE - EA = E(cation) + E(anion) - 2 E(neutral)",
            fixes=(fx,) if fx else (),
        )
