"""The server's view of the project: open buffers, configuration, analyses.

Checking an open document is the command line's check on the buffer's text,
through the same ``deckward.rules.engine.project.Projects``: one ``Loader`` whose
overlay holds every open buffer (so a deck that uses an unsaved file sees the
unsaved text); the workspace root and ``deckward.yaml`` are found exactly as
the command line finds them (the client's workspace folders play the part of
the folders named on the command line), and a configuration is re-read when
its modification time changes or the client reports a change.  Each
analysis remembers the files it read, so that editing one file re-checks
the open decks that use it.
"""
from __future__ import annotations

import os
import re
import threading
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Callable, Iterator, Optional

from pygls.uris import from_fs_path, to_fs_path

from deckward.grammar.findings import Finding
from deckward.grammar.resolve import Workspace
from deckward.rules.engine.config import CONFIG_NAME, Config
from deckward.rules.engine.project import Project, Projects

from .positions import UTF16, PositionMap


_LONE_SURROGATE = re.compile("[\ud800-\udfff]")


def checkable(text: str) -> str:
    """``text`` with lone surrogates (which JSON allows and no file can hold)
    replaced by U+FFFD: one code point for one, and one UTF-16 unit for one,
    so every position stays where it was."""
    if text.isascii() or not _LONE_SURROGATE.search(text):
        return text
    return _LONE_SURROGATE.sub("\ufffd", text)


def uri_to_path(uri: str) -> str:
    path = to_fs_path(uri) if uri.startswith("file:") else None
    return os.path.abspath(path if path else uri)


def path_to_uri(path: str) -> str:
    return from_fs_path(os.path.abspath(path)) or path


@dataclass
class Analysis:
    """One check of one document at one version."""

    uri: str
    path: str
    version: Optional[int]
    text: str
    workspace: Workspace
    findings: list[Finding]  # every finding of the workspace, suppressed ones included
    config: Config
    positions: PositionMap
    generation: int = 0  # the server's change counter when the check started

    @property
    def own_findings(self) -> list[Finding]:
        """Active findings located in this document."""
        return [f for f in self.findings if f.suppressed is None and f.span.path == self.path]

    @property
    def file_paths(self) -> set[str]:
        return {os.path.abspath(f.path) for f in self.workspace.files}

    def positions_for(self, path: str) -> Optional[PositionMap]:
        """Position conversion for another file of the workspace."""
        if path == self.path:
            return self.positions
        parsed = self.workspace.file(path)
        if parsed is None:
            return None
        return PositionMap(parsed.index.text, self.positions.encoding, parsed.index)


class Buffers(Mapping):
    """The overlay the ``Loader`` reads: path -> text of an open buffer.

    The text itself stays in pygls' documents (held once); this maps paths
    to their URIs and reads the document's current text when asked."""

    def __init__(self, documents: Callable[[], Mapping]) -> None:
        self.documents = documents
        self.uris: dict[str, str] = {}

    def __getitem__(self, path: str) -> str:
        doc = self.documents().get(self.uris[path])
        if doc is None:
            raise KeyError(path)
        return checkable(doc.source)

    def __contains__(self, path) -> bool:
        uri = self.uris.get(path)
        return uri is not None and uri in self.documents()

    def __iter__(self) -> Iterator[str]:
        return (p for p in list(self.uris) if p in self)

    def __len__(self) -> int:
        return sum(1 for _ in self)


class DeckWorkspace:
    """Open buffers, configurations and the latest analysis of each buffer.

    Analyses run on one worker thread at a time (``lock``); which buffers
    are open is only changed from the event loop."""

    def __init__(self, documents: Callable[[], Mapping] = dict) -> None:
        self.overlay = Buffers(documents)
        self.projects = Projects(overlay=self.overlay, live=True)
        self.loader = self.projects.loader
        self.encoding = UTF16
        self.analyses: dict[str, Analysis] = {}
        self.lock = threading.Lock()

    @property
    def folders(self) -> list[str]:
        return self.projects.folders

    @folders.setter
    def folders(self, folders: list[str]) -> None:
        self.projects.folders = [os.path.abspath(f) for f in folders]
        self.projects.reload()

    # -- buffers ----------------------------------------------------------
    def open_buffer(self, uri: str) -> None:
        self.overlay.uris[uri_to_path(uri)] = uri

    def drop_buffer(self, uri: str) -> None:
        path = uri_to_path(uri)
        self.overlay.uris.pop(path, None)
        self.loader.forget(path)
        self.analyses.pop(uri, None)

    # -- configuration ----------------------------------------------------
    def project_for(self, path: str) -> Project:
        return self.projects.for_path(path)

    def config_for(self, path: str) -> Config:
        """The configuration that applies to ``path``, re-read when the file
        changed on disk."""
        return self.projects.for_path(path).config

    def forget_configs(self) -> None:
        self.projects.reload()

    # -- checking ---------------------------------------------------------
    def analyse(self, uri: str, text: str, version: Optional[int]) -> Analysis:
        """Resolve and check ``text`` as the document ``uri`` (thread-safe)."""
        path = uri_to_path(uri)
        clean = checkable(text)
        with self.lock:
            checked = self.project_for(path).analyse(path, text=clean)
            ws = checked.workspace
            analysis = Analysis(uri, path, version, text, ws, checked.findings, checked.config,
                                PositionMap(clean, self.encoding, ws.root.index))
        return analysis

    def recheck_text(self, uri: str, text: str) -> list[Finding]:
        """Findings of ``text`` as the document ``uri``, for the fix loop."""
        return self.analyse(uri, text, None).findings

    def dependents(self, path: str) -> list[str]:
        """URIs of analysed documents that read ``path`` (other than itself)."""
        path = os.path.abspath(path)
        return [uri for uri, a in list(self.analyses.items()) if a.path != path and path in a.file_paths]

    def is_config(self, path: str) -> bool:
        return os.path.basename(path) == CONFIG_NAME
