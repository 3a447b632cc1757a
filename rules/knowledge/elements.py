"""Element symbols, atomic numbers and covalent radii.

The data come from PySCF (``pyscf.data.elements`` and
``pyscf.data.radii.COVALENT``, which holds the covalent radii of B. Cordero
et al., "Covalent radii revisited", Dalton Trans. 2008, 2832-2838) through
``rules/knowledge/data/elements.json``, written by ``python
bench/build_data.py``.  Reading that file instead of importing PySCF
keeps the typing path fast.

Ghost atoms are a feature of the deck language, not an element: the language
marks them with the ``ghost`` flag, so ``lookup`` knows only real elements.
"""

from __future__ import annotations

import json
from functools import lru_cache
from pathlib import Path
from typing import Iterable

from deckward.grammar.records import record

_ELEMENTS_FILE = Path(__file__).resolve().parent / "data" / "elements.json"


@record(frozen=True)
class Element:
    """One chemical element.

    ``covalent_radius`` is in angstrom (Cordero et al. 2008; for carbon the
    sp2 value 0.73, as PySCF stores it).  It is None for elements past
    curium, which that table does not cover.
    """

    symbol: str
    z: int
    name: str
    covalent_radius: float | None


@lru_cache(maxsize=1)
def _table() -> dict[str, Element]:
    rows = json.loads(_ELEMENTS_FILE.read_text(encoding="utf-8"))["elements"]
    return {
        row["symbol"].lower(): Element(
            symbol=row["symbol"],
            z=row["z"],
            name=row["name"],
            covalent_radius=row["covalent_radius"],
        )
        for row in rows
    }


def lookup(symbol: str) -> Element | None:
    """The element with this symbol, in any letter case (cl, Cl, CL), or None."""
    return _table().get(symbol.strip().lower())


def all_symbols() -> list[str]:
    """Every element symbol in order of atomic number."""
    return [e.symbol for e in sorted(_table().values(), key=lambda e: e.z)]


def by_number(z: int) -> Element | None:
    """The element with atomic number z, or None."""
    for element in _table().values():
        if element.z == z:
            return element
    return None


def closest_symbols(text: str, n: int = 3) -> list[str]:
    """Element symbols that look like ``text``, best first (for a did-you-mean).

    A symbol that matches ``text`` apart from letter case comes first; then
    symbols sharing its first letter, ranked by string similarity.
    """
    import difflib  # only a did-you-mean pays for it

    word = text.strip()
    if not word or n <= 0:
        return []
    table = _table()
    exact = table.get(word.lower())
    if exact is not None:
        return [exact.symbol]
    key = word.lower()

    def rank(symbol: str) -> tuple[bool, float]:
        ratio = difflib.SequenceMatcher(None, key, symbol.lower()).ratio()
        return (symbol[0].lower() != key[0], -ratio)

    # A shared first letter is the strongest hint ("Cx" -> C, Ca, Cd, ...).
    candidates = [
        s
        for s in all_symbols()
        if s[0].lower() == key[0]
        or difflib.SequenceMatcher(None, key, s.lower()).ratio() >= 0.5
    ]
    result = sorted(candidates, key=rank)
    return result[:n]


def electron_count(atoms: Iterable[tuple[str, bool]], charge: int) -> int | None:
    """Number of electrons N = sum(Z of non-ghost atoms) - charge.

    ``atoms`` holds (symbol, is_ghost) pairs; ghost atoms carry basis
    functions but no nucleus or electrons, so they add nothing.  Returns None
    when a non-ghost symbol is not an element (that is a separate finding).
    """
    total = 0
    for symbol, ghost in atoms:
        if ghost:
            continue
        element = lookup(symbol)
        if element is None:
            return None
        total += element.z
    return total - charge
