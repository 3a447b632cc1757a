"""minimal-basis-for-property: a minimal basis (sto-3g and alike) used for an
ionization energy, an electron affinity or a gap."""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from deckward.rules.knowledge import basis_library
from deckward.rules.engine.context import Context
from .targets import join_words, library_words, purposes, span_key, states_phrase

INFO = RuleInfo(
    id="minimal-basis-for-property",
    severity=Severity.WARNING,
    category="basis",
    title="Minimal basis for an ionization energy, electron affinity or gap",
    why=(
        "A minimal basis gives each occupied atomic shell a single contracted function with fixed "
        "shape. Removing or adding an electron changes the size and shape of the orbitals, and a "
        "minimal basis cannot follow that change, so ionization energies, electron affinities and gaps "
        "computed in it carry large errors that come from the basis, not from the method. Minimal "
        "sets are for quick geometries and teaching, not for these numbers; use at least a polarised "
        "double-zeta set (with diffuse functions for anions)."
    ),
    references=(
        "W. J. Hehre, R. F. Stewart, J. A. Pople, J. Chem. Phys. 51, 2657 (1969) (the STO-nG minimal sets)",  # from memory
        "F. Jensen, Introduction to Computational Chemistry, 3rd ed. (Wiley 2017), chapter on basis sets",  # from memory
    ),
    threshold_note="Minimal means the basis library counts one function per valence orbital (zeta 'minimal').",
    bad_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
        "level hf_min { method = hf basis = sto-3g reference = unrestricted }\n"
        "state radical { geometry = no2 level = hf_min charge = 0 multiplicity = 2 }\n"
        "state cation { geometry = no2 level = hf_min charge = 1 multiplicity = 1 }\n"
        "derive ie as ionization_energy = energy(cation) - energy(radical) in ev\n"
    ),
    fires_at="sto-3g",
    good_example=(
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
        "level hf_tz { method = hf basis = cc-pvtz reference = unrestricted }\n"
        "state radical { geometry = no2 level = hf_tz charge = 0 multiplicity = 2 }\n"
        "state cation { geometry = no2 level = hf_tz charge = 1 multiplicity = 1 }\n"
        "derive ie as ionization_energy = energy(cation) - energy(radical) in ev\n"
    ),
    fix=None,
    fix_note="No automatic fix: which larger basis fits depends on the method, the accuracy wanted and the budget.",
)

_PROPERTIES = ("ionization_energy", "electron_affinity", "fundamental_gap")


def check(ctx: Context):
    ws = ctx.workspace
    serving = purposes(ws, _PROPERTIES)
    found: dict[tuple, dict] = {}
    for rs in ws.states.values():
        if rs.name not in serving:
            continue
        for _symbol, word in library_words(ws, rs):
            info = basis_library.lookup(word.value)
            if info is None or info.zeta != "minimal":
                continue
            entry = found.setdefault(span_key(word), {"word": word, "states": [], "purposes": []})
            if rs.name not in entry["states"]:
                entry["states"].append(rs.name)
            for p in serving[rs.name]:
                if p not in entry["purposes"]:
                    entry["purposes"].append(p)
    for entry in found.values():
        word = entry["word"]
        subject, verb = states_phrase(entry["states"])
        # Name the derives when there are any; the goal alone otherwise.
        named = [p for p in entry["purposes"] if p.derive is not None] or entry["purposes"]
        yield ctx.finding(
            word.span,
            f"{subject} {verb} {word.value}, a minimal basis (one function per occupied atomic shell), "
            f"for {join_words([p.describe() for p in named])}; it cannot follow the orbitals as they "
            "relax when an electron is removed or added",
        )
