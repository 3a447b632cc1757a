"""Project configuration: ``deckward.yaml``.

Which file applies to a deck is ``deckward.rules.engine.project``'s business (the
nearest one at or above the deck; ``--config`` overrides); this module reads
and validates one.
Read with ``yaml.safe_load`` semantics, but through the node composer so that
every problem (an unknown key, a bad severity) is reported at its line.
"""
from __future__ import annotations

import fnmatch
import math
import os
from dataclasses import field
from typing import Optional

from deckward.grammar import derived_cache
from deckward.grammar.build import did_you_mean
from deckward.grammar.findings import Finding, RuleInfo, Severity
from deckward.grammar.records import record
from deckward.grammar.text_index import LineIndex

CONFIG_NAME = "deckward.yaml"
SEVERITY_WORDS = ("error", "warning", "info", "off")
TOP_KEYS = ("rules", "exclude", "probe", "run", "cluster")
PROBE_KEYS = ("time_limit_s", "max_basis_functions", "threshold_ev")
RUN_KEYS = ("max_memory_mb", "threads", "jobs", "time_limit_s", "max_basis_functions")

CONFIG_RULE = RuleInfo(
    id="invalid-config",
    severity=Severity.ERROR,
    title="deckward.yaml has a mistake",
    why="A misspelt rule id or severity in the configuration would silently leave a rule at its "
    "default; every key and value is checked and reported at its line.",
    references=("docs/configuration.md",),
    bad_example="rules:\n  koopmans-ea: eror\n",
    good_example="rules:\n  koopmans-ip: error\n",
    category="hygiene",
)


@record
class Config:
    """A read ``deckward.yaml`` (or the defaults): severities, excludes, limits, clusters."""

    path: Optional[str] = None
    root: Optional[str] = None  # the folder holding the file: the workspace root
    severities: dict[str, Optional[Severity]] = field(default_factory=dict)  # None: off
    exclude: list[str] = field(default_factory=list)
    probe: dict = field(default_factory=dict)
    run: dict = field(default_factory=dict)
    clusters: dict = field(default_factory=dict)  # name -> cluster_config.ClusterSpec
    findings: list[Finding] = field(default_factory=list)

    def severity_for(self, rule_id: str, default: Severity) -> Optional[Severity]:
        """The configured severity (None when the rule is off)."""
        if rule_id in self.severities:
            return self.severities[rule_id]
        return default

    def is_excluded(self, path: str) -> bool:
        if not self.exclude:
            return False
        base = self.root or os.getcwd()
        rel = os.path.relpath(os.path.abspath(path), base).replace(os.sep, "/")
        for pattern in self.exclude:
            if fnmatch.fnmatch(rel, pattern) or (pattern.endswith("/**") and rel.startswith(pattern[:-2])):
                return True
        return False


def load_config(path: Optional[str], known_rules: set[str]) -> Config:
    """Read and validate a configuration file (``None``: defaults)."""
    if path is None:
        return Config()
    cfg = Config(path=path, root=os.path.dirname(os.path.abspath(path)))
    try:
        with open(path, "rb") as f:
            data = f.read()
        text = data.decode("utf-8")
    except (OSError, UnicodeDecodeError) as e:
        cfg.findings.append(Finding("invalid-config", Severity.ERROR, f"cannot read the configuration: {e}",
                                    LineIndex("", path).span(0, 0)))
        return cfg
    remembered = derived_cache.recall(path, "config", text)
    if remembered is not None:
        try:
            if all(rid in known_rules for rid in remembered["severities"]):
                return _apply(cfg, remembered)
        except (KeyError, TypeError, ValueError, AttributeError):  # an entry of another shape: read the file
            cfg = Config(path=path, root=os.path.dirname(os.path.abspath(path)))
    import yaml  # only when there is a file to read: keeps start-up light

    index = LineIndex(text, path)

    def report(node, message: str) -> None:
        if node is None:
            span = index.span(0, 0)
        else:
            span = index.span(node.start_mark.index, node.end_mark.index)
        cfg.findings.append(Finding("invalid-config", Severity.ERROR, message, span))

    try:
        root = yaml.compose(text, Loader=_depth_limited_loader())
    except RecursionError:  # a nesting the depth limit did not catch: still a located message
        cfg.findings.append(Finding("invalid-config", Severity.ERROR,
                                    "not valid YAML: nested too deeply to read", index.span(0, 1)))
        return cfg
    except yaml.YAMLError as e:
        mark = getattr(e, "problem_mark", None)
        offset = mark.index if mark is not None else 0
        cfg.findings.append(Finding("invalid-config", Severity.ERROR,
                                    f"not valid YAML: {getattr(e, 'problem', None) or e}",
                                    index.span(offset, offset + 1)))
        return cfg
    if root is None:
        return cfg
    if not isinstance(root, yaml.MappingNode):
        report(root, f"the configuration must be a mapping of keys ({', '.join(TOP_KEYS)})")
        return cfg
    for key_node, value in root.value:
        key = key_node.value
        if key not in TOP_KEYS:
            report(key_node, f"unknown key `{key}` (keys: {', '.join(TOP_KEYS)})" + did_you_mean(str(key), TOP_KEYS))
        elif key == "rules":
            _rules(value, cfg, known_rules, report)
        elif key == "cluster":
            from .cluster_config import parse_clusters

            cfg.clusters = parse_clusters(value, report)
        elif key == "exclude":
            if not isinstance(value, yaml.SequenceNode) or not all(isinstance(v, yaml.ScalarNode) for v in value.value):
                report(value, "`exclude` must be a list of glob patterns")
            else:
                cfg.exclude = [str(v.value) for v in value.value]
        else:
            allowed = PROBE_KEYS if key == "probe" else RUN_KEYS
            target = cfg.probe if key == "probe" else cfg.run
            if not isinstance(value, yaml.MappingNode):
                report(value, f"`{key}` must be a mapping (keys: {', '.join(allowed)})")
                continue
            for k, v in value.value:
                if k.value not in allowed:
                    report(k, f"unknown key `{k.value}` in `{key}` (keys: {', '.join(allowed)})"
                           + did_you_mean(str(k.value), allowed))
                    continue
                try:
                    number = float(v.value)
                except (TypeError, ValueError):
                    report(v, f"`{key}.{k.value}` must be a positive number")
                    continue
                if not number > 0 or not math.isfinite(number):
                    report(v, f"`{key}.{k.value}` must be a positive number"
                           + (", not infinite" if number == float("inf") else ""))
                    continue
                target[k.value] = number
    if not cfg.findings and not cfg.clusters:  # a clean file is read as YAML once (grammar/derived_cache.py)
        derived_cache.remember(path, "config", text, {
            "severities": {rid: None if sev is None else sev.value for rid, sev in cfg.severities.items()},
            "exclude": cfg.exclude, "probe": cfg.probe, "run": cfg.run})
    return cfg


def _apply(cfg: Config, remembered: dict) -> Config:
    """A configuration as a clean read of the same text left it."""
    cfg.severities = {rid: None if word is None else Severity(word) for rid, word in remembered["severities"].items()}
    cfg.exclude = list(remembered["exclude"])
    cfg.probe = dict(remembered["probe"])
    cfg.run = dict(remembered["run"])
    return cfg


MAX_CONFIG_DEPTH = 32  # nesting of YAML collections; the configuration needs 3


_LOADER = None


def _depth_limited_loader():
    """``yaml.SafeLoader`` whose composer stops past ``MAX_CONFIG_DEPTH``
    nested collections with a located error (the composer recurses once per
    level: thousands of ``[`` would exhaust Python's stack)."""
    global _LOADER
    if _LOADER is None:
        import yaml

        class DepthLimitedLoader(yaml.SafeLoader):
            depth = 0

            def compose_node(self, parent, index):
                self.depth += 1
                try:
                    if self.depth > MAX_CONFIG_DEPTH:
                        mark = self.peek_event().start_mark
                        raise yaml.composer.ComposerError(
                            None, None, f"collections nested more than {MAX_CONFIG_DEPTH} levels deep", mark)
                    return super().compose_node(parent, index)
                finally:
                    self.depth -= 1

        _LOADER = DepthLimitedLoader
    return _LOADER


def _rules(node, cfg: Config, known: set[str], report) -> None:
    import yaml

    if not isinstance(node, yaml.MappingNode):
        report(node, "`rules` must map rule ids to error | warning | info | off")
        return
    for k, v in node.value:
        rid = str(k.value)
        if rid not in known:
            report(k, f"unknown rule `{rid}`" + did_you_mean(rid, sorted(known)))
            continue
        word = str(v.value).lower() if isinstance(v, yaml.ScalarNode) else ""
        if isinstance(v, yaml.ScalarNode) and v.tag == "tag:yaml.org,2002:bool" and word in ("false", "off", "no"):
            word = "off"
        if word not in SEVERITY_WORDS:
            report(v, f"`{v.value if isinstance(v, yaml.ScalarNode) else '...'}` is not a severity "
                      f"(error | warning | info | off)" + did_you_mean(word, SEVERITY_WORDS))
            continue
        cfg.severities[rid] = None if word == "off" else Severity(word)
