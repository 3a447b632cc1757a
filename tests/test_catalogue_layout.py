"""The catalogue's folders: one rule a module, in the folder of its family,
so a rule, its family's shared facts and its neighbours are found together."""
from __future__ import annotations

import importlib
import os
import pkgutil

from deckward.rules import catalogue
from deckward.rules.engine.registry import rule_modules, static_rules

FAMILIES = ("basis", "electrons", "geometry", "ion_states")
# Modules of a family that hold its shared facts rather than a rule.
SHARED_FACTS = {"deckward.rules.catalogue.basis.diffuse", "deckward.rules.catalogue.basis.targets",
                "deckward.rules.catalogue.ion_states.derives", "deckward.rules.catalogue.ion_states.ion_fixes",
                "deckward.rules.catalogue.ion_states.species", "deckward.rules.catalogue.ion_states.wording"}


def test_the_families_are_the_folders_of_the_catalogue():
    folders = sorted(m.name for m in pkgutil.iter_modules(catalogue.__path__) if m.ispkg)
    assert folders == list(FAMILIES)


def test_each_rule_sits_in_the_folder_of_its_category():
    rules = [r for r in static_rules().values() if r.module.startswith("deckward.rules.catalogue.")]
    assert len(rules) == 31
    for rule in rules:
        family = rule.module.split(".")[3]
        assert rule.info.category.replace("-", "_") == family, rule.id
        assert rule.module.rsplit(".", 1)[1] == rule.id.replace("-", "_")


def test_every_module_of_a_family_is_a_rule_or_its_shared_facts():
    for name in rule_modules():
        module = importlib.import_module(name)
        assert (getattr(module, "INFO", None) is not None) != (name in SHARED_FACTS), name
        assert os.path.basename(module.__file__)[:-3] == name.rsplit(".", 1)[1]
