"""``deckward review``: the HTML report is well-formed, self-contained and
complete (every deck, every finding, right batch counts)."""
from __future__ import annotations

import os
import re
import xml.etree.ElementTree as ET

import pytest

from deck_batch import DECKS, write_batch
from deckward.grammar.findings import Finding, Severity, Span
from deckward.server.checking import check_paths
from deckward.server.cli import main
from deckward.server.review_batch import build_review
from deckward.server.review_html import render_review

X = "{http://www.w3.org/1999/xhtml}"


def text_of(el) -> str:
    return "".join(el.itertext())


def by_class(root, tag: str, cls: str) -> list:
    return [el for el in root.iter(X + tag) if cls in (el.get("class") or "").split()]


@pytest.fixture()
def report(tmp_path, monkeypatch):
    write_batch(str(tmp_path / "batch"))
    monkeypatch.chdir(tmp_path)
    assert main(["review", "batch", "--out", "report.html", "--no-cache", "--title", "Round 1"]) == 0
    with open("report.html", encoding="utf-8") as f:
        html = f.read()
    return html, ET.fromstring(html)


def test_report_is_well_formed_and_self_contained(report):
    html, root = report
    assert html.startswith("<!DOCTYPE html>")
    assert root.tag == X + "html" and root.get("lang") == "en"
    assert not list(root.iter(X + "script")) and not list(root.iter(X + "link")) and not list(root.iter(X + "img"))
    for el in root.iter():
        for attr in ("src", "href"):
            value = el.get(attr)
            assert value is None or value.startswith("#"), f"{el.tag} {attr}={value}"
    assert "url(" not in html and "@import" not in html
    assert root.find(f"{X}head/{X}title").text == "Round 1"
    assert [text_of(h) for h in root.iter(X + "h1")] == ["Round 1"]


def test_summary_table_lists_every_deck_with_counts(report):
    _, root = report
    table = by_class(root, "table", "summary")[0]
    headers = [text_of(th) for th in table.find(X + "thead").iter(X + "th")]
    assert headers == ["Deck", "Errors", "Warnings", "Info", "Suppressed"]
    assert all(th.get("scope") == "col" for th in table.find(X + "thead").iter(X + "th"))
    rows = {}
    for tr in table.find(X + "tbody").iter(X + "tr"):
        th = tr.find(X + "th")
        assert th.get("scope") == "row"
        rows[text_of(th)] = [int(text_of(td)) for td in tr.iter(X + "td")]
    assert rows == {
        "batch/cn_broken.deck": [1, 0, 0, 0],
        "batch/cn_clean.deck": [0, 0, 0, 0],
        "batch/cn_restricted.deck": [1, 0, 0, 0],
        "batch/hco2_allowed.deck": [0, 0, 0, 1],
        "batch/no2_typos.deck": [2, 0, 0, 0],
        "batch/o2_restricted.deck": [1, 0, 0, 0],
        "All decks": [5, 0, 0, 1],
    }


def test_batch_summary_counts_decks_per_rule(report):
    _, root = report
    items = by_class(root, "li", "rule-summary")
    got = [(li.get("data-rule"), text_of(by_class(li, "span", "batch-count")[0]), li.get("data-findings"))
           for li in items]
    assert got == [
        ("restricted-open-shell", "2 of 6 decks", "2"),  # the suppressed one does not count
        ("syntax-error", "1 of 6 decks", "1"),
        ("undefined-name", "1 of 6 decks", "1"),
        ("unknown-key", "1 of 6 decks", "1"),
    ]
    links = [a.get("href") for a in items[0].iter(X + "a")]
    assert links == ["#deck-batch-cn-restricted-deck", "#deck-batch-o2-restricted-deck"]
    assert "Restricted reference for an open-shell state" in text_of(items[0])


def test_every_deck_and_finding_appears_with_context_why_and_fix(report):
    _, root = report
    sections = by_class(root, "section", "deck")
    assert [text_of(s.find(X + "h2")) for s in sections] == ["Deck " + p for p in (
        "batch/cn_broken.deck", "batch/cn_clean.deck", "batch/cn_restricted.deck",
        "batch/hco2_allowed.deck", "batch/no2_typos.deck", "batch/o2_restricted.deck")]
    ids = {el.get("id") for el in root.iter() if el.get("id")}
    for el in root.iter(X + "a"):
        assert el.get("href")[1:] in ids  # every in-page link has a target
    articles = by_class(root, "article", "finding")
    assert sorted(a.get("data-rule") for a in articles) == [
        "restricted-open-shell", "restricted-open-shell", "syntax-error", "undefined-name", "unknown-key"]
    cn = next(s for s in sections if s.get("id") == "deck-batch-cn-restricted-deck")
    (art,) = by_class(cn, "article", "finding")
    assert text_of(art.find(X + "h3")) == "Error restricted-open-shell: Restricted reference for an open-shell state"
    context = by_class(art, "pre", "context")[0]
    assert [text_of(m) for m in context.iter(X + "mark")] == ["restricted"]
    numbers = [text_of(s) for s in by_class(context, "span", "no")]
    assert numbers == ["4", "5", "6", "7", "8"]  # two lines either side of line 6
    from deckward.rules.engine.registry import get

    assert get("restricted-open-shell").info.why in text_of(by_class(art, "div", "why")[0])
    diffs = by_class(art, "pre", "diff")
    assert len(diffs) == 2  # both fixes
    added = [text_of(s) for s in by_class(diffs[0], "span", "add")]
    removed = [text_of(s) for s in by_class(diffs[0], "span", "del")]
    assert added == ["+level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }"]
    assert removed == ["-level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }"]
    allowed = next(s for s in sections if s.get("id") == "deck-batch-hco2-allowed-deck")
    assert "compared with the unrestricted run" in text_of(allowed)
    assert not by_class(allowed, "article", "finding")


def test_markup_is_escaped(tmp_path):
    """Deck text and messages cannot inject markup."""
    root = write_batch(str(tmp_path / "w"), {"x.deck": "# <script>alert(1)</script> & co\nstate s { chrge = 0 }\n"})
    html = render_review(build_review(check_paths([root])))
    tree = ET.fromstring(html)
    assert not list(tree.iter(X + "script"))
    assert "&lt;script&gt;alert(1)&lt;/script&gt; &amp; co" in html


def test_findings_in_a_used_file_outside_the_paths_get_their_own_entry(tmp_path):
    root = write_batch(str(tmp_path / "w"), {
        "lib/levels.deck": "level lv { metod = hf }\n",
        "run/a.deck": 'use "../lib/levels.deck"\n',
    })
    result = check_paths([os.path.join(root, "run")])
    review = build_review(result)
    assert [d.path for d in review.decks] == [os.path.join(root, "run", "a.deck"), os.path.join(root, "lib", "levels.deck")]
    assert [f.rule for f in review.decks[1].findings] == ["unknown-key"]


def test_probe_numbers_and_plot(tmp_path):
    """Probe findings' evidence becomes a table and an inline SVG with a
    text alternative.  The evidence below has the layout the basis
    sensitivity probe emits; the values were recorded from a HF probe run
    of this deck (the test checks layout, not chemistry)."""
    text = ("geometry c { C 0 0 0 }\nlevel hf_dz { method = hf basis = 6-31g* }\n"
            "state neutral { geometry = c level = hf_dz charge = 0 multiplicity = 3 }\n"
            "state anion { geometry = c level = hf_dz charge = -1 multiplicity = 4 }\n"
            "derive ea = energy(neutral) - energy(anion) in ev\n")
    root = write_batch(str(tmp_path / "w"), {"c.deck": text})
    result = check_paths([root])
    path = result.files[0]
    start = text.index("derive ea") + len("derive ")
    line = text.count("\n", 0, start) + 1
    span = Span(path, start, start + 2, line, 8, line, 10)
    evidence = (("quantity", "electron_affinity"), ("basis", "6-31g*"), ("augmented_basis", "6-31+g*"),
                ("delta_scf_ev", -0.537723), ("delta_scf_augmented_ev", 0.469714),
                ("orbital_estimate_ev", -1.496176), ("orbital_estimate_augmented_ev", -0.469204))
    result.findings.append(Finding("probe-basis-sensitivity", Severity.WARNING, "the basis decides the sign", span,
                                   evidence=evidence))
    html = render_review(build_review(result, probed=True))
    tree = ET.fromstring(html)
    (figure,) = by_class(tree, "figure", "plot")
    svg = figure.find("{http://www.w3.org/2000/svg}svg")
    assert svg is not None and svg.get("role") == "img"
    caption = figure.find(X + "figcaption")
    assert svg.get("aria-labelledby") == caption.get("id")
    assert text_of(caption) == ("ea: EA, delta-SCF: -0.54 eV with 6-31g*, +0.47 eV with 6-31+g*; "
                                "ea: EA, -e(LUMO): -1.50 eV with 6-31g*, -0.47 eV with 6-31+g*.")
    svg_text = " ".join(text_of(t) for t in svg.iter("{http://www.w3.org/2000/svg}text"))
    assert "ea: EA, delta-SCF" in svg_text and "augmented counterpart" in svg_text
    table = by_class(tree, "table", "evidence")[0]
    rows = {text_of(tr.find(X + "th")): text_of(tr.find(X + "td")) for tr in table.find(X + "tbody").iter(X + "tr")}
    assert rows["delta scf (eV)"] == "-0.538" and rows["augmented basis"] == "6-31+g*"
    assert "xlink:href" not in html.replace('xlink:href="#', "")  # only in-page references inside the SVG


def test_review_without_out_writes_to_stdout(tmp_path, monkeypatch, capsys):
    write_batch(str(tmp_path / "b"), {"ok.deck": DECKS["cn_clean.deck"]})
    monkeypatch.chdir(tmp_path)
    assert main(["review", "b", "--no-cache"]) == 0
    out = capsys.readouterr().out
    ET.fromstring(out)
    assert re.search(r"No deck has a finding", out)


def test_unwritable_output_is_a_usage_error(tmp_path, monkeypatch, capsys):
    write_batch(str(tmp_path / "b"), {"ok.deck": DECKS["cn_clean.deck"]})
    monkeypatch.chdir(tmp_path)
    assert main(["review", "b", "--no-cache", "--out", "missing/report.html"]) == 2
    assert "missing/report.html: its folder does not exist" in capsys.readouterr().err
