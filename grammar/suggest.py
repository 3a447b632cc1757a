"""Did-you-mean: the candidates nearest to a misspelt word, and fixes for them.

Every "did you mean" deckward prints (keys, values, names, methods, basis
sets, rule ids) is ranked here, by an edit distance that counts a swap of
two neighbouring characters as one edit: `aug-cc-pdvz` is one edit from
`aug-cc-pvdz` and two from `aug-cc-pvtz`.  Candidates within a third of the
word's length come first, nearest first; difflib's similarity fills up the
list when too few are that close.  Ties in distance go to the candidate
most like the word (difflib's ratio: `hf_az` is nearer `hf_adz` than
`hf_tz`).  A suggestion is *clear* when one candidate ranks strictly
before every other: replacing the word with it keeps what the author meant,
so its fix is safe.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Iterable

from .findings import Applicability, Fix, Span, TextEdit


def edit_distance(a: str, b: str, limit: int | None = None) -> int:
    """Levenshtein distance with transpositions (optimal string alignment).
    With ``limit``, any distance above it comes back as ``limit + 1`` as
    soon as a row shows it (a did-you-mean over thousands of names must
    not compute every distance in full)."""
    if a == b:
        return 0
    if limit is not None and abs(len(a) - len(b)) > limit:
        return limit + 1
    prev2: list[int] = []
    prev = list(range(len(b) + 1))
    for i, ca in enumerate(a, 1):
        cur = [i] + [0] * len(b)
        for j, cb in enumerate(b, 1):
            cur[j] = min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (ca != cb))
            if i > 1 and j > 1 and ca == b[j - 2] and a[i - 2] == cb:
                cur[j] = min(cur[j], prev2[j - 2] + 1)
        if limit is not None and min(cur) > limit and min(prev) > limit:
            return limit + 1  # every later row is at least the smaller of these two
        prev2, prev = prev, cur
    return prev[-1] if limit is None else min(prev[-1], limit + 1)


@dataclass(frozen=True)
class Suggestions:
    """Candidates for a misspelt word, best first."""

    names: tuple[str, ...]
    clear: bool = False  # the first is strictly nearer than any other candidate

    def __bool__(self) -> bool:
        return bool(self.names)

    def hint(self) -> str:
        """``; did you mean `x`?`` (or `a`, `b` or `c`), empty without candidates."""
        return f"; did you mean {or_list(self.names)}?" if self.names else ""


def or_list(names: Iterable[str]) -> str:
    quoted = [f"`{n}`" for n in names]
    if len(quoted) <= 1:
        return "".join(quoted)
    return ", ".join(quoted[:-1]) + " or " + quoted[-1]


# Above this many candidates difflib's similarity search is skipped: the
# edit-distance search alone keeps a did-you-mean over thousands of names cheap.
MAX_FUZZY_CANDIDATES = 1000


def suggest(word: str, candidates: Iterable[str], n: int = 1,
            key: Callable[[str], str] = str.lower) -> Suggestions:
    """The ``n`` candidates nearest to ``word``; ``key`` normalises both
    sides before comparing (case, or a basis name's `-` and `_`)."""
    cands = list(dict.fromkeys(candidates))
    target = key(word)
    if not target or n <= 0 or not cands:
        return Suggestions(())
    import difflib  # only a did-you-mean pays for it

    limit = max(1, len(target) // 3)
    scored: list[tuple[int, float, int, str]] = []
    normalised: dict[str, str] = {}
    for order, c in enumerate(cands):
        k = key(c)
        if k in normalised:
            continue  # aliases that normalise alike are one candidate
        normalised[k] = c
        if abs(len(k) - len(target)) > limit:
            continue  # the distance is at least the difference in length
        d = edit_distance(target, k, limit)
        if d <= limit:
            scored.append((d, -difflib.SequenceMatcher(None, target, k).ratio(), order, c))
    scored.sort()
    out = [c for *_, c in scored]
    seen_keys = {key(c) for c in out}
    clear = bool(scored) and scored[0][0] > 0 and (len(scored) == 1 or scored[0][:2] < scored[1][:2])
    if len(out) < n and len(normalised) <= MAX_FUZZY_CANDIDATES:
        for hit in difflib.get_close_matches(target, list(normalised), n=n + len(out), cutoff=0.6):
            if hit not in seen_keys:
                seen_keys.add(hit)
                out.append(normalised[hit])
    return Suggestions(tuple(out[:n]), clear)


def closest(word: str, candidates: Iterable[str], n: int = 1,
            key: Callable[[str], str] = str.lower) -> list[str]:
    return list(suggest(word, candidates, n, key).names)


def replacement_fixes(span: Span, suggestions: Suggestions, risky: bool = False,
                      spell: Callable[[str], str] = str, title: str = "Use `{}`") -> tuple[Fix, ...]:
    """One fix per suggestion, replacing the text of ``span`` with it
    (written by ``spell``, e.g. quoted).  The first is safe when the
    suggestion is clear and the caller does not call the change risky."""
    fixes = []
    for i, name in enumerate(suggestions.names):
        safe = i == 0 and suggestions.clear and not risky
        fixes.append(Fix(title.format(name), (TextEdit(span, spell(name)),),
                         Applicability.SAFE if safe else Applicability.RISKY))
    return tuple(fixes)
