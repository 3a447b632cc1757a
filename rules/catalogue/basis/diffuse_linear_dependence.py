"""diffuse-linear-dependence: two or more layers of diffuse functions on a
molecule of more than a few atoms, where the basis risks near-linear
dependence.

Layers are counted from exponents (rules/catalogue/basis/diffuse.py), so a set doubly
augmented by hand is caught as well as a library one.  Hydrogen and helium
are left out of the count: one standard diffuse layer on them already sits
below the heavy-atom scale and would be miscounted as two.
"""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from deckward.rules.knowledge import deck_facts
from . import diffuse
from deckward.rules.engine.context import Context
from .targets import element_symbols, join_words, span_key

# More atoms than this make overlapping diffuse shells a practical risk
# (common practice, no source).
MAX_ATOMS = 4

_LETTERS = ("s", "p")
_NOT_COUNTED = frozenset({"H", "He"})

INFO = RuleInfo(
    id="diffuse-linear-dependence",
    severity=Severity.INFO,
    category="basis",
    title="Heavily augmented basis on a larger molecule",
    why=(
        "Each layer of diffuse functions reaches further from its atom. With two or more layers "
        "(doubly augmented sets such as d-aug-cc-pVXZ, or shells added by hand) the functions on "
        "neighbouring atoms overlap so strongly that some combinations become almost identical: the "
        "overlap matrix is nearly singular, programs drop functions or lose precision, and the SCF "
        "can fail to converge or land on a different state. On a diatomic this is usually harmless and "
        "sometimes needed; on a molecule of more than a few atoms a single diffuse layer is normally "
        "enough for an anion."
    ),
    references=(
        "R. A. Kendall, T. H. Dunning Jr., R. J. Harrison, J. Chem. Phys. 96, 6796 (1992)",
        "D. E. Woon, T. H. Dunning Jr., J. Chem. Phys. 100, 2975 (1994) (doubly and triply augmented "
        "sets)",  # from memory
    ),
    threshold_note=(
        f"More than {MAX_ATOMS} atoms (ghost atoms included, they carry functions): common practice, "
        "no source. A diffuse layer is an s or p exponent below the per-element threshold of "
        "rules/catalogue/basis/diffuse.py; H and He are not counted."
    ),
    bad_example=(
        "geometry hco2 {\n  C 0 0 0\n  O 0 1.1 0.6\n  O 0 -1.1 0.6\n  H 0 0 -1.1\n  O 3 0 0 ghost\n}\n"
        "basis_set daug_dz {\n  from = aug-cc-pvdz\n  add O s 0.025\n  add O p 0.021\n}\n"
        "level hf_daug { method = hf basis = daug_dz reference = unrestricted }\n"
        "state anion { geometry = hco2 level = hf_daug charge = -1 multiplicity = 1 }\n"
    ),
    fires_at="daug_dz",
    good_example=(
        "geometry hco2 {\n  C 0 0 0\n  O 0 1.1 0.6\n  O 0 -1.1 0.6\n  H 0 0 -1.1\n  O 3 0 0 ghost\n}\n"
        "level hf_aug { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
        "state anion { geometry = hco2 level = hf_aug charge = -1 multiplicity = 1 }\n"
    ),
    fix=None,
    fix_note="No automatic fix: whether a second diffuse layer is needed depends on the anion.",
)


def check(ctx: Context):
    ws = ctx.workspace
    found: dict[tuple, dict] = {}
    for rs in ws.states.values():
        if rs.geometry is None or len(rs.geometry.atoms) <= MAX_ATOMS:
            continue
        for symbol in element_symbols(rs, include_ghosts=True):
            if symbol in _NOT_COUNTED:
                continue
            eb = deck_facts.element_basis(ws, rs.settings.basis, symbol)
            exponents = deck_facts.smallest_exponents(eb) if eb is not None else None
            if exponents is None:
                continue
            try:
                v = diffuse.verdict(symbol, exponents)
            except ValueError:  # no ionization energy tabulated: cannot count layers
                continue
            if v.layers < 2:
                continue
            entry = found.setdefault(span_key(eb.origin), {"eb": eb, "elements": {}, "states": {}})
            entry["elements"].setdefault(v.symbol, (v, exponents))
            entry["states"].setdefault(rs.name, len(rs.geometry.atoms))
    for entry in found.values():
        yield _finding(ctx, entry)


def _finding(ctx: Context, entry: dict):
    eb = entry["eb"]
    states = [f"`{n}` ({k} atoms)" for n, k in entry["states"].items()]
    subject = f"state{'s' if len(states) > 1 else ''} {join_words(states)}"
    verb = "uses" if len(states) == 1 else "use"
    basis = f"basis_set `{eb.basis_set.name.value}`" if eb.basis_set is not None else eb.origin.value
    layers = join_words([_layers_text(v, exps) for v, exps in entry["elements"].values()])
    message = (
        f"{subject} {verb} {basis}, which gives {layers}; on more than {MAX_ATOMS} atoms such diffuse "
        "functions overlap so strongly that the basis can become nearly linearly dependent"
    )
    return ctx.finding(eb.origin.span, message)


def _layers_text(v, exponents) -> str:
    """'O two diffuse s layers (exponents 0.025 and 0.079, below 0.104)'."""
    per_l = [[a for a in (exponents[l] if l < len(exponents) else []) if 0 < a < v.threshold] for l in (0, 1)]
    l = 0 if len(per_l[0]) >= len(per_l[1]) else 1
    values = join_words([f"{a:.3f}" for a in sorted(per_l[l])])
    count = {2: "two", 3: "three"}.get(len(per_l[l]), str(len(per_l[l])))
    return f"{v.symbol} {count} diffuse {_LETTERS[l]} layers (exponents {values}, below {v.threshold:.3f})"
