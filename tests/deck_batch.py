"""A small batch of decks with known findings, for the report tests.

Only language rules and restricted-open-shell are on (the deckward.yaml
turns every other rule off), so the findings are exact whatever rules are
added to the catalogue.  Demo decks of the acceptor-screening scenario;
coordinates are demo structures.
"""
from __future__ import annotations

import os

KEEP = {"syntax-error", "unknown-key", "undefined-name", "use-outside-workspace", "restricted-open-shell"}

DECKS = {
    "cn_restricted.deck": (
        "# CN radical, restricted by mistake\n"
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }\n"
        "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea = energy(radical) - energy(anion) in ev\n"
    ),
    "o2_restricted.deck": (
        "# O2 triplet, restricted on the state\n"
        "geometry o2 {\n  O 0 0 0\n  O 0 0 1.2075\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz }\n"
        "state neutral { geometry = o2 level = hf_adz charge = 0 multiplicity = 3 reference = restricted }\n"
        "state anion { geometry = o2 level = hf_adz charge = -1 multiplicity = 2 }\n"
        "derive ea = energy(neutral) - energy(anion) in ev\n"
    ),
    "hco2_allowed.deck": (
        "# HCO2 radical: the restricted reference is a recorded decision\n"
        "geometry hco2 {\n  C 0 0 0\n  H 0 0 1.1\n  O 0 1.04 -0.69\n  O 0 -1.04 -0.69\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }  # allow: restricted-open-shell -- compared with the unrestricted run\n"
        "state radical { geometry = hco2 level = hf_adz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = hco2 level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea = energy(radical) - energy(anion) in ev\n"
    ),
    "no2_typos.deck": (
        "# NO2 with two typos\n"
        "geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n  O 0 -1.0989 0.4653\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
        "state neutral { geometry = no2 level = hf_az charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = no2 level = hf_adz charge = -1 mutiplicity = 1 }\n"
        "derive ea = energy(neutral) - energy(anion) in ev\n"
    ),
    "cn_broken.deck": (
        "# CN with an unclosed block\n"
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
    ),
    "cn_clean.deck": (
        "# CN done right\n"
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
        "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea = energy(radical) - energy(anion) in ev\n"
    ),
}


def config_text() -> str:
    from deckward.rules.engine.checker import known_rule_ids

    off = sorted(known_rule_ids() - KEEP)
    return "rules:\n" + "".join(f"  {rule}: off\n" for rule in off)


def write_batch(folder: str, decks: dict | None = None) -> str:
    """Write the batch (and its deckward.yaml) into ``folder``; returns it."""
    os.makedirs(folder, exist_ok=True)
    with open(os.path.join(folder, "deckward.yaml"), "w", encoding="utf-8") as f:
        f.write(config_text())
    for name, text in (decks or DECKS).items():
        path = os.path.join(folder, name)
        os.makedirs(os.path.dirname(path), exist_ok=True)
        with open(path, "w", encoding="utf-8") as f:
            f.write(text)
    return folder
