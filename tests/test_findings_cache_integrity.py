"""The findings cache serves only sound entries: wrong types, deep nesting
and hand-edited entries are misses (checked afresh, never a crash), and the
key follows symlinks to what they point at."""
from __future__ import annotations

import json
import os

import pytest

from deck_batch import DECKS, write_batch
from deckward.server.checking import check_paths
from deckward.server.findings_cache import FindingsCache, entry_checksum, entry_problem, finding_to_dict


def dicts(result):
    return [finding_to_dict(f) for f in result.findings]


@pytest.fixture()
def cached(tmp_path):
    """A one-deck workspace checked once into a cache: (root, cache, entry path, fresh result)."""
    root = write_batch(str(tmp_path / "w"), {"cn.deck": DECKS["cn_restricted.deck"]})
    cache = str(tmp_path / "cache")
    first = check_paths([root], cache_dir=cache)
    assert [f.rule for f in first.active] == ["restricted-open-shell"]
    (entry,) = [os.path.join(d, n) for d, _, files in os.walk(cache) for n in files]
    return root, cache, entry, first


def _rewrite(entry, change, keep_checksum=True):
    with open(entry, encoding="utf-8") as f:
        data = json.load(f)
    change(data)
    if not keep_checksum:
        data["checksum"] = entry_checksum(data["key"], data["deps"], data["findings"])
    with open(entry, "w", encoding="utf-8") as f:
        json.dump(data, f)


def _served_afresh(root, cache, first):
    again = check_paths([root], cache_dir=cache)
    assert (again.stats.checked, again.stats.cache_hits, again.stats.cache_misses) == (1, 0, 1)
    assert dicts(again) == dicts(first)
    return again


def test_a_sound_entry_is_served(cached):
    root, cache, _, first = cached
    again = check_paths([root], cache_dir=cache)
    assert (again.stats.checked, again.stats.cache_hits) == (0, 1)
    assert dicts(again) == dicts(first)


def test_an_edited_severity_is_not_served(cached):
    root, cache, entry, first = cached
    _rewrite(entry, lambda d: d["findings"][0].update(severity="info"))
    _served_afresh(root, cache, first)


def test_a_dropped_finding_is_not_served(cached):
    root, cache, entry, first = cached
    _rewrite(entry, lambda d: d["findings"].clear())
    _served_afresh(root, cache, first)


@pytest.mark.parametrize("change, reason", [
    (lambda d: d["findings"][0]["span"].__setitem__(1, -5), "finding 0: span [-5, "),
    (lambda d: d["findings"][0].update(severity="fatal"), "finding 0: unknown severity"),
    (lambda d: d["findings"][0].update(message=["not", "text"]), "finding 0: rule and message are strings"),
    (lambda d: d["findings"][0]["span"].__setitem__(3, True), "finding 0: a span is [path, start"),
    (lambda d: d["findings"][0]["span"].__setitem__(0, "/etc/passwd"), "finding 0 points into a file the entry"),
    (lambda d: d.update(deps="all"), "deps and findings are lists"),
    (lambda d: d["findings"].append({"rule": "x"}), "finding 1: not a finding"),
    (lambda d: d["findings"][0].update(evidence=[["n", json.loads("[" * 12 + "1" + "]" * 12)]]),
     "finding 0: evidence nested too deeply"),
])
def test_entries_of_the_wrong_shape_are_rejected_even_with_a_matching_checksum(cached, change, reason):
    root, cache, entry, first = cached
    _rewrite(entry, change, keep_checksum=False)
    with open(entry, encoding="utf-8") as f:
        data = json.load(f)
    assert entry_problem(data, data["key"]).startswith(reason)
    _served_afresh(root, cache, first)


def test_deep_nesting_and_wrong_types_do_not_crash(cached):
    root, cache, entry, first = cached
    for text in ("[" * 200_000 + "]" * 200_000, '{"format": 2, "findings": {"a": 1}}', "null", '"x"', "[1, 2]"):
        with open(entry, "w", encoding="utf-8") as f:
            f.write(text)
        _served_afresh(root, cache, first)


def test_a_used_file_re_pointed_out_of_the_workspace_is_not_served(tmp_path):
    root = tmp_path / "w"
    outside = tmp_path / "elsewhere"
    (root / "shared").mkdir(parents=True)
    outside.mkdir()
    geometry = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
    (root / "shared" / "real.deck").write_text(geometry)
    (outside / "real.deck").write_text(geometry)  # the same bytes, outside the workspace
    (root / "deckward.yaml").write_text("rules: {}\n")
    link = root / "geo.deck"
    link.symlink_to(root / "shared" / "real.deck")
    (root / "cn.deck").write_text('use "geo.deck"\n' + DECKS["cn_restricted.deck"].split("}\n", 1)[1])
    cache = str(tmp_path / "cache")
    deck = str(root / "cn.deck")
    first = check_paths([deck], cache_dir=cache)
    assert [f.rule for f in first.active] == ["restricted-open-shell"]
    link.unlink()
    link.symlink_to(outside / "real.deck")
    again = check_paths([deck], cache_dir=cache)
    assert (again.stats.checked, again.stats.cache_hits) == (1, 0)
    assert [f.rule for f in again.active] == ["use-outside-workspace", "restricted-open-shell", "undefined-name",
                                              "undefined-name"]


def test_an_entry_stored_under_another_key_is_not_served(tmp_path):
    cache = FindingsCache(str(tmp_path))
    cache.put("a" * 64, [], [])
    os.makedirs(tmp_path / "bb", exist_ok=True)
    os.replace(tmp_path / "aa" / ("a" * 64 + ".json"), tmp_path / "bb" / ("b" * 64 + ".json"))
    assert cache.get("b" * 64) is None
    assert cache.get("a" * 64) is None
    cache.put("c" * 64, [], [])
    assert cache.get("c" * 64) == []
