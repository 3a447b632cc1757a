"""Decks with odd values in every slot: NUL bytes, lone surrogates and
control characters in every string position, numbers that are not finite or
have hundreds of digits in every number position, and deep nesting.

Shared by the property tests (``test_parse_robustness.py``) and the long
fuzz run (``bench/fuzz_escapes.py``).  ``escapes(text)`` checks one text the
way the editor and the command line do (as an unsaved buffer, and as a
file's bytes) and returns what went wrong: an exception, an
``internal-error`` finding, or a span outside its file.
"""
from __future__ import annotations

import os
import random
import traceback

from deckward.grammar.resolve import Loader, resolve
from deckward.rules.engine.checker import check_workspace

ODD_STRINGS = [
    "", "a\x00b.deck", "\x00", "\ud800", "x\udfffy", "\udcff.deck", "\ud83d", "\x1b[2J", "\x7f", "\u2028",
    "\ufeff", "../../etc/passwd", "/dev/zero", "a" * 300, "\\", "\\\"", "é" * 40, "\U0001f600",
]
ODD_NUMBERS = [
    "1e309", "-1e309", "1e-400", "9" * 400, "0." + "0" * 350 + "1", "1" * 60, "1e+99999", "-0", "0e0",
    "2e6", "1.7976931348623157e308", "4.9e-324", "1" + "0" * 30,
]
DEEP = ["(" * 300 + "1" + ")" * 300, "-" * 300 + "1", "{" * 300, "orbital(" * 300, "[" * 300]
DEEPER = ["(" * 3000 + "1" + ")" * 3000, "-" * 3000 + "1", "{" * 3000, "orbital(" * 3000]  # for the tests

TEMPLATE = """use "{s0}"
study "{s1}" {{ goal = electron_affinity kind = vertical note = "{s2}" }}
geometry g {{
  units = angstrom
  N {n0} 0 0
  O 0 {n1} 1.1
  O 0 -1.1 {n2}
}}
basis_set b {{ from = {{ default: "{s3}", O: aug-cc-pvdz }} add O s {n3} add N p {n4} }}
level lv {{ method = "{s4}" basis = "{s5}" reference = unrestricted }}
state neutral {{ geometry = g level = lv charge = {n5} multiplicity = {n6} }}
state anion {{ geometry = g level = lv charge = -1 multiplicity = 1 basis = b }}
derive ea = energy(neutral) - energy(anion) + {n7} in ev
derive ea_eig = -orbital(neutral, lumo+{n8}) * {deep} in ev
"""
STRING_SLOTS = 6
NUMBER_SLOTS = 9


def fill(pick_string, pick_number, deep: str) -> str:
    values = {f"s{i}": pick_string() for i in range(STRING_SLOTS)}
    values.update({f"n{i}": pick_number() for i in range(NUMBER_SLOTS)})
    return TEMPLATE.format(deep=deep, **values)


def random_deck(rng: random.Random) -> str:
    """One deck: each slot odd with some probability, else a plain value."""
    def s():
        return rng.choice(ODD_STRINGS) if rng.random() < 0.5 else "cc-pvdz"

    def n():
        return rng.choice(ODD_NUMBERS) if rng.random() < 0.3 else str(rng.choice([0, 1, 2]))

    text = fill(s, n, rng.choice(DEEP) if rng.random() < 0.2 else "2")
    if rng.random() < 0.3:  # and a careless edit somewhere
        at = rng.randrange(len(text))
        text = text[:at] + rng.choice(ODD_STRINGS + ODD_NUMBERS + ['"', "{", "}", "\n"]) + text[at + rng.randrange(4):]
    return text


def _spans_inside(findings, path: str, text: str) -> list[str]:
    bad = []
    for f in findings:
        if f.span.path == path and not (0 <= f.span.start <= f.span.end <= len(text) and f.span.line >= 1):
            bad.append(f"span outside the file: {f.rule} {f.span}")
    return bad


def escapes(text: str, folder: str, name: str = "odd.deck", modes=("buffer", "file")) -> list[str]:
    """What went wrong checking ``text`` (empty: nothing)."""
    path = os.path.join(folder, name)
    problems: list[str] = []
    for mode in modes:
        try:
            if mode == "buffer":
                ws = resolve(path, Loader({path: text}), folder)
            else:
                with open(path, "wb") as f:
                    f.write(text.encode("utf-8", "surrogatepass"))
                ws = resolve(path, Loader(), folder)
            findings = check_workspace(ws)
        except Exception as e:  # the escape a test reports
            problems.append(f"{mode}: {type(e).__name__}: {e} at "
                            + "; ".join(f"{fr.filename.rsplit('/', 1)[-1]}:{fr.lineno}"
                                        for fr in traceback.extract_tb(e.__traceback__)[-3:]))
            continue
        problems += [f"{mode}: internal-error: {f.message}" for f in findings if f.rule == "internal-error"]
        problems += [f"{mode}: {p}" for p in _spans_inside(findings, path, ws.root.deck.text)]
    return problems
