"""Element symbols, atomic numbers and covalent radii.

The data come from PySCF (``pyscf.data.elements`` and
``pyscf.data.radii.COVALENT``, which holds the covalent radii of B. Cordero
et al., "Covalent radii revisited", Dalton Trans. 2008, 2832-2838) through
``rules/data/elements.json``, written by ``python -m
deckward.rules.build_data``.  Reading that file instead of importing PySCF
keeps the typing path fast.

Ghost atoms are a feature of the deck language, not an element: the language
marks them with the ``ghost`` flag, so ``lookup`` knows only real elements.
"""

from __future__ import annotations

import difflib
import json
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from typing import Iterable


@dataclass(frozen=True)
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
    text = resources.files("deckward.rules.data").joinpath("elements.json").read_text()
    rows = json.loads(text)["elements"]
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
    word = text.strip()
    if not word or n <= 0:
        return []
    table = _table()
    exact = table.get(word.lower())
    if exact is not None:
        return [exact.symbol]
    symbols = all_symbols()
    lowered = {s.lower(): s for s in symbols}
    ranked = difflib.get_close_matches(word.lower(), list(lowered), n=n, cutoff=0.5)
    result = [lowered[r] for r in ranked]
    if len(result) < n:
        # A one-letter prefix is a strong hint ("Cx" -> C, Cl, Ca, ...).
        for s in symbols:
            if s not in result and s[0].lower() == word[0].lower():
                result.append(s)
            if len(result) >= n:
                break
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
