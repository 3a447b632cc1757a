"""``deckward review --format markdown``: the same report for pasting into
written feedback."""
from __future__ import annotations

from deck_batch import write_batch
from deckward.server.cli import main


def test_markdown_review(tmp_path, monkeypatch, capsys):
    write_batch(str(tmp_path / "batch"))
    monkeypatch.chdir(tmp_path)
    assert main(["review", "batch", "--format", "markdown", "--no-cache"]) == 0
    out = capsys.readouterr().out
    lines = out.splitlines()
    assert lines[0] == "# Deck review"
    assert lines[2] == "6 decks checked by deckward " + __import__("deckward").__version__ + \
        ": 5 errors, 0 warnings, 0 info; 2 without findings."
    table = lines[lines.index("| Deck | Errors | Warnings | Info | Suppressed |") + 2:][:6]
    assert table[4] == "| `batch/no2_typos.deck` | 2 | 0 | 0 | 0 |"
    batch = out.split("## Across the batch\n\n")[1].split("\n\n")[0].splitlines()
    assert batch == [
        "- **2 of 6 decks: Restricted reference for an open-shell state** (`restricted-open-shell`, error, 2 findings)",
        "- **1 of 6 decks: The text does not parse** (`syntax-error`, error, 1 finding)",
        "- **1 of 6 decks: A reference that names nothing** (`undefined-name`, error, 1 finding)",
        "- **1 of 6 decks: A key that the block does not take** (`unknown-key`, error, 1 finding)",
    ]
    cn = out.split("## `batch/cn_restricted.deck`")[1].split("\n## ")[0]
    assert "### error: `restricted-open-shell`, line 6" in cn
    assert "   6 > level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }" in cn
    assert cn.count("_Why it matters:_") == 1
    assert ("```diff\n--- batch/cn_restricted.deck\n+++ batch/cn_restricted.deck\n@@ -4,5 +4,5 @@\n"
            "   N 0 0 1.1718\n }\n-level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }\n"
            "+level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n") in cn
    allowed = out.split("## `batch/hco2_allowed.deck`")[1].split("\n## ")[0]
    assert "Suppressed on purpose: line 8 `restricted-open-shell` (compared with the unrestricted run)" in allowed
