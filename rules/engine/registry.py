"""The rule registry: every rule module in ``deckward.rules.catalogue``
(one folder per family: ``basis``, ``electrons``, ``geometry``,
``ion_states``).

A rule module defines ``INFO`` (a ``RuleInfo``: id, severity, title, why,
references, examples, fix) and ``check(ctx)`` yielding findings.  Modules are
discovered, so adding a rule is adding a file (see DEVELOPERS.md).  Findings
produced by the grammar (syntax errors, names) are listed here too, so users
see one catalogue.
"""
from __future__ import annotations

import importlib
import pkgutil
from collections.abc import Set as AbstractSet
from typing import Callable, Iterable, Optional

from deckward.grammar.findings import Finding, RuleInfo, Severity
from deckward.grammar.language_rules import LANGUAGE_RULES
from deckward.grammar.records import record

from deckward.rules import catalogue


@record(frozen=True)
class Rule:
    """A rule of the catalogue: its ``RuleInfo`` and its check (None when reported elsewhere)."""

    info: RuleInfo
    check: Optional[Callable[..., Iterable[Finding]]]  # None: reported by the grammar or a probe
    module: str = ""

    @property
    def id(self) -> str:
        return self.info.id


_RULES: Optional[dict[str, Rule]] = None
PROBE_MODULE = "deckward.rules.compute.probes"  # rules reported by probes, which run only on request

# Findings that are not rules of the catalogue but can appear in output.
INTERNAL_RULES = (
    RuleInfo(
        id="internal-error",
        severity=Severity.ERROR,
        title="A rule failed while checking this deck",
        why="deckward itself hit a defect while running one rule; the other rules' findings are still "
        "reported. Please report it with the deck that caused it.",
        category="hygiene",
    ),
)


_STATIC: Optional[dict[str, Rule]] = None


def rule_modules() -> list[str]:
    """The catalogue's modules, family by family (``catalogue/<family>/``),
    in the order of their names whatever their family, so the catalogue
    reads alphabetically.  Modules whose names start with ``_`` are helpers.
    A module without ``INFO`` (a family's shared facts) is skipped by the
    caller."""
    found = []
    for family in pkgutil.iter_modules(catalogue.__path__):
        if not family.ispkg or family.name.startswith("_"):
            continue
        package = importlib.import_module(f"{catalogue.__name__}.{family.name}")
        found.extend((m.name, f"{package.__name__}.{m.name}") for m in pkgutil.iter_modules(package.__path__)
                     if not m.name.startswith("_") and not m.ispkg)
    return [full for _, full in sorted(found)]


def static_rules() -> dict[str, Rule]:
    """Every rule except the probes', in catalogue order: what a check
    without ``--probe`` runs.  It does not import the probes package, which
    only probe runs need."""
    global _STATIC
    if _STATIC is None:
        rules: dict[str, Rule] = {}
        for info in LANGUAGE_RULES:
            rules[info.id] = Rule(info, None, "deckward.grammar")
        for name in rule_modules():
            mod = importlib.import_module(name)
            info = getattr(mod, "INFO", None)
            if info is None:  # a family's shared facts, not a rule
                continue
            rules[info.id] = Rule(info, getattr(mod, "check", None), mod.__name__)
        from .config import CONFIG_RULE
        from .suppressions import SUPPRESSION_RULES

        for info in SUPPRESSION_RULES + (CONFIG_RULE,) + INTERNAL_RULES:
            rules.setdefault(info.id, Rule(info, None, "deckward.rules"))
        _STATIC = rules
    return _STATIC


def all_rules() -> dict[str, Rule]:
    """Every rule by id, in catalogue order (language rules first, probes last)."""
    global _RULES
    if _RULES is None:
        rules = dict(static_rules())
        from deckward.rules.compute.probes import PROBE_RULES

        for info in PROBE_RULES:
            rules.setdefault(info.id, Rule(info, None, PROBE_MODULE))
        _RULES = rules
    return _RULES


class KnownRuleIds(AbstractSet):
    """The set of rule ids, for checking the ids a configuration or an
    ``# allow:`` names.  The probes' ids are looked up only when an id is not
    a static rule's, so checking a deck does not import the probes."""

    def __init__(self, extra: Iterable[str] = ()) -> None:
        self.extra = frozenset(extra)

    def __contains__(self, rule_id: object) -> bool:
        return rule_id in static_rules() or rule_id in self.extra or rule_id in all_rules()

    def __iter__(self):
        return iter(list(all_rules()) + sorted(self.extra - set(all_rules())))

    def __len__(self) -> int:
        return len(set(all_rules()) | self.extra)

    @classmethod
    def _from_iterable(cls, it) -> set:
        return set(it)  # set operations give plain sets


def get(rule_id: str) -> Optional[Rule]:
    return all_rules().get(rule_id)
