"""Numbers read from a deck must be finite.

``float("1e309")`` and a 400-digit integer give ``inf`` without an error, and
an infinite coordinate or exponent would reach the geometry rules, the
basis-set checks and PySCF.  ``finite`` converts a number token and says
why it cannot be used; the builder reports that at the token.
"""
from __future__ import annotations

import math
from typing import Optional

# Larger than any molecule in angstrom or bohr (0.1 mm), yet far from the
# range where squaring a distance overflows: common practice, no source.
MAX_COORDINATE = 1e6
MAX_DIGITS = 60  # a written number longer than this is a mistake, not a measurement


def finite(text: str, limit: Optional[float] = None) -> tuple[Optional[float], Optional[str]]:
    """(value, None) for a usable number, else (None, the reason in words)."""
    digits = sum(ch.isdigit() for ch in text)
    if digits > MAX_DIGITS:
        return None, f"has {digits} digits; write it with an exponent (e.g. `1.5e-3`)"
    try:
        value = float(text)
    except (ValueError, OverflowError):
        return None, "is not a number"
    if not math.isfinite(value):
        return None, "is too large to be a number deckward can use"
    if limit is not None and abs(value) > limit:
        return None, f"is too large (more than {limit:g} in size)"
    return value, None
