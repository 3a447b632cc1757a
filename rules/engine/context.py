"""What a rule sees: the resolved workspace, and helpers to report findings."""
from __future__ import annotations

from typing import Iterable, Optional

from deckward.grammar.findings import Finding, Fix, Related, RuleInfo, Severity, Span
from deckward.grammar.records import record
from deckward.grammar.resolve import Workspace


@record
class Context:
    """What a rule's check is given: the workspace and the rule's own ``RuleInfo``."""

    workspace: Workspace
    info: RuleInfo

    def finding(
        self,
        span: Span,
        message: str,
        *,
        severity: Optional[Severity] = None,
        related: Iterable[Related] = (),
        fixes: Iterable[Fix] = (),
        evidence: Iterable[tuple] = (),
    ) -> Finding:
        """A finding of this rule at ``span`` (default severity unless given)."""
        return Finding(
            self.info.id,
            severity or self.info.severity,
            message,
            span,
            tuple(related),
            tuple(fixes),
            tuple(evidence),
        )
