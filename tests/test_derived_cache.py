"""grammar/derived_cache.py: data derived from a file, kept on disk, rebuilt
when the file changes or the entry cannot be read."""
import os

from deckward.grammar import derived_cache


def _counting(source):
    calls = []

    def build():
        calls.append(1)
        with open(source, encoding="utf-8") as f:
            text = f.read()
        return {"upper": text.upper(), "length": len(text)}

    return build, calls


def test_an_entry_is_built_once_and_then_read(tmp_path, monkeypatch):
    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(tmp_path / "cache"))
    source = tmp_path / "index.json"
    source.write_text("abc")
    build, calls = _counting(str(source))
    assert derived_cache.load(str(source), "upper", build) == "ABC"
    assert derived_cache.load(str(source), "length", build) == 3  # written with the first build
    assert derived_cache.load(str(source), "upper", build) == "ABC"
    assert len(calls) == 1


def test_a_changed_file_is_built_again(tmp_path, monkeypatch):
    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(tmp_path / "cache"))
    source = tmp_path / "index.json"
    source.write_text("abc")
    build, calls = _counting(str(source))
    derived_cache.load(str(source), "upper", build)
    source.write_text("abcd")
    os.utime(source, ns=(1, 1))
    assert derived_cache.load(str(source), "upper", build) == "ABCD"
    assert len(calls) == 2


def test_a_corrupt_entry_or_an_unwritable_folder_only_means_building(tmp_path, monkeypatch):
    source = tmp_path / "index.json"
    source.write_text("abc")
    build, calls = _counting(str(source))
    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(tmp_path / "cache"))
    derived_cache.load(str(source), "upper", build)
    entry = derived_cache._entry(str(source), "upper")
    with open(entry, "wb") as f:
        f.write(b"\x00not marshal")
    assert derived_cache.load(str(source), "upper", build) == "ABC"
    blocker = tmp_path / "a-file"
    blocker.write_text("")
    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(blocker / "cache"))  # below a file: cannot be made
    assert derived_cache.load(str(source), "upper", build) == "ABC"
    assert len(calls) == 3
    assert not [p for p in os.listdir(tmp_path) if p.endswith(".tmp")]


def test_a_missing_source_is_built_without_an_entry(tmp_path, monkeypatch):
    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(tmp_path / "cache"))
    assert derived_cache.load(str(tmp_path / "gone.json"), "x", lambda: {"x": 1}) == 1
    assert not (tmp_path / "cache").exists()
