"""Rule documentation generated from the rules' own metadata.

``deckward rules``, ``deckward explain ID`` and docs/rules.md all come from
``RuleInfo``; tests/test_rule_docs.py fails when docs/rules.md is stale
(regenerate with ``python -m deckward.server.rule_docs > docs/rules.md``).
"""
from __future__ import annotations

import os
import sys

from deckward.grammar.findings import RuleInfo
from deckward.rules.engine.registry import all_rules

CATEGORY_TITLES = {
    "language": "The deck language",
    "electrons": "Electron bookkeeping",
    "ion-states": "Ion states and how a number is obtained",
    "basis": "Basis sets",
    "geometry": "Geometry",
    "hygiene": "Hygiene",
    "probe": "Probes (computed with PySCF on request)",
}
# A group hosting its own copy of docs/rules.md sets DECKWARD_DOCS_URL; the
# editor's and SARIF's links follow it.  Without it, links point at a copy
# of the rule documentation of the installed version, written once into the
# cache folder, so that they always resolve.
_docs_uri: str | None = None


def docs_uri() -> str:
    """A URI of this version's rule documentation."""
    global _docs_uri
    if _docs_uri is None:
        _docs_uri = os.environ.get("DECKWARD_DOCS_URL") or _local_copy()
    return _docs_uri


def _local_copy() -> str:
    from pathlib import Path

    from deckward import __version__

    base = os.environ.get("DECKWARD_CACHE_DIR") or os.path.join(os.path.expanduser("~"), ".cache", "deckward")
    path = Path(base, "docs", f"rules-{__version__}.md").absolute()
    text = markdown()
    try:
        if not path.is_file() or path.read_text(encoding="utf-8") != text:
            path.parent.mkdir(parents=True, exist_ok=True)
            tmp = path.with_name(f".{path.name}.{os.getpid()}.tmp")
            tmp.write_text(text, encoding="utf-8")
            os.replace(tmp, path)
    except OSError:  # a read-only home: the link still names the right place
        pass
    return path.as_uri()


def rule_url(rule_id: str) -> str:
    return f"{docs_uri()}#{rule_id}"


def _categories() -> list[tuple[str, list[RuleInfo]]]:
    groups: dict[str, list[RuleInfo]] = {}
    for rule in all_rules().values():
        groups.setdefault(rule.info.category, []).append(rule.info)
    order = list(CATEGORY_TITLES) + sorted(set(groups) - set(CATEGORY_TITLES))
    return [(c, groups[c]) for c in order if c in groups]


def fix_words(info: RuleInfo) -> str:
    return "none" if info.fix is None else info.fix.value


def listing() -> str:
    """One line a rule, grouped by category (``deckward rules``)."""
    lines = []
    width = max(len(r) for r in all_rules())
    for cat, infos in _categories():
        lines.append(CATEGORY_TITLES.get(cat, cat.title()))
        for info in infos:
            fix = "" if info.fix is None else f"  [fix: {info.fix.value}]"
            note = f" ({info.severity_note})" if info.severity_note else ""
            lines.append(f"  {info.id:<{width}}  {info.severity.value:<7}  {info.title}{fix}{note}")
        lines.append("")
    return "\n".join(lines)


def explain(info: RuleInfo) -> str:
    """The rationale, references and examples of one rule (plain text)."""
    out = [f"{info.id} ({info.severity_words}): {info.title}", "", info.why, ""]
    if info.threshold_note:
        out += [f"Thresholds: {info.threshold_note}", ""]
    if info.references:
        out.append("References:")
        out += [f"  - {r}" for r in info.references]
        out.append("")
    if info.bad_example:
        out += ["Example:", _indent(info.bad_example), ""]
    if info.good_example:
        out += ["Better:", _indent(info.good_example), ""]
    out.append(f"Fix: {fix_words(info)}" + (f" ({info.fix_note})" if info.fix_note else ""))
    return "\n".join(out).rstrip() + "\n"


def _indent(text: str) -> str:
    return "\n".join("    " + line if line else "" for line in text.rstrip("\n").split("\n"))


def markdown() -> str:
    """docs/rules.md."""
    out = [
        "# Rules",
        "",
        "Generated from the rules' metadata by `python -m deckward.server.rule_docs`; do not edit by hand.",
        "Severity is the default; `deckward.yaml` can change it (`rules: {ID: error|warning|info|off}`).",
        "",
    ]
    for cat, infos in _categories():
        out += [f"## {CATEGORY_TITLES.get(cat, cat.title())}", "", "| id | severity | title | fix |", "|---|---|---|---|"]
        for info in infos:
            out.append(f"| [{info.id}](#{info.id}) | {info.severity_words} | {info.title} | {fix_words(info)} |")
        out.append("")
    for cat, infos in _categories():
        for info in infos:
            out += [f"### {info.id}", "", f"**Finding** ({info.severity_words}): {info.title}.", "",
                    "**Why it matters.** " + info.why, ""]
            if info.threshold_note:
                out += ["**Thresholds.** " + info.threshold_note, ""]
            if info.bad_example:
                out += ["**Example**", "", "```", info.bad_example.rstrip("\n"), "```", ""]
            if info.good_example:
                out += ["**Better**", "", "```", info.good_example.rstrip("\n"), "```", ""]
            out += [f"**Fix.** {fix_words(info)}" + (f": {info.fix_note}" if info.fix_note else "."), ""]
            if info.references:
                out += ["**References**", ""] + [f"- {r}" for r in info.references] + [""]
    return "\n".join(out).rstrip() + "\n"


if __name__ == "__main__":
    sys.stdout.write(markdown())
