"""anion-lacks-diffuse: an anion (or an electron affinity) in a basis whose
functions do not reach as far as the extra electron does.

Decided from exponents (library data plus ``add`` shells, judged by
rules/catalogue/basis/diffuse.py), never from the basis name: a hand-augmented basis_set
passes, a set merely named like a diffuse one fails.  The reach needed
follows the species' measured binding energy (rules/knowledge/reference_data.py), the
angular momentum the extra electron occupies (p on p-block atoms, s on H and
the alkali metals) and the method (correlated methods need diffuse
polarisation functions too).  Hydrogen is judged only where the extra
electron can sit on it (H-, H2-, hydrides of electropositive atoms).

Severity: an error (in electron-affinity work) only when the set is clearly
inadequate: for a known species beyond the criterion's margin, for an
unknown one even at the strongest binding met in practice.  Otherwise, when
adequacy hangs on a binding energy the rule cannot know or on the margin of
the criterion, a warning that points to ``deckward probe``.
"""
from __future__ import annotations

from dataclasses import field
from typing import Optional

from deckward.grammar import model as m
from deckward.grammar.findings import Applicability, Related, RuleInfo, Severity
from deckward.grammar.records import record

from deckward.rules.knowledge import basis_families, basis_library, deck_facts, methods
from . import diffuse
from deckward.rules.catalogue.ion_states.species import anion_is_unbound, species_of
from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace
from .targets import (
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
        "A basis whose most diffuse functions are tight cannot follow it: the anion's energy comes out "
        "too high and the electron affinity too small, often by more than the effect being studied, or "
        "even negative for an anion that is bound. How far the functions must reach depends on how "
        "strongly the electron is bound (the measured electron affinity when deckward's table knows the "
        "species), on the angular momentum it occupies (p on the p-block atoms, so a halide is judged by "
        "its p functions, not its s; s on hydrogen and the alkali metals) and on the method: correlated "
        "methods also need diffuse polarisation functions (d on p-block atoms). Sets augmented with diffuse "
        "functions (aug-cc-pVXZ, 6-31+G*, aug-pcseg-n, ma-def2 sets) exist for this purpose; PySCF's "
        "def2-SVPD and def2-TZVPD add only a diffuse s on C and N, no diffuse p, so they fall short there. "
        "The rule reads the exponents the basis really gives each atom, including shells added in a "
        "basis_set, so a hand-augmented basis passes. In a molecule the atoms that carry the extra electron "
        "are judged: the most electronegative ones (O in formate, methoxide and nitrite), and hydrogen only "
        "where the electron can sit on it (H-, H2-, hydrides of electropositive atoms). An error in electron-affinity work when the "
        "set is clearly inadequate; a warning pointing to `deckward probe` when the verdict depends on a "
        "binding energy the rule cannot know or lies within the criterion's margin."
    ),
    references=(
        "R. A. Kendall, T. H. Dunning Jr., R. J. Harrison, J. Chem. Phys. 96, 6796 (1992)",
        "T. Clark, J. Chandrasekhar, G. W. Spitznagel, P. v. R. Schleyer, J. Comput. Chem. 4, 294 (1983)",
        "D. E. Woon, T. H. Dunning Jr., J. Chem. Phys. 98, 1358 (1993)",
        "D. Rappoport, F. Furche, J. Chem. Phys. 133, 134105 (2010)",
        "F. Jensen, J. Chem. Theory Comput. 10, 1074 (2014)",
    ),
    threshold_note=(
        "The largest acceptable exponent per element and angular momentum comes from rules/catalogue/basis/diffuse.py: "
        "the Gaussian must follow the tail of the extra electron (decay constant sqrt(2 E_b), E_b the "
        "measured electron affinity, else 0.75 eV assumed) where the neutral atom's valence density has "
        "died out, with one factor per angular momentum calibrated against Hartree-Fock and MP2 "
        "delta-SCF electron affinities (docs/diffuse-criterion.md, bench/diffuse_calibration.py). "
        "An error only when the set falls short by more than a fifth even at the strongest binding met in "
        "practice (4 eV for p electrons, CN- and Cl-; 2.4 eV for s electrons, Au-); otherwise a warning. "
        "The factor was calibrated on the same grid so that no adequate set is an error."
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

_LETTERS = "spdfg"
MARGIN = 1.2  # exponent / threshold, at the strongest binding in practice, beyond which it is an error (calibrated, docs/diffuse-criterion.md)


@record
class _Use:
    """One basis word that leaves some element of some checked state
    without functions that reach far enough."""

    word: m.Located[str]  # what the user would change
    element_basis: deck_facts.ElementBasis
    failing: dict = field(default_factory=dict)  # symbol -> DiffuseVerdict (the worst seen)
    shells: dict = field(default_factory=dict)  # symbol -> added shells
    anions: list = field(default_factory=list)  # (state name, charge, name span)
    ea_states: list = field(default_factory=list)  # (state name, derive names, name span)
    species: dict = field(default_factory=dict)  # species key -> binding energy (eV)
    unknown_species: bool = False
    definite: bool = False  # clearly inadequate (not a matter of margin or unknown binding)
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
        if anion_is_unbound(rs):
            continue  # no basis is right for an unbound anion: unbound-anion speaks
        species, binding = _binding(rs)
        correlated = _is_correlated(rs)
        for symbol in judged_symbols(rs):
            eb = deck_facts.element_basis(ws, rs.settings.basis, symbol)
            v = _verdict(eb, binding=binding, correlated=correlated)
            if eb is None or v is None or v.is_diffuse:
                continue
            word = eb.library_word or eb.origin
            use = uses.setdefault(span_key(word), _Use(word, eb))
            old = use.failing.get(v.symbol)
            if old is None or v.ratio > old.ratio:
                use.failing[v.symbol] = v
            use.shells.setdefault(v.symbol, eb.shells)
            if species is not None and binding is not None:
                use.species.setdefault(species.key, binding)
            else:
                use.unknown_species = True
            definite = clearly_inadequate(v)
            use.definite = use.definite or definite
            _add_state(use, rs, derives)
            use.error = use.error or (definite and (goal_is_ea or bool(derives)))
    for use in uses.values():
        yield _finding(ctx, use)


def _binding(rs):
    """(species, measured binding energy of its anion in eV) or (species or None, None)."""
    species = species_of(rs)
    if species is None or species.anion_bound is False or species.electron_affinity is None:
        return species, None
    value = species.electron_affinity.value_ev
    return species, (value if value > 0 else None)


def _is_correlated(rs) -> bool:
    method = rs.settings.method
    info = methods.lookup(method.value) if method is not None else None
    return info is not None and (info.correlated or info.dft_class == "double-hybrid")


def clearly_inadequate(v) -> bool:
    """Inadequate for any binding energy seen in practice: short, beyond the
    criterion's margin, even of the most strongly bound anions of its kind
    (4 eV for p electrons, 2.4 eV for s electrons).  The measured electron
    affinity is not enough to call an error on: the binding a method gives
    the anion differs from the measured one (Hartree-Fock binds O2- and
    O- far less), and the grid shows compact valence anions (O2-) need less
    reach than their measured binding suggests."""
    return v.ratio_at_max_binding > MARGIN


def judged_symbols(rs) -> list[str]:
    """Elements of the state's real atoms that carry the extra electron
    (diffuse.carrier_symbols); elements without a tabulated ionization
    energy are left out (they cannot be judged)."""
    symbols = [s for s in element_symbols(rs) if s in diffuse.IONIZATION_ENERGY_EV]
    return diffuse.carrier_symbols(symbols)


def _verdict(eb, library_word: Optional[str] = None, *, binding=None, correlated=False):
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
        return diffuse.verdict(eb.symbol, exponents, binding_ev=binding, correlated=correlated)
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
        for symbol, v in use.failing.items():
            after = _verdict(_with_shells(use, symbol), counterpart,
                             binding=v.binding_ev if v.binding_known else None, correlated=v.correlated)
            if after is None or not after.is_diffuse:
                uncured.append(symbol)
    cures = counterpart is not None and not uncured
    display = in_case_of(word.value, counterpart) if counterpart else None

    clauses = [_clause(v, counterpart if cures else None, display) for v in use.failing.values()]
    if len(clauses) == 1:
        detail = clauses[0][0]
    else:
        detail = "whose most diffuse functions are too tight for the extra electron: " + "; ".join(
            short for _, short in clauses
        )
    message = f"{_subject(use)} {_basis_text(use)}, {detail}"
    message += _binding_text(use)
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
    if not use.definite:
        message += "; `deckward probe` measures how much the electron affinity changes with diffuse functions"
    related = [Related(span, f"anion state `{n}` has charge {q}") for n, q, span in use.anions]
    related += [
        Related(span, f"state `{n}` is used for electron affinity " + join_words([f"`{d}`" for d in ds]))
        for n, ds, span in use.ea_states
    ]
    severity = Severity.ERROR if use.error else Severity.WARNING
    return ctx.finding(word.span, message, severity=severity, related=related, fixes=fixes)


def _binding_text(use: _Use) -> str:
    """Which binding energy the verdict assumed, and how sure it is."""
    parts = [f"{key}- is bound by {e:.2f} eV (measured)" for key, e in use.species.items()]
    if use.unknown_species:
        parts.append(
            f"the species is not in deckward's table, so a binding energy of {diffuse.DEFAULT_BINDING_EV:.2f} eV "
            "is assumed"
        )
    text = "; " + join_words(parts) if parts else ""
    if not use.definite:
        text += (
            "; the set would nearly do for the most strongly bound anions, so how much it costs depends on "
            "how strongly the method binds the extra electron, which the rule cannot know"
        )
    else:
        text += "; the set is too tight even for the most strongly bound anions"
    return text


def _with_shells(use: _Use, symbol: str) -> deck_facts.ElementBasis:
    eb = use.element_basis
    return deck_facts.ElementBasis(symbol, eb.library_word, use.shells.get(symbol, ()), eb.basis_set, eb.origin)


def _clause(v, counterpart: Optional[str], display: Optional[str]) -> tuple[str, str]:
    """How one element fails, as a clause of its own ('whose most diffuse p
    function on Cl has exponent 0.130, three times tighter than the 0.042
    that aug-cc-pvtz adds') and as an item of a list ('p on Cl has ...')."""
    letter = _LETTERS[v.limiting_l]
    kind = "diffuse polarisation" if v.limiting_l != v.electron_l else "diffuse"
    value = v.smallest
    reference = _counterpart_exponent(counterpart, v.symbol, v.limiting_l) if counterpart else None
    need = f"the {v.threshold:.3f} the extra electron needs"
    if v.limiting_l != v.electron_l:
        need += " with a correlated method"
    if value is None:
        if reference is not None:
            rest = f", where {display} has one with exponent {reference:.3f}"
        else:
            rest = f", and the extra electron needs one with exponent below {v.threshold:.3f}"
        return f"which has no {letter} function on {v.symbol}{rest}", f"no {letter} on {v.symbol}{rest}"
    if reference is not None and reference < value:
        rest = f"has exponent {value:.3f}, {times_word(value / reference)} tighter than the {reference:.3f} that {display} adds"
    else:
        rest = f"has exponent {value:.3f}, above {need}"
    return f"whose most {kind} {letter} function on {v.symbol} {rest}", f"{letter} on {v.symbol} {rest}"


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
