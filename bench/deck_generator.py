"""Realistic demo decks for benchmarks: the acceptor-screening scenario.

Deterministic (seeded), so one run's ratios compare like with like.  The
coordinates are demo structures, not reference data.
"""
from __future__ import annotations

import os
import random

FRAGMENTS = {
    "no2": ("N 0.000000 0.000000 0.000000", "O 0.000000 1.098900 0.465300", "O 0.000000 -1.098900 0.465300"),
    "cn": ("C 0.000000 0.000000 0.000000", "N 0.000000 0.000000 1.171800"),
    "hco2": ("C 0.000000 0.000000 0.000000", "H 0.000000 0.000000 1.100000",
             "O 0.000000 1.040000 -0.690000", "O 0.000000 -1.040000 -0.690000"),
    "o2": ("O 0.000000 0.000000 0.000000", "O 0.000000 0.000000 1.207500"),
    "oh": ("O 0.000000 0.000000 0.000000", "H 0.000000 0.000000 0.969700"),
}
METHODS = ("hf", "mp2", "ccsd(t)", "b3lyp", "pbe0")
BASES = ("cc-pvdz", "aug-cc-pvdz", "aug-cc-pvtz", "6-31g*", "6-31+g*", "def2-svp", "def2-svpd")


def deck_text(i: int, rng: random.Random) -> str:
    name = rng.choice(sorted(FRAGMENTS))
    atoms = FRAGMENTS[name]
    method = rng.choice(METHODS)
    basis = rng.choice(BASES)
    electrons = {"no2": 23, "cn": 13, "hco2": 23, "o2": 16, "oh": 9}[name]
    mult = 2 if electrons % 2 else 3
    anion_mult = 1 if mult == 2 else 2
    jitter = lambda line: line  # noqa: E731
    lines = [f"# screening deck {i}: {name} at {method}/{basis}",
             f'study "acceptor-{name}-{i}" {{', "  goal    = electron_affinity", "  kind    = vertical",
             "  compare = theory", "}", "", f"geometry {name} {{", "  units = angstrom"]
    lines += ["  " + jitter(a) for a in atoms]
    lines += ["}", "", f"level lv {{", f"  method      = {method}", f"  basis       = {basis}",
              "  reference   = unrestricted", "  frozen_core = true", "}", "",
              f"state neutral {{ geometry = {name}  level = lv  charge = 0   multiplicity = {mult} }}",
              f"state anion   {{ geometry = {name}  level = lv  charge = -1  multiplicity = {anion_mult} }}", ""]
    if rng.random() < 0.3:
        lines.append("derive ea_eig = -orbital(neutral, lumo) in ev")
    lines.append("derive ea as electron_affinity = energy(neutral) - energy(anion) in ev")
    return "\n".join(lines) + "\n"


def write_decks(folder: str, count: int, seed: int = 7) -> list[str]:
    rng = random.Random(seed)
    paths = []
    for i in range(count):
        sub = os.path.join(folder, f"group{i % 20:02d}")
        os.makedirs(sub, exist_ok=True)
        path = os.path.join(sub, f"deck{i:05d}.deck")
        with open(path, "w", encoding="utf-8") as f:
            f.write(deck_text(i, rng))
        paths.append(path)
    return paths
