"""Plain text: one finding a line, ``path:line:column: severity: rule: message``."""
from __future__ import annotations

from .checking import CheckResult


def summary_line(result: CheckResult) -> str:
    c = result.counts()
    parts = [f"{c['error']} error{'s' * (c['error'] != 1)}",
             f"{c['warning']} warning{'s' * (c['warning'] != 1)}",
             f"{c['info']} info"]
    n = len(result.files)
    line = f"{', '.join(parts)} in {n} file{'s' * (n != 1)}"
    if result.suppressed:
        line += f" ({len(result.suppressed)} suppressed)"
    if result.fixes_applied:
        line += f"; {result.fixes_applied} fix{'es' * (result.fixes_applied != 1)} applied"
    return line


def render(result: CheckResult) -> str:
    lines = [
        f"{f.span.path}:{f.span.line}:{f.span.column}: {f.severity.value}: {f.rule}: {f.message}"
        for f in result.active
    ]
    lines.extend(result.notes)
    lines.append(summary_line(result))
    return "\n".join(lines) + "\n"
