"""The finding type shared by every part of deckward.

A finding is plain immutable data: which rule, how severe, what to say, where
(an exact source span), what else is relevant (related spans) and how it could
be fixed (text edits with an applicability).  Grammar, resolution, rules and
probes all produce findings; the command line, the language server and the
report formats only read them.  It lives in ``grammar`` because the grammar is
the first producer and nothing may import upwards.
"""
from __future__ import annotations

import enum
from dataclasses import field, replace
from typing import Any, Optional

from .records import record


class Severity(str, enum.Enum):
    """How much a finding matters; ordered error > warning > info."""

    ERROR = "error"
    WARNING = "warning"
    INFO = "info"

    @property
    def rank(self) -> int:
        return {"error": 3, "warning": 2, "info": 1}[self.value]

    @classmethod
    def parse(cls, text: str) -> "Severity":
        return cls(text.strip().lower())


class Applicability(str, enum.Enum):
    """Whether applying a fix keeps what the author meant (safe) or changes
    the calculation's meaning or cost (risky)."""

    SAFE = "safe"
    RISKY = "risky"


@record(frozen=True, order=True)
class Span:
    """A range of source text: character offsets (end exclusive) and the
    matching 1-based line and column (columns count code points, the end
    column is exclusive).  Conversion to UTF-16 or bytes happens at the edge."""

    path: str
    start: int
    end: int
    line: int
    column: int
    end_line: int
    end_column: int

    def contains(self, offset: int) -> bool:
        return self.start <= offset <= self.end

    def to_dict(self) -> dict:
        return {
            "path": self.path,
            "line": self.line,
            "column": self.column,
            "end_line": self.end_line,
            "end_column": self.end_column,
            "start_offset": self.start,
            "end_offset": self.end,
        }


@record(frozen=True)
class TextEdit:
    """Replace the text of ``span`` with ``new_text`` (an insertion when the
    span is empty)."""

    span: Span
    new_text: str

    def to_dict(self) -> dict:
        d = self.span.to_dict()
        d["new_text"] = self.new_text
        return d


@record(frozen=True)
class Fix:
    """A titled list of edits against the original text."""

    title: str
    edits: tuple[TextEdit, ...]
    applicability: Applicability = Applicability.SAFE

    @property
    def is_safe(self) -> bool:
        return self.applicability is Applicability.SAFE

    def to_dict(self) -> dict:
        return {
            "title": self.title,
            "safety": self.applicability.value,  # "safe" or "risky"
            "edits": [e.to_dict() for e in self.edits],
        }


@record(frozen=True)
class Related:
    """Another place that explains a finding ("the level is defined here")."""

    span: Span
    message: str


@record(frozen=True)
class Finding:
    """One thing deckward has to say about a deck."""

    rule: str
    severity: Severity
    message: str
    span: Span
    related: tuple[Related, ...] = ()
    fixes: tuple[Fix, ...] = ()
    # Numbers that back the finding (probe results), keyed by name; plain
    # JSON-serialisable values only.
    evidence: tuple[tuple[str, Any], ...] = field(default=(), compare=False)
    suppressed: Optional[str] = None  # the reason, when a suppression matched

    @property
    def path(self) -> str:
        return self.span.path

    def sort_key(self) -> tuple:
        return (self.span.path, self.span.start, self.span.end, self.rule, self.message)

    def with_severity(self, severity: Severity) -> "Finding":
        return replace(self, severity=severity)

    def to_dict(self) -> dict:
        d = {
            "path": self.span.path,
            "rule": self.rule,
            "severity": self.severity.value,
            "message": self.message,
            "line": self.span.line,
            "column": self.span.column,
            "end_line": self.span.end_line,
            "end_column": self.span.end_column,
            "related": [
                dict(r.span.to_dict(), message=r.message) for r in self.related
            ],
            "fixes": [f.to_dict() for f in self.fixes],
        }
        if self.evidence:
            d["evidence"] = dict(self.evidence)
        if self.suppressed is not None:
            d["suppressed"] = self.suppressed
        return d


@record(frozen=True)
class RuleInfo:
    """Metadata of one rule, kept beside the code that reports it; the
    user documentation (``deckward rules``, ``deckward explain``,
    docs/rules.md) is generated from it."""

    id: str
    severity: Severity
    title: str
    why: str
    references: tuple[str, ...] = ()
    bad_example: str = ""
    good_example: str = ""
    fix: Optional[Applicability] = None  # None: the rule offers no fix
    fix_note: str = ""
    category: str = "language"
    threshold_note: str = ""  # where a threshold comes from (source or "common practice")
    # The exact text the finding covers in ``bad_example`` (tests check it).
    fires_at: str = ""
    # The bad example after applying the rule's fix (tests check it).
    fixed_example: str = ""
    # When the rule reports at another severity than ``severity``, in words
    # ("error when an electron affinity depends on the anion").
    severity_note: str = ""

    @property
    def severity_words(self) -> str:
        """"warning", or "warning; error when ..." for a rule whose findings escalate."""
        return self.severity.value + (f"; {self.severity_note}" if self.severity_note else "")
