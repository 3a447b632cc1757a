"""Parallel and cached checking: same findings whatever --jobs, and a cache
keyed by everything that can change them."""
from __future__ import annotations

import json
import os
from concurrent.futures import ProcessPoolExecutor

import pytest

from deck_batch import DECKS, write_batch
from deckward.grammar.findings import Applicability, Finding, Fix, Related, Severity, Span, TextEdit
from deckward.server import findings_cache
from deckward.server.checking import check_paths
from deckward.server.cli import main
from deckward.server.findings_cache import FindingsCache, finding_from_dict, finding_to_dict
from deckward.server.parallel_check import IN_PROCESS_BELOW


def dicts(result):
    return [finding_to_dict(f) for f in result.findings]


@pytest.fixture()
def big_batch(tmp_path):
    """Ten copies of the batch in subfolders: 60 decks, enough for workers."""
    root = tmp_path / "repo"
    decks = {f"g{i}/{name}": text for i in range(10) for name, text in DECKS.items()}
    write_batch(str(root), decks)
    assert len(decks) >= IN_PROCESS_BELOW
    return str(root)


def test_findings_do_not_depend_on_jobs(big_batch):
    one = check_paths([big_batch], jobs=1)
    two = check_paths([big_batch], jobs=2)
    assert two.stats.workers == 2
    assert two.files == one.files
    assert dicts(two) == dicts(one)
    assert len(one.active) == 50 and len(one.suppressed) == 10  # 5 findings and 1 suppressed a copy


def test_cache_serves_unchanged_decks(big_batch, tmp_path):
    cache = str(tmp_path / "cache")
    reference = check_paths([big_batch], jobs=1)
    cold = check_paths([big_batch], jobs=2, cache_dir=cache)
    assert (cold.stats.checked, cold.stats.cache_hits) == (60, 0)
    warm = check_paths([big_batch], jobs=2, cache_dir=cache)
    assert (warm.stats.checked, warm.stats.cache_hits) == (0, 60)
    assert dicts(warm) == dicts(reference) == dicts(cold)
    with open(os.path.join(big_batch, "g3", "cn_clean.deck"), "a", encoding="utf-8") as f:
        f.write("state cation { geometry = cn level = hf_adz charge = 1 multiplicity = 1 reference = restricted }\n")
    changed = check_paths([big_batch], jobs=1, cache_dir=cache)
    assert (changed.stats.checked, changed.stats.cache_hits) == (1, 59)
    assert len(changed.active) == 50  # a closed-shell cation: still nothing to say
    leftovers = [n for _, _, files in os.walk(cache) for n in files if not n.endswith(".json")]
    assert leftovers == []


def test_a_changed_used_file_invalidates_the_decks_that_use_it(tmp_path):
    root = write_batch(str(tmp_path / "w"), {
        "shared/levels.deck": "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n",
        "uses.deck": 'use "shared/levels.deck"\ngeometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n'
                     "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n",
        "missing.deck": 'use "later.deck"\n',
    })
    cache = str(tmp_path / "cache")
    first = check_paths([os.path.join(root, "uses.deck"), os.path.join(root, "missing.deck")], cache_dir=cache)
    assert [(f.rule, f.message) for f in first.active] == [("use-outside-workspace", "`later.deck` does not exist")]
    with open(os.path.join(root, "shared", "levels.deck"), "w", encoding="utf-8") as f:
        f.write("level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }\n")
    with open(os.path.join(root, "later.deck"), "w", encoding="utf-8") as f:
        f.write("level lv { metod = hf }\n")
    second = check_paths([os.path.join(root, "uses.deck"), os.path.join(root, "missing.deck")], cache_dir=cache)
    assert second.stats.cache_hits == 0
    assert sorted((f.rule, os.path.basename(f.path)) for f in second.active) == [
        ("restricted-open-shell", "levels.deck"), ("unknown-key", "later.deck")]


def test_configuration_is_part_of_the_key(tmp_path):
    root = write_batch(str(tmp_path / "w"), {"cn.deck": DECKS["cn_restricted.deck"]})
    cache = str(tmp_path / "cache")
    assert [f.rule for f in check_paths([root], cache_dir=cache).active] == ["restricted-open-shell"]
    with open(os.path.join(root, "deckward.yaml"), "a", encoding="utf-8") as f:
        f.write("  restricted-open-shell: warning\n")
    again = check_paths([root], cache_dir=cache)
    assert again.stats.cache_hits == 0
    assert [f.severity for f in again.active] == [Severity.WARNING]


def test_version_is_part_of_the_key(tmp_path, monkeypatch):
    root = write_batch(str(tmp_path / "w"), {"cn.deck": DECKS["cn_restricted.deck"]})
    cache = str(tmp_path / "cache")
    check_paths([root], cache_dir=cache)
    assert check_paths([root], cache_dir=cache).stats.cache_hits == 1
    monkeypatch.setattr(findings_cache, "__version__", "999.0")
    monkeypatch.setattr(findings_cache, "_CODE_FINGERPRINT", None)
    assert check_paths([root], cache_dir=cache).stats.cache_hits == 0


def test_damaged_entry_is_a_miss(tmp_path):
    root = write_batch(str(tmp_path / "w"), {"cn.deck": DECKS["cn_restricted.deck"]})
    cache = str(tmp_path / "cache")
    first = check_paths([root], cache_dir=cache)
    (entry,) = [os.path.join(d, n) for d, _, files in os.walk(cache) for n in files]
    with open(entry, "w") as f:
        f.write('{"deps": [["x"')
    again = check_paths([root], cache_dir=cache)
    assert (again.stats.checked, again.stats.cache_hits) == (1, 0)
    assert dicts(again) == dicts(first)
    with open(entry) as f:
        assert json.load(f)["findings"]  # rewritten


def test_unwritable_cache_is_a_note_not_a_failure(tmp_path):
    root = write_batch(str(tmp_path / "w"), {"cn.deck": DECKS["cn_restricted.deck"]})
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("")
    result = check_paths([root], cache_dir=str(blocker))
    assert [f.rule for f in result.active] == ["restricted-open-shell"]
    assert any("could not be written" in n for n in result.notes)


def test_cli_cache_options(tmp_path, monkeypatch, capsys):
    root = write_batch(str(tmp_path / "w"), {"cn.deck": DECKS["cn_restricted.deck"],
                                             "cn2.deck": DECKS["cn_restricted.deck"]})
    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(tmp_path / "env"))
    main(["check", root, "--no-cache"])
    # (the folder may hold other caches: the basis indexes read once)
    assert not (tmp_path / "env" / "findings").exists()
    main(["check", os.path.join(root, "cn.deck")])
    assert not (tmp_path / "env" / "findings").exists()  # one deck: the default cache is not worth opening
    main(["check", root])
    assert len(list((tmp_path / "env" / "findings").rglob("*.json"))) == 2
    main(["check", root, "--cache-dir", str(tmp_path / "given"), "--jobs", "2"])
    assert list((tmp_path / "given").rglob("*.json"))
    capsys.readouterr()
    for bad, message in (("many", "--jobs takes a whole number"), ("-1", "--jobs must be 0")):
        with pytest.raises(SystemExit) as e:
            main(["check", root, "--jobs", bad])
        assert e.value.code == 2
        assert message in capsys.readouterr().err


def test_unreadable_deck_is_skipped_alike_whatever_jobs(big_batch):
    os.symlink(os.path.join(big_batch, "gone"), os.path.join(big_batch, "g5", "dangling.deck"))
    results = [check_paths([big_batch], jobs=jobs, cache_dir=None if jobs == 1 else os.path.join(big_batch, ".c"))
               for jobs in (1, 2)]
    assert results[0].files == results[1].files and results[0].findings == results[1].findings
    skipped = [[n for n in r.notes if "dangling.deck" in n] for r in results]
    assert skipped[0] == skipped[1] and len(skipped[0]) == 1
    assert skipped[0][0].endswith("dangling.deck: it is not a regular file")


def test_findings_round_trip_through_the_cache_format():
    span = Span("a.deck", 3, 9, 1, 4, 1, 10)
    other = Span("b.deck", 0, 0, 1, 1, 1, 1)
    f = Finding("probe-basis-sensitivity", Severity.WARNING, "moves", span,
                related=(Related(other, "here"),),
                fixes=(Fix("swap", (TextEdit(span, "x"), TextEdit(other, "y\n")), Applicability.RISKY),),
                evidence=(("basis", "cc-pvdz"), ("delta_scf_ev", -0.25), ("pair", (1, 2))),
                suppressed="on purpose")
    back = finding_from_dict(json.loads(json.dumps(finding_to_dict(f))))
    assert back == f
    assert back.evidence == f.evidence  # not part of equality, so checked apart


def _hammer(args):
    folder, key, n = args
    cache = FindingsCache(folder)
    span = Span("a.deck", 0, 1, 1, 1, 1, 2)
    for i in range(n):
        cache.put(key, ["a.deck"], [Finding("syntax-error", Severity.ERROR, f"writer {os.getpid()} round {i}", span)])
        got = cache.get(key)
        assert got is not None and len(got) == 1
    return cache.write_errors


def test_concurrent_writers_never_leave_half_an_entry(tmp_path):
    folder = str(tmp_path / "cache")
    key = "ab" + "0" * 62
    with ProcessPoolExecutor(2) as pool:
        assert list(pool.map(_hammer, [(folder, key, 200)] * 2)) == [0, 0]
    assert os.listdir(os.path.join(folder, "ab")) == [key + ".json"]


def test_no_cache_clears_the_entries_and_nothing_else(tmp_path):
    from deckward.server.cli import main

    deck = tmp_path / "d.deck"
    deck.write_text("geometry g {\n  H 0 0 0\n}\n")
    cache = tmp_path / "cache"
    cache.mkdir()
    (cache / "notes.txt").write_text("a user's file in the folder they named\n")
    assert main(["check", str(deck), "--cache-dir", str(cache), "--fail-on", "never"]) == 0
    entries = [p for p in cache.rglob("*.json")]
    assert len(entries) == 1
    assert main(["check", str(deck), "--cache-dir", str(cache), "--no-cache", "--fail-on", "never"]) == 0
    assert [p for p in cache.rglob("*.json")] == []
    assert (cache / "notes.txt").read_text() == "a user's file in the folder they named\n"
