"""What a review report says, independent of how it is printed.

``deckward review`` turns one check of a batch of decks (say, a class's
submissions) into: every deck with its findings, each finding with the
lines around it and its suggested fix as a diff, and a summary of the batch
by rule ("7 of 12 decks ...") so that a teacher sees the common
misconceptions first.  The HTML and Markdown renderers only lay this out.
"""
from __future__ import annotations

import difflib
from dataclasses import dataclass, field
from typing import Optional

from deckward.grammar.findings import Finding, Fix, RuleInfo, Severity
from deckward.rules.fixes.edits import OverlappingEdits, apply_edits
from deckward.rules.engine.registry import get as get_rule

from .checking import CheckResult

SEVERITIES = (Severity.ERROR, Severity.WARNING, Severity.INFO)


def rule_info(rule_id: str) -> RuleInfo:
    rule = get_rule(rule_id)
    if rule is not None:
        return rule.info
    return RuleInfo(id=rule_id, severity=Severity.WARNING, title=rule_id,
                    why="Reported by a part of deckward that has no catalogue entry.", category="other")


def read_text(path: str) -> Optional[str]:
    from deckward.grammar.safe_open import read_regular

    try:
        return read_regular(path).decode("utf-8", errors="replace")
    except OSError:
        return None


@dataclass
class DeckEntry:
    path: str
    text: Optional[str]  # None when it could not be read again for the report
    findings: list[Finding] = field(default_factory=list)  # active, in source order
    suppressed: list[Finding] = field(default_factory=list)
    recorded: list[dict] = field(default_factory=list)  # latest derived values from the results database

    def counts(self) -> dict[Severity, int]:
        c = {s: 0 for s in SEVERITIES}
        for f in self.findings:
            c[f.severity] += 1
        return c

    @property
    def anchor(self) -> str:
        return "deck-" + "".join(ch if ch.isalnum() else "-" for ch in self.path).strip("-")


@dataclass
class RuleSummary:
    info: RuleInfo
    decks: list[str]  # paths of the decks with at least one active finding of the rule
    findings: int
    severity: Severity  # the highest severity it was reported at


@dataclass
class Review:
    title: str
    decks: list[DeckEntry]
    rules: list[RuleSummary]  # most widespread first
    probed: bool = False
    notes: list[str] = field(default_factory=list)

    def totals(self) -> dict[Severity, int]:
        c = {s: 0 for s in SEVERITIES}
        for d in self.decks:
            for s, n in d.counts().items():
                c[s] += n
        return c

    @property
    def clean_decks(self) -> int:
        return sum(1 for d in self.decks if not d.findings)

    def deck(self, path: str) -> Optional[DeckEntry]:
        for d in self.decks:
            if d.path == path:
                return d
        return None


def build_review(result: CheckResult, title: str = "Deck review", probed: bool = False) -> Review:
    entries: dict[str, DeckEntry] = {}
    for path in result.files:
        entries.setdefault(path, DeckEntry(path, read_text(path)))
    for f in result.findings:
        entry = entries.get(f.span.path)
        if entry is None:  # a used file outside the named paths, or the configuration
            entry = entries[f.span.path] = DeckEntry(f.span.path, read_text(f.span.path))
        (entry.findings if f.suppressed is None else entry.suppressed).append(f)
    for entry in entries.values():
        entry.findings.sort(key=lambda f: (f.span.start, f.span.end, f.rule))
    by_rule: dict[str, RuleSummary] = {}
    for entry in entries.values():
        for f in entry.findings:
            s = by_rule.get(f.rule)
            if s is None:
                s = by_rule[f.rule] = RuleSummary(rule_info(f.rule), [], 0, f.severity)
            if entry.path not in s.decks:
                s.decks.append(entry.path)
            s.findings += 1
            if f.severity.rank > s.severity.rank:
                s.severity = f.severity
    rules = sorted(by_rule.values(), key=lambda s: (-len(s.decks), -s.severity.rank, -s.findings, s.info.id))
    return Review(title, list(entries.values()), rules, probed, list(result.notes))


def attach_recorded(review: Review, db) -> None:
    """The latest recorded derived values of each deck (``results_db``),
    so the report shows what was computed beside what the set-up says."""
    import os

    rows = db.derived([d.path for d in review.decks])
    for d in review.decks:
        full = os.path.abspath(d.path)
        d.recorded = [r for r in rows if r["deck_path"] == full]


def recorded_rows(entry: DeckEntry) -> list[tuple[str, str, str]]:
    """(name, value with unit, when) of a deck's recorded derived values."""
    import time

    out = []
    for r in entry.recorded:
        value = f"{r['value']:.6f} {r['unit']}" if r["value"] is not None else f"not available: {r['reason']}"
        out.append((r["name"], value, time.strftime("%Y-%m-%d %H:%M UTC", time.gmtime(r["recorded_at"]))))
    return out


def batch_sentence(summary: RuleSummary, total_decks: int) -> str:
    """``7 of 12 decks: Anion or electron affinity without diffuse functions``."""
    n = len(summary.decks)
    return f"{n} of {total_decks} deck{'s' if total_decks != 1 else ''}: {summary.info.title}"


@dataclass(frozen=True)
class ContextLine:
    number: int
    text: str
    flagged: bool
    mark: Optional[tuple[int, int]]  # columns (0-based, end exclusive) of the finding on this line


def context_lines(text: str, finding: Finding, around: int = 2) -> list[ContextLine]:
    """The finding's lines and ``around`` lines either side, with the part
    the finding covers marked."""
    lines = text.split("\n")
    span = finding.span
    first = max(1, span.line - around)
    last = min(len(lines), max(span.end_line, span.line) + around)
    out = []
    for n in range(first, last + 1):
        line = lines[n - 1].rstrip("\r")
        flagged = span.line <= n <= max(span.end_line, span.line)
        mark = None
        if flagged:
            start = span.column - 1 if n == span.line else 0
            end = span.end_column - 1 if n == span.end_line else len(line)
            start, end = max(0, min(start, len(line))), max(0, min(end, len(line)))
            if end > start:
                mark = (start, end)
        out.append(ContextLine(n, line, flagged, mark))
    return out


def fix_diff(fix: Fix, texts: dict[str, Optional[str]], context: int = 2) -> str:
    """A unified diff of what the fix changes (every file it touches), or
    an empty string when it cannot be applied to the current text."""
    by_path: dict[str, list] = {}
    for e in fix.edits:
        by_path.setdefault(e.span.path, []).append(e)
    out = []
    for path, edits in by_path.items():
        if path not in texts:
            texts[path] = read_text(path)
        before = texts[path]
        if before is None:
            return ""
        try:
            after = apply_edits(before, edits)
        except OverlappingEdits:
            return ""
        lines = difflib.unified_diff(before.splitlines(), after.splitlines(), fromfile=path, tofile=path,
                                     n=context, lineterm="")
        out.extend(lines)
    return "\n".join(out)


def experiment_caution(finding: Finding) -> str:
    """The caution that goes beside a comparison with experiment ('' when
    the finding's evidence has none)."""
    from deckward.rules.compute.comparison import CAUTION

    return CAUTION if any(k == "experimental_ev" for k, _ in finding.evidence) else ""


def evidence_rows(finding: Finding) -> list[tuple[str, str]]:
    """Probe numbers as (label, value) for a table."""
    rows = []
    for key, value in finding.evidence:
        label = key.replace("_ev", " (eV)").replace("_", " ")
        if isinstance(value, float):
            text = f"{value:.3f}" if abs(value) >= 1e-3 or value == 0 else f"{value:.2e}"
        elif isinstance(value, bool):
            text = "yes" if value else "no"
        else:
            text = str(value)
        rows.append((label, text))
    return rows

