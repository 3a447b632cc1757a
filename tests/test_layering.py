"""The design's one direction (grammar -> rules -> server), the order of
the parts inside rules/ (knowledge, fixes, catalogue, engine, compute) and
the light typing path, enforced on the source rather than promised in a
docstring."""
from __future__ import annotations

import os
import textwrap

from layering import back_edges, heavy_on_typing_path, rules_part_edges

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def test_no_import_runs_against_the_layers():
    assert back_edges(ROOT) == []


def test_the_parts_of_rules_import_only_those_below_them():
    assert rules_part_edges(ROOT) == []


def test_typing_path_reaches_no_heavy_library():
    assert heavy_on_typing_path(ROOT) == []


def _tree(tmp_path, files: dict[str, str]) -> str:
    for folder in ("package", "grammar", "rules", "server"):
        (tmp_path / folder).mkdir()
        (tmp_path / folder / "__init__.py").write_text("")
    for rel, text in files.items():
        path = tmp_path / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(textwrap.dedent(text))
    return str(tmp_path)


def test_a_back_edge_in_a_synthetic_tree_is_reported(tmp_path):
    root = _tree(tmp_path, {
        "grammar/model.py": "from deckward.rules import engine\n",
        "rules/engine.py": "def late():\n    from ..server import cli\n",
        "rules/ok.py": "from deckward.grammar import model\nfrom ..grammar.model import x\n",
        "server/cli.py": "from deckward.rules.engine import late\n",
    })
    assert back_edges(root) == [
        f"grammar{os.sep}model.py:1: deckward.grammar.model (grammar) imports deckward.rules (rules)",
        f"grammar{os.sep}model.py:1: deckward.grammar.model (grammar) imports deckward.rules.engine (rules)",
        f"rules{os.sep}engine.py:2: deckward.rules.engine (rules) imports deckward.server (server)",
        f"rules{os.sep}engine.py:2: deckward.rules.engine (rules) imports deckward.server.cli (server)",
    ]


def test_heavy_import_reached_through_a_chain_is_reported_but_a_lazy_one_is_not(tmp_path):
    root = _tree(tmp_path, {
        "server/cmd_check.py": "from deckward.rules import helper\n",
        "rules/helper.py": "import os\nfrom . import tables\n",
        "rules/tables.py": "import numpy as np\n",
        "rules/runner.py": "def run():\n    import pyscf\n",
        "rules/catalogue/__init__.py": "",
        "rules/catalogue/some_rule.py": "try:\n    import matplotlib\nexcept ImportError:\n    pass\n",
    })
    assert heavy_on_typing_path(root) == [
        "deckward.rules.catalogue.some_rule -> matplotlib (line 2)",
        "deckward.server.cmd_check -> deckward.rules.helper -> deckward.rules.tables -> numpy (line 1)",
    ]


def test_a_back_edge_between_the_parts_of_rules_is_reported(tmp_path):
    root = _tree(tmp_path, {
        "rules/knowledge/__init__.py": "",
        "rules/knowledge/elements.py": "from deckward.rules.engine import config\n",
        "rules/fixes/__init__.py": "",
        "rules/fixes/edits.py": "from ..knowledge import elements\n",
        "rules/catalogue/__init__.py": "",
        "rules/catalogue/some_rule.py": ("from deckward.rules.engine.context import Context\n"
                                         "from deckward.rules.engine.registry import all_rules\n"),
        "rules/engine/__init__.py": "",
        "rules/engine/checker.py": ("from deckward.rules.compute import runner\n"
                                    "def probe():\n    from deckward.rules.compute.probes import run_probes\n"),
    })
    assert rules_part_edges(root) == [
        f"rules{os.sep}catalogue{os.sep}some_rule.py:2: deckward.rules.catalogue.some_rule (catalogue) imports "
        "at module level deckward.rules.engine.registry (engine)",
        f"rules{os.sep}catalogue{os.sep}some_rule.py:2: deckward.rules.catalogue.some_rule (catalogue) imports "
        "at module level deckward.rules.engine.registry.all_rules (engine)",
        f"rules{os.sep}engine{os.sep}checker.py:1: deckward.rules.engine.checker (engine) imports "
        "at module level deckward.rules.compute (compute)",
        f"rules{os.sep}engine{os.sep}checker.py:1: deckward.rules.engine.checker (engine) imports "
        "at module level deckward.rules.compute.runner (compute)",
        f"rules{os.sep}knowledge{os.sep}elements.py:1: deckward.rules.knowledge.elements (knowledge) imports "
        "at module level deckward.rules.engine (engine)",
        f"rules{os.sep}knowledge{os.sep}elements.py:1: deckward.rules.knowledge.elements (knowledge) imports "
        "at module level deckward.rules.engine.config (engine)",
    ]
