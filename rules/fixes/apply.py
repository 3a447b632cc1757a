"""Applying fixes: choose, apply one at a time, re-check, repeat until stable.

A ``Fix`` is a titled list of edits against the text its finding was computed
from.  Edits of *different* findings may overlap or interact (two findings
may both want to add the same anion state), so this module never applies two
findings' fixes against one text: it applies the first eligible fix (in the
findings' sorted order, so the outcome is deterministic), asks the caller to
re-check the new text, and continues with the fresh findings.  The loop stops
when no eligible fix changes the text, or at a bound.

A fix is eligible when its finding is active (not suppressed), lies in the
file being fixed, every edit lies in that file and inside the text, its
edits do not overlap each other, and its applicability is allowed (safe
only, or safe and risky).  Of a finding's fixes the first eligible one is
used: rules list their preferred fix first.  A fix is skipped (and reported in
``FixOutcome.skipped``) when its result would damage a deck: more findings
of the grammar's own rules (syntax errors, undefined or duplicate names,
invalid values ...) in any file the re-check covers, so a fix never breaks
the decks that ``use`` the file; or when it would bring back a text seen
earlier in the loop (two fixes undoing each other).

Pure: no file I/O.  The command line (``deckward check --fix``) and the
language server ("apply all safe fixes") both call ``fix_text`` with their
own re-check callback.
"""
from __future__ import annotations

import os
from collections import Counter
from dataclasses import dataclass
from typing import Callable, Iterable, Optional, Sequence

from deckward.grammar.findings import Applicability, Finding, Fix
from deckward.grammar.language_rules import LANGUAGE_RULES

from .edits import OverlappingEdits, apply_edits

# Re-check callback: the findings of the workspace when the file reads ``text``.
Recheck = Callable[[str], Sequence[Finding]]

# How many fixes one run may apply, and how many re-checks it may spend
# (rejected candidates cost a re-check too).  Real decks need a handful.
MAX_FIXES = 100
MAX_RECHECKS = 300

SYNTAX_RULE = "syntax-error"
# Findings that mean a deck is damaged (it does not parse or resolve); a fix
# must never add one, in its own file or in another.
DAMAGE_RULES = frozenset(r.id for r in LANGUAGE_RULES)


@dataclass(frozen=True)
class AppliedFix:
    """One fix that was applied: which rule, which fix, where the finding was
    (1-based line in the text the fix was applied to)."""

    rule: str
    title: str
    applicability: Applicability
    line: int


@dataclass(frozen=True)
class SkippedFix:
    """A fix that was not applied although eligible, and why."""

    rule: str
    title: str
    line: int
    reason: str

    def describe(self) -> str:
        return f"line {self.line}: fix \"{self.title}\" of {self.rule} was not applied: {self.reason}"


@dataclass(frozen=True)
class FixOutcome:
    text: str
    applied: tuple[AppliedFix, ...]
    findings: tuple[Finding, ...]  # the findings of ``text`` (from the last re-check)
    skipped: tuple[SkippedFix, ...] = ()
    settled: bool = True  # False when a bound stopped the loop with fixes left

    @property
    def count(self) -> int:
        return len(self.applied)


def same_path(a: str, b: str) -> bool:
    return os.path.normcase(os.path.abspath(a)) == os.path.normcase(os.path.abspath(b))


def allowed(fix: Fix, include_risky: bool) -> bool:
    return fix.applicability is Applicability.SAFE or include_risky


def fix_is_applicable(fix: Fix, path: str, text: str) -> bool:
    """The fix has edits, all in ``path``, inside ``text``, not overlapping."""
    if not fix.edits:
        return False
    n = len(text)
    spans = sorted((e.span.start, e.span.end) for e in fix.edits)
    for (start, end) in spans:
        if not (0 <= start <= end <= n):
            return False
    for (s1, e1), (s2, e2) in zip(spans, spans[1:]):
        if s2 < e1:
            return False
    return all(same_path(e.span.path, path) for e in fix.edits)


def choose_fix(finding: Finding, path: str, text: str, include_risky: bool) -> Optional[Fix]:
    """The fix to apply for ``finding`` when fixing ``path`` (None: none)."""
    if finding.suppressed is not None or not same_path(finding.span.path, path):
        return None
    for fix in finding.fixes:
        if allowed(fix, include_risky) and fix_is_applicable(fix, path, text):
            return fix
    return None


def candidates(findings: Iterable[Finding], path: str, text: str,
               include_risky: bool) -> list[tuple[Finding, Fix]]:
    """Eligible (finding, fix) pairs in a deterministic order: the findings'
    sort order (position, then rule id, then message)."""
    out = []
    for f in sorted(findings, key=Finding.sort_key):
        fix = choose_fix(f, path, text, include_risky)
        if fix is not None:
            out.append((f, fix))
    return out


def apply_fix(text: str, fix: Fix) -> str:
    return apply_edits(text, fix.edits)


def syntax_errors(findings: Iterable[Finding], path: str) -> int:
    return sum(1 for f in findings if f.rule == SYNTAX_RULE and same_path(f.span.path, path))


def damage(findings: Iterable[Finding]) -> Counter:
    """How many damage findings each (rule, file) has."""
    return Counter((f.rule, os.path.abspath(f.span.path)) for f in findings if f.rule in DAMAGE_RULES)


def new_damage(before: Counter, after: Counter, path: str) -> Optional[str]:
    """Why ``after`` is worse than ``before`` (None: it is not)."""
    for (rule, where), n in sorted(after.items()):
        if n > before.get((rule, where), 0):
            if rule == SYNTAX_RULE and same_path(where, path):
                return "the result would not parse"
            return f"it would cause {rule} in {os.path.basename(where)}"
    return None


def fix_text(
    text: str,
    path: str,
    recheck: Recheck,
    *,
    include_risky: bool = False,
    findings: Optional[Sequence[Finding]] = None,
    max_fixes: int = MAX_FIXES,
    max_rechecks: int = MAX_RECHECKS,
) -> FixOutcome:
    """Apply eligible fixes to ``text`` (the file ``path``) one at a time
    until none changes it.  ``findings``: those of ``text`` if already known
    (saves one re-check).  Never raises for a bad fix; ``recheck`` errors
    propagate."""
    current = list(findings) if findings is not None else list(recheck(text))
    rechecks = 0 if findings is not None else 1
    seen = {text}
    rejected: dict[str, str] = {}  # resulting text -> why it was rejected
    applied: list[AppliedFix] = []
    skipped: dict[tuple, SkippedFix] = {}
    settled = True
    while True:
        if len(applied) >= max_fixes:
            settled = not candidates(current, path, text, include_risky)
            break
        progressed = False
        damage_before = damage(current)
        for finding, fix in candidates(current, path, text, include_risky):
            line = finding.span.line
            try:
                new_text = apply_fix(text, fix)
            except OverlappingEdits:  # excluded by fix_is_applicable; kept as a guard
                continue
            if new_text == text:
                continue
            reason = rejected.get(new_text)
            if reason is None and new_text in seen:
                reason = "it would undo an earlier fix (the fixes of two findings disagree)"
            if reason is None:
                if rechecks >= max_rechecks:
                    settled = False
                    break
                after = list(recheck(new_text))
                rechecks += 1
                reason = new_damage(damage_before, damage(after), path)
                if reason is None:
                    text, current = new_text, after
                    seen.add(new_text)
                    applied.append(AppliedFix(finding.rule, fix.title, fix.applicability, line))
                    progressed = True
                    break
            rejected[new_text] = reason
            key = (finding.rule, fix.title, reason)
            skipped.setdefault(key, SkippedFix(finding.rule, fix.title, line, reason))
        if not progressed:
            break
    return FixOutcome(text, tuple(applied), tuple(current), tuple(skipped.values()), settled)
