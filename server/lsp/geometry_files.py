"""Editor support for ``geometry NAME { file = "x.xyz" }``: go to the .xyz
file from its path, and complete the path with the .xyz files of the deck's
folder.  Navigation and completion call these two functions."""
from __future__ import annotations

import os
from typing import Optional

from lsprotocol import types as t

from deckward.grammar.resolve import Workspace

from .workspace import path_to_uri


def file_location(ws: Workspace, path: str, offset: int) -> Optional[t.Location]:
    """The start of the .xyz file whose quoted path is under ``offset``."""
    for pf in ws.files:
        if pf.path != path:
            continue
        for g in pf.deck.geometries:
            if g.file is not None and g.file_path is not None and g.file.span.start <= offset <= g.file.span.end:
                return t.Location(uri=path_to_uri(os.path.abspath(g.file_path)),
                                  range=t.Range(t.Position(0, 0), t.Position(0, 0)))
    return None


def file_items(ws: Workspace) -> list[t.CompletionItem]:
    """The .xyz files beside the deck (and one folder down), quoted."""
    folder = os.path.dirname(os.path.abspath(ws.path))
    found = []
    try:
        for entry in sorted(os.scandir(folder), key=lambda e: e.name):
            if entry.is_file() and entry.name.lower().endswith(".xyz"):
                found.append(entry.name)
            elif entry.is_dir() and not entry.name.startswith("."):
                found += [f"{entry.name}/{n}" for n in sorted(os.listdir(entry.path)) if n.lower().endswith(".xyz")]
    except OSError:
        return []
    return [t.CompletionItem(label=f'"{n}"', kind=t.CompletionItemKind.File, detail="geometry file (XYZ, angstrom)")
            for n in found]
