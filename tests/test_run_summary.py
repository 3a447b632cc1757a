"""The run summary: a re-check of unchanged decks is served from one file,
and anything that could change the findings (a deck or a used file edited,
created or re-pointed, a deck added, the summary itself edited) sends the
check back through the per-deck entries."""
from __future__ import annotations

import glob
import hashlib
import json
import os
import time

import pytest

from deck_batch import DECKS, write_batch
from deckward.server import run_summary
from deckward.server.checking import check_paths
from deckward.server.findings_cache import FindingsCache, finding_to_dict

# demo decks of the acceptor-screening scenario (CN at a demo bond length)
USER = ('use "shared/levels.deck"\n'
        "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
        "state radical { geometry = cn level = shared_level charge = 0 multiplicity = 2 }\n")
SHARED = "level shared_level { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"


def dicts(result):
    return [finding_to_dict(f) for f in result.findings]


@pytest.fixture
def settled(monkeypatch):
    """Files count as settled as soon as they are written (the two seconds
    that guard against coarse file-system clocks would slow every test)."""
    monkeypatch.setattr(run_summary, "SETTLED_NS", 0)


def workspace(tmp_path) -> str:
    root = write_batch(str(tmp_path / "w"), {**DECKS, "user.deck": USER, "shared/levels.deck": SHARED})
    time.sleep(0.05)  # the files' change times lie before the check starts
    return root


def summaries(cache: str) -> list[str]:
    return glob.glob(os.path.join(cache, "summaries", "*.json"))


def test_an_unchanged_repository_is_served_from_the_summary(tmp_path, settled):
    root, cache = workspace(tmp_path), str(tmp_path / "cache")
    fresh = check_paths([root])
    cold = check_paths([root], cache_dir=cache)
    assert not cold.stats.from_summary and len(summaries(cache)) == 1
    warm = check_paths([root], cache_dir=cache)
    assert warm.stats.from_summary
    assert (warm.stats.checked, warm.stats.cache_hits) == (0, len(DECKS) + 2)
    assert dicts(warm) == dicts(cold) == dicts(fresh)


@pytest.mark.parametrize("edit", ["deck", "used file", "same size, time put back", "deck added", "geometry file created"])
def test_a_change_sends_the_check_through_the_entries(tmp_path, settled, edit):
    root, cache = workspace(tmp_path), str(tmp_path / "cache")
    check_paths([root], cache_dir=cache)
    if edit == "deck":
        with open(os.path.join(root, "cn_clean.deck"), "a", encoding="utf-8") as f:
            f.write("# seen again\n")
    elif edit == "used file":
        path = os.path.join(root, "shared", "levels.deck")
        with open(path, "w", encoding="utf-8") as f:
            f.write(SHARED.replace("unrestricted", "restricted"))
    elif edit == "same size, time put back":
        path = os.path.join(root, "shared", "levels.deck")
        st = os.stat(path)
        with open(path, "w", encoding="utf-8") as f:
            f.write(SHARED.replace("unrestricted", "restricted  "))  # two spaces: the same size
        assert os.stat(path).st_size == st.st_size
        os.utime(path, ns=(st.st_atime_ns, st.st_mtime_ns))  # the modification time as it was
    elif edit == "deck added":
        with open(os.path.join(root, "zz_new.deck"), "w", encoding="utf-8") as f:
            f.write(DECKS["cn_restricted.deck"])
    elif edit == "geometry file created":
        with open(os.path.join(root, "cn_clean.deck"), "a", encoding="utf-8") as f:
            f.write('geometry late { file = "late.xyz" }\n')
        time.sleep(0.05)
        check_paths([root], cache_dir=cache)  # a summary that lists late.xyz as absent
        with open(os.path.join(root, "late.xyz"), "w", encoding="utf-8") as f:
            f.write("2\nCN\nC 0 0 0\nN 0 0 1.1718\n")
    again = check_paths([root], cache_dir=cache)
    assert not again.stats.from_summary
    assert dicts(again) == dicts(check_paths([root]))
    if edit in ("used file", "same size, time put back"):
        assert [f.rule for f in again.active if f.span.path.endswith("levels.deck")] == ["restricted-open-shell"]


def test_files_written_just_before_the_check_are_not_summarised(tmp_path):
    root, cache = workspace(tmp_path), str(tmp_path / "cache")  # default: two seconds to settle
    check_paths([root], cache_dir=cache)
    assert summaries(cache) == []
    assert not check_paths([root], cache_dir=cache).stats.from_summary


def _rewrite(path: str, change, keep_checksum: bool) -> None:
    with open(path, "rb") as f:
        checksum, _, body = f.read().partition(b"\n")
    data = json.loads(body)
    change(data)
    body = json.dumps(data).encode()
    if not keep_checksum:
        checksum = hashlib.sha256(body).hexdigest().encode()
    with open(path, "wb") as f:
        f.write(checksum + b"\n" + body)


@pytest.mark.parametrize("change, keep_checksum", [
    (lambda d: d["findings"][0][0].update(severity="info"), True),        # edited by hand
    (lambda d: d["findings"][0][0].update(severity="loud"), False),       # a checksum that matches, a bad value
    (lambda d: d["findings"][0][0]["span"].__setitem__(1, -4), False),    # a span before the text
    (lambda d: d["findings"].pop(), False),                               # a task without findings
    (lambda d: d.update(files="all of them"), False),
])
def test_an_edited_or_unsound_summary_is_not_served(tmp_path, settled, change, keep_checksum):
    root, cache = workspace(tmp_path), str(tmp_path / "cache")
    cold = check_paths([root], cache_dir=cache)
    (path,) = summaries(cache)
    _rewrite(path, change, keep_checksum)
    again = check_paths([root], cache_dir=cache)
    assert not again.stats.from_summary
    assert dicts(again) == dicts(cold)


def test_clearing_the_cache_removes_the_summaries(tmp_path, settled):
    root, cache = workspace(tmp_path), str(tmp_path / "cache")
    check_paths([root], cache_dir=cache)
    assert len(summaries(cache)) == 1
    FindingsCache(cache).clear()
    assert summaries(cache) == [] and not os.path.exists(os.path.join(cache, "summaries"))
