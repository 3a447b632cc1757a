"""correlated-small-basis: a correlated method (MP2, coupled cluster, CI) in a
double-zeta or smaller basis for an ionization energy or electron affinity."""
from __future__ import annotations

from deckward.grammar.findings import Applicability, RuleInfo, Severity

from deckward.rules.knowledge import basis_families, basis_library, methods
from deckward.rules.engine.context import Context
from deckward.rules.fixes.edits import fix, replace
from .targets import in_case_of, join_words, library_words, purposes, span_key

INFO = RuleInfo(
    id="correlated-small-basis",
    severity=Severity.INFO,
    category="basis",
    title="Correlated method in a double-zeta basis",
    why=(
        "Hartree-Fock energies settle quickly as the basis grows, but the correlation energy that MP2, "
        "coupled cluster or CI add converges slowly: each step up in zeta level still recovers a "
        "sizeable part of it. Removing or adding an electron changes the correlation energy, so an "
        "ionization energy or electron affinity from a correlated method in a double-zeta basis keeps "
        "much of the basis error and gives away the accuracy the method was chosen for. A triple-zeta "
        "set of the same family (or an extrapolation from two sizes) is the usual minimum."
    ),
    references=(
        "T. H. Dunning Jr., J. Chem. Phys. 90, 1007 (1989)",
        "R. A. Kendall, T. H. Dunning Jr., R. J. Harrison, J. Chem. Phys. 96, 6796 (1992)",
        "T. Helgaker, W. Klopper, H. Koch, J. Noga, J. Chem. Phys. 106, 9639 (1997) (basis-set "
        "convergence of the correlation energy)",  # from memory
    ),
    threshold_note=(
        "Double zeta or smaller as too small for a correlated ionization energy or electron affinity: "
        "common practice, no source. The zeta level is counted from the basis data (functions per "
        "valence orbital), not read from the name."
    ),
    bad_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
        "level cc_dz { method = ccsd(t) basis = aug-cc-pvdz reference = unrestricted }\n"
        "state radical { geometry = no2 level = cc_dz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = no2 level = cc_dz charge = -1 multiplicity = 1 }\n"
        "derive ea as electron_affinity = energy(radical) - energy(anion) in ev\n"
    ),
    fires_at="aug-cc-pvdz",
    good_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
        "level cc_tz { method = ccsd(t) basis = aug-cc-pvtz reference = unrestricted }\n"
        "state radical { geometry = no2 level = cc_tz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = no2 level = cc_tz charge = -1 multiplicity = 1 }\n"
        "derive ea as electron_affinity = energy(radical) - energy(anion) in ev\n"
    ),
    fix=Applicability.RISKY,
    fix_note=(
        "Replaces the basis word with the triple-zeta member of the same family (cc-pVDZ -> cc-pVTZ, "
        "aug-cc-pVDZ -> aug-cc-pVTZ, def2-SVP -> def2-TZVP, 6-31G* -> 6-311G*). Risky: the calculation "
        "becomes several times more expensive."
    ),
    fixed_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
        "level cc_dz { method = ccsd(t) basis = aug-cc-pvtz reference = unrestricted }\n"
        "state radical { geometry = no2 level = cc_dz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = no2 level = cc_dz charge = -1 multiplicity = 1 }\n"
        "derive ea as electron_affinity = energy(radical) - energy(anion) in ev\n"
    ),
)

_PROPERTIES = ("ionization_energy", "electron_affinity")
_SMALL = {"minimal": "a minimal basis", "double": "a double-zeta basis"}


def check(ctx: Context):
    ws = ctx.workspace
    serving = purposes(ws, _PROPERTIES)
    found: dict[tuple, dict] = {}
    for rs in ws.states.values():
        method = rs.settings.method
        if rs.name not in serving or method is None:
            continue
        info = methods.lookup(method.value)
        if info is None or not info.correlated:
            continue
        for _symbol, word in library_words(ws, rs):
            basis = basis_library.lookup(word.value)
            if basis is None or basis.zeta not in _SMALL:
                continue
            entry = found.setdefault(
                span_key(word), {"word": word, "zeta": basis.zeta, "states": [], "methods": [], "purposes": []}
            )
            _add(entry["states"], rs.name)
            _add(entry["methods"], method.value)
            for p in serving[rs.name]:
                _add(entry["purposes"], p)
    for entry in found.values():
        yield _finding(ctx, entry)


def _add(items: list, item) -> None:
    if item not in items:
        items.append(item)


def _finding(ctx: Context, entry: dict):
    word = entry["word"]
    states = [f"`{n}`" for n in entry["states"]]
    subject = f"state{'s' if len(states) > 1 else ''} {join_words(states)}"
    verb = "runs" if len(states) == 1 else "run"
    named = [p for p in entry["purposes"] if p.derive is not None] or entry["purposes"]
    message = (
        f"{subject} {verb} {join_words(entry['methods'])} in {word.value}, {_SMALL[entry['zeta']]}, "
        f"for {join_words([p.describe() for p in named])}; the correlation energy converges slowly "
        "with the basis, so much of its change on adding or removing an electron is missing"
    )
    target = basis_families.triple_zeta_counterpart(word.value)
    fixes = ()
    if target is not None:
        display = in_case_of(word.value, target)
        fixes = (fix(f"Use the triple-zeta set {display}", replace(word.span, display), risky=True),)
    return ctx.finding(word.span, message, fixes=fixes)
