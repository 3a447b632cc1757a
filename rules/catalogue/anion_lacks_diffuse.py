"""anion-lacks-diffuse: an anion (or an electron affinity) in a basis without
diffuse s and p functions.

Decided from exponents (library data plus ``add`` shells, judged by
rules/diffuse.py), never from the basis name: a hand-augmented basis_set
passes, a set merely named like a diffuse one fails.  Hydrogen is exempt:
an anion's extra charge sits on the heavier atoms, and the common "+" sets
(6-31+g*) deliberately leave hydrogen alone.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Optional

from deckward.grammar import model as m
from deckward.grammar.findings import Applicability, Related, RuleInfo, Severity

from .. import basis_families, basis_library, deck_facts, diffuse
from ..context import Context
from ..edits import fix, replace
from ._basis_targets import (
    element_symbols,
    in_case_of,
    join_words,
    purposes,
    span_key,
    study_goal,
    times_word,
)

INFO = RuleInfo(
    id="anion-lacks-diffuse",
    severity=Severity.WARNING,
    severity_note="error when an electron affinity depends on the anion",
    category="basis",
    title="Anion or electron affinity without diffuse functions",
    why=(
        "The extra electron of an anion is weakly bound, so its orbital reaches far from the nuclei. "
        "A basis whose most diffuse s and p functions are tight cannot follow it: the anion's energy "
        "comes out too high and the electron affinity too small, often by more than the effect being "
        "studied, or even negative for an anion that is bound. Sets augmented with diffuse functions "
        "(aug-cc-pVXZ, 6-31+G*, def2-SVPD, aug-pcseg-n) exist for this purpose. The rule reads the "
        "exponents the basis really gives each atom, including shells added in a basis_set, so a "
        "hand-augmented basis passes. Hydrogen is not checked: the extra charge of the anions this "
        "rule meets sits on heavier atoms. An error when the study is about electron affinities, a "
        "warning for any other negatively charged state."
    ),
    references=(
        "R. A. Kendall, T. H. Dunning Jr., R. J. Harrison, J. Chem. Phys. 96, 6796 (1992)",
        "T. Clark, J. Chandrasekhar, G. W. Spitznagel, P. v. R. Schleyer, J. Comput. Chem. 4, 294 (1983)",
        "D. E. Woon, T. H. Dunning Jr., J. Chem. Phys. 98, 1358 (1993)",
        "D. Rappoport, F. Furche, J. Chem. Phys. 133, 134105 (2010)",
        "F. Jensen, J. Chem. Theory Comput. 10, 1074 (2014)",
    ),
    threshold_note=(
        "The largest acceptable s/p exponent per element comes from rules/diffuse.py: the Gaussian must "
        "follow the tail of an electron bound by about 1 eV where the neutral atom's valence density "
        "has died out, with one factor calibrated against Hartree-Fock delta-SCF electron affinities "
        "(docs/diffuse-criterion.md). Without diffuse functions O's smallest s/p exponents are 0.17 or "
        "more, with them 0.05-0.085 (basis_set_exchange data)."
    ),
    bad_example=(
        "study \"acceptor-cn\" { goal = electron_affinity }\n"
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_tz { method = hf basis = cc-pvtz reference = unrestricted }\n"
        "state radical { geometry = cn level = hf_tz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = cn level = hf_tz charge = -1 multiplicity = 1 }\n"
        "derive ea as electron_affinity = energy(radical) - energy(anion) in ev\n"
    ),
    fires_at="cc-pvtz",
    good_example=(
        "study \"acceptor-cn\" { goal = electron_affinity }\n"
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "basis_set tz_diffuse {\n  from = cc-pvtz\n"
        "  add C s 0.044\n  add C p 0.036\n  add N s 0.058\n  add N p 0.049\n}\n"
        "level hf_tz { method = hf basis = tz_diffuse reference = unrestricted }\n"
        "state radical { geometry = cn level = hf_tz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = cn level = hf_tz charge = -1 multiplicity = 1 }\n"
        "derive ea as electron_affinity = energy(radical) - energy(anion) in ev\n"
    ),
    fix=Applicability.SAFE,
    fix_note=(
        "Replaces the basis word (in the level, the state, or a basis_set's `from`) with the augmented "
        "set of the same family: cc-pVXZ -> aug-cc-pVXZ, 6-31G* -> 6-31+G*, def2-XXX -> def2-XXXD, "
        "pcseg-n -> aug-pcseg-n; offered only when that set is diffuse enough on every failing element. "
        "In a per-element map only the word of the failing element changes."
    ),
    fixed_example=(
        "study \"acceptor-cn\" { goal = electron_affinity }\n"
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_tz { method = hf basis = aug-cc-pvtz reference = unrestricted }\n"
        "state radical { geometry = cn level = hf_tz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = cn level = hf_tz charge = -1 multiplicity = 1 }\n"
        "derive ea as electron_affinity = energy(radical) - energy(anion) in ev\n"
    ),
)

_LETTERS = ("s", "p")
_EXEMPT = frozenset({"H"})


@dataclass
class _Use:
    """One basis word that leaves some heavy element of some checked state
    without diffuse functions."""

    word: m.Located[str]  # what the user would change
    element_basis: deck_facts.ElementBasis
    failing: dict = field(default_factory=dict)  # symbol -> DiffuseVerdict
    shells: dict = field(default_factory=dict)  # symbol -> added shells
    anions: list = field(default_factory=list)  # (state name, charge, name span)
    ea_states: list = field(default_factory=list)  # (state name, derive names, name span)
    error: bool = False


def check(ctx: Context):
    ws = ctx.workspace
    goal_is_ea = study_goal(ws) == "electron_affinity"
    ea_derives = {
        name: [p.derive for p in ps if p.derive is not None]
        for name, ps in purposes(ws, {"electron_affinity"}).items()
    }
    uses: dict[tuple, _Use] = {}
    for rs in ws.states.values():
        derives = ea_derives.get(rs.name) or []
        if rs.charge >= 0 and not derives:
            continue
        for symbol in _heavy_symbols(rs):
            eb = deck_facts.element_basis(ws, rs.settings.basis, symbol)
            v = _verdict(eb)
            if eb is None or v is None or v.is_diffuse:
                continue
            word = eb.library_word or eb.origin
            use = uses.setdefault(span_key(word), _Use(word, eb))
            use.failing.setdefault(v.symbol, v)
            use.shells.setdefault(v.symbol, eb.shells)
            _add_state(use, rs, derives)
            use.error = use.error or goal_is_ea or bool(derives)
    for use in uses.values():
        yield _finding(ctx, use)


def _heavy_symbols(rs) -> list[str]:
    """Elements of the state's real atoms, hydrogen left out."""
    return [s for s in element_symbols(rs) if s not in _EXEMPT]


def _verdict(eb, library_word: Optional[str] = None):
    """The diffuse verdict for an element's basis (optionally with the library
    part swapped for ``library_word``); None when it cannot be judged."""
    if eb is None:
        return None
    if library_word is not None:
        eb = deck_facts.ElementBasis(
            eb.symbol, m.Located(library_word, eb.origin.span), eb.shells, eb.basis_set, eb.origin
        )
    exponents = deck_facts.smallest_exponents(eb)
    if exponents is None:
        return None
    try:
        return diffuse.verdict(eb.symbol, exponents)
    except ValueError:  # no ionization energy tabulated for the element
        return None


def _add_state(use: _Use, rs, derives: list[str]) -> None:
    names = [n for n, *_ in use.anions] + [n for n, *_ in use.ea_states]
    if rs.name in names:
        return
    if rs.charge < 0:
        use.anions.append((rs.name, rs.charge, rs.state.name.span))
    else:
        use.ea_states.append((rs.name, derives, rs.state.name.span))


def _finding(ctx: Context, use: _Use):
    word = use.word
    counterpart = basis_families.augmented_counterpart(word.value) if use.element_basis.library_word else None
    uncured = []
    if counterpart is not None:
        for symbol in use.failing:
            after = _verdict(_with_shells(use, symbol), counterpart)
            if after is None or not after.is_diffuse:
                uncured.append(symbol)
    cures = counterpart is not None and not uncured
    display = in_case_of(word.value, counterpart) if counterpart else None

    clauses = [_clause(v, counterpart if cures else None, display) for v in use.failing.values()]
    if len(clauses) == 1:
        detail = clauses[0][0]
    else:
        detail = "whose most diffuse functions are too tight for a weakly bound electron: " + "; ".join(
            short for _, short in clauses
        )
    message = f"{_subject(use)} {_basis_text(use)}, {detail}"
    fixes = ()
    if cures:
        fixes = (fix(f"Use {display}", replace(word.span, display)),)
    elif counterpart is None:
        message += f"; the library has no augmented counterpart of {word.value}, so no fix is offered"
    else:
        message += (
            f"; its augmented counterpart {counterpart} is not diffuse enough on "
            f"{join_words(uncured)} either, so no fix is offered"
        )
    related = [Related(span, f"anion state `{n}` has charge {q}") for n, q, span in use.anions]
    related += [
        Related(span, f"state `{n}` is used for electron affinity " + join_words([f"`{d}`" for d in ds]))
        for n, ds, span in use.ea_states
    ]
    severity = Severity.ERROR if use.error else Severity.WARNING
    return ctx.finding(word.span, message, severity=severity, related=related, fixes=fixes)


def _with_shells(use: _Use, symbol: str) -> deck_facts.ElementBasis:
    eb = use.element_basis
    return deck_facts.ElementBasis(symbol, eb.library_word, use.shells.get(symbol, ()), eb.basis_set, eb.origin)


def _clause(v, counterpart: Optional[str], display: Optional[str]) -> tuple[str, str]:
    """How one element fails, as a clause of its own ('whose most diffuse p
    function on Cl has exponent 0.130, three times tighter than the 0.042
    that aug-cc-pvtz adds') and as an item of a list ('p on Cl has ...')."""
    letter = _LETTERS[v.limiting_l]
    value = (v.smallest_s, v.smallest_p)[v.limiting_l]
    reference = _counterpart_exponent(counterpart, v.symbol, v.limiting_l) if counterpart else None
    if value is None:
        if reference is not None:
            rest = f", where {display} has one with exponent {reference:.3f}"
        else:
            rest = f", and a weakly bound electron needs one with exponent below {v.threshold:.3f}"
        return f"which has no {letter} function on {v.symbol}{rest}", f"no {letter} on {v.symbol}{rest}"
    if reference is not None and reference < value:
        rest = f"has exponent {value:.3f}, {times_word(value / reference)} tighter than the {reference:.3f} that {display} adds"
    else:
        rest = f"has exponent {value:.3f}, above the {v.threshold:.3f} a weakly bound electron needs"
    return f"whose most diffuse {letter} function on {v.symbol} {rest}", f"{letter} on {v.symbol} {rest}"


def _counterpart_exponent(word: str, symbol: str, l: int) -> Optional[float]:
    data = basis_library.element_data(word, symbol)
    if data is None or l >= len(data.smallest_exponents) or not data.smallest_exponents[l]:
        return None
    return data.smallest_exponents[l][0]


def _subject(use: _Use) -> str:
    parts = []
    if use.anions:
        names = join_words([f"`{n}`" for n, *_ in use.anions])
        parts.append(f"the anion state{'s' if len(use.anions) > 1 else ''} {names}")
    if use.ea_states:
        names = join_words([f"`{n}`" for n, *_ in use.ea_states])
        derives: list[str] = []
        for _, ds, _ in use.ea_states:
            derives += [d for d in ds if d not in derives]
        plural = "s" if len(use.ea_states) > 1 else ""
        parts.append(f"state{plural} {names} of electron affinity {join_words([f'`{d}`' for d in derives])}")
    count = len(use.anions) + len(use.ea_states)
    return " and ".join(parts) + (" uses" if count == 1 else " use")


def _basis_text(use: _Use) -> str:
    eb = use.element_basis
    if eb.basis_set is None:
        return use.word.value
    name = eb.basis_set.name.value
    if eb.library_word is None:
        return f"basis_set `{name}`"
    added = any(use.shells.values())
    return f"basis_set `{name}` ({eb.library_word.value}{' plus added shells' if added else ''})"
