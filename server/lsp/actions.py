"""Code actions: each fix as a quick fix, and "apply all safe fixes".

Quick fixes come from the findings under the cursor, from the same analysis
that produced the diagnostics; a fix marked risky says so in its title
(it changes what is computed or what it costs) and is never the preferred
one.  The source action applies the safe fixes one at a time with a
re-check after each (``deckward.rules.fixes.apply.fix_text``, the loop behind
``deckward check --fix``) and offers the result as one edit.
"""
from __future__ import annotations

import asyncio
from typing import TYPE_CHECKING

from lsprotocol import types as t

from deckward.grammar.findings import Finding, Fix

from .core import DeckServer, minimal_edit, to_diagnostic

if TYPE_CHECKING:
    from .workspace import Analysis

FIX_ALL_KIND = t.CodeActionKind.SourceFixAll.value + ".deckward"
FIX_ALL_TITLE = "Apply all safe fixes in this file"
RISKY_SUFFIX = " (risky: changes what is computed)"


def fix_title(fix: Fix) -> str:
    return fix.title if fix.is_safe else fix.title + RISKY_SUFFIX


def _overlaps(finding: Finding, start: int, end: int) -> bool:
    return finding.span.start <= end and start <= finding.span.end


def quick_fixes(analysis: "Analysis", start: int, end: int) -> list[t.CodeAction]:
    actions = []
    for finding in analysis.own_findings:
        if not finding.fixes or not _overlaps(finding, start, end):
            continue
        diagnostic = to_diagnostic(finding, analysis)
        preferred_given = False
        for fix in finding.fixes:
            if not fix.edits or any(e.span.path != analysis.path for e in fix.edits):
                continue
            preferred = fix.is_safe and not preferred_given
            preferred_given = preferred_given or preferred
            edits = [t.TextEdit(range=analysis.positions.range(e.span.start, e.span.end), new_text=e.new_text)
                     for e in sorted(fix.edits, key=lambda e: e.span.start)]
            actions.append(t.CodeAction(
                title=fix_title(fix),
                kind=t.CodeActionKind.QuickFix,
                diagnostics=[diagnostic],
                is_preferred=preferred or None,
                edit=t.WorkspaceEdit(changes={analysis.uri: edits}),
            ))
    return actions


def fix_all(server: DeckServer, analysis: "Analysis"):
    """The text with every safe fix applied (None when nothing changes)."""
    from deckward.rules.fixes import apply as fixes

    if not fixes.candidates(analysis.findings, analysis.path, analysis.text, include_risky=False):
        return None
    outcome = fixes.fix_text(analysis.text, analysis.path,
                             lambda text: server.store.recheck_text(analysis.uri, text),
                             include_risky=False, findings=analysis.findings)
    return outcome if outcome.text != analysis.text else None


def _wants(only, kind: str) -> bool:
    if not only:
        return True
    names = [getattr(k, "value", k) for k in only]
    return any(kind == k or kind.startswith(k + ".") for k in names)


async def code_action(ls: DeckServer, params: t.CodeActionParams):
    analysis = await ls.analysis(params.text_document.uri)
    if analysis is None:
        return None
    only = params.context.only if params.context else None
    actions: list[t.CodeAction] = []
    if _wants(only, t.CodeActionKind.QuickFix.value):
        start = analysis.positions.offset(params.range.start)
        end = analysis.positions.offset(params.range.end)
        actions.extend(quick_fixes(analysis, start, end))
    if _wants(only, FIX_ALL_KIND):
        loop = asyncio.get_running_loop()
        outcome = await loop.run_in_executor(ls.executor, fix_all, ls, analysis)
        if outcome is not None and ls.is_current(analysis.uri, analysis):
            n = outcome.count
            actions.append(t.CodeAction(
                title=f"{FIX_ALL_TITLE} ({n} fix{'es' * (n != 1)})",
                kind=FIX_ALL_KIND,
                edit=t.WorkspaceEdit(changes={analysis.uri: [minimal_edit(analysis, outcome.text)]}),
            ))
    general_menu = not only and params.context and not params.context.diagnostics
    for kind, build in ls.source_actions:
        # offered when asked for, or in the general menu away from a finding
        if (only and _wants(only, kind)) or general_menu:
            actions.append(build(analysis.uri))
    return actions


def _options(server: DeckServer) -> t.CodeActionOptions:
    """The kinds offered: quick fixes, fix-all and the source actions other features contribute."""
    kinds = [t.CodeActionKind.QuickFix, t.CodeActionKind.SourceFixAll, FIX_ALL_KIND]
    return t.CodeActionOptions(code_action_kinds=kinds + [kind for kind, _ in server.source_actions])


FEATURES = [(t.TEXT_DOCUMENT_CODE_ACTION, _options, code_action)]
