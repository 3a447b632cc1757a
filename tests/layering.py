"""Reads every module's imports with `ast` (nothing is imported) and finds
the two kinds of edge the design forbids: an import against the direction
grammar -> rules -> server, and a heavy library (PySCF, numpy, ...) reached
from the typing path through module-level imports.

Imports inside functions count for the direction (a lazy back edge is still
a back edge) but not for the typing path: a function-level import of PySCF is
how the probes and the runner stay off that path."""
from __future__ import annotations

import ast
import os
from dataclasses import dataclass

# Source folder -> the package it installs as (pyproject.toml's package-dir).
PACKAGE_DIRS = {"package": "deckward", "grammar": "deckward.grammar",
                "rules": "deckward.rules", "server": "deckward.server"}
# A layer may import only itself and the layers before it.
LAYER_ORDER = ("grammar", "rules", "server")
HEAVY = ("pyscf", "numpy", "scipy", "matplotlib", "dask", "distributed", "basis_set_exchange", "geometric")
# What `deckward check` and the language server load to give findings as one
# types, and every command module (the CLI builds all their parsers at start).
TYPING_PATH_ROOTS = ("deckward.grammar", "deckward.rules.knowledge", "deckward.rules.fixes",
                     "deckward.rules.catalogue", "deckward.rules.engine", "deckward.server.cli",
                     "deckward.server.cmd_", "deckward.server.lsp")


@dataclass(frozen=True)
class Import:
    importer: str
    imported: str
    line: int
    top_level: bool


def modules(root: str) -> dict[str, str]:
    """Module name -> file path for every Python file of the four packages."""
    found = {}
    for folder, package in PACKAGE_DIRS.items():
        base = os.path.join(root, folder)
        for here, dirs, files in os.walk(base):
            dirs[:] = [d for d in dirs if d != "__pycache__"]
            rel = os.path.relpath(here, base)
            prefix = package if rel == "." else package + "." + rel.replace(os.sep, ".")
            for name in files:
                if name.endswith(".py"):
                    mod = prefix if name == "__init__.py" else prefix + "." + name[:-3]
                    found[mod] = os.path.join(here, name)
    return found


def _is_package(path: str) -> bool:
    return os.path.basename(path) == "__init__.py"


def imports_of(module: str, path: str) -> list[Import]:
    with open(path, encoding="utf-8") as f:
        tree = ast.parse(f.read(), filename=path)
    package = module if _is_package(path) else module.rpartition(".")[0]
    top = {id(node) for node in tree.body}
    # Statements inside `if`/`try` at module level still run at import time.
    for node in tree.body:
        if isinstance(node, (ast.If, ast.Try)):
            top.update(id(n) for n in ast.walk(node))
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names = [a.name for a in node.names]
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[: len(base) - node.level + 1]
                stem = ".".join(base + ([node.module] if node.module else []))
            else:
                stem = node.module or ""
            # `from x import y` may import the submodule x.y: record both.
            names = [stem] + [stem + "." + a.name for a in node.names if a.name != "*"]
        else:
            continue
        for name in names:
            out.append(Import(module, name, node.lineno, id(node) in top))
    return out


def layer_of(module: str) -> str | None:
    parts = module.split(".")
    if parts[0] != "deckward":
        return None
    return parts[1] if len(parts) > 1 and parts[1] in LAYER_ORDER else "package"


def back_edges(root: str) -> list[str]:
    """Imports from grammar to rules or server, or from rules to server."""
    problems = []
    for module, path in sorted(modules(root).items()):
        mine = layer_of(module)
        if mine not in LAYER_ORDER:
            continue
        for imp in imports_of(module, path):
            theirs = layer_of(imp.imported)
            if theirs in LAYER_ORDER and LAYER_ORDER.index(theirs) > LAYER_ORDER.index(mine):
                rel = os.path.relpath(path, root)
                problems.append(f"{rel}:{imp.line}: {module} ({mine}) imports {imp.imported} ({theirs})")
    return sorted(set(problems))


def heavy_on_typing_path(root: str) -> list[str]:
    """Chains of module-level imports from the typing path to a heavy library."""
    known = modules(root)
    graph: dict[str, list[Import]] = {m: [i for i in imports_of(m, p) if i.top_level] for m, p in known.items()}
    roots = [m for m in known
             if any(m == r or m.startswith(r if r.endswith("_") else r + ".") for r in TYPING_PATH_ROOTS)]
    # A package's __init__ runs whenever one of its submodules is imported.
    def with_parents(name: str) -> list[str]:
        parts = name.split(".")
        return [".".join(parts[:i]) for i in range(1, len(parts) + 1)]

    seen: dict[str, list[str]] = {}
    stack = [(r, [r]) for r in sorted(roots)]
    problems = []
    while stack:
        module, chain = stack.pop()
        if module in seen:
            continue
        seen[module] = chain
        for imp in graph.get(module, []):
            if imp.imported.split(".")[0] in HEAVY:
                problems.append(" -> ".join(chain) + f" -> {imp.imported} (line {imp.line})")
                continue
            for target in with_parents(imp.imported):
                if target in known and target not in seen:
                    stack.append((target, chain + [target]))
    return sorted(set(problems))


# Inside rules/: what each part may import (besides itself and grammar).
# knowledge is the floor; the catalogue builds findings with the engine's
# context and the fixes' edits; the engine discovers the catalogue; the
# PySCF layer (compute) sits on top and is reached from below only inside
# functions (the probes of a `--probe` check, the probe rules' ids).
RULES_PARTS = ("knowledge", "fixes", "catalogue", "engine", "compute")
RULES_MAY_IMPORT = {
    "knowledge": set(),
    "fixes": {"knowledge"},
    "catalogue": {"knowledge", "fixes", "engine.context"},
    "engine": {"knowledge", "fixes", "catalogue"},
    "compute": {"knowledge", "fixes", "catalogue", "engine"},
}
LAZY_ONLY = {"compute"}


def rules_part_of(module: str) -> str | None:
    parts = module.split(".")
    if parts[:2] != ["deckward", "rules"] or len(parts) < 3 or parts[2] not in RULES_PARTS:
        return None
    return parts[2]


def rules_part_edges(root: str) -> list[str]:
    """Imports between the parts of rules/ that RULES_MAY_IMPORT does not
    allow; an import of compute from another part is allowed only inside a
    function."""
    problems = []
    for module, path in sorted(modules(root).items()):
        mine = rules_part_of(module)
        if mine is None:
            continue
        for imp in imports_of(module, path):
            theirs = rules_part_of(imp.imported)
            if theirs is None or theirs == mine:
                continue
            allowed = RULES_MAY_IMPORT[mine]
            target = ".".join(imp.imported.split(".")[2:])
            ok = theirs in allowed or any(target == a or target.startswith(a + ".") for a in allowed)
            if theirs in LAZY_ONLY and not imp.top_level:
                ok = True
            if not ok:
                rel = os.path.relpath(path, root)
                where = "at module level " if imp.top_level else ""
                problems.append(f"{rel}:{imp.line}: {module} ({mine}) imports {where}{imp.imported} ({theirs})")
    return sorted(set(problems))
