"""Run the rule catalogue on a resolved workspace.

One parse and one resolution per file (the ``Loader`` shares them); every
rule sees the same ``Workspace``.  A crash inside one rule becomes an
``internal-error`` finding naming the rule, and the other rules still run.
Configuration severities and suppressions are applied here, once, for the
command line and the language server alike.
"""
from __future__ import annotations

from typing import Iterable, Optional

from deckward.grammar.findings import Finding
from deckward.grammar.resolve import Workspace

from .config import CONFIG_RULE, Config
from .context import Context
from .registry import PROBE_MODULE, KnownRuleIds, all_rules, static_rules
from .suppressions import apply_suppressions


def known_rule_ids() -> KnownRuleIds:
    """Every rule id (a set-like object that imports the probes only when
    asked about an id that is not a static rule's)."""
    return KnownRuleIds({CONFIG_RULE.id})


def check_workspace(
    ws: Workspace,
    config: Optional[Config] = None,
    select: Optional[Iterable[str]] = None,
    extra: Iterable[Finding] = (),
    probed: bool = False,
) -> list[Finding]:
    """All findings for one workspace (the root deck and what it uses).

    ``extra``: findings computed elsewhere (probes) that should go through
    the same severity and suppression handling; ``probed`` says the probes
    ran, so that a suppression of a probe finding can be called unused only
    then."""
    config = config or Config()
    selected = set(select) if select is not None else None
    findings: list[Finding] = list(ws.findings)
    ran: set[str] = set()
    for rule in (all_rules() if probed else static_rules()).values():
        if selected is not None and rule.id not in selected:
            continue
        if config.severity_for(rule.id, rule.info.severity) is None:
            continue
        if rule.module == PROBE_MODULE and not probed:
            continue
        ran.add(rule.id)
        if rule.check is None:
            continue
        try:
            findings.extend(rule.check(Context(ws, rule.info)))
        except Exception as e:  # one broken rule must not hide the others
            import traceback

            tb = traceback.extract_tb(e.__traceback__)
            where = f" ({tb[-1].filename.rsplit('/', 1)[-1]}:{tb[-1].lineno})" if tb else ""
            findings.append(Finding(
                "internal-error", static_rules()["internal-error"].info.severity,
                f"rule `{rule.id}` failed: {type(e).__name__}: {e}{where}; its findings are missing",
                ws.root.index.span(0, 0),
            ))
    findings.extend(extra)
    findings = apply_suppressions(findings, [f.deck for f in ws.files], ran, known_rule_ids())
    out = []
    for f in findings:
        if selected is not None and f.rule not in selected and f.rule != "internal-error":
            continue
        sev = config.severity_for(f.rule, f.severity)
        if sev is None:
            continue
        out.append(f if sev is f.severity else f.with_severity(sev))
    return dedupe(out)


def dedupe(findings: Iterable[Finding]) -> list[Finding]:
    """Sorted, without repeats (a used file's findings appear once even when
    several checked decks use it)."""
    seen = set()
    out = []
    for f in sorted(findings, key=Finding.sort_key):
        key = (f.rule, f.span.path, f.span.start, f.span.end, f.message)
        if key in seen:
            continue
        seen.add(key)
        out.append(f)
    return out
