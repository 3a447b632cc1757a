"""The language server's modules: features depend on the core, never on
each other, and bind module-level handlers (no closures registered inside
functions)."""
import ast
import os

import pytest

import deckward.server.lsp as lsp_package

FOLDER = os.path.dirname(lsp_package.__file__)
FEATURES = ("actions", "completion", "diagnostics", "formatting", "hover", "navigation", "probes")


def imports_of(name: str) -> set[str]:
    with open(os.path.join(FOLDER, name + ".py"), encoding="utf-8") as f:
        tree = ast.parse(f.read())
    found = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom):
            if node.level == 1 and node.module:
                found.add(node.module.split(".")[0])
            elif node.level == 1:
                found.update(a.name for a in node.names)
            elif node.module and node.module.startswith("deckward.server.lsp."):
                found.add(node.module.split(".")[3])
    return found


@pytest.mark.parametrize("feature", FEATURES)
def test_a_feature_imports_no_other_feature(feature):
    assert imports_of(feature) & set(FEATURES) == set()
    assert "server" not in imports_of(feature)


def test_the_core_imports_no_feature():
    assert imports_of("core") & set(FEATURES) == set()


@pytest.mark.parametrize("feature", FEATURES)
def test_handlers_are_module_level(feature):
    with open(os.path.join(FOLDER, feature + ".py"), encoding="utf-8") as f:
        tree = ast.parse(f.read())
    registered_inside = [n.name for top in tree.body if isinstance(top, (ast.FunctionDef, ast.AsyncFunctionDef))
                         for n in ast.walk(top) if n is not top
                         and isinstance(n, (ast.FunctionDef, ast.AsyncFunctionDef)) and n.decorator_list]
    assert registered_inside == []
    assert any(isinstance(n, ast.Assign) and any(getattr(t, "id", None) == "FEATURES" for t in n.targets)
               or isinstance(n, ast.AnnAssign) and getattr(n.target, "id", None) == "FEATURES" for n in tree.body)


def test_every_listed_handler_is_bound():
    from deckward.server.lsp.server import build_server

    server = build_server()
    import importlib

    for feature in FEATURES:
        module = importlib.import_module(f"deckward.server.lsp.{feature}")
        for method, _, handler in module.FEATURES:
            bound = server.protocol.fm.features[method]
            assert getattr(bound, "func", bound) is handler  # pygls binds the server as a partial
    assert "deckward.runProbes" in server.protocol.fm.commands
    assert [kind for kind, _ in server.source_actions] == ["source.deckward.probes"]
