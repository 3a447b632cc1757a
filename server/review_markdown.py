"""The review report as Markdown, for pasting into written feedback.

Same content as the HTML report, in the order a reader of feedback wants
it: the table of decks, what the batch gets wrong most often, then each
deck's findings with the reason (once per rule and deck, so repeated
findings stay short), the flagged lines and the suggested fix as a diff.
"""
from __future__ import annotations

from deckward import __version__
from deckward.grammar.findings import Severity
from deckward.grammar.wording import counted

from .format_markdown import code, md_text
from .review_batch import SEVERITIES, Review, batch_sentence, context_lines, evidence_rows, fix_diff, rule_info

LABELS = {Severity.ERROR: "Errors", Severity.WARNING: "Warnings", Severity.INFO: "Info"}


def fence(body: str, lang: str = "") -> list[str]:
    ticks = "```"
    while ticks in body:
        ticks += "`"
    return [ticks + lang, body, ticks]


def render_review_markdown(review: Review) -> str:
    total = len(review.decks)
    t = review.totals()
    out = [f"# {md_text(review.title)}", "",
           f"{counted(total, 'deck')} checked by deckward {__version__}: "
           f"{counted(t[Severity.ERROR], 'error')}, {counted(t[Severity.WARNING], 'warning')}, "
           f"{t[Severity.INFO]} info; "
           f"{review.clean_decks} without findings.", "",
           "| Deck | Errors | Warnings | Info | Suppressed |", "| --- | ---: | ---: | ---: | ---: |"]
    for d in review.decks:
        c = d.counts()
        out.append(f"| {code(d.path)} | " + " | ".join(str(c[s]) for s in SEVERITIES) + f" | {len(d.suppressed)} |")
    out += ["", "## Across the batch", ""]
    if not review.rules:
        out.append("No deck has a finding.")
    for s in review.rules:
        out.append(f"- **{md_text(batch_sentence(s, total))}** ({code(s.info.id)}, {s.severity.value}, "
                   f"{s.findings} finding{'s' * (s.findings != 1)})")
    texts = {d.path: d.text for d in review.decks}
    for d in review.decks:
        out += ["", f"## {code(d.path)}", ""]
        if not d.findings:
            out.append("No findings.")
        explained: set[str] = set()
        for f in d.findings:
            info = rule_info(f.rule)
            out.append(f"### {f.severity.value}: {code(f.rule)}, line {f.span.line}")
            out += ["", md_text(f.message), ""]
            text = texts.get(f.span.path)
            if text is not None:
                lines = context_lines(text, f, around=1)
                out += fence("\n".join(f"{cl.number:>4} {'>' if cl.flagged else ' '} {cl.text}" for cl in lines))
                out.append("")
            if f.rule not in explained:
                explained.add(f.rule)
                out += [f"_Why it matters:_ {md_text(info.why)}", ""]
            for fix in f.fixes:
                diff = fix_diff(fix, texts)
                kind = "safe" if fix.is_safe else "risky"
                out.append(f"Suggested fix ({kind}): {md_text(fix.title)}")
                out.append("")
                if diff:
                    out += fence(diff, "diff")
                    out.append("")
            if review.probed and f.evidence:
                out += ["| Probe number | Value |", "| --- | ---: |"]
                out += [f"| {md_text(k)} | {md_text(v)} |" for k, v in evidence_rows(f)]
                out.append("")
        if d.suppressed:
            out.append("Suppressed on purpose: " + "; ".join(
                f"line {f.span.line} {code(f.rule)} ({md_text(f.suppressed or '')})" for f in d.suppressed))
    for note in review.notes:
        out += ["", f"> {md_text(note)}"]
    return "\n".join(out).rstrip("\n") + "\n"
