"""Small helpers for the words every stage prints: counts with their noun."""
from __future__ import annotations


def counted(n: int, singular: str, plural: str | None = None) -> str:
    """"1 error", "2 errors", "0 fixes" ("fix", "fixes"): never "1 electrons"."""
    return f"{n} {singular if abs(n) == 1 else (plural or singular + 's')}"
