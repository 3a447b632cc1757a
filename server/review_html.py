"""The review report as one self-contained HTML file.

No scripts, fonts, images or links that leave the page: the stylesheet is
inlined and plots are inline SVG, so the file can be mailed, archived or
opened offline.  The markup is also well-formed XML (every element closed,
only XML's own entities), so tests and other tools can parse it strictly.
Structure carries meaning for assistive technology: one ``h1``, an ``h2``
for each part and each deck, an ``h3`` for each finding, tables with
header cells and captions, and a sentence of text beside every plot.
"""
from __future__ import annotations

import re
from html import escape
from importlib import resources

from deckward import __version__
from deckward.grammar.findings import Finding, Severity

from .review_batch import (SEVERITIES, DeckEntry, Review, context_lines, evidence_rows, experiment_caution, fix_diff,
                           recorded_rows,
                           rule_info)

LABELS = {Severity.ERROR: "Error", Severity.WARNING: "Warning", Severity.INFO: "Info"}
COLUMN = {Severity.ERROR: "Errors", Severity.WARNING: "Warnings", Severity.INFO: "Info"}


def e(text: object) -> str:
    return escape(str(text), quote=True)


def stylesheet() -> str:
    return resources.files("deckward.server").joinpath("review.css").read_text(encoding="utf-8")


def inline(text: str) -> str:
    """Message text with `backticked` names as code."""
    parts = text.split("`")
    if len(parts) % 2 == 0:
        return e(text)
    return "".join(f"<code>{e(p)}</code>" if i % 2 else e(p) for i, p in enumerate(parts))


def first_sentence(text: str) -> str:
    m = re.match(r"(.+?[.!?])(\s+[A-Z(]|$)", text, flags=re.S)
    return m.group(1) if m else text


def badge(sev: Severity) -> str:
    return f'<span class="sev sev-{sev.value}">{LABELS[sev]}</span>'


def count_cell(n: int, label: str = "") -> str:
    data = f' data-label="{e(label)}"' if label else ""
    return f'<td class="num{" zero" if n == 0 else ""}"{data}>{n}</td>'


def path_text(path: str) -> str:
    """A path that may break after its separators (not inside a name)."""
    return "/<wbr/>".join(e(part) for part in path.split("/"))


def plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


# -- parts -----------------------------------------------------------------------------

def summary_table(review: Review) -> str:
    rows = []
    for d in review.decks:
        c = d.counts()
        rows.append(f'<tr><th scope="row"><a class="path" href="#{d.anchor}">{path_text(d.path)}</a></th>'
                    + "".join(count_cell(c[s], COLUMN[s]) for s in SEVERITIES)
                    + count_cell(len(d.suppressed), "Suppressed") + "</tr>")
    t = review.totals()
    rows.append('<tr class="total"><th scope="row">All decks</th>'
                + "".join(count_cell(t[s], COLUMN[s]) for s in SEVERITIES)
                + count_cell(sum(len(d.suppressed) for d in review.decks), "Suppressed") + "</tr>")
    head = ('<tr><th scope="col">Deck</th>' + "".join(f'<th scope="col" class="num">{COLUMN[s]}</th>' for s in SEVERITIES)
            + '<th scope="col" class="num">Suppressed</th></tr>')
    return ('<section id="summary" aria-labelledby="h-summary">\n<h2 id="h-summary">Summary of the decks</h2>\n'
            '<div class="table-wrap"><table class="summary">\n<caption>Findings by severity, one row a deck</caption>\n'
            f"<thead>{head}</thead>\n<tbody>\n" + "\n".join(rows) + "\n</tbody></table></div>\n</section>")


def batch_section(review: Review) -> str:
    total = len(review.decks)
    out = ['<section id="batch" aria-labelledby="h-batch">', '<h2 id="h-batch">Across the batch</h2>']
    if not review.rules:
        out.append('<p class="clean">No deck has a finding.</p></section>')
        return "\n".join(out)
    out.append(f"<p>What the {plural(total, 'deck')} get wrong most often, by rule; "
               f"{plural(review.clean_decks, 'deck')} {'has' if review.clean_decks == 1 else 'have'} no finding.</p>")
    out.append('<ol class="batch">')
    by_path = {d.path: d for d in review.decks}
    for s in review.rules:
        share = round(100 * len(s.decks) / total) if total else 0
        links = ", ".join(f'<a class="path" href="#{by_path[p].anchor}">{path_text(p)}</a>' for p in s.decks if p in by_path)
        out.append(
            f'<li class="rule-summary" data-rule="{e(s.info.id)}" data-decks="{len(s.decks)}" data-findings="{s.findings}">'
            f'<div class="batch-line"><span class="batch-count">{len(s.decks)} of {plural(total, "deck")}</span>'
            f"<span>{inline(s.info.title)}</span> {badge(s.severity)} <code>{e(s.info.id)}</code></div>"
            f'<div class="bar" role="presentation"><span style="width: {share}%"></span></div>'
            f'<p class="small">{inline(first_sentence(s.info.why))}</p>'
            f'<p class="decks-list">{plural(s.findings, "finding")} in: {links}</p></li>'
        )
    out.append("</ol>\n</section>")
    return "\n".join(out)


def context_block(text: str, f: Finding) -> str:
    lines = context_lines(text, f)
    if not lines:
        return ""
    parts = []
    for cl in lines:
        if cl.mark:
            a, b = cl.mark
            body = f"{e(cl.text[:a])}<mark>{e(cl.text[a:b])}</mark>{e(cl.text[b:])}"
        else:
            body = e(cl.text)
        cls = "ln flagged" if cl.flagged else "ln"
        parts.append(f'<span class="{cls}"><span class="no" aria-hidden="true">{cl.number}</span>{body or " "}</span>')
    label = f"lines {lines[0].number} to {lines[-1].number} of {f.span.path}"
    return f'<pre class="context" aria-label="{e(label)}">' + "".join(parts) + "</pre>"


def diff_block(diff: str, deck_path: str) -> str:
    """The diff, without the file header when the fix changes only the
    deck being shown."""
    lines = diff.split("\n")
    headers = [line for line in lines if line.startswith(("+++ ", "--- "))]
    if all(h[4:] == deck_path for h in headers):
        lines = [line for line in lines if line not in headers]
    parts = []
    for line in lines:
        if line.startswith(("+++ ", "--- ")):
            cls = "hunk"
        elif line.startswith("@@"):
            cls = "hunk"
        elif line.startswith("+"):
            cls = "add"
        elif line.startswith("-"):
            cls = "del"
        else:
            cls = ""
        parts.append(f'<span class="ln {cls}">{e(line) or " "}</span>')
    return '<pre class="diff">' + "".join(parts) + "</pre>"


def evidence_table(f: Finding) -> str:
    rows = "".join(f'<tr><th scope="row">{e(k)}</th><td class="num">{e(v)}</td></tr>' for k, v in evidence_rows(f))
    return ('<div class="table-wrap"><table class="evidence"><caption>Probe numbers</caption>'
            '<thead><tr><th scope="col">Quantity</th><th scope="col" class="num">Value</th></tr></thead>'
            f"<tbody>{rows}</tbody></table></div>"
            + (f'<p class="small caution">{e(experiment_caution(f))}</p>' if experiment_caution(f) else ""))


def finding_article(deck: DeckEntry, f: Finding, n: int, texts: dict, probed: bool) -> str:
    info = rule_info(f.rule)
    where = f"Line {f.span.line}, column {f.span.column}"
    if f.span.path != deck.path:
        where += f" of {f.span.path}"
    out = [f'<article class="finding {f.severity.value}" id="{deck.anchor}-{n}" data-rule="{e(f.rule)}">',
           f"<h3>{badge(f.severity)} <code>{e(f.rule)}</code>: {inline(info.title)}</h3>",
           f'<p class="where">{e(where)}</p>',
           f'<p class="message">{inline(f.message)}</p>']
    text = texts.get(f.span.path)
    if text is not None:
        out.append(context_block(text, f))
    why = f'<div class="why"><p><strong>Why it matters.</strong> {inline(info.why)}</p>'
    if info.references:
        why += '<ul class="refs">' + "".join(f"<li>{inline(r)}</li>" for r in info.references) + "</ul>"
    out.append(why + "</div>")
    for fix in f.fixes:
        diff = fix_diff(fix, texts)
        out.append(f'<h4><span class="fix-title">Suggested fix: {inline(fix.title)}</span> '
                   f'<span class="fix-safety">({"safe" if fix.is_safe else "risky: changes what is computed"})</span></h4>')
        out.append(diff_block(diff, deck.path) if diff else '<p class="small">The fix no longer applies to the file as it is now.</p>')
    if probed and f.evidence:
        out.append(evidence_table(f))
    out.append("</article>")
    return "\n".join(out)


def recorded_table(deck: DeckEntry) -> str:
    rows = "".join(f"<tr><td><code>{e(n)}</code></td><td>{e(v)}</td><td>{e(w)}</td></tr>"
                   for n, v, w in recorded_rows(deck))
    return ('<table class="recorded"><caption>Computed by <code>deckward run</code> (latest in the results '
            'database)</caption><thead><tr><th scope="col">Derived</th><th scope="col">Value</th>'
            f'<th scope="col">Recorded</th></tr></thead><tbody>{rows}</tbody></table>')


def deck_section(deck: DeckEntry, texts: dict, probed: bool, index: int) -> str:
    c = deck.counts()
    out = [f'<section class="deck" id="{deck.anchor}" aria-labelledby="{deck.anchor}-h">',
           f'<h2 id="{deck.anchor}-h"><span class="kicker">Deck</span> <span class="path">{path_text(deck.path)}</span></h2>']
    if deck.text is None:
        out.append('<p class="small">The file could not be read again for this report.</p>')
    if not deck.findings:
        out.append('<p class="clean">No findings.</p>')
    else:
        out.append("<p>" + ", ".join(f"{badge(s)} {c[s]}" for s in SEVERITIES if c[s]) + "</p>")
    if probed:
        out.append(probe_figure(deck, index))
    if deck.recorded:
        out.append(recorded_table(deck))
    for n, f in enumerate(deck.findings, 1):
        out.append(finding_article(deck, f, n, texts, probed))
    if deck.suppressed:
        out.append("<h3>Suppressed on purpose</h3><ul>")
        for f in deck.suppressed:
            out.append(f"<li>Line {f.span.line}, <code>{e(f.rule)}</code>: {inline(f.suppressed or '')}</li>")
        out.append("</ul>")
    out.append("</section>")
    return "\n".join(out)


def probe_figure(deck: DeckEntry, index: int) -> str:
    from .review_plots import plot_rows, rows_from

    text = deck.text or ""

    def name_of(f: Finding) -> str:
        return text[f.span.start : f.span.end] if f.span.path == deck.path else ""

    probe_findings = [f for f in deck.findings + deck.suppressed if f.evidence]
    rows = rows_from(probe_findings, name_of)
    if not rows:
        return ('<p class="small">No probe numbers to plot for this deck (no probe compared its basis with the '
                "augmented counterpart, or the deck was not probed because it has errors).</p>")
    plot = plot_rows(rows, "", f"deck{index}")
    if plot is None:
        return ""
    desc_id = f"{deck.anchor}-plot-desc"
    svg = plot.svg.replace("<svg", f'<svg role="img" aria-labelledby="{desc_id}"', 1)
    return (f'<figure class="plot"><p class="figure-title">Probe values at Hartree-Fock (eV): the deck\'s basis '
            f"against its augmented counterpart</p>{svg}"
            f'<figcaption id="{desc_id}">{e(plot.alt)}</figcaption></figure>')


def render_review(review: Review) -> str:
    texts = {d.path: d.text for d in review.decks}
    t = review.totals()
    meta = (f"{plural(len(review.decks), 'deck')} checked by deckward {e(__version__)}: "
            f"{plural(t[Severity.ERROR], 'error')}, {plural(t[Severity.WARNING], 'warning')}, "
            f"{t[Severity.INFO]} info; {plural(review.clean_decks, 'deck')} without findings"
            + ("; probes run" if review.probed else "") + ".")
    toc = "".join(f'<li><a class="path" href="#{d.anchor}">{path_text(d.path)}</a></li>' for d in review.decks)
    body = [
        '<a class="skip" href="#decks">Skip to the decks</a>',
        "<main>",
        f'<header class="report"><h1>{e(review.title)}</h1><p class="meta">{meta}</p></header>',
        summary_table(review),
        batch_section(review),
        f'<nav class="toc" aria-label="Decks"><h2 id="decks">Decks</h2><ol>{toc}</ol></nav>',
    ]
    body += [deck_section(d, texts, review.probed, i) for i, d in enumerate(review.decks)]
    for note in review.notes:
        body.append(f'<p class="small">{inline(note)}</p>')
    body.append("</main>")
    return ("<!DOCTYPE html>\n"
            '<html lang="en" xmlns="http://www.w3.org/1999/xhtml">\n<head>\n<meta charset="utf-8"/>\n'
            '<meta name="viewport" content="width=device-width, initial-scale=1"/>\n'
            f"<title>{e(review.title)}</title>\n<style>\n{stylesheet()}</style>\n</head>\n<body>\n"
            + "\n".join(body) + "\n</body>\n</html>\n")
