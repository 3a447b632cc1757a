"""``deckward check --format markdown``: counts by rule and severity, then
findings grouped by file, safe to paste into a merge-request comment."""
from __future__ import annotations

from deck_batch import write_batch
from deckward.server.cli import main
from deckward.server.format_markdown import code, md_text


def run_markdown(tmp_path, monkeypatch, capsys) -> str:
    write_batch(str(tmp_path / "batch"))
    monkeypatch.chdir(tmp_path)
    assert main(["check", "batch", "--format", "markdown", "--no-cache"]) == 1
    return capsys.readouterr().out


def test_counts_table_by_rule_and_severity(tmp_path, monkeypatch, capsys):
    out = run_markdown(tmp_path, monkeypatch, capsys)
    lines = out.splitlines()
    assert lines[0] == "### deckward: 5 errors, 0 warnings, 0 info in 6 files (1 suppressed)"
    start = lines.index("| Rule | Errors | Warnings | Info |")
    table = lines[start + 2 : start + 7]
    assert table == [
        "| `restricted-open-shell` | 2 |  |  |",
        "| `syntax-error` | 1 |  |  |",
        "| `undefined-name` | 1 |  |  |",
        "| `unknown-key` | 1 |  |  |",
        "| **Total** | **5** | **0** | **0** |",
    ]


def test_findings_grouped_by_file_in_order(tmp_path, monkeypatch, capsys):
    out = run_markdown(tmp_path, monkeypatch, capsys)
    headings = [line for line in out.splitlines() if line.startswith("#### ")]
    assert headings == ["#### `batch/cn_broken.deck`", "#### `batch/cn_restricted.deck`",
                        "#### `batch/no2_typos.deck`", "#### `batch/o2_restricted.deck`"]
    section = out.split("#### `batch/no2_typos.deck`")[1].split("####")[0]
    items = [line for line in section.splitlines() if line.startswith("- ")]
    assert items[0].startswith("- **error** line 8:40 `undefined-name`: no level is named `hf_az`")
    assert items[0].endswith("_(safe fix available)_")  # another defined name, clearly the nearest
    assert items[1].startswith("- **error** line 9:57 `unknown-key`")
    assert "compared with the unrestricted run" in out.split("Suppressed findings (1)")[1]


def test_clean_folder(tmp_path, monkeypatch, capsys):
    write_batch(str(tmp_path / "b"), {"ok.deck": "# nothing to say\n"})
    monkeypatch.chdir(tmp_path)
    assert main(["check", "b", "--format", "markdown", "--no-cache"]) == 0
    out = capsys.readouterr().out
    assert out == "### deckward: 0 errors, 0 warnings, 0 info in 1 file\n\nNo findings.\n"


def test_escaping_keeps_code_and_neutralises_html():
    assert md_text("value <b>|x| `a|b<c>`") == "value \\<b\\>\\|x\\| `a|b<c>`"
    assert code("a`b") == "`` a`b ``"
    assert code("x|y") == "`x\\|y`"
