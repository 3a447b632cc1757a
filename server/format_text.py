"""Plain text: one finding a line, ``path:line:column: severity: rule: message``."""
from __future__ import annotations

from deckward.grammar.wording import counted

from .checking import CheckResult


def summary_line(result: CheckResult) -> str:
    c = result.counts()
    parts = [counted(c["error"], "error"), counted(c["warning"], "warning"), f"{c['info']} info"]
    line = f"{', '.join(parts)} in {counted(len(result.files), 'file')}"
    if result.suppressed:
        line += f" ({len(result.suppressed)} suppressed)"
    if result.fixes_applied:
        line += f"; {counted(result.fixes_applied, 'fix', 'fixes')} applied"
    return line


def render(result: CheckResult) -> str:
    lines = [
        f"{f.span.path}:{f.span.line}:{f.span.column}: {f.severity.value}: {f.rule}: {f.message}"
        for f in result.active
    ]
    lines.extend(result.notes)
    lines.append(summary_line(result))
    return "\n".join(lines) + "\n"
