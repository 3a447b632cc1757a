"""A clean deckward.yaml is read as YAML once; later starts take what that
read gave from the cache folder, only while the text is the same and every
rule id it names is still known."""
import sys

import pytest

from deckward.grammar.findings import Severity
from deckward.rules.engine import config as config_mod
from deckward.rules.engine.config import load_config

TEXT = "rules:\n  koopmans-ip: error\n  unused-definition: off\nexclude:\n  - \"scratch/**\"\nprobe:\n  time_limit_s: 120\n"
KNOWN = {"koopmans-ip", "unused-definition"}


def _fields(cfg):
    return cfg.severities, cfg.exclude, cfg.probe, cfg.run, cfg.findings, cfg.root


@pytest.fixture
def cache(tmp_path, monkeypatch):
    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(tmp_path / "cache"))
    return tmp_path


def test_the_second_read_gives_the_same_configuration_without_yaml(cache, monkeypatch):
    path = cache / "deckward.yaml"
    path.write_text(TEXT)
    first = load_config(str(path), KNOWN)
    assert first.severities == {"koopmans-ip": Severity.ERROR, "unused-definition": None}
    assert first.exclude == ["scratch/**"] and first.probe == {"time_limit_s": 120.0} and not first.findings
    monkeypatch.setitem(sys.modules, "yaml", None)  # an import of yaml would now fail
    assert _fields(load_config(str(path), KNOWN)) == _fields(first)


def test_a_changed_text_is_read_again(cache):
    path = cache / "deckward.yaml"
    path.write_text(TEXT)
    load_config(str(path), KNOWN)
    path.write_text(TEXT.replace("error", "info"))
    assert load_config(str(path), KNOWN).severities["koopmans-ip"] is Severity.INFO


def test_a_file_with_mistakes_is_reported_on_every_read(cache):
    path = cache / "deckward.yaml"
    path.write_text("rules:\n  koopmans-ea: eror\n")
    for _ in range(2):
        cfg = load_config(str(path), KNOWN)
        assert [(f.rule, f.message, f.span.line) for f in cfg.findings] == [
            ("invalid-config", "unknown rule `koopmans-ea`; did you mean `koopmans-ip`?", 2)]


def test_a_rule_id_no_longer_known_is_read_again_and_reported(cache):
    path = cache / "deckward.yaml"
    path.write_text(TEXT)
    load_config(str(path), KNOWN)
    cfg = load_config(str(path), {"koopmans-ip"})
    assert [f.message for f in cfg.findings] == ["unknown rule `unused-definition`"]


def test_the_remembered_entry_is_plain_data(cache):
    path = cache / "deckward.yaml"
    path.write_text(TEXT)
    load_config(str(path), KNOWN)
    assert config_mod.derived_cache.recall(str(path), "config", TEXT) == {
        "severities": {"koopmans-ip": "error", "unused-definition": None}, "exclude": ["scratch/**"],
        "probe": {"time_limit_s": 120.0}, "run": {}}


@pytest.mark.parametrize("stored", [42, {"severities": 7}, {"severities": {"koopmans-ip": "loud"}}, {}])
def test_a_remembered_entry_of_another_shape_means_reading_the_file(cache, stored):
    path = cache / "deckward.yaml"
    path.write_text(TEXT)
    config_mod.derived_cache.remember(str(path), "config", TEXT, stored)
    cfg = load_config(str(path), KNOWN)
    assert cfg.severities == {"koopmans-ip": Severity.ERROR, "unused-definition": None}
    assert cfg.exclude == ["scratch/**"] and not cfg.findings


def test_a_new_release_reads_the_file_again(cache, monkeypatch):
    path = cache / "deckward.yaml"
    path.write_text(TEXT)
    load_config(str(path), KNOWN)
    monkeypatch.setattr(config_mod.derived_cache, "__version__", "999.0")
    assert config_mod.derived_cache.recall(str(path), "config", TEXT) is None
