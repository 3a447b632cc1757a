"""SARIF 2.1.0: findings for code-scanning services and CI annotations.

One run: the tool with every rule deckward knows (id, title, rationale,
help text and link, default level), then one result per finding with its
location, related locations, fixes as SARIF fixes (replacements of regions)
and, for a finding suppressed by an ``# allow:`` comment, an in-source
suppression carrying the reason.  Columns count Unicode code points, which
is what ``Span`` holds, so ``columnKind`` says so.  Relative paths stay
relative to ``SRCROOT`` (the folder deckward ran in), which is what upload
actions expect; they are percent-encoded because ``uri-reference`` is not
checked by the schema.
"""
from __future__ import annotations

import json
import os
from typing import Optional
from urllib.parse import quote

from deckward import __version__
from deckward.grammar.findings import Finding, RuleInfo, Severity, Span
from deckward.rules.engine.registry import all_rules

from .checking import CheckResult
from .rule_docs import rule_url

SCHEMA_URI = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
LEVELS = {Severity.ERROR: "error", Severity.WARNING: "warning", Severity.INFO: "note"}


def artifact_location(path: str) -> dict:
    """A relative path against SRCROOT, an absolute one as a file URI."""
    if os.path.isabs(path):
        return {"uri": "file://" + quote(path.replace(os.sep, "/"))}
    return {"uri": quote(os.path.normpath(path).replace(os.sep, "/")), "uriBaseId": "SRCROOT"}


def region(span: Span) -> dict:
    line = max(1, span.line)
    end_line = max(line, span.end_line)
    column = max(1, span.column)
    end_column = max(1, span.end_column)
    if end_line == line:
        end_column = max(column, end_column)
    return {"startLine": line, "startColumn": column, "endLine": end_line, "endColumn": end_column,
            "charOffset": span.start, "charLength": max(0, span.end - span.start)}


def physical(span: Span) -> dict:
    return {"physicalLocation": {"artifactLocation": artifact_location(span.path), "region": region(span)}}


def help_markdown(info: RuleInfo) -> str:
    parts = [info.why]
    if info.threshold_note:
        parts.append(f"**Thresholds:** {info.threshold_note}")
    if info.fix is not None:
        parts.append(f"**Fix:** {info.fix.value}" + (f" - {info.fix_note}" if info.fix_note else ""))
    if info.references:
        parts.append("**References:**\n" + "\n".join(f"- {r}" for r in info.references))
    if info.bad_example:
        parts.append("**Flagged:**\n```\n" + info.bad_example.rstrip("\n") + "\n```")
    if info.good_example:
        parts.append("**Better:**\n```\n" + info.good_example.rstrip("\n") + "\n```")
    parts.append(f"[Documentation]({rule_url(info.id)})")
    return "\n\n".join(parts)


def help_text(info: RuleInfo) -> str:
    parts = [info.why]
    if info.references:
        parts.append("References: " + "; ".join(info.references))
    parts.append(f"Documentation: {rule_url(info.id)}")
    return "\n\n".join(parts)


def descriptor(info: RuleInfo) -> dict:
    props: dict = {"tags": [info.category], "fix": info.fix.value if info.fix is not None else "none"}
    if info.references:
        props["references"] = list(info.references)
    return {
        "id": info.id,
        "name": "".join(w.title() for w in info.id.split("-")),
        "shortDescription": {"text": info.title},
        "fullDescription": {"text": info.why},
        "help": {"text": help_text(info), "markdown": help_markdown(info)},
        "helpUri": rule_url(info.id),
        "defaultConfiguration": {"level": LEVELS[info.severity], "enabled": True},
        "properties": props,
    }


def _unknown_rule(rule_id: str) -> RuleInfo:
    return RuleInfo(id=rule_id, severity=Severity.WARNING, title=rule_id,
                    why="Reported by a part of deckward that has no catalogue entry.", category="other")


def fix_object(fix) -> dict:
    by_path: dict[str, list] = {}
    for e in fix.edits:
        by_path.setdefault(e.span.path, []).append(e)
    changes = []
    for path, edits in by_path.items():
        changes.append({
            "artifactLocation": artifact_location(path),
            "replacements": [{"deletedRegion": region(e.span), "insertedContent": {"text": e.new_text}}
                             for e in sorted(edits, key=lambda e: e.span.start)],
        })
    return {"description": {"text": fix.title}, "artifactChanges": changes,
            "properties": {"safety": fix.applicability.value}}


def result_object(f: Finding, index: int) -> dict:
    r: dict = {
        "ruleId": f.rule,
        "ruleIndex": index,
        "level": LEVELS[f.severity],
        "message": {"text": f.message},
        "locations": [physical(f.span)],
    }
    if f.related:
        r["relatedLocations"] = [dict(physical(rel.span), id=i + 1, message={"text": rel.message})
                                 for i, rel in enumerate(f.related)]
    if f.fixes:
        r["fixes"] = [fix_object(x) for x in f.fixes]
    if f.suppressed is not None:
        r["suppressions"] = [{"kind": "inSource", "status": "accepted", "justification": f.suppressed}]
    if f.evidence:
        r["properties"] = {"evidence": {k: v for k, v in f.evidence}}
    return r


def sarif_log(result: CheckResult, cwd: Optional[str] = None) -> dict:
    rules = [r.info for r in all_rules().values()]
    known = {info.id for info in rules}
    for f in result.findings:  # anything reported outside the catalogue still needs a descriptor
        if f.rule not in known:
            known.add(f.rule)
            rules.append(_unknown_rule(f.rule))
    index = {info.id: i for i, info in enumerate(rules)}
    root = os.path.abspath(cwd or os.getcwd()).replace(os.sep, "/").rstrip("/") + "/"
    run = {
        "tool": {"driver": {
            "name": "deckward",
            "version": __version__,
            "semanticVersion": __version__,
            "informationUri": rule_url("").rsplit("#", 1)[0],
            "rules": [descriptor(info) for info in rules],
        }},
        "originalUriBaseIds": {"SRCROOT": {"uri": "file://" + quote(root)}},
        "columnKind": "unicodeCodePoints",
        "invocations": [{
            "executionSuccessful": True,
            "toolExecutionNotifications": [{"level": "note", "message": {"text": n}} for n in result.notes],
        }],
        "results": [result_object(f, index[f.rule]) for f in result.findings],
    }
    return {"$schema": SCHEMA_URI, "version": "2.1.0", "runs": [run]}


def render(result: CheckResult) -> str:
    return json.dumps(sarif_log(result), indent=2, ensure_ascii=False) + "\n"
