"""What ``deckward run`` checks before it computes anything.

A run costs minutes to hours, so the deck gets the same static check as
``deckward check`` first: error findings (charge and multiplicity that
cannot be, an unknown basis or method, a name that does not resolve) stop
the run with exit status 2 and are listed; warnings are printed and the run
goes on, so that a suspicious set-up never computes silently.  A deck with
no state has nothing to run, which is said in one line (exit 2).
"""
from __future__ import annotations

from typing import Optional, TextIO

from deckward.grammar.findings import Finding, Severity


def _line(f: Finding) -> str:
    return f"{f.span.path}:{f.span.line}:{f.span.column}: {f.severity.value}: {f.rule}: {f.message}\n"


def gate(ws, config, stream: TextIO, what: str = "run") -> Optional[int]:
    """None when the deck may be run; otherwise the exit status, after
    writing why to ``stream``.  Warnings are written either way."""
    from deckward.rules.engine.checker import check_workspace

    if not ws.states:
        stream.write(f"deckward: nothing to {what}: {ws.path} has no state (a state block says what to compute)\n")
        return 2
    findings = [f for f in check_workspace(ws, config) if f.suppressed is None]
    errors = [f for f in findings if f.severity is Severity.ERROR]
    warnings = [f for f in findings if f.severity is Severity.WARNING]
    for f in errors + warnings:
        stream.write(_line(f))
    if errors:
        n = len(errors)
        stream.write(f"deckward: the deck has {n} error{'s' * (n != 1)} and cannot be {what}"
                     f"{'' if what == 'run' else 'd'} (see `deckward check`)\n")
        return 2
    if warnings:
        n = len(warnings)
        stream.write(f"deckward: {n} warning{'s' * (n != 1)} (see `deckward check`); running anyway\n")
    return None
