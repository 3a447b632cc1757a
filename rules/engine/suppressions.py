"""Suppression comments: ``# allow: ID[, ID...] -- reason``.

A trailing comment suppresses findings that start on its own line; a comment
on a line of its own applies to the next line that holds a statement token;
``# allow-file:`` applies to the whole file.  Suppressed findings are kept
(marked with their reason) so that SARIF can report them as suppressed; a
suppression without a reason, and one that suppresses nothing, are reported.
"""
from __future__ import annotations

import re
from dataclasses import replace
from typing import Iterable, Optional

from deckward.grammar.findings import Finding, RuleInfo, Severity, Span
from deckward.grammar.model import Deck
from deckward.grammar.records import record


SUPPRESSION_RULES = (
    RuleInfo(
        id="suppression-without-reason",
        severity=Severity.INFO,
        title="A suppression that gives no reason",
        why="A reviewer reading `# allow: koopmans-ip` cannot tell whether the author weighed the "
        "warning or silenced it; the reason after `--` records the judgement.",
        references=("The deck language, version 1: suppressing a finding (docs/deck-language.md).",),
        bad_example="derive ie_koopmans = -orbital(neutral, homo) in ev  # allow: koopmans-ip\n",
        good_example="derive ie_koopmans = -orbital(neutral, homo) in ev  # allow: koopmans-ip -- compared with delta-SCF below\n",
        category="hygiene",
    ),
    RuleInfo(
        id="unused-suppression",
        severity=Severity.INFO,
        title="A suppression that suppresses nothing",
        why="A suppression left behind after the deck changed hides nothing today but would silently "
        "hide a future finding on that line.",
        references=("The deck language, version 1: suppressing a finding (docs/deck-language.md).",),
        category="hygiene",
    ),
)


@record(frozen=True)
class Suppression:
    """One ``# allow:`` comment: the rule ids, the reason and the line it covers."""

    ids: tuple[str, ...]
    reason: Optional[str]
    span: Span  # the comment
    whole_file: bool
    target_line: int  # the line it applies to (0 for the whole file)


def parse_suppressions(deck: Deck) -> tuple[list[Suppression], list[Finding]]:
    """The deck's suppressions, and findings about malformed ones."""
    found: list[Suppression] = []
    problems: list[Finding] = []
    statement_lines = sorted({s.line for s in deck.statement_spans} | _token_lines(deck))
    for c in deck.comments:
        text = c.text.strip()
        if not text.lower().startswith("allow"):
            continue
        head, sep, reason = text.partition("--")
        m = re.match(r"^allow(-file)?\s*:\s*(.*)$", head.strip(), re.IGNORECASE)
        if not m:
            continue
        ids = tuple(i.strip().lower() for i in m.group(2).split(",") if i.strip())
        reason = reason.strip() if sep else ""
        if not reason:
            problems.append(Finding("suppression-without-reason", Severity.INFO,
                                    "this suppression gives no reason: add `-- why` after the rule ids", c.span))
        whole = bool(m.group(1))
        if whole:
            target = 0
        elif c.own_line:
            target = next((ln for ln in statement_lines if ln > c.span.line), -1)
        else:
            target = c.span.line
        found.append(Suppression(ids, reason or None, c.span, whole, target))
    return found, problems


def _token_lines(deck: Deck) -> set[int]:
    """Lines that hold some non-comment text."""
    lines = set()
    comment_lines = {c.span.line for c in deck.comments if c.own_line}
    for i, line in enumerate(deck.text.split("\n"), start=1):
        if line.strip() and i not in comment_lines:
            lines.add(i)
    return lines


def apply_suppressions(findings: Iterable[Finding], decks: Iterable[Deck], ran: set[str],
                       known: set[str]) -> list[Finding]:
    """Mark suppressed findings and add findings about the suppressions.

    ``ran`` is the set of rule ids that were run; a suppression naming a rule
    that did not run (a probe, a rule turned off) is not called unused."""
    findings = list(findings)
    by_path: dict[str, list[Suppression]] = {}
    extra: list[Finding] = []
    for deck in decks:
        sups, problems = parse_suppressions(deck)
        by_path[deck.path] = sups
        extra.extend(problems)
    used: set[tuple[int, str]] = set()
    out = []
    for f in findings:
        for s in by_path.get(f.span.path, ()):
            if f.rule in s.ids and (s.whole_file or s.target_line == f.span.line):
                used.add((id(s), f.rule))
                f = replace(f, suppressed=s.reason or "")
                break
        out.append(f)
    for path, sups in by_path.items():
        for s in sups:
            for rid in s.ids:
                if (id(s), rid) not in used and rid in ran:
                    extra.append(Finding("unused-suppression", Severity.INFO,
                                         f"the suppression of `{rid}` suppresses nothing", s.span))
                elif rid not in known:
                    extra.append(Finding("unused-suppression", Severity.INFO,
                                         f"`{rid}` is not a rule id (see `deckward rules`)", s.span))
    return out + extra
