"""Markdown for a merge-request comment: counts first, then findings by file.

Reviewers read the table to see what kind of problems a change brings and
the list to find them; both stay short (at most ``MAX_LISTED`` findings are
listed, since comment boxes have size limits).  Text from decks and messages
is escaped so that it cannot open HTML or break a table.
"""
from __future__ import annotations

from collections import Counter

from deckward.grammar.findings import Finding, Severity

from .checking import CheckResult
from .format_text import summary_line

MAX_LISTED = 200
SEVERITIES = (Severity.ERROR, Severity.WARNING, Severity.INFO)


def md_text(text: str) -> str:
    """Escape Markdown/HTML specials outside `code spans` (messages quote
    names in backticks, which should stay code)."""
    parts = text.split("`")
    if len(parts) % 2 == 0:  # an unpaired backtick: treat everything as text
        parts = [text.replace("`", "\\`")]
    out = []
    for i, part in enumerate(parts):
        if i % 2 == 1:
            out.append(f"`{part}`")
        else:
            for ch in "\\*_[]<>|#":
                part = part.replace(ch, "\\" + ch)
            out.append(part)
    return "".join(out)


def code(text: str) -> str:
    """Inline code that survives a backtick inside ``text``."""
    fence = "``" if "`" in text else "`"
    pad = " " if "`" in text else ""
    return f"{fence}{pad}{text}{pad}{fence}".replace("|", "\\|")


def counts_table(findings: list[Finding]) -> list[str]:
    by_rule: dict[str, Counter] = {}
    for f in findings:
        by_rule.setdefault(f.rule, Counter())[f.severity] += 1
    order = sorted(by_rule, key=lambda r: (-sum(by_rule[r].values()), r))
    lines = ["| Rule | Errors | Warnings | Info |", "| --- | ---: | ---: | ---: |"]
    for rule in order:
        c = by_rule[rule]
        lines.append(f"| {code(rule)} | " + " | ".join(str(c[s]) if c[s] else "" for s in SEVERITIES) + " |")
    total = Counter(f.severity for f in findings)
    lines.append("| **Total** | " + " | ".join(f"**{total[s]}**" for s in SEVERITIES) + " |")
    return lines


def finding_line(f: Finding) -> str:
    fix = ""
    if f.fixes:
        fix = " _(safe fix available)_" if any(x.is_safe for x in f.fixes) else " _(risky fix available)_"
    return f"- **{f.severity.value}** line {f.span.line}:{f.span.column} {code(f.rule)}: {md_text(f.message)}{fix}"


def by_file(findings: list[Finding]) -> dict[str, list[Finding]]:
    groups: dict[str, list[Finding]] = {}
    for f in findings:
        groups.setdefault(f.span.path, []).append(f)
    return groups


def render(result: CheckResult) -> str:
    active = result.active
    lines = [f"### deckward: {md_text(summary_line(result))}", ""]
    if not active:
        lines.append("No findings.")
    else:
        lines += counts_table(active)
        listed = 0
        for path, findings in sorted(by_file(active).items()):
            if listed >= MAX_LISTED:
                break
            lines += ["", f"#### {code(path)}", ""]
            for f in findings:
                if listed >= MAX_LISTED:
                    break
                lines.append(finding_line(f))
                listed += 1
        if listed < len(active):
            lines += ["", f"_... and {len(active) - listed} more; run `deckward check` for the full list._"]
    if result.suppressed:
        lines += ["", "<details><summary>Suppressed findings (" + str(len(result.suppressed)) + ")</summary>", ""]
        for f in result.suppressed[:MAX_LISTED]:
            lines.append(f"- {code(f.span.path)} line {f.span.line} {code(f.rule)}: {md_text(f.suppressed or '')}")
        lines += ["", "</details>"]
    for note in result.notes:
        lines += ["", f"> {md_text(note)}"]
    return "\n".join(lines) + "\n"
