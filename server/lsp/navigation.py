"""Names: outline, go to definition, find references, rename.

Every definition and every use of a name is already known to resolution
(``Workspace.definitions`` and ``Workspace.references``).  A definition is
identified by its file and the offset of its name, so a geometry defined in
a shared file and used by several decks is one target: references and
rename search the open decks and the decks of the workspace folder.
"""
from __future__ import annotations

import asyncio
import os
import re
from typing import TYPE_CHECKING, Iterable, Optional

from lsprotocol import types as t
from pygls.exceptions import JsonRpcInvalidParams

from deckward.grammar import model as m
from deckward.grammar.resolve import Definition, Workspace
from deckward.grammar.scanner import STATEMENT_KEYWORDS

from .core import DeckServer, target_at
from .geometry_files import file_location
from .positions import PositionMap
from .workspace import path_to_uri, uri_to_path

if TYPE_CHECKING:
    from .workspace import Analysis

MAX_WORKSPACE_DECKS = 500
_NAME = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$")
RESERVED = frozenset(STATEMENT_KEYWORDS | {"add", "as", "in", "energy", "orbital", "ghost", "optimize", "default"})

_KIND = {
    "geometry": t.SymbolKind.Struct,
    "basis_set": t.SymbolKind.Package,
    "level": t.SymbolKind.Class,
    "state": t.SymbolKind.Object,
    "derive": t.SymbolKind.Function,
}

DefKey = tuple[str, int]


def def_key(d: Definition) -> DefKey:
    return (os.path.abspath(d.path), d.name.span.start)


# ---------------------------------------------------------------- outline


def _summary(kind: str, node) -> Optional[str]:
    if kind == "geometry":
        return f"{len(node.atoms)} atom{'s' * (len(node.atoms) != 1)}"
    if kind == "level":
        method = node.settings.method.value if node.settings.method else "?"
        basis = node.settings.basis.default.value if node.settings.basis and node.settings.basis.default else ""
        return f"{method}/{basis}" if basis else method
    if kind == "state":
        charge = node.charge.value if node.charge else 0
        mult = node.multiplicity.value if node.multiplicity else "?"
        return f"charge {charge}, multiplicity {mult}"
    if kind == "derive" and node.quantity:
        return node.quantity.value
    return None


def document_symbols(analysis: "Analysis") -> list[t.DocumentSymbol]:
    deck = analysis.workspace.root.deck
    pos = analysis.positions
    symbols = []
    if deck.study is not None:
        s = deck.study
        title = s.title.value if s.title else "study"
        children = []
        for key in ("goal", "kind", "compare"):
            value = getattr(s, key)
            if value is not None:
                children.append(t.DocumentSymbol(name=key, detail=value.value, kind=t.SymbolKind.Property,
                                                 range=pos.range(value.span.start, value.span.end),
                                                 selection_range=pos.range(value.span.start, value.span.end)))
        symbols.append(t.DocumentSymbol(
            name=title, detail="study", kind=t.SymbolKind.Module,
            range=pos.range(s.span.start, s.span.end),
            selection_range=pos.range(s.keyword_span.start, s.keyword_span.end), children=children or None))
    for kind, name, node in deck.definitions():
        symbols.append(t.DocumentSymbol(
            name=name.value, detail=_summary(kind, node), kind=_KIND[kind],
            range=pos.range(node.span.start, node.span.end),
            selection_range=pos.range(name.span.start, name.span.end)))
    return symbols


# ------------------------------------------------------------- references


def workspace_decks(server: DeckServer, analysis: "Analysis") -> list[str]:
    """Deck files that may refer to names of this document: the open ones
    and those below the workspace root."""
    paths = [uri_to_path(u) for u in server.workspace.text_documents if u.endswith(".deck")]
    root = analysis.workspace.root_dir
    count = 0
    for folder, dirs, files in os.walk(root):
        dirs[:] = sorted(d for d in dirs if not d.startswith("."))
        for f in sorted(files):
            if f.endswith(".deck"):
                paths.append(os.path.join(folder, f))
                count += 1
        if count >= MAX_WORKSPACE_DECKS:
            break
    out = []
    for p in paths:
        p = os.path.abspath(p)
        if p not in out:
            out.append(p)
    return out


def references_of(server: DeckServer, analysis: "Analysis", key: DefKey,
                  include_declaration: bool) -> list[tuple[str, m.Located, PositionMap]]:
    """Every (path, name, position map) that is ``key``'s definition or a
    use of it, across the workspace's decks (runs on the worker thread)."""
    store = server.store
    found: dict[tuple[str, int], tuple[str, m.Located, PositionMap]] = {}
    workspaces: list[Workspace] = [analysis.workspace]
    with store.lock:
        for path in workspace_decks(server, analysis):
            if path == analysis.path:
                continue
            try:
                workspaces.append(store.project_for(path).resolve(path))
            except OSError:
                continue
    maps: dict[str, PositionMap] = {}

    def where(ws: Workspace, path: str) -> PositionMap:
        if path not in maps:
            if path == analysis.path:
                maps[path] = analysis.positions
            else:
                parsed = ws.file(path)
                maps[path] = PositionMap(parsed.index.text, store.encoding, parsed.index)
        return maps[path]

    for ws in workspaces:
        for d in ws.definitions.values():
            if include_declaration and def_key(d) == key:
                found[key] = (d.path, d.name, where(ws, d.path))
        for r in ws.references:
            if r.target is not None and def_key(r.target) == key:
                p = r.name.span.path
                found[(os.path.abspath(p), r.name.span.start)] = (p, r.name, where(ws, p))
    return [found[k] for k in sorted(found)]


def _location(path: str, name: m.Located, pos: PositionMap) -> t.Location:
    return t.Location(uri=path_to_uri(path), range=pos.range(name.span.start, name.span.end))


def check_new_name(new_name: str, kind: str, workspaces: Iterable[Workspace], old: str) -> None:
    if not _NAME.match(new_name):
        raise JsonRpcInvalidParams(f"`{new_name}` is not a name: use letters, digits and _, not starting with a digit")
    if new_name.lower() in RESERVED:
        raise JsonRpcInvalidParams(f"`{new_name}` is a keyword of the deck language")
    if new_name == old:
        return
    for ws in workspaces:
        other = ws.definitions.get(new_name)
        if other is not None:
            raise JsonRpcInvalidParams(
                f"`{new_name}` is already the name of a {other.kind} ({os.path.basename(other.path)} line {other.name.span.line})")


async def symbols(ls: DeckServer, params: t.DocumentSymbolParams):
    analysis = await ls.analysis(params.text_document.uri)
    return document_symbols(analysis) if analysis is not None else None


async def locate(ls: DeckServer, uri: str, position: t.Position):
    analysis = await ls.analysis(uri)
    if analysis is None:
        return None, None
    return analysis, target_at(analysis.workspace, analysis.path, analysis.positions.offset(position))


async def definition(ls: DeckServer, params: t.DefinitionParams):
    analysis, hit = await locate(ls, params.text_document.uri, params.position)
    if analysis is not None and (xyz := file_location(analysis.workspace, analysis.path,
                                                      analysis.positions.offset(params.position))):
        return xyz
    if not hit or hit[1] is None:
        return None
    d = hit[1]
    return _location(d.path, d.name, analysis.positions_for(d.path) or analysis.positions)


async def references(ls: DeckServer, params: t.ReferenceParams):
    analysis, hit = await locate(ls, params.text_document.uri, params.position)
    if not hit or hit[1] is None:
        return None
    loop = asyncio.get_running_loop()
    found = await loop.run_in_executor(ls.executor, references_of, ls, analysis, def_key(hit[1]),
                                       params.context.include_declaration)
    return [_location(p, name, pos) for p, name, pos in found]


async def prepare_rename(ls: DeckServer, params: t.PrepareRenameParams):
    analysis, hit = await locate(ls, params.text_document.uri, params.position)
    if not hit or hit[1] is None:
        return None
    name = hit[0]
    return t.PrepareRenamePlaceholder(range=analysis.positions.range(name.span.start, name.span.end),
                                      placeholder=name.value)


async def rename(ls: DeckServer, params: t.RenameParams):
    analysis, hit = await locate(ls, params.text_document.uri, params.position)
    if not hit or hit[1] is None:
        return None
    target = hit[1]
    loop = asyncio.get_running_loop()
    found = await loop.run_in_executor(ls.executor, references_of, ls, analysis, def_key(target), True)
    check_new_name(params.new_name, target.kind, [analysis.workspace], target.name.value)
    changes: dict[str, list[t.TextEdit]] = {}
    for path, name, pos in found:
        changes.setdefault(path_to_uri(path), []).append(
            t.TextEdit(range=pos.range(name.span.start, name.span.end), new_text=params.new_name))
    return t.WorkspaceEdit(changes=changes)


FEATURES = [
    (t.TEXT_DOCUMENT_DOCUMENT_SYMBOL, None, symbols),
    (t.TEXT_DOCUMENT_DEFINITION, None, definition),
    (t.TEXT_DOCUMENT_REFERENCES, None, references),
    (t.TEXT_DOCUMENT_PREPARE_RENAME, None, prepare_rename),
    (t.TEXT_DOCUMENT_RENAME, t.RenameOptions(prepare_provider=True), rename),
]
